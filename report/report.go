package report

import (
	"encoding/json"
	"math"
	"strconv"
)

// Number is a real result written to JSON as a number, or as null when it is
// infinite or does not exist (NaN).
type Number float64

// MarshalJSON writes the shortest decimal that reads back to the same
// float64, or null for NaN and ±Inf.
func (x Number) MarshalJSON() ([]byte, error) {
	v := float64(x)
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, v, 'g', -1, 64), nil
}

// Complex is a complex result, written as {"re": x, "im": y}.
type Complex struct {
	// Re and Im are the real and imaginary parts.
	Re Number `json:"re"`
	Im Number `json:"im"`
}

func newComplex(c complex128) Complex {
	return Complex{Re: Number(real(c)), Im: Number(imag(c))}
}

func complexList(cs []complex128) []Complex {
	out := make([]Complex, len(cs))
	for i, c := range cs {
		out[i] = newComplex(c)
	}
	return out
}

// Interval is [lo, hi]; an infinite end is null.
type Interval [2]Number

// Report is the full analysis, the value printed by loopreport -json (its
// JSON form is this value's encoding/json form, see JSON). Every section is
// present; a quantity that could not be computed is null and the reason is
// in Warnings; an empty list means "computed: there is none".
type Report struct {
	// Name is the report's title.
	Name string `json:"name"`
	// Description is the loop file's description.
	Description string `json:"description,omitempty"`
	// Loop is the loop as analysed.
	Loop LoopText `json:"loop"`
	// OpenLoop, ClosedLoop, Locus, Margins, Step and SteadyState are
	// the sections of the pipeline, in order.
	OpenLoop    OpenLoopResult    `json:"open_loop"`
	ClosedLoop  ClosedLoopResult  `json:"closed_loop"`
	Locus       LocusResult       `json:"locus"`
	Margins     MarginsResult     `json:"margins"`
	Step        StepResult        `json:"step"`
	SteadyState SteadyStateResult `json:"steady_state"`
	// DiscreteLoop is the loop converted to z; nil without Discretize.
	DiscreteLoop *DiscreteLoopResult `json:"discrete_loop,omitempty"`
	// Requirements are the verdicts on the loop's requirements.
	Requirements []RequirementResult `json:"requirements"`
	// LoadDisturbance, ControlEffort and Noise are the whole loop's
	// metrics (closedloop.go); null when they could not be computed.
	LoadDisturbance *LoadDisturbanceResult `json:"load_disturbance"`
	ControlEffort   *ControlEffortResult   `json:"control_effort"`
	Noise           *NoiseResult           `json:"noise"`
	// Design is the set of values of the gain (or the parameter) that meet
	// each requirement (design.go); null without requirements.
	Design *DesignResult `json:"design"`
	// Plane is the D-partition of the loop file's "plane" (design.go);
	// null without it.
	Plane *PlaneResult `json:"plane"`
	// Robust is the loop over its uncertain parameters (robust.go); null
	// without the loop file's "uncertain" key.
	Robust *RobustResult `json:"robust"`
	// DeadTime is the closed loop with its dead time exact (deadtime.go);
	// null without a (non-negligible) dead time in s.
	DeadTime *DeadTimeResult `json:"dead_time"`
	// Warnings say, in sentences, what could not be computed and why,
	// and what was approximated.
	Warnings []string `json:"warnings"`

	// Figures are the plots, drawn when Settings.Plots is set; they are
	// not part of the JSON form.
	Figures []Figure `json:"-"`
}

// LoopText echoes the loop that was analysed, in the text form of tf.
type LoopText struct {
	// Controller, Plant and Sensor are the expressions as written.
	Controller string `json:"controller"`
	Plant      string `json:"plant"`
	Sensor     string `json:"sensor"`
	// OpenLoopFactored is L as gain·∏(s − z)/∏(s − p), 4 significant
	// digits, for reading.
	OpenLoopFactored string `json:"open_loop_factored"`
	// OpenLoop is L = k·controller·plant·sensor at the nominal gain (and
	// parameter value), with dead time.
	OpenLoop string `json:"open_loop"`
	// Gain is the nominal loop gain k.
	Gain Number `json:"gain"`
	// SampleTimeSec is the sample time of L in seconds; 0 in continuous time.
	SampleTimeSec Number `json:"sample_time_sec"`
	// DelaySec is the dead time of L in seconds.
	DelaySec Number `json:"delay_sec"`
	// Parameter says the parameter, its value and range; nil without one.
	Parameter *string `json:"parameter,omitempty"`
	// at is "k = 0.1" or "k = 0.1, Ki = 4": where margins and responses
	// are evaluated (for headings; not written to JSON).
	at string
}

// DiscreteLoopResult is the "discrete_loop" section: the loop converted to
// z, written with a monic denominator, coefficients highest power first.
type DiscreteLoopResult struct {
	// Method is the conversion of the loop file ("zoh", ...).
	Method string `json:"method"`
	// SampleTimeSec is the sample time in seconds.
	SampleTimeSec Number `json:"sample_time_sec"`
	// Num and Den are the coefficients of L in z.
	Num []Number `json:"num"`
	Den []Number `json:"den"`
}

// nan is the value of a quantity that was not computed.
var nan = Number(math.NaN())

// emptyReport returns a report whose every quantity and list is null (not
// computed), except requirements and warnings, which are empty lists, so
// that the JSON always carries every documented key. A section that
// computes a list sets it, empty when there is nothing: [] means
// "computed: there is none", null "not computed" (the warnings say why).
func emptyReport() *Report {
	return &Report{
		OpenLoop: OpenLoopResult{StaticGain: nan},
		Locus: LocusResult{
			Range: Interval{nan, nan}, Centroid: nan,
		},
		Margins: MarginsResult{
			GainMargin: nan, GainMarginDB: nan, PhaseCrossoverRadPerSec: nan, LowerGainMargin: nan,
			LowerGainMarginDB: nan, PhaseMarginDeg: nan, GainCrossoverRadPerSec: nan, DelayMarginSec: nan,
			PeakSensitivity: nan, PeakSensitivityRadPerSec: nan, PeakComplementarySensitivity: nan,
			PeakComplementarySensitivityRadPerS: nan, BandwidthRadPerSec: nan,
		},
		Step: StepResult{RiseTimeSec: nan, SettlingTimeSec: nan, OvershootPct: nan, UndershootPct: nan,
			Peak: nan, PeakTimeSec: nan, FinalValue: nan},
		SteadyState: SteadyStateResult{PositionConstant: nan, VelocityConstant: nan,
			AccelerationConstant: nan, StepError: nan, RampError: nan, ParabolaError: nan},
		Requirements: []RequirementResult{},
		Warnings:     []string{},
	}
}

// JSON returns the report as indented JSON followed by a newline: the
// output of loopreport -json.
func (r *Report) JSON() ([]byte, error) {
	b, err := json.MarshalIndent(r, "", "  ")
	if err != nil {
		return nil, err
	}
	return append(b, '\n'), nil
}
