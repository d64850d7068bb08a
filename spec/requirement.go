package spec

import (
	"fmt"
	"math"
	"strconv"
)

// quantity names what a requirement limits.
type quantity int

const (
	invalidQuantity quantity = iota
	phaseMargin
	gainMargin
	delayMargin
	peakSensitivity
	dampingRatio
	overshoot
	riseTime
	settlingTime
	steadyStateError
	disturbancePeak
	recoveryTime
	controlPeak
	integratedAbsoluteError
	noiseToControlGain
	lastQuantity = noiseToControlGain
)

// quantityInfo describes a quantity in words.
type quantityInfo struct {
	key     string // loop-file key of the requirement
	what    string // "phase margin"
	unit    string // "°", " dB", " s", "%" or ""
	minimum bool   // the limit is a minimum (else a maximum)
}

var quantities = map[quantity]quantityInfo{
	phaseMargin:             {"min_phase_margin_deg", "phase margin", "°", true},
	gainMargin:              {"min_gain_margin_db", "gain margin", " dB", true},
	delayMargin:             {"min_delay_margin_sec", "delay margin", " s", true},
	peakSensitivity:         {"max_peak_sensitivity", "peak sensitivity", "", false},
	dampingRatio:            {"min_damping_ratio", "damping ratio of the closed-loop poles", "", true},
	overshoot:               {"max_overshoot_pct", "step-response overshoot", " %", false},
	riseTime:                {"max_rise_time_sec", "step-response rise time (10 % to 90 %)", " s", false},
	settlingTime:            {"max_settling_time_sec", "step-response settling time (2 % band)", " s", false},
	steadyStateError:        {"max_steady_state_error", "steady-state error to a unit step", "", false},
	disturbancePeak:         {"max_disturbance_peak", "peak output deviation after a unit load-disturbance step", "", false},
	recoveryTime:            {"max_recovery_time_sec", "recovery time after a unit load-disturbance step (2 % of the peak deviation)", " s", false},
	controlPeak:             {"max_control_peak", "peak control signal after a unit reference step", "", false},
	integratedAbsoluteError: {"max_integrated_absolute_error", "integrated absolute error after a unit load-disturbance step", " s", false},
	noiseToControlGain:      {"max_noise_to_control_gain", "gain from measurement noise to the control signal (largest over frequency)", "", false},
}

// Requirement is one limit on a quantity of the loop. Make it with
// MinPhaseMarginDeg, MinGainMarginDB, MinDelayMarginSec,
// MaxPeakSensitivity, MinDampingRatio, MaxOvershootPct, MaxRiseTimeSec,
// MaxSettlingTimeSec or MaxSteadyStateError; the zero value is not a valid
// requirement and fails when checked.
type Requirement struct {
	q     quantity
	limit float64
}

// Requirements is a list of requirements, checked in order by Check.
type Requirements []Requirement

// MinPhaseMarginDeg requires a phase margin of at least deg degrees.
func MinPhaseMarginDeg(deg float64) Requirement { return Requirement{phaseMargin, deg} }

// MinGainMarginDB requires a gain margin of at least db decibels: the loop
// gain may rise by the factor 10^(db/20) before the closed loop becomes
// unstable.
func MinGainMarginDB(db float64) Requirement { return Requirement{gainMargin, db} }

// MinDelayMarginSec requires that the closed loop tolerate at least sec
// seconds of additional dead time.
func MinDelayMarginSec(sec float64) Requirement { return Requirement{delayMargin, sec} }

// MaxPeakSensitivity requires Ms = max|1/(1 + L(jω))| ≤ ms (a ratio, not
// dB); 1/Ms is the shortest distance of the Nyquist curve from −1.
func MaxPeakSensitivity(ms float64) Requirement { return Requirement{peakSensitivity, ms} }

// MinDampingRatio requires every closed-loop pole to have a damping ratio
// of at least zeta; with dead time, every dominant closed-loop root (see
// the package documentation for discrete poles and dead time).
func MinDampingRatio(zeta float64) Requirement { return Requirement{dampingRatio, zeta} }

// MaxOvershootPct requires the closed-loop step response to overshoot its
// final value by at most pct per cent.
func MaxOvershootPct(pct float64) Requirement { return Requirement{overshoot, pct} }

// MaxRiseTimeSec requires the closed-loop step response to rise from 10 %
// to 90 % of its final value in at most sec seconds.
func MaxRiseTimeSec(sec float64) Requirement { return Requirement{riseTime, sec} }

// MaxSettlingTimeSec requires the closed-loop step response to enter and
// stay in the band of ±2 % around its final value within sec seconds.
func MaxSettlingTimeSec(sec float64) Requirement { return Requirement{settlingTime, sec} }

// MaxDisturbancePeak requires the output's largest deviation after a unit
// step of load disturbance at the plant input to be at most peak (in
// output units per unit of disturbance). It needs the loop's parts
// (Settings.Loop); see closedloop.StepDeviation.
func MaxDisturbancePeak(peak float64) Requirement { return Requirement{disturbancePeak, peak} }

// MaxRecoveryTimeSec requires the output to be back, for good, within 2 % of
// the peak deviation around its final value at most sec seconds after a
// unit load-disturbance step (the 2 % band is common practice). It needs
// Settings.Loop.
func MaxRecoveryTimeSec(sec float64) Requirement { return Requirement{recoveryTime, sec} }

// MaxControlPeak requires the largest |u| after a unit reference step to
// be at most peak (control-signal units per unit of reference), the figure
// that sizes the actuator against saturation. It needs Settings.Loop.
func MaxControlPeak(peak float64) Requirement { return Requirement{controlPeak, peak} }

// MaxIntegratedAbsoluteError requires IAE = ∫|y| dt of the output after a
// unit load-disturbance step to be at most iae (output units × seconds per
// unit of disturbance; written with the unit "s"). It needs Settings.Loop.
func MaxIntegratedAbsoluteError(iae float64) Requirement {
	return Requirement{integratedAbsoluteError, iae}
}

// MaxNoiseToControlGain requires max over ω of |noise → u| — the largest
// gain with which measurement noise reaches the actuator, at least the
// high-frequency gain — to be at most gain (a ratio, not dB). It needs
// Settings.Loop.
func MaxNoiseToControlGain(gain float64) Requirement { return Requirement{noiseToControlGain, gain} }

// MaxSteadyStateError requires the steady-state error to a unit step,
// 1/(1 + Kp), to be at most e (a fraction of the step, not per cent).
func MaxSteadyStateError(e float64) Requirement { return Requirement{steadyStateError, e} }

// ByKey returns the requirement named by key with the given limit. The
// keys are those of the loop file of examples/loopreport:
// "min_phase_margin_deg", "min_gain_margin_db", "min_delay_margin_sec",
// "max_peak_sensitivity", "min_damping_ratio", "max_overshoot_pct",
// "max_rise_time_sec", "max_settling_time_sec", "max_steady_state_error",
// "max_disturbance_peak", "max_recovery_time_sec", "max_control_peak",
// "max_integrated_absolute_error", "max_noise_to_control_gain".
// It returns ErrInvalidRequirement for an unknown key and for a limit the
// quantity cannot have (a negative overshoot, a phase margin outside
// [0°, 180°], a non-finite number, ...).
func ByKey(key string, limit float64) (Requirement, error) {
	for q := phaseMargin; q <= lastQuantity; q++ {
		if quantities[q].key == key {
			r := Requirement{q, limit}
			return r, r.valid()
		}
	}
	return Requirement{}, fmt.Errorf("%w: unknown key %q", ErrInvalidRequirement, key)
}

// Keys returns the keys ByKey accepts, in the order of the constructors.
func Keys() []string {
	out := make([]string, 0, len(quantities))
	for q := phaseMargin; q <= lastQuantity; q++ {
		out = append(out, quantities[q].key)
	}
	return out
}

// Key returns the requirement's key ("min_phase_margin_deg"), or "" for the
// zero value.
func (r Requirement) Key() string { return quantities[r.q].key }

// Limit returns the limit in the unit of the requirement's name.
func (r Requirement) Limit() float64 { return r.limit }

// Unit returns the unit of the limit and of the measured value as written
// after a number: "°", "dB", "s", "%", or "" for a ratio.
func (r Requirement) Unit() string {
	u := quantities[r.q].unit
	if len(u) > 0 && u[0] == ' ' {
		return u[1:]
	}
	return u
}

// NeedsLoopParts reports whether the requirement is measured on the loop's
// parts (plant and controller apart, Settings.Loop): the load-disturbance,
// control-signal and noise requirements. Judged on a loop transfer
// function alone, such a requirement cannot be measured.
func (r Requirement) NeedsLoopParts() bool {
	return r.q >= disturbancePeak && r.q <= noiseToControlGain
}

// Name returns the requirement in words: "minimum phase margin".
func (r Requirement) Name() string {
	info, ok := quantities[r.q]
	if !ok {
		return "invalid requirement"
	}
	if info.minimum {
		return "minimum " + info.what
	}
	return "maximum " + info.what
}

// String returns the requirement with its limit: "phase margin at least
// 45°".
func (r Requirement) String() string {
	info, ok := quantities[r.q]
	if !ok {
		return "invalid requirement"
	}
	bound := "at most"
	if info.minimum {
		bound = "at least"
	}
	return fmt.Sprintf("%s %s %s", info.what, bound, withUnit(r.limit, info.unit))
}

// valid reports whether the requirement can be checked, with the reason.
func (r Requirement) valid() error {
	if _, ok := quantities[r.q]; !ok {
		return fmt.Errorf("%w: the zero Requirement; make requirements with MinPhaseMarginDeg and the other functions of package spec", ErrInvalidRequirement)
	}
	if math.IsNaN(r.limit) || math.IsInf(r.limit, 0) {
		return fmt.Errorf("%w: %s has the limit %v; a limit must be a finite number", ErrInvalidRequirement, r.Name(), r.limit)
	}
	if lo, hi, open, words := limitRange(r.q); r.limit < lo || r.limit > hi || (open && r.limit == lo) {
		return fmt.Errorf("%w: %s has the limit %s; %s", ErrInvalidRequirement, r.Name(), num(r.limit), words)
	}
	return nil
}

// limitRange returns the limits a requirement on q can meaningfully have:
// [lo, hi], or (lo, hi] when open, and the range in words. The ranges are
// those of the quantities themselves: a phase margin lies in (−180°, 180°]
// and is a safety margin only when positive; a gain or delay margin, an
// overshoot, a peak sensitivity, a time and a steady-state error are never
// negative; the damping ratio of a stable pole lies in (0, 1].
func limitRange(q quantity) (lo, hi float64, open bool, words string) {
	switch q {
	case phaseMargin:
		return 0, 180, false, "a minimum phase margin lies between 0° and 180°"
	case gainMargin:
		return 0, math.MaxFloat64, false, "a minimum gain margin is 0 dB or more"
	case delayMargin:
		return 0, math.MaxFloat64, false, "a minimum delay margin is 0 s or more"
	case peakSensitivity:
		return 0, math.MaxFloat64, false, "a maximum peak sensitivity is a ratio of 0 or more (not dB)"
	case dampingRatio:
		return 0, 1, false, "a minimum damping ratio lies between 0 and 1"
	case overshoot:
		return 0, math.MaxFloat64, false, "a maximum overshoot is 0 % or more"
	case riseTime:
		return 0, math.MaxFloat64, false, "a maximum rise time is 0 s or more"
	case settlingTime:
		return 0, math.MaxFloat64, false, "a maximum settling time is 0 s or more"
	case steadyStateError:
		return 0, math.MaxFloat64, false, "a maximum steady-state error is 0 or more (a fraction of the step)"
	case disturbancePeak:
		return 0, math.MaxFloat64, false, "a maximum disturbance peak is 0 or more (output per unit disturbance)"
	case recoveryTime:
		return 0, math.MaxFloat64, false, "a maximum recovery time is 0 s or more"
	case controlPeak:
		return 0, math.MaxFloat64, false, "a maximum control peak is 0 or more (control signal per unit reference)"
	case integratedAbsoluteError:
		return 0, math.MaxFloat64, false, "a maximum integrated absolute error is 0 or more"
	case noiseToControlGain:
		return 0, math.MaxFloat64, false, "a maximum noise-to-control gain is a ratio of 0 or more (not dB)"
	}
	return math.Inf(-1), math.Inf(1), false, ""
}

// num formats x with 4 significant digits for messages.
func num(x float64) string {
	switch {
	case math.IsInf(x, 1):
		return "infinite"
	case math.IsInf(x, -1):
		return "minus infinite"
	case math.IsNaN(x):
		return "undefined"
	}
	return strconv.FormatFloat(x, 'g', 4, 64)
}

func withUnit(x float64, unit string) string {
	if math.IsInf(x, 0) || math.IsNaN(x) {
		return num(x)
	}
	return num(x) + unit
}
