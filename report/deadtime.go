package report

// Dead time kept exact (issue 14, item 6). For a continuous loop with dead
// time the closed loop D(s) + N(s)·e^(−sτ) = 0 has infinitely many roots;
// the report computes them exactly (locus.DelayedRoots), the stable gain
// intervals and axis crossings from the exact frequency conditions
// (locus.DelayedStableGains), the delay margin and stable delay ranges
// (locus.DelayedStableDelays) and the step response by the exact
// method-of-steps collocation of package response. The Padé approximation
// is used only where the loop file asks for it ("dead_time_model": "pade"),
// for a biproper loop (neutral type, not handled exactly), for a parameter
// locus that the exact analysis refuses (an unbounded range of a parameter
// that is not a loop gain, a range through a value where the degree drops;
// a warning says why) and for the analyses that have no exact form yet
// (the sections of closedloop.go, design.go, robust.go, which say so). The
// locus in the loop file's "parameter" is exact
// (locus.DelayedParametric): the closed loop A0 + A1·e^(−sτ) +
// p·(B0 + B1·e^(−sτ)), its crossings, stable intervals and traced branches.
//
// This file holds the section and the helpers the pipeline files call
// through one-line hooks: loops.go (closed-loop roots and verdict),
// rootlocus.go (exact crossings and stable intervals, in the gain or the
// parameter), step.go and
// plots.go (the exact step response), margins.go (wording of the verdict
// check).

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
)

// deadTimeRoots is how many rightmost closed-loop roots the report lists
// for a loop with dead time (a conjugate pair is never split, so the list
// may hold one more).
const deadTimeRoots = 8

// Values of the loop file's "dead_time_model" key.
const (
	deadTimeExact = "exact"
	deadTimePade  = "pade"
)

// deadTimeModelKey is the loop file's "dead_time_model": "exact" (the
// default) or "pade".
var deadTimeModelKey = loopKey{name: "dead_time_model", decode: func(v keyValue, lf *Loop) error {
	if err := v.text(&lf.DeadTimeModel); err != nil {
		return err
	}
	return lf.checkDeadTimeModel(v.f.key + " " + at(v.data, v.f.valOff))
}}

// checkDeadTimeModel refuses an unknown "dead_time_model"; where names the
// key for the message.
func (lf *Loop) checkDeadTimeModel(where string) error {
	switch lf.DeadTimeModel {
	case "", deadTimeExact, deadTimePade:
		return nil
	}
	return badInput("key %s: the dead-time model %q is not known; use %q (the default: closed-loop roots, stable ranges and step response with e^(−sτ) exact) or %q (a %s-order Padé approximation, as a rational loop)",
		where, lf.DeadTimeModel, deadTimeExact, deadTimePade, ordinal(padeOrder))
}

// deadTimeState is what the exact dead-time analysis leaves for the
// sections after it.
type deadTimeState struct {
	// roots are the rightmost exact closed-loop roots (nil when they
	// could not be computed; rootsErr says why).
	roots    locus.DelayRoots
	rootsErr error
	// stepSet is the input of the exact step response from reference to
	// output; nil when the response cannot be formed exactly (stepWhy).
	stepSet *response.ClosedLoopSettings
	stepWhy string
	// param is the exact quasi-polynomial of the loop file's parameter
	// (nil without a parameter, or when the locus in it fell back on
	// Padé).
	param *locus.DelayedParametric
}

// exactDelay reports whether the loop has a dead time that the report
// keeps exact: a continuous loop, a dead time that is not negligible, no
// request for Padé, and a strictly proper loop (a biproper one is of
// neutral type with dead time and gets the Padé approximation).
func (m *loopModel) exactDelay() bool {
	return m.open.DelaySec() > 0 && !m.open.IsDiscrete() && !m.delayIgnored &&
		m.file.DeadTimeModel != deadTimePade && m.open.IsStrictlyProper()
}

// deadTimeLoops replaces the Padé closed-loop poles and verdict of loops()
// by the exact ones; called by loops() for every loop. It returns false
// when the loop's dead time is not kept exact, and loops() goes on with
// the rational loop.
func (a *analysis) deadTimeLoops() bool {
	m := a.m
	if m.open.DelaySec() <= 0 || m.open.IsDiscrete() || m.delayIgnored {
		return false
	}
	if !m.exactDelay() {
		why := "the loop file asks for it (\"dead_time_model\": \"pade\")"
		if m.file.DeadTimeModel != deadTimePade {
			why = "the loop is biproper, and with dead time its closed loop is of neutral type, which the exact analyses do not handle"
		}
		a.warn("dead time approximated by a %s-order Padé approximation for the closed-loop poles, the locus and the step response because %s (the approximation adds poles and right-half-plane zeros of its own; a small undershoot at the start of the step can come from them)", ordinal(padeOrder), why)
		return false
	}
	st := &deadTimeState{}
	a.dead = st
	st.roots, st.rootsErr = locus.DelayedRoots(m.open, 1, &locus.DelaySettings{Count: deadTimeRoots})
	if st.rootsErr == nil && !st.roots.CountVerified {
		st.rootsErr = fmt.Errorf("the count of the roots by the argument principle (%d) does not match the roots found (%d)", st.roots.Count, len(st.roots.Roots))
	}
	if st.rootsErr != nil {
		// The stability switches in the dead time decide without the
		// roots (Cooke & van den Driessche 1986): the loop without dead
		// time, then every crossing as τ grows to the loop's own — stable
		// for every τ when |L(jω)| never reaches 1 at a crossing
		// frequency. The Nyquist criterion, if it can be evaluated, has
		// the last word (settleVerdict).
		if ds, err := locus.DelayedStableDelays(m.open, 1); err == nil {
			a.verdict = verdict{known: true, stable: ds.StableAtDelay, method: "the stability switches in the dead time"}
			a.rep.ClosedLoop.Stable = a.verdict.ptr()
			a.warn("closed-loop roots with the dead time exact: %s; the closed_loop poles are null and the stability switches in the dead time decide stability (%s)", short(st.rootsErr), map[bool]string{true: "stable for every dead time", false: "stable dead times: see dead_time"}[ds.DelayIndependent])
		} else {
			a.warn("closed-loop roots with the dead time exact: %s; the closed_loop poles are null and the Nyquist criterion decides stability", short(st.rootsErr))
		}
	} else {
		a.rep.ClosedLoop.Poles = complexList(st.roots.Roots)
		a.verdict = delayVerdict(st.roots)
		a.rep.ClosedLoop.Stable = a.verdict.ptr()
	}
	// Reference → output: y = F·e^(−sτ)/(1 + L) with F the forward path
	// without its dead time, when the forward path carries all of L's dead
	// time (a sensor without dead time).
	fwd := m.forward
	switch {
	case m.unitySensor:
		st.stepSet = &response.ClosedLoopSettings{Input: response.Reference}
	case fwd.DelaySec() == m.open.DelaySec():
		st.stepSet = &response.ClosedLoopSettings{Input: response.FilteredDisturbance, Filter: fwd.WithoutDelay()}
	default:
		st.stepWhy = "the sensor carries part of the dead time, so the response from reference to output is not a step through the loop's one dead time"
	}
	if st.stepSet == nil {
		// Keep the Padé closed loop for the step section.
		a.refOut, _ = a.feedbackWithSensor()
	}
	return true
}

// delayVerdict is the verdict of the exact rightmost roots: every root
// with Re s above the region's abscissa was found (the count by the
// argument principle matches), so the rightmost one decides. A rightmost
// root within the Newton tolerance (1e-12 relative) of the axis counts as
// on the boundary, hence unstable, as for rational loops.
func delayVerdict(r locus.DelayRoots) verdict {
	v := verdict{known: true, stable: true, method: "the exact closed-loop roots"}
	if len(r.Roots) == 0 {
		// No root above the abscissa, which lies left of every root.
		v.stable = r.MinRealPart < 0
		return v
	}
	top := r.Roots[0]
	if math.Abs(real(top)) <= 1e-10*math.Max(1, math.Abs(imag(top))) {
		v.stable = false
		v.boundary = []complex128{top}
		return v
	}
	v.stable = real(top) < 0
	return v
}

// delayRootsName names the roots the verdict of a loop with dead time
// came from before the Nyquist criterion settles it (margins.go).
func (a *analysis) delayRootsName() string {
	if a.dead != nil {
		return "the exact closed-loop roots"
	}
	return "the closed-loop poles of the Padé approximation"
}

// deadTimeStep fills the step section with the exact response when the
// loop's dead time is kept exact; it returns false otherwise (step.go then
// goes on with the rational closed loop).
func (a *analysis) deadTimeStep() bool {
	st := a.dead
	if st == nil || st.stepSet == nil {
		if st != nil {
			a.warn("step response: %s; it is computed with a %s-order Padé approximation of the dead time", st.stepWhy, ordinal(padeOrder))
		}
		return false
	}
	if reason := a.unsettled(); reason != "" {
		a.warn("step response: %s, so the step response has no metrics; the step keys are null", reason)
		return true
	}
	mt, err := response.ClosedLoopStepMetrics(a.m.open, st.stepSet, nil)
	if err != nil {
		a.warn("step response with the dead time exact: %s; the step keys are null", stepReason(err))
		return true
	}
	a.step = &mt
	s := &a.rep.Step
	s.RiseTimeSec, s.SettlingTimeSec = Number(mt.RiseTimeSec), Number(mt.SettlingTimeSec)
	s.OvershootPct, s.UndershootPct = Number(mt.OvershootPct), Number(mt.UndershootPct)
	s.Peak, s.PeakTimeSec, s.FinalValue = Number(mt.PeakValue), Number(mt.PeakTimeSec), Number(mt.FinalValue)
	return true
}

// stepCurve returns the step response for the figure: the exact one for
// a loop whose dead time is kept exact, otherwise that of the rational
// closed loop.
func (a *analysis) stepCurve() (response.Response, error) {
	if st := a.dead; st != nil && st.stepSet != nil {
		// The horizon of the metrics: the settling time and a half more,
		// so that the figure shows the settled response.
		set := *st.stepSet
		if a.step != nil && a.step.SettlingTimeSec > 0 && !math.IsInf(a.step.SettlingTimeSec, 0) {
			set.HorizonSec = 1.5 * math.Max(a.step.SettlingTimeSec, a.step.PeakTimeSec)
		}
		r, err := response.ClosedLoopStep(a.m.open, &set)
		return r.Response, err
	}
	if a.refOut.IsZero() {
		return response.Response{}, errors.New("the closed loop from reference to output could not be formed")
	}
	return response.Step(a.refOut, nil)
}

// deadTimeLocus replaces the locus section, computed on the Padé
// approximation by locus.Analyze, by the exact construction quantities of
// locus.DelayedAnalyze for the loop (or the parametric loop of an affine
// parameter) with its dead time; called by rootLocus, which keeps the Padé
// section when it returns false.
func (a *analysis) deadTimeLocus(loop tf.TF, set *locus.Settings) bool {
	if a.dead == nil || loop.DelaySec() <= 0 {
		return false
	}
	an, err := locus.DelayedAnalyze(loop, &locus.Settings{Range: set.Range, Variable: set.Variable})
	if err != nil {
		a.warn("root locus: the locus with the dead time exact could not be analysed (%s); the locus keys are those of the %s-order Padé approximation", short(err), ordinal(padeOrder))
		return false
	}
	l := &a.rep.Locus
	l.fill(an)
	l.Notes = []string{fmt.Sprintf("dead time of %s s kept exact: no asymptotes (the branches to infinity are chains of roots that come in from Re s = −∞); break points, angles, crossings and stable intervals are those of the exact closed loop", g(Number(loop.DelaySec())))}
	return true
}

// deadTimeParamLocus fills the locus section in the loop file's parameter
// with the dead time exact (locus.DelayedParametric: the closed loop
// A0 + A1·e^(−sτ) + p·(B0 + B1·e^(−sτ)), crossings and stable intervals
// by D-decomposition on the imaginary axis); called by rootLocus, which
// forms the Padé parametric locus when it returns false (a warning then
// says why).
func (a *analysis) deadTimeParamLocus(loopAt func(float64) (tf.TF, error), set *locus.Settings) bool {
	if a.dead == nil {
		return false
	}
	fallback := func(err error) bool {
		a.warn("root locus: the locus in the parameter %s with the dead time exact could not be formed (%s); the locus keys are those of a %s-order Padé approximation", set.Variable, short(err), ordinal(padeOrder))
		return false
	}
	dp, err := locus.FromDelayedParameter(set.Variable, loopAt)
	if err != nil {
		return fallback(err)
	}
	an, err := dp.Analyze(set)
	if err != nil {
		return fallback(err)
	}
	a.dead.param = &dp
	a.locus = &an
	l := &a.rep.Locus
	l.fill(an)
	l.Notes = append([]string{fmt.Sprintf("dead time of %s s kept exact: the closed loop A0(s) + A1(s)·e^(−sτ) + %s·(B0(s) + B1(s)·e^(−sτ)) = 0; no asymptotes; crossings and stable intervals from the exact crossing condition on the imaginary axis; departure angles at the roots for %s = 0 in view", g(Number(dp.DelaySec)), set.Variable, set.Variable)}, an.Notes...)
	for _, n := range dp.Notes {
		a.warn("parameter locus: %s", n)
	}
	return true
}

// deadTimeLocusFigure draws the root locus with the dead time exact
// (locus.DelayedTrace) when the loop's dead time is kept exact; ok is
// false otherwise and plots.go draws the locus of the rational loop.
func (a *analysis) deadTimeLocusFigure(set *locus.Settings, value float64) (fig *chart.Figure, ok bool, err error) {
	if a.dead == nil || ((a.locusFor.DelaySec() <= 0 || set.Range.Min < 0) && a.dead.param == nil) {
		return nil, false, nil
	}
	tau := a.locusFor.DelaySec()
	var l locus.Locus
	if dp := a.dead.param; dp != nil {
		tau = dp.DelaySec
		l, err = dp.Trace(set)
	} else {
		l, err = locus.DelayedTrace(a.locusFor, set)
	}
	if err != nil && a.dead.param != nil {
		// The locus section is the exact one: no Padé figure to fall back on.
		return nil, true, fmt.Errorf("the locus in the parameter with the dead time exact could not be traced: %w", err)
	}
	if err != nil {
		a.warn("root locus figure: the locus with the dead time exact could not be traced (%s); the figure shows the %s-order Padé approximation", short(err), ordinal(padeOrder))
		return nil, false, nil
	}
	ls := &chart.LocusSettings{PlaneSettings: chart.PlaneSettings{Grid: true,
		Title: fmt.Sprintf("Root locus over %s, dead time %s s exact", variableWords(l.Analysis.Variable), g(Number(tau)))}}
	if l.Analysis.Range.Contains(value) && a.dead.rootsErr == nil {
		// The exact closed-loop roots at the nominal value that lie in the
		// view (the others are far left).
		var in []complex128
		v := l.View
		for _, s := range a.dead.roots.Roots {
			if real(s) >= v.ReMin && real(s) <= v.ReMax && imag(s) >= v.ImMin && imag(s) <= v.ImMax {
				in = append(in, s)
			}
		}
		ls.Mark = &chart.LocusMark{Value: value, Poles: in}
	}
	fig, err = chart.RootLocus(l, ls)
	return fig, true, err
}

// DeadTimeResult is the "dead_time" section: the closed loop of a
// continuous loop with dead time, analysed with e^(−sτ) exact. Null for
// loops without dead time, discrete loops, a negligible dead time, and
// when the dead time is not kept exact (see the warnings).
type DeadTimeResult struct {
	// DelaySec is the dead time τ of L in seconds.
	DelaySec Number `json:"delay_sec"`
	// RightmostRoots are the rightmost closed-loop roots of
	// D(s) + N(s)·e^(−sτ) = 0 at the nominal gain, rightmost first (a
	// conjugate pair is never split); null when not computed.
	RightmostRoots []Complex `json:"rightmost_closed_loop_roots"`
	// RootsAboveRealPart is σ₀: every closed-loop root with Re s > σ₀ is
	// in RightmostRoots (counted by the argument principle).
	RootsAboveRealPart Number `json:"roots_above_real_part"`
	// DelayMarginSec is the dead time that can be added at the nominal
	// gain before the closed loop becomes unstable (null if never, 0 when
	// unstable).
	DelayMarginSec Number `json:"delay_margin_sec"`
	// DelayIndependent reports stability for every dead time ≥ 0; null
	// when not computed.
	DelayIndependent *bool `json:"delay_independent"`
	// StableDelayIntervalsSec are the ranges of the total dead time, in
	// seconds, for which the closed loop at the nominal gain is stable
	// (an infinite end is null).
	StableDelayIntervalsSec []Interval `json:"stable_delay_intervals_sec"`
	// DelaySwitches are the dead times at which a closed-loop root pair
	// crosses the imaginary axis at the nominal gain, in increasing dead
	// time (stability switches of Cooke & van den Driessche 1986).
	DelaySwitches []DelaySwitch `json:"delay_switches"`
}

// DelaySwitch is a stability switch: at DelaySec a root pair crosses the
// imaginary axis at ±j·FrequencyRadPerSec, moving right ("destabilising")
// or left ("stabilising") as the dead time grows.
type DelaySwitch struct {
	DelaySec           Number `json:"delay_sec"`
	FrequencyRadPerSec Number `json:"frequency_rad_per_sec"`
	Direction          string `json:"direction"`
}

// deadTime fills the dead_time section.
func (a *analysis) deadTime() {
	st := a.dead
	if st == nil {
		return
	}
	L := a.m.open
	res := &DeadTimeResult{DelaySec: Number(L.DelaySec()), RootsAboveRealPart: nan, DelayMarginSec: nan}
	a.rep.DeadTime = res
	if st.rootsErr == nil {
		res.RightmostRoots = complexList(st.roots.Roots)
		res.RootsAboveRealPart = Number(st.roots.MinRealPart)
	}
	ds, err := locus.DelayedStableDelays(L, 1)
	if err != nil {
		a.warn("dead time: stable delay ranges: %s; the dead_time delay keys are null", short(err))
		return
	}
	res.StableDelayIntervalsSec = make([]Interval, 0, len(ds.StableDelayIntervals))
	for _, iv := range ds.StableDelayIntervals {
		res.StableDelayIntervalsSec = append(res.StableDelayIntervalsSec, Interval{Number(iv.Lo), Number(iv.Hi)})
	}
	res.DelaySwitches = make([]DelaySwitch, 0, len(ds.Switches))
	for _, s := range ds.Switches {
		dir := "destabilising"
		if s.Direction < 0 {
			dir = "stabilising"
		}
		res.DelaySwitches = append(res.DelaySwitches, DelaySwitch{Number(s.DelaySec), Number(s.FrequencyRadPerSec), dir})
	}
	indep := ds.DelayIndependent
	res.DelayIndependent = &indep
	res.DelayMarginSec = Number(ds.DelayMarginSec)
	if st.rootsErr == nil && ds.StableAtDelay != (a.verdict.known && a.verdict.stable) {
		a.warn("dead time: the stability switches say the loop is %s at its own dead time, the exact closed-loop roots say %s", stableWord(&ds.StableAtDelay), a.verdict.words())
	}
}

// deadTimeTables shows the dead_time section.
func deadTimeTables(r *Report) []table {
	d := r.DeadTime
	if d == nil {
		return nil
	}
	t := table{title: "Dead time, exact (no Padé approximation) at " + r.Loop.at}
	t.rows = append(t.rows, row{"dead time", gUnit(d.DelaySec, "s")})
	if d.RightmostRoots != nil {
		t.rows = append(t.rows, row{fmt.Sprintf("rightmost closed-loop roots (every one with Re s > %s)", g(d.RootsAboveRealPart)), rootList(d.RightmostRoots)})
	} else {
		t.rows = append(t.rows, row{"rightmost closed-loop roots", notComputed})
	}
	t.rows = append(t.rows, row{"delay margin", gUnit(d.DelayMarginSec, "s")})
	if d.StableDelayIntervalsSec != nil {
		t.rows = append(t.rows, row{"stable for a total dead time in (s)", intervalList(d.StableDelayIntervalsSec)})
	} else {
		t.rows = append(t.rows, row{"stable dead-time ranges", notComputed})
	}
	if n := len(d.DelaySwitches); n > 0 {
		var parts []string
		for i, s := range d.DelaySwitches {
			if i == 4 {
				parts = append(parts, fmt.Sprintf("… (%d in all)", n))
				break
			}
			parts = append(parts, fmt.Sprintf("%s at %s (%s)", gUnit(s.DelaySec, "s"), gUnit(s.FrequencyRadPerSec, "rad/s"), s.Direction))
		}
		t.rows = append(t.rows, row{"stability switches", strings.Join(parts, "; ")})
	}
	return []table{t}
}

// deadTimeSection computes dead_time; it runs after margins, whose verdict
// it checks against the stability switches.
var deadTimeSection = section{stage: "dead time", keys: []loopKey{deadTimeModelKey}, run: (*analysis).deadTime, tables: deadTimeTables}
