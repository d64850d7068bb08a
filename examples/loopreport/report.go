package main

import (
	"encoding/json"
	"math"
	"strconv"
)

// number is a real result written to JSON as a number, or as null when it is
// infinite or does not exist (NaN).
type number float64

// MarshalJSON writes the shortest decimal that reads back to the same
// float64, or null for NaN and ±Inf.
func (x number) MarshalJSON() ([]byte, error) {
	v := float64(x)
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, v, 'g', -1, 64), nil
}

// complexNumber is a complex result, written as {"re": x, "im": y}.
type complexNumber struct {
	Re number `json:"re"`
	Im number `json:"im"`
}

func newComplex(c complex128) complexNumber {
	return complexNumber{Re: number(real(c)), Im: number(imag(c))}
}

func complexList(cs []complex128) []complexNumber {
	out := make([]complexNumber, len(cs))
	for i, c := range cs {
		out[i] = newComplex(c)
	}
	return out
}

// interval is [lo, hi]; an infinite end is null.
type interval [2]number

// report is the full analysis, the value printed by -json. Every section is
// present; a quantity that could not be computed is null and the reason is in
// Warnings.
type report struct {
	Name         string               `json:"name"`
	Description  string               `json:"description,omitempty"`
	Loop         loopText             `json:"loop"`
	OpenLoop     openLoopSection      `json:"open_loop"`
	ClosedLoop   closedLoopSection    `json:"closed_loop"`
	Locus        locusSection         `json:"locus"`
	Margins      marginsSection       `json:"margins"`
	Step         stepSection          `json:"step"`
	SteadyState  steadyStateSection   `json:"steady_state"`
	DiscreteLoop *discreteLoopSection `json:"discrete_loop,omitempty"`
	Requirements []requirementResult  `json:"requirements"`
	Warnings     []string             `json:"warnings"`
}

// loopText echoes the loop that was analysed, in the text form of tf.
type loopText struct {
	// Controller, Plant and Sensor are the expressions as written.
	Controller string `json:"controller"`
	Plant      string `json:"plant"`
	Sensor     string `json:"sensor"`
	// OpenLoopFactored is L as gain·∏(s − z)/∏(s − p), 4 significant
	// digits, for reading.
	OpenLoopFactored string `json:"open_loop_factored"`
	// OpenLoop is L = k·controller·plant·sensor at the nominal gain (and
	// parameter value), with dead time.
	OpenLoop      string  `json:"open_loop"`
	Gain          number  `json:"gain"`
	SampleTimeSec number  `json:"sample_time_sec"`
	DelaySec      number  `json:"delay_sec"`
	Parameter     *string `json:"parameter,omitempty"`
	// at is "k = 0.1" or "k = 0.1, Ki = 4": where margins and responses
	// are evaluated (for headings; not written to JSON).
	at string
}

type openLoopSection struct {
	Poles      []complexNumber `json:"poles"`
	Zeros      []complexNumber `json:"zeros"`
	StaticGain number          `json:"static_gain"`
}

type closedLoopSection struct {
	Poles  []complexNumber `json:"poles"`
	Stable *bool           `json:"stable"`
}

type angleAt struct {
	Pole     *complexNumber `json:"pole,omitempty"`
	Zero     *complexNumber `json:"zero,omitempty"`
	AngleDeg number         `json:"angle_deg"`
}

type breakPoint struct {
	S        complexNumber `json:"s"`
	Value    number        `json:"value"`
	Branches int           `json:"branches"`
}

type axisCrossing struct {
	FrequencyRadPerSec number        `json:"frequency_rad_per_sec"`
	Point              complexNumber `json:"point"`
	Value              number        `json:"value"`
}

type locusSection struct {
	Variable           string         `json:"variable"`
	Range              interval       `json:"range"`
	Centroid           number         `json:"centroid"`
	AsymptoteAnglesDeg []number       `json:"asymptote_angles_deg"`
	RealAxisSegments   []interval     `json:"real_axis_segments"`
	DepartureAngles    []angleAt      `json:"departure_angles"`
	ArrivalAngles      []angleAt      `json:"arrival_angles"`
	BreakPoints        []breakPoint   `json:"break_points"`
	AxisCrossings      []axisCrossing `json:"axis_crossings"`
	StableIntervals    []interval     `json:"stable_intervals"`
	Notes              []string       `json:"notes,omitempty"`
}

type crossover struct {
	FrequencyRadPerSec number `json:"frequency_rad_per_sec"`
	// Margin is the phase margin in degrees for a gain crossover and the
	// gain factor for a phase crossover.
	Margin number `json:"margin"`
	// MarginDB is the gain factor in dB (phase crossovers only).
	MarginDB *number `json:"margin_db,omitempty"`
}

type marginsSection struct {
	GainMargin                          number      `json:"gain_margin"`
	GainMarginDB                        number      `json:"gain_margin_db"`
	PhaseCrossoverRadPerSec             number      `json:"phase_crossover_rad_per_sec"`
	LowerGainMargin                     number      `json:"lower_gain_margin"`
	LowerGainMarginDB                   number      `json:"lower_gain_margin_db"`
	PhaseMarginDeg                      number      `json:"phase_margin_deg"`
	GainCrossoverRadPerSec              number      `json:"gain_crossover_rad_per_sec"`
	DelayMarginSec                      number      `json:"delay_margin_sec"`
	PeakSensitivity                     number      `json:"peak_sensitivity"`
	PeakSensitivityRadPerSec            number      `json:"peak_sensitivity_rad_per_sec"`
	PeakComplementarySensitivity        number      `json:"peak_complementary_sensitivity"`
	PeakComplementarySensitivityRadPerS number      `json:"peak_complementary_sensitivity_rad_per_sec"`
	BandwidthRadPerSec                  number      `json:"bandwidth_rad_per_sec"`
	ClosedLoopStable                    *bool       `json:"closed_loop_stable"`
	GainCrossovers                      []crossover `json:"gain_crossovers"`
	PhaseCrossovers                     []crossover `json:"phase_crossovers"`
}

type stepSection struct {
	RiseTimeSec     number `json:"rise_time_sec"`
	SettlingTimeSec number `json:"settling_time_sec"`
	OvershootPct    number `json:"overshoot_pct"`
	UndershootPct   number `json:"undershoot_pct"`
	Peak            number `json:"peak"`
	PeakTimeSec     number `json:"peak_time_sec"`
	FinalValue      number `json:"final_value"`
}

type steadyStateSection struct {
	SystemType           *int   `json:"system_type"`
	PositionConstant     number `json:"position_constant"`
	VelocityConstant     number `json:"velocity_constant"`
	AccelerationConstant number `json:"acceleration_constant"`
	StepError            number `json:"step_error"`
	RampError            number `json:"ramp_error"`
	ParabolaError        number `json:"parabola_error"`
}

type discreteLoopSection struct {
	Method        string   `json:"method"`
	SampleTimeSec number   `json:"sample_time_sec"`
	Num           []number `json:"num"`
	Den           []number `json:"den"`
}

type requirementResult struct {
	Name    string `json:"name"`
	Limit   number `json:"limit"`
	Value   number `json:"value"`
	Unit    string `json:"unit"`
	Pass    bool   `json:"pass"`
	Message string `json:"message"`
}

// nan is the value of a quantity that was not computed.
var nan = number(math.NaN())

// emptyReport returns a report whose every quantity is null and every list
// empty (not null), so that the JSON always carries every documented key.
func emptyReport() *report {
	return &report{
		OpenLoop:   openLoopSection{Poles: []complexNumber{}, Zeros: []complexNumber{}, StaticGain: nan},
		ClosedLoop: closedLoopSection{Poles: []complexNumber{}},
		Locus: locusSection{
			Range: interval{nan, nan}, Centroid: nan, AsymptoteAnglesDeg: []number{},
			RealAxisSegments: []interval{}, DepartureAngles: []angleAt{}, ArrivalAngles: []angleAt{},
			BreakPoints: []breakPoint{}, AxisCrossings: []axisCrossing{}, StableIntervals: []interval{},
		},
		Margins: marginsSection{
			GainMargin: nan, GainMarginDB: nan, PhaseCrossoverRadPerSec: nan, LowerGainMargin: nan,
			LowerGainMarginDB: nan, PhaseMarginDeg: nan, GainCrossoverRadPerSec: nan, DelayMarginSec: nan,
			PeakSensitivity: nan, PeakSensitivityRadPerSec: nan, PeakComplementarySensitivity: nan,
			PeakComplementarySensitivityRadPerS: nan, BandwidthRadPerSec: nan,
			GainCrossovers: []crossover{}, PhaseCrossovers: []crossover{},
		},
		Step: stepSection{RiseTimeSec: nan, SettlingTimeSec: nan, OvershootPct: nan, UndershootPct: nan,
			Peak: nan, PeakTimeSec: nan, FinalValue: nan},
		SteadyState: steadyStateSection{PositionConstant: nan, VelocityConstant: nan,
			AccelerationConstant: nan, StepError: nan, RampError: nan, ParabolaError: nan},
		Requirements: []requirementResult{},
		Warnings:     []string{},
	}
}

// marshalReport returns the report as indented JSON followed by a newline.
func marshalReport(r *report) ([]byte, error) {
	b, err := json.MarshalIndent(r, "", "  ")
	if err != nil {
		return nil, err
	}
	return append(b, '\n'), nil
}
