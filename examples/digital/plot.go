package main

import (
	"fmt"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/examples/internal/output"
	"github.com/loopwise/loopwise/locus"
)

// plot writes the figures into dir and returns the paths written.
func (c comparison) plot(dir string) ([]string, error) {
	var files []string
	fig, err := c.stepComparison()
	if err != nil {
		return nil, err
	}
	paths, err := output.Save(fig, dir, "step-comparison")
	files = append(files, paths...)
	if err != nil {
		return files, err
	}
	for _, v := range c.Variants[1:] {
		tr, err := locus.Trace(v.Loop, &locus.Settings{Variable: "k"})
		if err != nil {
			return files, fmt.Errorf("%s: tracing the locus: %w", v.Name, err)
		}
		fig, err := chart.RootLocus(tr, &chart.LocusSettings{
			PlaneSettings: chart.PlaneSettings{
				Title:         fmt.Sprintf("Root locus in z over the factor k on the controller, %s", v.Name),
				DampingRatios: []float64{0.3, 0.7},
			},
			Mark: &chart.LocusMark{Value: 1, Poles: v.Poles},
		})
		if err != nil {
			return files, fmt.Errorf("%s: locus plot: %w", v.Name, err)
		}
		paths, err := output.Save(fig, dir, fmt.Sprintf("root-locus-z-%gms", 1000*v.SampleTimeSec))
		files = append(files, paths...)
		if err != nil {
			return files, err
		}
		if v.SampleTimeSec >= 0.01 {
			continue
		}
		// Fast sampling crowds the closed-loop poles near z = 1 (z = e^(sT)
		// with |s|T small); a second figure zooms in there.
		fig, err = chart.RootLocus(tr, &chart.LocusSettings{
			PlaneSettings: chart.PlaneSettings{
				Title:         fmt.Sprintf("The same locus near z = 1, %s", v.Name),
				DampingRatios: []float64{0.3, 0.7},
				HideKey:       true,
			},
			Mark: &chart.LocusMark{Value: 1, Poles: v.Poles},
		})
		if err != nil {
			return files, fmt.Errorf("%s: locus plot: %w", v.Name, err)
		}
		p := fig.Panels[0]
		p.X.Min, p.X.Max = 0.7, 1.1
		p.Y.Min, p.Y.Max = -0.2, 0.2
		paths, err = output.Save(fig, dir, fmt.Sprintf("root-locus-z-%gms-near-1", 1000*v.SampleTimeSec))
		files = append(files, paths...)
		if err != nil {
			return files, err
		}
	}
	return files, nil
}

// plotEndSec is the right end of the step comparison's time axis.
const plotEndSec = 0.6

// stepComparison draws the continuous step response with its metrics and
// overlays the two digital responses: the joint angle at the sample
// instants, held until the next sample as the controller sees it.
func (c comparison) stepComparison() (*chart.Figure, error) {
	cont := c.Variants[0]
	fig, err := chart.StepResponse(cont.StepCurve, nil, &chart.StepSettings{
		Title:       "Joint angle after a 1 rad reference step: continuous design and its digital versions",
		OutputLabel: "joint angle (rad)",
		EndTimeSec:  plotEndSec,
	})
	if err != nil {
		return nil, fmt.Errorf("step plot: %w", err)
	}
	p := fig.Panels[0]
	colours := chart.Palette()
	thumb := func(i int) (*plotter.Line, error) {
		l, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}})
		if err != nil {
			return nil, err
		}
		l.Color = colours[i]
		l.Width = vg.Points(1.4)
		return l, nil
	}
	l, err := thumb(0)
	if err != nil {
		return nil, err
	}
	p.Legend.Add(fmt.Sprintf("%s (overshoot %.3g %%)", cont.Name, cont.Step.OvershootPct), l)
	for i, v := range c.Variants[1:] {
		r := v.StepCurve
		var xs, ys []float64
		for k, y := range r.Output {
			t := r.TimeSec[k]
			if t >= plotEndSec {
				break
			}
			xs = append(xs, t, math.Min(t+r.SampleTimeSec, plotEndSec))
			ys = append(ys, y, y)
		}
		curve, err := chart.NewCurve(xs, ys)
		if err != nil {
			return nil, err
		}
		curve.Color = colours[i+1]
		curve.Width = vg.Points(1.4)
		p.Add(curve)
		l, err := thumb(i + 1)
		if err != nil {
			return nil, err
		}
		p.Legend.Add(fmt.Sprintf("%s (overshoot %.3g %%)", v.Name, v.Step.OvershootPct), l)
	}
	// Top right is empty once the responses have settled; the padding
	// separates the rows of the theme's small, vertically centred text.
	p.Legend.Top = true
	p.Legend.Left = false
	p.Legend.Padding = vg.Points(6)
	p.Legend.YOffs = -vg.Points(6)
	return fig, nil
}
