package main

import (
	"fmt"

	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"

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
	// The other candidates' poles are marked as dots too (the same mark:
	// closed-loop poles at a value of τ), each in its own colour.
	var also []chart.LocusMark
	for i, c := range d.Candidates {
		if i != d.Chosen {
			also = append(also, chart.LocusMark{Value: c.TauSec, Poles: c.Poles})
		}
	}
	fig, err := chart.RootLocus(tr, &chart.LocusSettings{
		PlaneSettings: chart.PlaneSettings{
			Title:         fmt.Sprintf("Parameter root locus over the derivative time τ (s), proportional gain fixed at 10 V/rad; both candidates give ζ = %.2g", targetDamping),
			DampingRatios: []float64{targetDamping},
		},
		Mark: &chart.LocusMark{Value: chosen.TauSec, Poles: chosen.Poles},
		Also: also,
	})
	if err != nil {
		return nil, fmt.Errorf("locus plot: %w", err)
	}
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
