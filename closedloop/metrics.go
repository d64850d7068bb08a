package closedloop

import (
	"errors"
	"fmt"
	"math"

	"github.com/loopwise/loopwise/tf"
)

// StepDeviation describes the response of an output to a unit step of an
// input that should be rejected (a load disturbance at the plant input).
// Times are in seconds from the step; values are in the output's unit per
// unit step.
type StepDeviation struct {
	// PeakDeviation is the value of the response of largest magnitude
	// (signed), and PeakTimeSec its time; for a response that creeps
	// monotonically to its final value they are FinalValue and +Inf (the
	// supremum, approached as t → ∞).
	PeakDeviation, PeakTimeSec float64
	// RecoveryTimeSec is the last time the output is
	// RecoveryBandFraction·|PeakDeviation| away from its final value; after
	// it the output stays within that band. 0 when it never leaves the band.
	RecoveryTimeSec float64
	// FinalValue is the residual offset y(∞) (exact, the static gain): 0
	// with integral action in the controller.
	FinalValue float64
	// IntegratedAbsoluteError is ∫|y| dt, IntegratedSquaredError ∫y² dt and
	// IntegratedTimeAbsoluteError ∫t·|y| dt over [0, ∞): the integral
	// criteria of the deviation (+Inf with a residual offset).
	IntegratedAbsoluteError, IntegratedSquaredError, IntegratedTimeAbsoluteError float64
	// AbsoluteErrorBound and TimeAbsoluteErrorBound bound the errors of the
	// two integrals above (see ErrorIntegrals).
	AbsoluteErrorBound, TimeAbsoluteErrorBound float64
}

// ControlEffort describes the control signal u after a unit step of one
// input.
type ControlEffort struct {
	// InitialValue is u(0+), the proportional and derivative kick (the
	// direct feedthrough of the function; in discrete time u[0]).
	InitialValue float64
	// PeakValue is the value of u of largest magnitude (signed) and
	// PeakTimeSec its time (FinalValue and +Inf when |u| creeps
	// monotonically up to its final value).
	PeakValue, PeakTimeSec float64
	// FinalValue is u(∞), exact.
	FinalValue float64
}

// IntegralCriteria are the integral criteria of an error signal that tends
// to zero, for a unit step input.
type IntegralCriteria struct {
	// IntegratedAbsoluteError is IAE = ∫|e| dt, IntegratedSquaredError
	// ISE = ∫e² dt, IntegratedTimeAbsoluteError ITAE = ∫t·|e| dt, each
	// over [0, ∞); +Inf when e does not tend to 0.
	IntegratedAbsoluteError, IntegratedSquaredError, IntegratedTimeAbsoluteError float64
	// AbsoluteErrorBound and TimeAbsoluteErrorBound bound the absolute
	// errors of IAE and ITAE (ISE is exact up to the rounding of the
	// Lyapunov solve).
	AbsoluteErrorBound, TimeAbsoluteErrorBound float64
}

// NoiseGains describe how measurement noise reaches the actuator and the
// output.
type NoiseGains struct {
	// ToControlH2 and ToOutputH2 are the H2 norms of noise → u and
	// noise → y: the standard deviation of the signal for unit-intensity
	// white noise (continuous; +Inf when the function has a direct
	// feedthrough) or unit-variance white noise (discrete, per sample).
	ToControlH2, ToOutputH2 float64
	// ToControlHighFrequencyGain is lim |noise → u| as ω → ∞ (continuous:
	// the direct feedthrough, +Inf for an improper controller) or at the
	// Nyquist frequency π/T (discrete): the gain with which sensor noise
	// above the loop's bandwidth reaches the actuator.
	ToControlHighFrequencyGain float64
}

// FrequencyPeak is the largest magnitude of a closed-loop function over
// frequency.
type FrequencyPeak struct {
	// Value is max |F(jω)| (a ratio, not dB).
	Value float64
	// FrequencyRadPerSec is where it is reached (0 at zero frequency, +Inf
	// for a limit approached as ω → ∞).
	FrequencyRadPerSec float64
}

// Metrics gathers the metrics of the whole loop for unit steps.
type Metrics struct {
	// LoadDisturbance is the output's response to a unit load-disturbance
	// step at the plant input.
	LoadDisturbance StepDeviation
	// ReferenceControl and LoadControl are the control signal after a unit
	// reference step and a unit load-disturbance step.
	ReferenceControl, LoadControl ControlEffort
	// ReferenceError holds the integral criteria of e = r − y after a unit
	// reference step.
	ReferenceError IntegralCriteria
	// Noise holds the noise gains.
	Noise NoiseGains
	// LoadToOutputPeak is max |G·S| and NoiseToControlPeak max |C·S| (with
	// the loop gain k and sensor included) over frequency.
	LoadToOutputPeak, NoiseToControlPeak FrequencyPeak
	// SensitivityPeak and ComplementaryPeak are Ms = max |S| and
	// Mt = max |T| for comparison on the same page.
	SensitivityPeak, ComplementaryPeak FrequencyPeak
}

func (fs *Functions) requireStable() error {
	if fs.InternallyStable {
		return nil
	}
	msg := fmt.Sprintf("closed-loop poles %v", fs.UnstablePoles)
	if len(fs.HiddenModes) > 0 {
		msg += fmt.Sprintf(", of which %v are hidden by a pole–zero cancellation between the parts", fs.HiddenModes)
	}
	return fmt.Errorf("%w: %s", ErrInternallyUnstable, msg)
}

// StepDeviation returns the response of the output `to` to a unit step of
// the input `from`, with the recovery band of set (nil = defaults). The
// peak and recovery times are located on the exact continuous response
// (relative accuracy about 1e-13, see the package documentation).
//
// Errors: ErrInternallyUnstable; ErrImproper; ErrSettings.
func (fs *Functions) StepDeviation(from Input, to Output, set *Settings) (StepDeviation, error) {
	_, _, band, err := set.resolve()
	if err != nil {
		return StepDeviation{}, err
	}
	if err := fs.requireStable(); err != nil {
		return StepDeviation{}, err
	}
	if fs.loopDelay() > 0 {
		return fs.delayedDeviation(from, to, band)
	}
	g := fs.fns[from][to].TF
	tr, err := newTrajectory(g, true)
	if err != nil {
		return StepDeviation{}, fmt.Errorf("%v → %v: %w", from, to, err)
	}
	d := deviation(tr, tr.final, band)
	c, err := fs.criteria(g, tr)
	if err != nil {
		return StepDeviation{}, fmt.Errorf("%v → %v: %w", from, to, err)
	}
	d.IntegratedAbsoluteError, d.IntegratedSquaredError, d.IntegratedTimeAbsoluteError = c.IntegratedAbsoluteError, c.IntegratedSquaredError, c.IntegratedTimeAbsoluteError
	d.AbsoluteErrorBound, d.TimeAbsoluteErrorBound = c.AbsoluteErrorBound, c.TimeAbsoluteErrorBound
	return d, nil
}

// ControlEffort returns the control signal after a unit step of the input
// from. Errors: ErrInternallyUnstable; ErrImproper when the controller has
// an unfiltered derivative (u then contains an impulse: add a derivative
// filter).
func (fs *Functions) ControlEffort(from Input) (ControlEffort, error) {
	if err := fs.requireStable(); err != nil {
		return ControlEffort{}, err
	}
	if fs.loopDelay() > 0 {
		d, err := fs.delayedStep(from, Control)
		if err != nil {
			return ControlEffort{}, fmt.Errorf("%v → control signal: %w", from, err)
		}
		var c ControlEffort
		c.InitialValue = d.initial()
		c.PeakValue, c.PeakTimeSec = d.peak()
		c.FinalValue = d.final
		return c, nil
	}
	g := fs.fns[from][Control].TF
	tr, err := newTrajectory(g, false)
	if err != nil {
		return ControlEffort{}, fmt.Errorf("%v → control signal: %w", from, err)
	}
	var c ControlEffort
	c.InitialValue = tr.pts[0].y
	c.PeakValue, c.PeakTimeSec = tr.peak()
	c.FinalValue = tr.final
	return c, nil
}

// ErrorIntegrals returns IAE, ISE and ITAE of the error e = r − y after a
// unit step of the input from (for the reference: the tracking error; for
// a disturbance: −y).
//
// ISE is exact: e(t) is the impulse response of E(s)/s (discrete: the
// staircase of E(z)·z/(z − 1), times T), whose energy is a Lyapunov
// equation (see h2Squared). IAE and ITAE integrate the exact response
// between its zero crossings with running integrals carried in the state
// (see the package documentation), with the stated bounds.
func (fs *Functions) ErrorIntegrals(from Input) (IntegralCriteria, error) {
	if err := fs.requireStable(); err != nil {
		return IntegralCriteria{}, err
	}
	if fs.loopDelay() > 0 {
		d, err := fs.delayedStep(from, Error)
		if err != nil {
			return IntegralCriteria{}, fmt.Errorf("%v → error: %w", from, err)
		}
		var c IntegralCriteria
		c.IntegratedAbsoluteError, c.IntegratedTimeAbsoluteError, c.IntegratedSquaredError, c.AbsoluteErrorBound, c.TimeAbsoluteErrorBound = d.integrals()
		return c, nil
	}
	g := fs.fns[from][Error].TF
	tr, err := newTrajectory(g, true)
	if err != nil {
		return IntegralCriteria{}, fmt.Errorf("%v → error: %w", from, err)
	}
	return fs.criteria(g, tr)
}

func (fs *Functions) criteria(g tf.TF, tr *trajectory) (IntegralCriteria, error) {
	var c IntegralCriteria
	var err error
	c.IntegratedAbsoluteError, c.IntegratedTimeAbsoluteError, c.AbsoluteErrorBound, c.TimeAbsoluteErrorBound, err = tr.integrals()
	if err != nil {
		return c, err
	}
	if math.IsInf(c.IntegratedAbsoluteError, 1) {
		c.IntegratedSquaredError = math.Inf(1)
		return c, nil
	}
	c.IntegratedSquaredError, err = stepEnergy(g)
	return c, err
}

// stepEnergy returns ∫ y² dt of the unit-step response y of g, whose final
// value is 0: the squared H2 norm of g/s (discrete: T·‖g·z/(z − 1)‖₂²).
func stepEnergy(g tf.TF) (float64, error) {
	ts := g.SampleTimeSec()
	integ, _ := tf.NewDiscrete([]float64{1}, []float64{1, 0}, ts) // 1/s
	if ts > 0 {
		integ, _ = tf.NewDiscrete([]float64{1, 0}, []float64{1, -1}, ts) // z/(z − 1)
	}
	w, err := g.WithoutDelay().Series(integ)
	if err != nil {
		return math.NaN(), fmt.Errorf("%w: %v", ErrNumerical, err)
	}
	w, _, err = w.Minimal(0)
	if err != nil {
		return math.NaN(), fmt.Errorf("%w: %v", ErrNumerical, err)
	}
	// What is left of the integrator must be gone: a pole at 0 (1) means a
	// nonzero final value, which the caller excluded up to rounding.
	v, err := h2Squared(w)
	if ts > 0 {
		v *= ts
	}
	return v, err
}

// located is a step response whose peak and band exit are located:
// trajectory (rational) or delayedResponse (exact dead time).
type located interface {
	peak() (value, timeSec float64)
	lastExit(level float64) float64
}

// deviation fills the peak, final value and recovery time of a
// StepDeviation from r.
func deviation(r located, final, band float64) StepDeviation {
	var d StepDeviation
	d.PeakDeviation, d.PeakTimeSec = r.peak()
	d.FinalValue = final
	if d.PeakDeviation == 0 {
		d.PeakTimeSec = 0
	} else {
		d.RecoveryTimeSec = r.lastExit(band * math.Abs(d.PeakDeviation))
	}
	return d
}

// delayedDeviation is StepDeviation for a continuous loop with dead time,
// on the exact delayed response (delayed.go).
func (fs *Functions) delayedDeviation(from Input, to Output, band float64) (StepDeviation, error) {
	d, err := fs.delayedStep(from, to)
	if err != nil {
		return StepDeviation{}, fmt.Errorf("%v → %v: %w", from, to, err)
	}
	s := deviation(d, d.final, band)
	s.IntegratedAbsoluteError, s.IntegratedTimeAbsoluteError, s.IntegratedSquaredError, s.AbsoluteErrorBound, s.TimeAbsoluteErrorBound = d.integrals()
	return s, nil
}

// NoiseGains returns the noise gains. Errors: ErrInternallyUnstable.
func (fs *Functions) NoiseGains() (NoiseGains, error) {
	if err := fs.requireStable(); err != nil {
		return NoiseGains{}, err
	}
	var ng NoiseGains
	var err error
	nu := fs.fns[Noise][Control].TF
	if !nu.IsProper() {
		ng.ToControlH2, ng.ToControlHighFrequencyGain = math.Inf(1), math.Inf(1)
	} else {
		if ng.ToControlH2, err = h2Squared(nu); err != nil {
			return ng, err
		}
		ng.ToControlH2 = math.Sqrt(ng.ToControlH2)
		ng.ToControlHighFrequencyGain = highFrequencyGain(nu)
	}
	if ng.ToOutputH2, err = h2Squared(fs.fns[Noise][ProcessOutput].TF); err != nil {
		return ng, err
	}
	ng.ToOutputH2 = math.Sqrt(ng.ToOutputH2)
	return ng, nil
}

// highFrequencyGain returns lim_{ω→∞} |g(jω)| of a proper continuous g,
// or |g(−1)| of a discrete one.
func highFrequencyGain(g tf.TF) float64 {
	if g.IsDiscrete() {
		return math.Abs(g.Num().Eval(-1) / g.Den().Eval(-1))
	}
	if g.IsStrictlyProper() {
		return 0
	}
	return math.Abs(g.GainFactor())
}

// Analyze returns every metric of Metrics for the loop. Errors:
// ErrInternallyUnstable (with the unstable and hidden poles named);
// ErrImproper (a controller with an unfiltered derivative); ErrSettings.
func (fs *Functions) Analyze(set *Settings) (Metrics, error) {
	var m Metrics
	var err error
	if err = fs.requireStable(); err != nil {
		return m, err
	}
	var errs []error
	keep := func(e error) {
		if e != nil {
			errs = append(errs, e)
		}
	}
	m.LoadDisturbance, err = fs.StepDeviation(LoadDisturbance, ProcessOutput, set)
	keep(err)
	m.ReferenceControl, err = fs.ControlEffort(Reference)
	keep(err)
	m.LoadControl, err = fs.ControlEffort(LoadDisturbance)
	keep(err)
	m.ReferenceError, err = fs.ErrorIntegrals(Reference)
	keep(err)
	m.Noise, err = fs.NoiseGains()
	keep(err)
	m.LoadToOutputPeak, err = fs.Peak(LoadDisturbance, ProcessOutput)
	keep(err)
	m.NoiseToControlPeak, err = fs.Peak(Noise, Control)
	keep(err)
	m.SensitivityPeak, err = fs.Peak(OutputDisturbance, ProcessOutput)
	keep(err)
	m.ComplementaryPeak, err = fs.Peak(LoadDisturbance, Control)
	keep(err)
	return m, errors.Join(errs...)
}
