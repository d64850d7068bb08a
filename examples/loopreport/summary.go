package main

import (
	"fmt"
	"io"
	"math"
	"strings"
)

// row is one line of a result table: a quantity in words and its value.
type row struct{ label, value string }

// section is a titled group of rows, shared by the text summary, the
// Markdown summary and index.html.
type section struct {
	title string
	rows  []row
}

// sections turns the report into titled tables of words and numbers.
func sections(r *report) []section {
	var out []section

	loop := section{title: "Loop"}
	loop.rows = append(loop.rows,
		row{"plant", r.Loop.Plant},
		row{"controller", r.Loop.Controller},
		row{"sensor (feedback path)", r.Loop.Sensor},
	)
	if r.Loop.OpenLoopFactored != "" {
		loop.rows = append(loop.rows, row{"open loop L = k·controller·plant·sensor", r.Loop.OpenLoopFactored})
	} else {
		loop.rows = append(loop.rows, row{"open loop L = k·controller·plant·sensor", r.Loop.OpenLoop})
	}
	loop.rows = append(loop.rows, row{"loop gain k", g(r.Loop.Gain)})
	if r.Loop.Parameter != nil {
		loop.rows = append(loop.rows, row{"parameter", *r.Loop.Parameter})
	}
	if float64(r.Loop.SampleTimeSec) > 0 {
		loop.rows = append(loop.rows, row{"sample time", gUnit(r.Loop.SampleTimeSec, "s")})
	}
	if float64(r.Loop.DelaySec) > 0 {
		loop.rows = append(loop.rows, row{"dead time", gUnit(r.Loop.DelaySec, "s")})
	}
	if d := r.DiscreteLoop; d != nil {
		loop.rows = append(loop.rows, row{"converted to z by", fmt.Sprintf("%s at a sample time of %s", methodWords(d.Method), gUnit(d.SampleTimeSec, "s"))})
	}
	out = append(out, loop)

	ol := section{title: "Open loop"}
	ol.rows = append(ol.rows,
		row{fmt.Sprintf("poles (%d)", len(r.OpenLoop.Poles)), rootList(r.OpenLoop.Poles)},
		row{fmt.Sprintf("zeros (%d)", len(r.OpenLoop.Zeros)), rootList(r.OpenLoop.Zeros)},
		row{"static gain", g(r.OpenLoop.StaticGain)},
	)
	out = append(out, ol)

	cl := section{title: "Closed loop"}
	cl.rows = append(cl.rows,
		row{"stability", stableWord(r.ClosedLoop.Stable)},
		row{fmt.Sprintf("poles (%d)", len(r.ClosedLoop.Poles)), rootList(r.ClosedLoop.Poles)},
	)
	out = append(out, cl)

	lo := r.Locus
	ls := section{title: "Root locus in " + variableWords(lo.Variable)}
	ls.rows = append(ls.rows, row{"range of " + lo.Variable, intervalText(lo.Range)})
	if len(lo.AsymptoteAnglesDeg) > 0 {
		angles := make([]string, len(lo.AsymptoteAnglesDeg))
		for i, a := range lo.AsymptoteAnglesDeg {
			angles[i] = gUnit(a, "°")
		}
		ls.rows = append(ls.rows, row{"asymptotes", fmt.Sprintf("centroid %s, angles %s", g(lo.Centroid), strings.Join(angles, ", "))})
	} else {
		ls.rows = append(ls.rows, row{"asymptotes", "none (as many zeros as poles)"})
	}
	ls.rows = append(ls.rows, row{"real-axis segments", intervalListClosed(lo.RealAxisSegments)})
	for _, a := range lo.DepartureAngles {
		ls.rows = append(ls.rows, row{"departure angle from the pole " + cplx(*a.Pole, false), gUnit(a.AngleDeg, "°")})
	}
	for _, a := range lo.ArrivalAngles {
		ls.rows = append(ls.rows, row{"arrival angle at the zero " + cplx(*a.Zero, false), gUnit(a.AngleDeg, "°")})
	}
	for _, b := range lo.BreakPoints {
		ls.rows = append(ls.rows, row{"break point s = " + cplx(b.S, false), fmt.Sprintf("%s = %s, %d branches meet", lo.Variable, g(b.Value), b.Branches)})
	}
	if len(lo.BreakPoints) == 0 {
		ls.rows = append(ls.rows, row{"break points", "none"})
	}
	axis := "imaginary axis"
	if float64(r.Loop.SampleTimeSec) > 0 {
		axis = "unit circle"
	}
	for _, c := range lo.AxisCrossings {
		ls.rows = append(ls.rows, row{"crosses the " + axis + " at " + gUnit(c.FrequencyRadPerSec, "rad/s"), fmt.Sprintf("%s = %s", lo.Variable, g(c.Value))})
	}
	if len(lo.AxisCrossings) == 0 {
		ls.rows = append(ls.rows, row{"crossings of the " + axis, "none"})
	}
	ls.rows = append(ls.rows, row{"closed loop stable for " + lo.Variable + " in", intervalList(lo.StableIntervals)})
	for _, n := range lo.Notes {
		ls.rows = append(ls.rows, row{"note", n})
	}
	out = append(out, ls)

	mg := r.Margins
	ms := section{title: "Margins at " + r.Loop.at}
	gm := g(mg.GainMargin)
	if finite(float64(mg.GainMargin)) {
		gm = fmt.Sprintf("%s (gain factor %s) at %s", gUnit(mg.GainMarginDB, "dB"), g(mg.GainMargin), gUnit(mg.PhaseCrossoverRadPerSec, "rad/s"))
	} else if isInf(mg.GainMargin) {
		gm = "infinite (the gain can rise without limit)"
	}
	ms.rows = append(ms.rows, row{"gain margin", gm})
	if finite(float64(mg.LowerGainMargin)) {
		ms.rows = append(ms.rows, row{"lower gain margin", fmt.Sprintf("%s (gain factor %s): the gain may fall only this far", gUnit(mg.LowerGainMarginDB, "dB"), g(mg.LowerGainMargin))})
	}
	pm := "none (no gain crossover)"
	if finite(float64(mg.PhaseMarginDeg)) {
		pm = fmt.Sprintf("%s at %s", gUnit(mg.PhaseMarginDeg, "°"), gUnit(mg.GainCrossoverRadPerSec, "rad/s"))
	}
	ms.rows = append(ms.rows, row{"phase margin", pm})
	ms.rows = append(ms.rows, row{"delay margin", gUnit(mg.DelayMarginSec, "s")})
	ps := g(mg.PeakSensitivity)
	if finite(float64(mg.PeakSensitivity)) {
		ps = fmt.Sprintf("%s %s", g(mg.PeakSensitivity), atFrequency(mg.PeakSensitivityRadPerSec))
	}
	ms.rows = append(ms.rows, row{"peak sensitivity", ps})
	if finite(float64(mg.PeakComplementarySensitivity)) {
		ms.rows = append(ms.rows, row{"peak complementary sensitivity", fmt.Sprintf("%s %s", g(mg.PeakComplementarySensitivity), atFrequency(mg.PeakComplementarySensitivityRadPerS))})
	}
	if finite(float64(mg.BandwidthRadPerSec)) {
		ms.rows = append(ms.rows, row{"bandwidth of L/(1 + L) (−3 dB)", gUnit(mg.BandwidthRadPerSec, "rad/s")})
	}
	ms.rows = append(ms.rows, row{"closed loop (Nyquist)", stableWord(mg.ClosedLoopStable)})
	for _, c := range mg.GainCrossovers {
		ms.rows = append(ms.rows, row{"gain crossover at " + gUnit(c.FrequencyRadPerSec, "rad/s"), "phase margin " + gUnit(c.Margin, "°")})
	}
	for _, c := range mg.PhaseCrossovers {
		ms.rows = append(ms.rows, row{"phase crossover at " + gUnit(c.FrequencyRadPerSec, "rad/s"), "gain factor " + g(c.Margin)})
	}
	out = append(out, ms)

	st := r.Step
	ss := section{title: "Step response from reference to output at " + r.Loop.at}
	if math.IsNaN(float64(st.FinalValue)) {
		ss.rows = append(ss.rows, row{"not available", "see the warnings"})
	} else {
		ss.rows = append(ss.rows,
			row{"rise time (10 % to 90 %)", gUnit(st.RiseTimeSec, "s")},
			row{"settling time (2 % band)", gUnit(st.SettlingTimeSec, "s")},
			row{"overshoot", gUnit(st.OvershootPct, "%")},
			row{"undershoot", gUnit(st.UndershootPct, "%")},
			row{"peak", fmt.Sprintf("%s at %s", g(st.Peak), gUnit(st.PeakTimeSec, "s"))},
			row{"final value", g(st.FinalValue)},
		)
	}
	out = append(out, ss)

	e := r.SteadyState
	es := section{title: "Steady-state errors (unit inputs) at " + r.Loop.at}
	if e.SystemType == nil {
		es.rows = append(es.rows, row{"not available", "see the warnings"})
		out = append(out, es)
		return out
	}
	origin := "s = 0"
	if float64(r.Loop.SampleTimeSec) > 0 {
		origin = "z = 1"
	}
	es.rows = append(es.rows,
		row{"system type (poles of L at " + origin + ")", fmt.Sprint(*e.SystemType)},
		row{"position constant", g(e.PositionConstant)},
		row{"velocity constant", g(e.VelocityConstant)},
		row{"acceleration constant", g(e.AccelerationConstant)},
		row{"error to a step", g(e.StepError)},
		row{"error to a ramp", g(e.RampError)},
		row{"error to a parabola", g(e.ParabolaError)},
	)
	out = append(out, es)
	return out
}

// atFrequency says where a peak lies: "at 2.5 rad/s", or "approached as
// the frequency grows without bound".
func atFrequency(w number) string {
	if isInf(w) {
		return "(approached as the frequency grows without bound)"
	}
	return "at " + gUnit(w, "rad/s")
}

func isInf(x number) bool { return float64(x) > 1e308 }

// intervalListClosed formats real-axis segments [lo, hi].
func intervalListClosed(ivs []interval) string {
	if len(ivs) == 0 {
		return "none"
	}
	parts := make([]string, len(ivs))
	for i, iv := range ivs {
		t := intervalText(iv)
		parts[i] = "[" + t[1:len(t)-1] + "]"
	}
	return strings.Join(parts, ", ")
}

func variableWords(v string) string {
	if v == "gain" {
		return "the loop gain k"
	}
	return "the parameter " + v
}

func methodWords(m string) string {
	switch m {
	case "zoh":
		return "zero-order hold"
	case "foh":
		return "first-order hold"
	case "tustin":
		return "the Tustin (bilinear) transform"
	case "matched":
		return "matched poles and zeros"
	}
	return m
}

// verdictCounts returns how many requirements pass, of how many.
func verdictCounts(r *report) (pass, total int) {
	for _, q := range r.Requirements {
		if q.Pass {
			pass++
		}
	}
	return pass, len(r.Requirements)
}

// printSummary writes the readable summary of the report.
func printSummary(w io.Writer, r *report) {
	fmt.Fprintln(w, r.Name)
	fmt.Fprintln(w, strings.Repeat("=", len([]rune(r.Name))))
	if r.Description != "" {
		fmt.Fprintln(w, r.Description)
	}
	for _, s := range sections(r) {
		fmt.Fprintf(w, "\n%s\n", s.title)
		width := 0
		for _, rw := range s.rows {
			width = max(width, len([]rune(rw.label)))
		}
		width = min(width, 44)
		for _, rw := range s.rows {
			pad := max(width-len([]rune(rw.label)), 0)
			fmt.Fprintf(w, "  %s%s  %s\n", rw.label, strings.Repeat(" ", pad), rw.value)
		}
	}
	if len(r.Requirements) > 0 {
		pass, total := verdictCounts(r)
		fmt.Fprintf(w, "\nRequirements: %d of %d met\n", pass, total)
		for _, q := range r.Requirements {
			verdict := "pass"
			if !q.Pass {
				verdict = "FAIL"
			}
			fmt.Fprintf(w, "  %s  %s\n", verdict, q.Message)
		}
	}
	if len(r.Warnings) > 0 {
		fmt.Fprintln(w, "\nWarnings")
		for _, s := range r.Warnings {
			fmt.Fprintf(w, "  - %s\n", s)
		}
	}
	fmt.Fprintf(w, "\nCaution: %s\n", safetyCaution)
}

// safetyCaution is printed with every report.
const safetyCaution = "These results describe a linear model. They do not guarantee the behaviour of real hardware (saturation, friction, backlash, quantisation, noise and unmodelled dynamics are not in the model). Validate loops that drive machines on the real plant with limits and interlocks in place; local codes, applicable standards and licensed engineering practice govern any safety-related use."
