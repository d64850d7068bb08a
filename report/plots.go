package report

import (
	"bytes"
	"fmt"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/tf"
)

// render draws fig as SVG and PNG into a figure of the report.
func render(fig *chart.Figure, file, title, caption string) (Figure, error) {
	var svg, png bytes.Buffer
	if err := fig.Render(&svg, chart.FormatSVG); err != nil {
		return Figure{}, err
	}
	if err := fig.Render(&png, chart.FormatPNG); err != nil {
		return Figure{}, err
	}
	return Figure{File: file, Title: title, Caption: caption, SVG: svg.Bytes(), PNG: png.Bytes()}, nil
}

// plots draws the figures of the report: root locus, frequency response,
// Nyquist curve, step response and pole–zero map. A figure that cannot be
// drawn is left out with a warning that says why.
func (a *analysis) plots() []Figure {
	var figs []Figure
	add := func(title, file, caption string, draw func() (*chart.Figure, error)) {
		defer func() {
			if p := recover(); p != nil {
				a.warn("plot %q not drawn: internal error (%v); please report this loop to the loopwise maintainers", title, p)
			}
		}()
		fig, err := draw()
		if err == nil {
			var f Figure
			if f, err = render(fig, file, title, caption); err == nil {
				figs = append(figs, f)
				return
			}
		}
		a.warn("plot %q not drawn: %s", title, short(err))
	}
	m, lf := a.m, a.m.file
	variable, value := "the loop gain k", m.gain
	if p := lf.Parameter; p != nil {
		variable, value = "the parameter "+p.Name, p.Value
	}

	add("Root locus", "root-locus",
		fmt.Sprintf("Closed-loop poles as %s varies over %s: branches with arrows in the direction of increasing %s, × where each branch starts and ○ where branches end (the key says at which value), asymptotes, break points and crossings of the stability boundary with their values; filled dots are the closed-loop poles at %s = %s.",
			variable, intervalText(a.rep.Locus.Range), a.rep.Locus.Variable, a.rep.Locus.Variable, g(Number(value))),
		func() (*chart.Figure, error) {
			if a.locus == nil {
				return nil, fmt.Errorf("the locus could not be analysed")
			}
			set := &locus.Settings{PadeOrder: padeOrder, Range: a.locus.Range, Variable: a.locus.Variable,
				Progress: func(f float64) { a.fraction("plots: tracing the root locus", f) }}
			if fig, ok, err := a.deadTimeLocusFigure(set, value); ok { // deadtime.go
				return fig, err
			}
			l, err := locus.Trace(a.locusFor, set)
			if err != nil {
				return nil, err
			}
			var mark *chart.LocusMark
			if a.locus.Range.Contains(value) {
				if poles, err := locus.ClosedLoopPoles(a.locusFor, value); err == nil {
					mark = &chart.LocusMark{Value: value, Poles: poles}
				}
			}
			return chart.RootLocus(l, &chart.LocusSettings{PlaneSettings: chart.PlaneSettings{Grid: true, Approximation: padeArtefacts(a.locusFor)}, Mark: mark})
		})

	add("Frequency response", "frequency-response",
		fmt.Sprintf("Magnitude and phase of the open loop L at k = %s, with the gain and phase crossovers and the margins.", g(Number(m.gain))),
		func() (*chart.Figure, error) {
			grid, err := margins.AutoGrid(m.analysed, nil)
			if err != nil {
				return nil, err
			}
			resp, err := margins.FrequencyResponse(m.analysed, grid)
			if err != nil {
				return nil, err
			}
			return chart.FrequencyResponse(resp, a.margins, nil)
		})

	add("Nyquist curve", "nyquist",
		"The open loop L along the Nyquist contour, the critical point −1, the unit circle and the circle of radius 1/Ms around −1 that the curve touches at the peak sensitivity.",
		func() (*chart.Figure, error) {
			n, err := margins.NyquistCurve(m.analysed, nil)
			if err != nil {
				return nil, err
			}
			return chart.Nyquist(n, a.margins, nil)
		})

	add("Step response", "step-response",
		"Response of the closed loop from reference to output to a unit step, with the rise between 10 % and 90 %, the overshoot and the 2 % settling band.",
		func() (*chart.Figure, error) {
			if a.step == nil {
				return nil, fmt.Errorf("the closed loop has no settled step response (see the step warnings)")
			}
			r, err := a.stepCurve() // deadtime.go: exact with dead time
			if err != nil {
				return nil, err
			}
			return chart.StepResponse(r, a.step, nil)
		})

	add("Pole–zero map", "pole-zero-map",
		"Open-loop poles (×) and zeros (○) of L with lines of constant damping; the shaded region is where poles are stable.",
		func() (*chart.Figure, error) {
			l := m.open.WithoutDelay()
			set := &chart.PlaneSettings{Grid: true, Title: "Pole–zero map of the open loop L"}
			switch {
			case m.open.IsDiscrete() && a.rational.DelaySec() == 0:
				l = a.rational
			case a.dead == nil && !m.delayIgnored && a.rational.DelaySec() == 0 && m.open.DelaySec() > 0:
				// Padé mode: the loop analysed is the rational one; its
				// approximation's poles and zeros are marked as such.
				l = a.rational
				set.Approximation = padeArtefacts(m.open)
				set.Title += " with its dead time by a Padé approximation"
			}
			return chart.PoleZero(l, set)
		})
	a.closedLoopPlots(add) // closedloop.go
	a.designPlots(add)     // design.go
	a.robustPlots(add)     // robust.go
	return figs
}

// padeArtefacts returns the poles and zeros of the Padé approximation of
// order padeOrder that replaces the dead time of the continuous loop l in
// the Padé-mode figures (the locus traced by locus.Trace, the rational
// loop), or nil when l has no dead time or is discrete. They are drawn as
// approximation artefacts, never as the plant's (chart.Approximation).
func padeArtefacts(l tf.TF) *chart.Approximation {
	tau := l.DelaySec()
	if tau <= 0 || l.IsDiscrete() {
		return nil
	}
	p, err := tf.New([]float64{1}, []float64{1})
	if err == nil {
		p, err = p.WithDelay(tau)
	}
	if err == nil {
		p, err = p.Pade(padeOrder)
	}
	if err != nil {
		return nil
	}
	poles, err1 := p.Den().Roots()
	zeros, err2 := p.Num().Roots()
	if err1 != nil || err2 != nil {
		return nil
	}
	return &chart.Approximation{Name: fmt.Sprintf("Padé approximation of the dead time (order %d)", padeOrder), Poles: poles, Zeros: zeros}
}
