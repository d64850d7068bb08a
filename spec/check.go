package spec

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"github.com/loopwise/loopwise/closedloop"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
)

// Settings controls Check. A nil *Settings means the defaults.
type Settings struct {
	// PadeOrder is the order of the Padé approximation of dead time used
	// for the closed-loop poles (damping ratio) and the step metrics of a
	// continuous loop with dead time, 1 to 20. If zero, defaults to 6.
	PadeOrder int
	// ReferenceToOutput is the closed loop from reference to output whose
	// poles (damping ratio) and step response are judged, for a loop whose
	// feedback path is not 1: with L = F·H (F forward path, H sensor), it
	// is F/(1 + L). Dead time in it is replaced as in the loop. If zero
	// (the zero TF), defaults to L/(1 + L).
	ReferenceToOutput tf.TF
	// PadeDeadTime asks for the Padé approximation of dead time (of
	// PadeOrder) for the damping ratio and the step metrics of a
	// continuous loop even where the dead time can be kept exact. If false
	// (the default), they use the exact closed-loop roots over the dominant
	// set and the exact delayed step response (see the package
	// documentation).
	PadeDeadTime bool
	// DominantFactor is the factor F of the dominant set of a loop with
	// dead time: every exact closed-loop root with Re s > F·Re s₁ (s₁ the
	// rightmost root) is judged, > 1 and at most 1000. If zero, defaults
	// to 5.
	DominantFactor float64
	// DominantCrossoverMultiple is the multiple M of the dominant set: every
	// exact closed-loop root with Re s > −M·ω_c (ω_c the highest gain
	// crossover in rad/s) is judged as well, > 0 and at most 1000. If zero,
	// defaults to 3.
	DominantCrossoverMultiple float64
	// Loop gives the loop's parts (plant, controller, sensor, prefilter),
	// which the requirements on load disturbance, control effort and noise
	// need (MaxDisturbancePeak, MaxRecoveryTimeSec, MaxControlPeak,
	// MaxIntegratedAbsoluteError, MaxNoiseToControlGain); they are analysed
	// by package closedloop. If its Plant is the zero value, those
	// requirements fail with a message saying so.
	Loop closedloop.Loop
	// Margins, if not nil, is margins.Compute(loop, nil) of the very loop
	// being checked, already computed by the caller (a sampling loop that
	// also records the margins); the margin requirements and the stability
	// verdicts use it instead of computing it again. It must belong to
	// the loop: spec cannot tell.
	Margins *margins.Result
}

const defaultPadeOrder = 6 // the default of package locus as well

// Result is the verdict on one requirement.
type Result struct {
	// Requirement is the requirement checked.
	Requirement Requirement
	// Name is the requirement in words ("minimum phase margin").
	Name string
	// Limit is the requirement's limit, in the unit of its name.
	Limit float64
	// Value is the measured value in the same unit: NaN when it could not
	// be measured or does not exist, ±Inf when it is infinite.
	Value float64
	// Pass reports whether the requirement is met.
	Pass bool
	// Message is a sentence in full words: the measured value, the limit,
	// the verdict, and the reason when the value could not be measured.
	Message string
	// Err is non-nil when the value could not be measured (with the reason,
	// wrapping the analysis package's error) or the requirement is
	// invalid; the result then fails.
	Err error
}

// Report holds one Result per requirement, in the order of the
// Requirements checked.
type Report struct {
	Results []Result
}

// Passed reports whether every requirement is met.
func (r Report) Passed() bool {
	for _, x := range r.Results {
		if !x.Pass {
			return false
		}
	}
	return true
}

// Failures returns the results that did not pass, in order.
func (r Report) Failures() []Result {
	var out []Result
	for _, x := range r.Results {
		if !x.Pass {
			out = append(out, x)
		}
	}
	return out
}

// Err returns nil when every requirement is met, and otherwise a
// *FailureError listing every failure, which matches ErrNotMet with
// errors.Is (and ErrInvalidRequirement when a requirement was invalid).
func (r Report) Err() error {
	f := r.Failures()
	if len(f) == 0 {
		return nil
	}
	return &FailureError{Failures: f, Checked: len(r.Results)}
}

// String lists every verdict on its own line.
func (r Report) String() string {
	var b strings.Builder
	for _, x := range r.Results {
		verdict := "pass"
		if !x.Pass {
			verdict = "FAIL"
		}
		fmt.Fprintf(&b, "%s: %s\n", verdict, x.Message)
	}
	return b.String()
}

// FailureError is the error of Report.Err: the requirements not met.
type FailureError struct {
	// Failures are the results that did not pass.
	Failures []Result
	// Checked is the number of requirements checked.
	Checked int
}

// Error lists every failure, one per line.
func (e *FailureError) Error() string {
	var b strings.Builder
	fmt.Fprintf(&b, "spec: %d of %d requirements not met:", len(e.Failures), e.Checked)
	for _, f := range e.Failures {
		b.WriteString("\n  - ")
		b.WriteString(f.Message)
	}
	return b.String()
}

// Is reports whether target is ErrNotMet, or ErrInvalidRequirement when a
// failure comes from an invalid requirement.
func (e *FailureError) Is(target error) bool {
	if target == ErrNotMet {
		return true
	}
	for _, f := range e.Failures {
		if f.Err != nil && errors.Is(f.Err, target) {
			return true
		}
	}
	return false
}

// Check evaluates the loop transfer function loop (unity negative
// feedback) against every requirement, with the default settings. See
// CheckWith.
func Check(loop tf.TF, req Requirements) Report {
	return CheckWith(loop, req, nil)
}

// CheckWith evaluates the loop transfer function loop against every
// requirement and returns one Result per requirement, in order. Only the
// analyses the requirements need are run: margins.Compute for the margins
// and the peak sensitivity, the closed-loop poles for the damping ratio
// (with dead time: the dominant exact roots, see the package
// documentation), response.StepMetrics of L/(1 + L) for the step metrics
// (with dead time: response.ClosedLoopStepMetrics) and
// response.SteadyState for the steady-state error. A failing analysis
// fails the requirements that need it, with the reason in the message.
// Invalid settings fail every requirement with ErrInvalidSettings.
func CheckWith(loop tf.TF, req Requirements, set *Settings) Report {
	e := &evaluator{loop: loop, padeOrder: defaultPadeOrder}
	if set != nil && set.PadeOrder != 0 {
		e.padeOrder = set.PadeOrder
	}
	if set != nil {
		e.parts = set.Loop
		if set.Margins != nil {
			e.margins, e.marginsDone = *set.Margins, true
		}
	}
	if set != nil && !set.ReferenceToOutput.IsZero() {
		e.refToOut = set.ReferenceToOutput
		e.haveRefToOut = true
	}
	var setErr error
	e.domFactor, e.domCross, setErr = dominantSettings(set)
	if set != nil {
		e.padeDeadTime = set.PadeDeadTime
	}
	if e.padeOrder < 1 || e.padeOrder > 20 {
		setErr = fmt.Errorf("%w: PadeOrder %d is outside 1…20", ErrInvalidSettings, e.padeOrder)
	}
	rep := Report{Results: make([]Result, 0, len(req))}
	for _, r := range req {
		res := Result{Requirement: r, Name: r.Name(), Limit: r.limit, Value: math.NaN()}
		err := r.valid()
		if err == nil {
			err = setErr
		}
		if err != nil {
			res.Err = err
			res.Message = fmt.Sprintf("The requirement cannot be checked: %s.", strings.TrimPrefix(err.Error(), "spec: "))
		} else {
			e.evaluate(&res)
		}
		rep.Results = append(rep.Results, res)
	}
	return rep
}

// evaluator runs each analysis at most once.
type evaluator struct {
	loop      tf.TF
	padeOrder int

	refToOut     tf.TF
	haveRefToOut bool

	padeDeadTime        bool
	domFactor, domCross float64
	domDone             bool
	dom                 DominantRoots
	domErr              error

	marginsDone bool
	margins     margins.Result
	marginsErr  error

	closedDone bool
	closed     tf.TF // L/(1+L), dead time replaced by Padé
	closedNote string
	closedErr  error

	stepDone bool
	step     response.Metrics
	stepNote string
	stepErr  error

	parts     closedloop.Loop
	wholeDone bool
	whole     closedloop.Metrics
	wholeNote string
	wholeErr  error
}

// getWhole returns the closed-loop metrics of the loop's parts.
func (e *evaluator) getWhole() (closedloop.Metrics, string, error) {
	if !e.wholeDone {
		e.wholeDone = true
		if e.parts.Plant.IsZero() {
			e.wholeErr = errNoLoopParts
			return e.whole, "", e.wholeErr
		}
		fs, err := closedloop.Of(e.parts, &closedloop.Settings{PadeOrder: e.padeOrder})
		if err != nil {
			e.wholeErr = err
			return e.whole, "", err
		}
		if fs.DelayApproximated {
			// The time metrics of closedloop use the exact delayed
			// response and the frequency peaks the exact dead time; say so.
			e.wholeNote = "with the exact dead time"
		}
		e.whole, e.wholeErr = fs.Analyze(nil)
	}
	return e.whole, e.wholeNote, e.wholeErr
}

func (e *evaluator) getMargins() (margins.Result, error) {
	if !e.marginsDone {
		e.marginsDone = true
		e.margins, e.marginsErr = margins.Compute(e.loop, nil)
	}
	return e.margins, e.marginsErr
}

// getClosed returns the closed loop L/(1 + L), with dead time replaced by
// a Padé approximation in continuous time.
func (e *evaluator) getClosed() (tf.TF, string, error) {
	if !e.closedDone {
		e.closedDone = true
		l := e.loop
		if e.haveRefToOut {
			l = e.refToOut
		}
		if l.DelaySec() > 0 {
			// Exact for whole samples of a discrete loop.
			p, err := l.Pade(e.padeOrder)
			if err != nil {
				e.closedErr = err
				return e.closed, "", err
			}
			if !l.IsDiscrete() {
				e.closedNote = fmt.Sprintf("dead time approximated by a Padé approximation of order %d", e.padeOrder)
			}
			l = p
		}
		if e.haveRefToOut {
			e.closed = l
		} else {
			e.closed, e.closedErr = l.ClosedLoop()
		}
	}
	return e.closed, e.closedNote, e.closedErr
}

// getStep returns the step metrics of the closed loop from reference to
// output and a note on how dead time was treated ("" without dead time).
func (e *evaluator) getStep() (response.Metrics, string, error) {
	if !e.stepDone {
		e.stepDone = true
		if e.exactDelay() && !e.haveRefToOut {
			e.stepNote = "dead time exact: the step response of the delayed closed loop by the method of steps"
			e.step, e.stepErr = response.ClosedLoopStepMetrics(e.loop, nil, nil)
			return e.step, e.stepNote, e.stepErr
		}
		cl, note, err := e.getClosed()
		if note != "" {
			note += e.padeReason(true)
		}
		e.stepNote = note
		if err != nil {
			e.stepErr = err
		} else {
			e.step, e.stepErr = response.StepMetrics(cl, nil)
		}
	}
	return e.step, e.stepNote, e.stepErr
}

// exactDelay reports whether the damping ratio is judged on the exact
// closed-loop roots: a continuous, strictly proper loop with dead time,
// and Settings.PadeDeadTime not set.
func (e *evaluator) exactDelay() bool {
	return !e.loop.IsDiscrete() && e.loop.DelaySec() > 0 && e.loop.IsStrictlyProper() && !e.padeDeadTime
}

// padeReason says why a continuous loop's dead time was replaced by its
// Padé approximation (for the step metrics when step is true), as a
// clause to append to the note.
func (e *evaluator) padeReason(step bool) string {
	switch {
	case e.padeDeadTime:
		return ", as requested"
	case e.loop.DelaySec() > 0 && !e.loop.IsStrictlyProper():
		return ", because the loop is biproper and with dead time its closed loop is of neutral type, which the exact analyses do not cover"
	case step && e.haveRefToOut:
		return ", because the closed loop from reference to output was given as a transfer function, whose delay structure the exact delayed response does not cover"
	}
	return ""
}

// getDominant returns the dominant exact closed-loop roots (dominant.go).
func (e *evaluator) getDominant() (DominantRoots, error) {
	if !e.domDone {
		e.domDone = true
		e.dom, e.domErr = e.dominantRoots(e.domFactor, e.domCross)
	}
	return e.dom, e.domErr
}

// cannot fills res for a value that could not be measured.
func cannot(res *Result, what string, err error) {
	res.Err = err
	res.Message = fmt.Sprintf("The %s could not be measured, so the requirement (%s) is not met: %s.", what, res.Requirement, reason(err))
}

// noLoopPartsError is the error of a whole-loop requirement checked
// without Settings.Loop. Its Error is for programmers (it names the Go
// field); Result.Message, which reports built on loop files show, says it
// without Go names (see reason).
type noLoopPartsError struct{}

var errNoLoopParts error = noLoopPartsError{}

func (noLoopPartsError) Error() string {
	return ErrInvalidSettings.Error() + ": this requirement needs the plant and the controller separately (Settings.Loop is the zero Loop)"
}

// Is reports whether target is ErrInvalidSettings.
func (noLoopPartsError) Is(target error) bool { return target == ErrInvalidSettings }

// reason turns an analysis error into words for a message.
func reason(err error) string {
	switch {
	case errors.Is(err, errNoLoopParts):
		return "it is measured on the loop's parts, the plant and the controller taken apart, and only their product (the loop transfer function) was available"
	case errors.Is(err, response.ErrUnstable):
		return "the closed loop is unstable"
	case errors.Is(err, response.ErrZeroFinalValue):
		return "the closed loop's static gain is zero, so the step response has no level to reach"
	case errors.Is(err, closedloop.ErrInternallyUnstable):
		return "the closed loop is internally unstable (" + strings.TrimPrefix(err.Error(), closedloop.ErrInternallyUnstable.Error()+": ") + ")"
	case errors.Is(err, response.ErrNotSettled):
		return "the step response did not settle within the longest horizon tried"
	}
	s := err.Error()
	for _, p := range []string{"margins: ", "response: ", "tf: ", "spec: ", "closedloop: "} {
		s = strings.TrimPrefix(s, p)
	}
	return s
}

// judge fills Pass and Message from a measured value.
func judge(res *Result, what, unit, extra string) {
	info := quantities[res.Requirement.q]
	v, lim := res.Value, res.Limit
	if info.minimum {
		res.Pass = v >= lim
	} else {
		res.Pass = v <= lim
	}
	val := withUnit(v, unit)
	switch {
	case info.minimum && res.Pass:
		res.Message = fmt.Sprintf("The %s is %s%s, at least the required %s: met.", what, val, extra, withUnit(lim, unit))
	case info.minimum:
		res.Message = fmt.Sprintf("The %s is %s%s, below the required minimum of %s: not met.", what, val, extra, withUnit(lim, unit))
	case res.Pass:
		res.Message = fmt.Sprintf("The %s is %s%s, within the allowed maximum of %s: met.", what, val, extra, withUnit(lim, unit))
	default:
		res.Message = fmt.Sprintf("The %s is %s%s, above the allowed maximum of %s: not met.", what, val, extra, withUnit(lim, unit))
	}
}

func (e *evaluator) evaluate(res *Result) {
	info := quantities[res.Requirement.q]
	switch res.Requirement.q {
	case phaseMargin, gainMargin, delayMargin, peakSensitivity:
		m, err := e.getMargins()
		if err != nil {
			cannot(res, info.what, err)
			return
		}
		extra := ""
		switch res.Requirement.q {
		case phaseMargin:
			res.Value = m.PhaseMarginDeg
			if math.IsNaN(res.Value) && m.ClosedLoopStable {
				// No gain crossover with a stable closed loop: |L| < 1 at
				// every frequency, so no phase change can destabilise it.
				res.Value = math.Inf(1)
				extra = " (the loop gain stays below 1 at every frequency)"
			} else if finite(m.GainCrossoverRadPerSec) {
				extra = fmt.Sprintf(" at %s rad/s", num(m.GainCrossoverRadPerSec))
			}
		case gainMargin:
			res.Value = m.GainMarginDB
			if math.IsNaN(res.Value) && m.ClosedLoopStable {
				res.Value = math.Inf(1)
			}
			if finite(m.PhaseCrossoverRadPerSec) && finite(res.Value) {
				extra = fmt.Sprintf(" at %s rad/s", num(m.PhaseCrossoverRadPerSec))
			}
		case delayMargin:
			res.Value = m.DelayMarginSec
		case peakSensitivity:
			res.Value = m.PeakSensitivity
			if finite(m.PeakSensitivityRadPerSec) {
				extra = fmt.Sprintf(" at %s rad/s", num(m.PeakSensitivityRadPerSec))
			}
		}
		if !m.ClosedLoopStable {
			res.Pass = false
			res.Message = fmt.Sprintf("The closed loop is unstable, so it has no %s (a margin measures the distance from instability of a stable loop) and the requirement (%s) is not met.", info.what, res.Requirement)
			return
		}
		if math.IsNaN(res.Value) {
			res.Message = fmt.Sprintf("The %s does not exist for this loop, so the requirement (%s) is not met.", info.what, res.Requirement)
			return
		}
		judge(res, info.what, info.unit, extra)

	case dampingRatio:
		if e.exactDelay() {
			d, err := e.getDominant()
			if err != nil {
				cannot(res, info.what, err)
				return
			}
			zeta, worst := minDamping(d.Roots, 0)
			res.Value = zeta
			judge(res, "smallest damping ratio of the dominant closed-loop roots", "", " (root "+formatPole(worst)+"; "+d.describe()+")")
			return
		}
		cl, note, err := e.getClosed()
		if err != nil {
			cannot(res, info.what, err)
			return
		}
		if note != "" {
			note += e.padeReason(false)
		}
		poles, err := cl.Poles()
		if err != nil {
			cannot(res, info.what, err)
			return
		}
		if len(poles) == 0 {
			res.Value = math.Inf(1)
			res.Pass = true
			res.Message = fmt.Sprintf("The closed loop has no poles, so every pole meets the requirement (%s).", res.Requirement)
			return
		}
		zeta, worst := minDamping(poles, cl.SampleTimeSec())
		res.Value = zeta
		what := "smallest damping ratio of the closed-loop poles"
		detail := " (pole " + formatPole(worst)
		if note != "" {
			detail += "; " + note
		}
		judge(res, what, "", detail+")")

	case overshoot, riseTime, settlingTime:
		m, note, err := e.getStep()
		if err != nil {
			if note != "" {
				err = fmt.Errorf("%w (%s)", err, note)
			}
			cannot(res, info.what, err)
			return
		}
		switch res.Requirement.q {
		case overshoot:
			res.Value = m.OvershootPct
		case riseTime:
			res.Value = m.RiseTimeSec
		case settlingTime:
			res.Value = m.SettlingTimeSec
		}
		if note != "" {
			note = " (" + note + ")"
		}
		if math.IsNaN(res.Value) {
			res.Message = fmt.Sprintf("The %s does not exist for this loop%s, so the requirement (%s) is not met.", info.what, note, res.Requirement)
			return
		}
		judge(res, info.what, info.unit, note)

	case disturbancePeak, recoveryTime, controlPeak, integratedAbsoluteError, noiseToControlGain:
		m, note, err := e.getWhole()
		if err != nil {
			cannot(res, info.what, err)
			return
		}
		extra := ""
		switch res.Requirement.q {
		case disturbancePeak:
			res.Value = math.Abs(m.LoadDisturbance.PeakDeviation)
			extra = fmt.Sprintf(" at %s s", num(m.LoadDisturbance.PeakTimeSec))
		case recoveryTime:
			res.Value = m.LoadDisturbance.RecoveryTimeSec
		case controlPeak:
			res.Value = math.Abs(m.ReferenceControl.PeakValue)
			extra = fmt.Sprintf(" at %s s", num(m.ReferenceControl.PeakTimeSec))
		case integratedAbsoluteError:
			res.Value = m.LoadDisturbance.IntegratedAbsoluteError
		case noiseToControlGain:
			res.Value = m.NoiseToControlPeak.Value
			if finite(m.NoiseToControlPeak.FrequencyRadPerSec) {
				extra = fmt.Sprintf(" at %s rad/s", num(m.NoiseToControlPeak.FrequencyRadPerSec))
			} else if math.IsInf(m.NoiseToControlPeak.FrequencyRadPerSec, 1) {
				extra = " at high frequency"
			}
		}
		if note != "" {
			extra += " (" + note + ")"
		}
		judge(res, info.what, info.unit, extra)

	case steadyStateError:
		l := e.loop
		extra := ""
		if l.DelaySec() > 0 && !l.IsDiscrete() {
			// Dead time does not change the limit L(0), but SteadyState
			// cannot decide stability with it: use the Nyquist verdict.
			m, err := e.getMargins()
			if err != nil {
				cannot(res, info.what, err)
				return
			}
			if !m.ClosedLoopStable {
				cannot(res, info.what, response.ErrUnstable)
				return
			}
			l = l.WithoutDelay()
			extra = ""
		}
		s, err := response.SteadyState(l)
		if err != nil {
			cannot(res, info.what, err)
			return
		}
		res.Value = s.StepError
		judge(res, info.what, info.unit, extra)
	}
}

// DampingRatio returns the damping ratio of the pole p: −Re(p)/|p| for a
// continuous pole (sampleTimeSec = 0), and that of s = ln(p)/T for a
// discrete pole. A pole at s = 0 (z = 1) has damping ratio 0, a pole at
// z = 0 (infinitely fast) 1.
func DampingRatio(p complex128, sampleTimeSec float64) float64 {
	s := p
	if sampleTimeSec > 0 {
		if p == 0 {
			return 1
		}
		s = cmplx.Log(p) / complex(sampleTimeSec, 0)
	}
	r := cmplx.Abs(s)
	if r == 0 {
		return 0
	}
	return -real(s) / r
}

// minDamping returns the smallest damping ratio of the roots and the root
// that has it (the upper member of a conjugate pair).
func minDamping(roots []complex128, sampleTimeSec float64) (float64, complex128) {
	zeta, worst := math.Inf(1), complex128(0)
	for _, p := range roots {
		if z := DampingRatio(p, sampleTimeSec); z < zeta {
			zeta, worst = z, p
		}
	}
	return zeta, worst
}

func formatPole(p complex128) string {
	if imag(p) == 0 {
		return num(real(p))
	}
	return fmt.Sprintf("%s ± %sj", num(real(p)), num(math.Abs(imag(p))))
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }
