package main

import (
	"fmt"
	"math"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/examples/internal/output"
	"github.com/loopwise/loopwise/examples/internal/words"
	"github.com/loopwise/loopwise/locus"
)

// plot writes the figures into dir and returns the paths written.
func (d gimbal) plot(dir string) ([]string, error) {
	var files []string
	tr, err := locus.Trace(d.Param.Loop, &locus.Settings{Variable: "τ"})
	if err != nil {
		return nil, fmt.Errorf("tracing the parameter locus: %w", err)
	}
	chosen := d.Candidates[d.Chosen]
	fig, err := chart.RootLocus(tr, &chart.LocusSettings{
		PlaneSettings: chart.PlaneSettings{
			Title:         "Parameter root locus over the derivative time τ (s), proportional gain fixed at 10 V/rad",
			DampingRatios: []float64{targetDamping},
		},
		Mark: &chart.LocusMark{Value: chosen.TauSec, Poles: chosen.Poles},
	})
	if err != nil {
		return nil, fmt.Errorf("locus plot: %w", err)
	}
	// Mark the other candidates' poles too, as hollow squares, and widen
	// the view to show them.
	pl := fig.Panels[0]
	for i, c := range d.Candidates {
		if i == d.Chosen {
			continue
		}
		var xs, ys []float64
		for _, z := range c.Poles {
			xs, ys = append(xs, real(z)), append(ys, imag(z))
		}
		marks, err := chart.NewMarks(xs, ys)
		if err != nil {
			return nil, err
		}
		marks.GlyphStyle = draw.GlyphStyle{Shape: draw.BoxGlyph{}, Radius: vg.Points(4), Color: chart.Palette()[4]}
		pl.Add(marks)
		thumb, err := plotter.NewScatter(plotter.XYs{{X: xs[0], Y: ys[0]}})
		if err != nil {
			return nil, err
		}
		thumb.GlyphStyle = marks.GlyphStyle
		pl.Legend.Add(fmt.Sprintf("poles at τ = %.3g s (also ζ = %.2g)", c.TauSec, targetDamping), thumb)
		pl.Y.Min, pl.Y.Max = math.Min(pl.Y.Min, -1.2*imag(c.Pair)), math.Max(pl.Y.Max, 1.2*imag(c.Pair))
	}
	pl.Legend.Top, pl.Legend.Left = false, true
	pl.Legend.Padding = vg.Points(6)
	pl.Legend.XOffs, pl.Legend.YOffs = vg.Points(8), vg.Points(20)
	paths, err := output.Save(fig, dir, "parameter-locus")
	files = append(files, paths...)
	if err != nil {
		return files, err
	}
	fig, err = d.disturbanceComparison()
	if err != nil {
		return files, err
	}
	paths, err = output.Save(fig, dir, "disturbance-comparison")
	files = append(files, paths...)
	if err != nil {
		return files, err
	}
	for i, c := range d.Candidates {
		fig, err := chart.StepResponse(c.StepCurve, &c.Step, &chart.StepSettings{
			Title:       fmt.Sprintf("Tilt angle after a 1 rad step, derivative time τ = %.4g s", c.TauSec),
			OutputLabel: "tilt angle (rad)",
		})
		if err != nil {
			return files, fmt.Errorf("step plot: %w", err)
		}
		paths, err := output.Save(fig, dir, fmt.Sprintf("step-response-candidate-%d", i+1))
		files = append(files, paths...)
		if err != nil {
			return files, err
		}
	}
	return files, nil
}

// disturbanceComparison overlays the tilt angle after a 1 V disturbance
// step at the motor for every candidate.
func (d gimbal) disturbanceComparison() (*chart.Figure, error) {
	first := d.Candidates[0]
	fig, err := chart.StepResponse(first.DisturbanceCurve, nil, &chart.StepSettings{
		Title:       "Tilt angle after a 1 V disturbance step at the motor",
		OutputLabel: "tilt angle (rad)",
	})
	if err != nil {
		return nil, fmt.Errorf("disturbance plot: %w", err)
	}
	pl := fig.Panels[0]
	colours := chart.Palette()
	for i, c := range d.Candidates {
		r := c.DisturbanceCurve
		if i > 0 {
			curve, err := chart.NewCurve(r.TimeSec, r.Output)
			if err != nil {
				return nil, err
			}
			curve.Color = colours[i]
			curve.Width = vg.Points(1.4)
			pl.Add(curve)
		}
		thumb, err := plotter.NewLine(plotter.XYs{{X: 0, Y: 0}, {X: 1, Y: 0}})
		if err != nil {
			return nil, err
		}
		thumb.Color = colours[i]
		thumb.Width = vg.Points(1.4)
		pl.Legend.Add(fmt.Sprintf("τ = %.4g s: settles (2 %% band) in %s", c.TauSec, words.Seconds(c.Disturbance.SettlingTimeSec)), thumb)
	}
	pl.Legend.Top, pl.Legend.Left = false, false
	pl.Legend.Padding = vg.Points(6)
	pl.Legend.YOffs = vg.Points(14)
	return fig, nil
}
