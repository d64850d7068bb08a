package main

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"strings"

	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// padeOrder is the order of the Padé approximation of dead time for the
// closed-loop poles, the step response and the locus (the default of
// package locus).
const padeOrder = 6

// analysis carries the intermediate results between the stages.
type analysis struct {
	prog     *progress
	m        *loopModel
	rep      *report
	rational tf.TF // the open loop with dead time replaced (Padé or exact z^-d)
	refOut   tf.TF // closed loop from reference to output (rational)
	locus    *locus.Analysis
	locusFor tf.TF // the loop whose locus was analysed (base or parametric)
	margins  *margins.Result
	step     *response.Metrics
}

func (a *analysis) warn(format string, args ...any) {
	a.rep.Warnings = append(a.rep.Warnings, fmt.Sprintf(format, args...))
}

// short removes the package prefix of an error message.
func short(err error) string {
	s := err.Error()
	for _, p := range []string{"locus: ", "margins: ", "response: ", "tf: ", "poly: ", "chart: ", "spec: "} {
		s = strings.ReplaceAll(s, p, "")
	}
	return s
}

// analyze runs every analysis on the loop. An analysis that fails leaves
// its keys null and adds a warning; it never stops the others. With plots
// set it also draws the figures.
func analyze(m *loopModel, prog *progress, plots bool) (*report, []figure) {
	lf := m.file
	rep := emptyReport()
	a := &analysis{m: m, rep: rep, prog: prog}
	prog.total = 6
	if plots {
		prog.total++
	}
	rep.Name = lf.Name
	if rep.Name == "" {
		rep.Name = "Loop " + strings.TrimSuffix(lf.file, ".json")
	}
	rep.Description = lf.Description
	rep.Loop = loopText{Controller: lf.Controller, Plant: lf.Plant, Sensor: lf.Sensor, OpenLoop: m.open.String(), Gain: number(m.gain), SampleTimeSec: number(m.open.SampleTimeSec()), DelaySec: number(m.open.DelaySec())}
	rep.Loop.at = "k = " + g(number(m.gain))
	if p := lf.Parameter; p != nil {
		rep.Loop.at += fmt.Sprintf(", %s = %s", p.Name, g(number(p.Value)))
		s := fmt.Sprintf("%s = %s, locus over %s", p.Name, g(number(p.Value)), intervalText(interval{number(p.Range[0]), number(p.Range[1])}))
		rep.Loop.Parameter = &s
	}
	rep.DiscreteLoop = m.discrete
	if lf.Gain < lf.GainRange[0] || lf.Gain > lf.GainRange[1] {
		a.warn("the gain k = %s lies outside gain_range %s; the locus does not show the nominal closed loop", g(number(lf.Gain)), intervalText(interval{number(lf.GainRange[0]), number(lf.GainRange[1])}))
	}
	if p := lf.Parameter; p != nil && (p.Value < p.Range[0] || p.Value > p.Range[1]) {
		a.warn("the parameter value %s = %s lies outside its range %s", p.Name, g(number(p.Value)), intervalText(interval{number(p.Range[0]), number(p.Range[1])}))
	}

	prog.step("open and closed loop")
	a.loops()
	prog.step("root locus")
	a.rootLocus()
	prog.step("margins")
	a.marginsStage()
	prog.step("step response")
	a.stepStage()
	prog.step("steady-state errors")
	a.steadyStage()
	prog.step("requirements")
	a.requirementsStage()
	var figs []figure
	if plots {
		prog.step("plots")
		figs = a.plots()
	}
	return rep, figs
}

// loops fills open_loop and closed_loop.
func (a *analysis) loops() {
	m, rep := a.m, a.rep
	a.rational = m.open
	if m.open.DelaySec() > 0 {
		r, err := m.open.Pade(padeOrder)
		if err != nil {
			a.warn("the dead time cannot be replaced for the closed-loop poles: %s", short(err))
		} else {
			a.rational = r
			if !m.open.IsDiscrete() {
				a.warn("dead time approximated by a %s-order Padé approximation for the closed-loop poles and the step response (the approximation adds poles and right-half-plane zeros of its own; a small undershoot at the start of the step can come from them)", ordinal(padeOrder))
			}
		}
	}
	// Open-loop poles: those of the rational part; in discrete time the
	// dead time's poles at z = 0 are exact and listed too.
	ol := m.open.WithoutDelay()
	if m.open.IsDiscrete() && a.rational.DelaySec() == 0 {
		ol = a.rational
	}
	if p, err := ol.Poles(); err == nil {
		rep.OpenLoop.Poles = complexList(p)
	} else {
		a.warn("open-loop poles: %s", short(err))
	}
	if z, err := ol.Zeros(); err == nil {
		rep.OpenLoop.Zeros = complexList(z)
	} else {
		a.warn("open-loop zeros: %s", short(err))
	}
	if len(rep.OpenLoop.Poles) > 0 || ol.Den().Degree() == 0 {
		p, _ := ol.Poles()
		z, _ := ol.Zeros()
		delay := m.open.DelaySec()
		if ol.DelaySec() == 0 && ol.IsDiscrete() && m.open.DelaySec() > 0 {
			delay = 0 // already poles at z = 0
		}
		rep.Loop.OpenLoopFactored = factoredText(ol.GainFactor(), z, p, ol.Variable(), delay, ol.IsDiscrete())
	}
	if k, err := m.open.StaticGain(); err == nil {
		rep.OpenLoop.StaticGain = number(k)
		if m.open.IsDiscrete() && integrates(m.open) {
			// tf.StaticGain evaluates D(1) exactly; a pole at z = 1 written
			// as (z − 1)(z − 0.368) expands to coefficients whose sum is a
			// rounding error, not 0.
			rep.OpenLoop.StaticGain = number(math.Inf(1))
		}
	} else if errors.Is(err, tf.ErrInfiniteGain) {
		rep.OpenLoop.StaticGain = number(math.Inf(1))
	} else {
		a.warn("open-loop static gain: %s", short(err))
	}

	// Closed loop from reference to output.
	if a.rational.DelaySec() == 0 {
		var err error
		if m.unitySensor {
			a.refOut, err = a.rational.ClosedLoop()
		} else {
			a.refOut, err = a.feedbackWithSensor()
		}
		if err != nil {
			a.warn("closed loop: %s", short(err))
		}
	}
	if p, err := a.rational.CharacteristicPolynomial().Roots(); err == nil && a.rational.DelaySec() == 0 {
		rep.ClosedLoop.Poles = complexList(p)
		stable := true
		for _, z := range p {
			if (m.open.IsDiscrete() && cmplx.Abs(z) >= 1) || (!m.open.IsDiscrete() && real(z) >= 0) {
				stable = false
			}
		}
		rep.ClosedLoop.Stable = &stable
	} else if err != nil {
		a.warn("closed-loop poles: %s", short(err))
	}
}

// feedbackWithSensor returns forward/(1 + forward·sensor) with dead time
// replaced, for loops whose sensor is not 1.
func (a *analysis) feedbackWithSensor() (tf.TF, error) {
	m := a.m
	fwd, err := m.forward.Pade(padeOrder)
	if err != nil {
		return tf.TF{}, err
	}
	h := m.sensor
	if d := m.file.Discretize; d != nil {
		if h, err = discretize(h, d); err != nil {
			return tf.TF{}, err
		}
		a.warn("the sensor was converted to z on its own to form the closed loop from reference to output")
	}
	if h, err = h.Pade(padeOrder); err != nil {
		return tf.TF{}, err
	}
	return tf.Feedback(fwd, h)
}

// rootLocus fills the locus section: in the gain k, or in the parameter.
func (a *analysis) rootLocus() {
	m, lf, rep := a.m, a.m.file, a.rep
	set := &locus.Settings{PadeOrder: padeOrder}
	loop := m.base
	if p := lf.Parameter; p != nil {
		par, err := locus.FromParameter(p.Name, m.loopAt)
		if err != nil {
			a.warn("the locus in the parameter %s cannot be formed: %s", p.Name, short(err))
			rep.Locus.Variable = p.Name
			return
		}
		loop = par.Loop
		for _, n := range par.Notes {
			a.warn("parameter locus: %s", n)
		}
		set.Variable = p.Name
		set.Range = locus.Range{Min: p.Range[0], Max: p.Range[1]}
	} else {
		set.Range = locus.Range{Min: lf.GainRange[0], Max: lf.GainRange[1]}
	}
	rep.Locus.Variable = "gain"
	if set.Variable != "" {
		rep.Locus.Variable = set.Variable
	}
	rep.Locus.Range = interval{number(set.Range.Min), number(set.Range.Max)}
	a.locusFor = loop
	an, err := locus.Analyze(loop, set)
	if err != nil {
		a.warn("root locus: %s", short(err))
		return
	}
	a.locus = &an
	l := &rep.Locus
	if an.HasAsymptotes {
		l.Centroid = number(an.CentroidReal)
	}
	for _, x := range an.AsymptoteAnglesDeg {
		l.AsymptoteAnglesDeg = append(l.AsymptoteAnglesDeg, number(x))
	}
	for _, iv := range an.RealAxisSegments {
		l.RealAxisSegments = append(l.RealAxisSegments, interval{number(iv.Lo), number(iv.Hi)})
	}
	for _, d := range an.Departures {
		p := newComplex(d.Point)
		l.DepartureAngles = append(l.DepartureAngles, angleAt{Pole: &p, AngleDeg: number(d.AngleDeg)})
	}
	for _, d := range an.Arrivals {
		z := newComplex(d.Point)
		l.ArrivalAngles = append(l.ArrivalAngles, angleAt{Zero: &z, AngleDeg: number(d.AngleDeg)})
	}
	for _, b := range an.BreakPoints {
		l.BreakPoints = append(l.BreakPoints, breakPoint{S: newComplex(b.Point), Value: number(b.Value), Branches: b.Branches})
	}
	for _, c := range an.AxisCrossings {
		l.AxisCrossings = append(l.AxisCrossings, axisCrossing{FrequencyRadPerSec: number(c.FrequencyRadPerSec), Point: newComplex(c.Point), Value: number(c.Value)})
	}
	for _, iv := range an.StableIntervals {
		l.StableIntervals = append(l.StableIntervals, interval{number(iv.Lo), number(iv.Hi)})
	}
	l.Notes = append(l.Notes, an.Notes...)
	for _, n := range an.Notes {
		a.warn("root locus: %s", n)
	}
}

// unitRootTol is the relative tolerance, to the 1-norm of the
// coefficients, below which D(1) counts as zero for a discrete loop (the
// value package response uses for the same decision).
const unitRootTol = 1e-12

// integrates reports whether the discrete loop l has a pole at z = 1 that
// its numerator does not cancel.
func integrates(l tf.TF) bool {
	d, n := l.Den(), l.Num()
	return math.Abs(d.Eval(1)) <= unitRootTol*d.Norm1() && math.Abs(n.Eval(1)) > unitRootTol*n.Norm1()
}

// ordinal returns "6th" and the like.
func ordinal(n int) string {
	suffix := "th"
	switch {
	case n%100 >= 11 && n%100 <= 13:
	case n%10 == 1:
		suffix = "st"
	case n%10 == 2:
		suffix = "nd"
	case n%10 == 3:
		suffix = "rd"
	}
	return fmt.Sprintf("%d%s", n, suffix)
}

// stepStage fills the step section from the closed loop reference → output.
func (a *analysis) stepStage() {
	if a.refOut.IsZero() {
		a.warn("step response: the closed loop from reference to output could not be formed")
		return
	}
	mt, err := response.StepMetrics(a.refOut, nil)
	if err != nil {
		a.warn("step response: %s; the step keys are null", stepReason(err))
		return
	}
	a.step = &mt
	s := &a.rep.Step
	s.RiseTimeSec = number(mt.RiseTimeSec)
	s.SettlingTimeSec = number(mt.SettlingTimeSec)
	s.OvershootPct = number(mt.OvershootPct)
	s.UndershootPct = number(mt.UndershootPct)
	s.Peak = number(mt.PeakValue)
	s.PeakTimeSec = number(mt.PeakTimeSec)
	s.FinalValue = number(mt.FinalValue)
}

func stepReason(err error) string {
	switch {
	case errors.Is(err, response.ErrUnstable):
		return "the closed loop is unstable, so the step response has no metrics"
	case errors.Is(err, response.ErrZeroFinalValue):
		return "the closed loop's static gain is zero, so the step response has no level to reach"
	}
	return short(err)
}

// steadyStage fills the steady-state errors of L.
func (a *analysis) steadyStage() {
	l := a.m.open
	if l.DelaySec() > 0 && !l.IsDiscrete() {
		if a.margins == nil || !a.margins.ClosedLoopStable {
			a.warn("steady-state errors: the closed loop with dead time is not known to be stable; the steady-state keys are null")
			return
		}
		// Dead time does not change the limits; stability comes from the
		// Nyquist criterion of the margins.
		l = l.WithoutDelay()
	}
	e, err := response.SteadyState(l)
	if err != nil {
		reason := short(err)
		if errors.Is(err, response.ErrUnstable) {
			reason = "the closed loop is unstable, so there is no steady state"
		}
		a.warn("steady-state errors: %s; the steady-state keys are null", reason)
		return
	}
	s := &a.rep.SteadyState
	t := e.SystemType
	s.SystemType = &t
	s.PositionConstant = number(e.PositionConstant)
	s.VelocityConstant = number(e.VelocityConstant)
	s.AccelerationConstant = number(e.AccelerationConstant)
	s.StepError = number(e.StepError)
	s.RampError = number(e.RampError)
	s.ParabolaError = number(e.ParabolaError)
}

// requirementsStage checks the loop file's requirements with package spec.
func (a *analysis) requirementsStage() {
	lf := a.m.file
	if len(lf.Requirements) == 0 {
		return
	}
	var req spec.Requirements
	for _, r := range lf.Requirements {
		q, err := spec.ByKey(r.Key, r.Limit)
		if err != nil {
			a.warn("requirement %q: %s", r.Key, short(err))
			continue
		}
		req = append(req, q)
	}
	set := &spec.Settings{PadeOrder: padeOrder}
	if !a.m.unitySensor && a.refOut.Den().Degree() > 0 {
		set.ReferenceToOutput = a.refOut
	}
	for _, res := range spec.CheckWith(a.m.open, req, set).Results {
		a.rep.Requirements = append(a.rep.Requirements, requirementResult{
			Name: res.Name, Limit: number(res.Limit), Value: number(res.Value), Unit: res.Requirement.Unit(), Pass: res.Pass, Message: res.Message,
		})
	}
}

// marginsStage fills the margins of L at the nominal gain.
func (a *analysis) marginsStage() {
	res, err := margins.Compute(a.m.open, nil)
	if err != nil {
		a.warn("margins: %s; the margin keys are null", short(err))
		return
	}
	a.margins = &res
	mg := &a.rep.Margins
	mg.GainMargin = number(res.GainMargin)
	mg.GainMarginDB = number(res.GainMarginDB)
	mg.PhaseCrossoverRadPerSec = number(res.PhaseCrossoverRadPerSec)
	mg.LowerGainMargin = number(res.LowerGainMargin)
	mg.LowerGainMarginDB = number(res.LowerGainMarginDB)
	mg.PhaseMarginDeg = number(res.PhaseMarginDeg)
	mg.GainCrossoverRadPerSec = number(res.GainCrossoverRadPerSec)
	mg.DelayMarginSec = number(res.DelayMarginSec)
	mg.PeakSensitivity = number(res.PeakSensitivity)
	mg.PeakSensitivityRadPerSec = number(res.PeakSensitivityRadPerSec)
	mg.PeakComplementarySensitivity = number(res.PeakComplementarySensitivity)
	mg.PeakComplementarySensitivityRadPerS = number(res.PeakComplementarySensitivityRadPerSec)
	mg.BandwidthRadPerSec = number(res.BandwidthRadPerSec)
	stable := res.ClosedLoopStable
	mg.ClosedLoopStable = &stable
	for _, c := range res.GainCrossovers {
		mg.GainCrossovers = append(mg.GainCrossovers, crossover{FrequencyRadPerSec: number(c.FrequencyRadPerSec), Margin: number(c.PhaseMarginDeg)})
	}
	for _, c := range res.PhaseCrossovers {
		db := number(c.GainFactorDB)
		mg.PhaseCrossovers = append(mg.PhaseCrossovers, crossover{FrequencyRadPerSec: number(c.FrequencyRadPerSec), Margin: number(c.GainFactor), MarginDB: &db})
	}
	// The Nyquist verdict is exact with dead time; the closed-loop poles
	// above are then those of the Padé approximation.
	cl := a.rep.ClosedLoop.Stable
	if cl != nil && *cl != stable {
		a.warn("the closed-loop poles of the Padé approximation say %s, the Nyquist criterion on the exact loop says %s; the report follows the Nyquist criterion", stableWord(cl), stableWord(&stable))
	}
	a.rep.ClosedLoop.Stable = &stable
	if !stable {
		a.warn("the closed loop is unstable at %s: the margins describe an unstable loop", a.rep.Loop.at)
	}
}
