package main

import (
	"fmt"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/examples/internal/output"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
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
	}
	return files, nil
}

// plotEndSec is the right end of the step comparison's time axis.
const plotEndSec = 0.6

// pointsPerSample is the number of intervals of the fine grid per sample
// period on which the plant's output between samples is computed.
const pointsPerSample = 16

// between returns the joint angle of a digital variant between the
// samples: the continuous plant G(s) driven by the controller's output
// held over each sample period (the zero-order hold), from rest, on a grid
// of pointsPerSample intervals per period up to plotEndSec. The controller
// output is the step response of U/R = C(z)/(1 + C(z)·G(z)) at the sample
// instants; the plant is simulated exactly under the hold
// (response.Simulate, Van Loan 1978), so at the sample instants the curve
// equals the sampled closed-loop response (the zero-order-hold equivalent
// G(z) is exact there).
func between(v variant, plant tf.TF) (response.Response, error) {
	T := v.SampleTimeSec
	one, err := tf.NewDiscrete([]float64{1}, []float64{1}, T)
	if err != nil {
		return response.Response{}, err
	}
	sens, err := one.Parallel(v.Loop) // 1 + C·G
	if err != nil {
		return response.Response{}, err
	}
	inv, err := sens.Inverse()
	if err != nil {
		return response.Response{}, err
	}
	ur, err := v.Controller.Series(inv)
	if err != nil {
		return response.Response{}, err
	}
	samples := int(math.Ceil(plotEndSec/T - 1e-9))
	u, err := response.Step(ur, &response.Settings{HorizonSec: float64(samples) * T})
	if err != nil {
		return response.Response{}, fmt.Errorf("controller output: %w", err)
	}
	n := samples * pointsPerSample
	ts := make([]float64, n+1)
	us := make([]float64, n+1)
	for j := range ts {
		k := j / pointsPerSample
		ts[j] = float64(k)*T + float64(j%pointsPerSample)*T/pointsPerSample
		us[j] = u.Output[min(k, len(u.Output)-1)]
	}
	return response.Simulate(plant, ts, us, &response.SimulateSettings{Interpolation: response.Hold})
}

// stepComparison draws the continuous step response with its metrics and
// overlays the two digital responses as what they are: the joint angle at
// the sample instants (dots), and between them the angle the continuous
// plant really takes under the held controller output (a thin line).
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
	plant, err := tf.Parse(plantText)
	if err != nil {
		return nil, err
	}
	p := fig.Panels[0]
	colours := chart.Palette()
	line := func(i int, w vg.Length) draw.LineStyle { return draw.LineStyle{Color: colours[i], Width: w} }
	thumb := func(i int, w vg.Length) (*plotter.Line, error) {
		l, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}})
		if err != nil {
			return nil, err
		}
		l.LineStyle = line(i, w)
		return l, nil
	}
	l, err := thumb(0, vg.Points(1.4))
	if err != nil {
		return nil, err
	}
	p.Legend.Add(fmt.Sprintf("%s (overshoot %.3g %%)", cont.Name, cont.Step.OvershootPct), l)
	for i, v := range c.Variants[1:] {
		b, err := between(v, plant)
		if err != nil {
			return nil, fmt.Errorf("%s: output between samples: %w", v.Name, err)
		}
		curve, err := chart.NewCurve(b.TimeSec, b.Output)
		if err != nil {
			return nil, err
		}
		curve.LineStyle = line(i+1, vg.Points(1))
		p.Add(curve)
		r := v.StepCurve
		var xs, ys []float64
		for k, t := range r.TimeSec {
			if t <= plotEndSec*(1+1e-9) {
				xs = append(xs, t)
				ys = append(ys, r.Output[k])
			}
		}
		dots, err := chart.NewMarks(xs, ys)
		if err != nil {
			return nil, err
		}
		radius := vg.Points(2.2)
		if len(xs) > 60 {
			radius = vg.Points(1.5) // dense samples: small dots
		}
		dots.GlyphStyle = draw.GlyphStyle{Color: colours[i+1], Radius: radius, Shape: draw.CircleGlyph{}}
		p.Add(dots)
		l, err := thumb(i+1, vg.Points(1))
		if err != nil {
			return nil, err
		}
		p.Legend.Add(fmt.Sprintf("%s: samples (overshoot %.3g %% at the samples) and the angle between them", v.Name, v.Step.OvershootPct), l, dots)
	}
	// Top right is empty once the responses have settled; the padding
	// separates the rows of the theme's small, vertically centred text.
	p.Legend.Top = true
	p.Legend.Left = false
	p.Legend.Padding = vg.Points(6)
	p.Legend.YOffs = -vg.Points(6)
	return fig, nil
}
