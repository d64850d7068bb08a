package report

import (
	"fmt"
	"strings"

	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
)

// padeOrder is the order of the Padé approximation of dead time for the
// closed-loop poles, the step response and the locus (the default of
// package locus).
const padeOrder = 6

// Settings controls Analyze. A nil *Settings means the defaults.
type Settings struct {
	// Plots asks for the figures of the report (root locus, frequency
	// response, Nyquist curve, step response, pole–zero map) as SVG and
	// PNG. Drawing them takes longer than every analysis together. If
	// false (the zero value), no figure is drawn.
	Plots bool
	// Progress, if not nil, is called when a stage starts and while long
	// stages advance. It is called from the goroutine that runs Analyze.
	Progress func(Progress)
}

// Progress says how far Analyze has come.
type Progress struct {
	// Stage names the running stage in words: "margins".
	Stage string
	// Step is the 1-based number of the stage, of Steps.
	Step, Steps int
	// Fraction is how much of the stage is done, in [0, 1]; 0 when the
	// stage starts.
	Fraction float64
}

// analysis carries the intermediate results from one section to the next.
// Sections read what earlier sections of the pipeline left here.
type analysis struct {
	set      Settings
	steps    int
	stepN    int
	m        *loopModel
	rep      *Report
	rational tf.TF // the open loop with dead time replaced (Padé or exact z^-d)
	refOut   tf.TF // closed loop from reference to output (rational)
	locus    *locus.Analysis
	locusFor tf.TF // the loop whose locus was analysed (base or parametric)
	margins  *margins.Result
	step     *response.Metrics
	closed   *closedLoopState // closedloop.go
	// verdict is the loop's one stability verdict (see stability.go),
	// final once the margins section has run.
	verdict verdict
	// design holds the design section's results for its figures
	// (design.go).
	design designFigures
	// dead holds the exact dead-time analysis (deadtime.go); nil when the
	// loop's dead time is not kept exact.
	dead *deadTimeState
}

// warn adds a warning to the report: a sentence that says what could not
// be computed and why.
func (a *analysis) warn(format string, args ...any) {
	a.rep.Warnings = append(a.rep.Warnings, shorten(fmt.Sprintf(format, args...)))
}

// stage announces the start of the next stage.
func (a *analysis) stage(name string) {
	a.stepN++
	a.fraction(name, 0)
}

// fraction reports how far the current stage has come.
func (a *analysis) fraction(name string, f float64) {
	if a.set.Progress != nil {
		a.set.Progress(Progress{Stage: name, Step: a.stepN, Steps: max(a.steps, a.stepN), Fraction: min(max(f, 0), 1)})
	}
}

// short removes the package prefix of an error message.
func short(err error) string {
	s := err.Error()
	for _, p := range []string{"locus: ", "margins: ", "response: ", "tf: ", "poly: ", "chart: ", "spec: ", "statespace: "} {
		s = strings.ReplaceAll(s, p, "")
	}
	// Sentinel phrases that add nothing to the reason that follows them.
	for _, p := range []string{"value is NaN or infinite: ", "numerical method failed: "} {
		s = strings.ReplaceAll(s, p, "")
	}
	return s
}

// Analyze runs every analysis of the pipeline on the loop l and returns
// the report. An analysis that fails leaves its keys null and adds a
// warning that says why; it never stops the others. Analyze returns an
// error wrapping ErrBadInput only when the loop itself is unusable (an
// expression that does not parse, an improper or zero loop, a key out of
// range); it does not modify l.
func Analyze(l *Loop, set *Settings) (*Report, error) {
	if set == nil {
		set = &Settings{}
	}
	lf, err := l.withDefaults()
	if err != nil {
		return nil, err
	}
	m, err := build(lf)
	if err != nil {
		return nil, err
	}
	rep := emptyReport()
	a := &analysis{m: m, rep: rep, set: *set, steps: len(pipeline)}
	if set.Plots {
		a.steps++
	}
	a.header()
	for _, s := range pipeline {
		a.stage(s.stage)
		a.runSection(s)
	}
	if set.Plots {
		a.stage("plots")
		rep.Figures = a.plots()
	}
	return rep, nil
}

// header fills the report's name, description and the loop as analysed,
// and warns about nominal values outside the locus ranges.
func (a *analysis) header() {
	m, lf, rep := a.m, a.m.file, a.rep
	rep.Name = lf.Name
	if rep.Name == "" {
		rep.Name = strings.TrimSpace("Loop " + strings.TrimSuffix(lf.file, ".json"))
	}
	rep.Description = lf.Description
	rep.Loop = LoopText{Controller: lf.Controller, Plant: lf.Plant, Sensor: lf.Sensor, OpenLoop: m.open.String(), Gain: Number(m.gain), SampleTimeSec: Number(m.open.SampleTimeSec()), DelaySec: Number(m.open.DelaySec())}
	rep.Loop.at = "k = " + g(Number(m.gain))
	if p := lf.Parameter; p != nil {
		rep.Loop.at += fmt.Sprintf(", %s = %s", p.Name, g(Number(p.Value)))
		s := fmt.Sprintf("%s = %s, locus over %s", p.Name, g(Number(p.Value)), intervalText(Interval{Number(p.Range[0]), Number(p.Range[1])}))
		rep.Loop.Parameter = &s
	}
	rep.DiscreteLoop = m.discrete
	if lf.Gain < lf.GainRange[0] || lf.Gain > lf.GainRange[1] {
		a.warn("the gain k = %s lies outside gain_range %s; the locus does not show the nominal closed loop", g(Number(lf.Gain)), intervalText(Interval{Number(lf.GainRange[0]), Number(lf.GainRange[1])}))
	}
	if p := lf.Parameter; p != nil && (p.Value < p.Range[0] || p.Value > p.Range[1]) {
		a.warn("the parameter value %s = %s lies outside its range %s", p.Name, g(Number(p.Value)), intervalText(Interval{Number(p.Range[0]), Number(p.Range[1])}))
	}
}

// runSection runs one section. A panic in the packages below is a defect
// there, but it must not take the other sections down with it: it becomes
// a warning that names the section, so that the report is still written.
func (a *analysis) runSection(s section) {
	defer func() {
		if p := recover(); p != nil {
			a.warn("%s: internal error (%v); the results of this section may be incomplete; please report this loop to the loopwise maintainers", s.stage, p)
		}
	}()
	s.run(a)
}
