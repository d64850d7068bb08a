package main

import (
	"fmt"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/examples/internal/output"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/response"
)

// plot writes the figures into dir and returns the paths written.
func (d servoDesign) plot(dir string) ([]string, error) {
	var files []string
	tr, err := locus.Trace(d.Plant, &locus.Settings{Variable: "Kp"})
	if err != nil {
		return nil, fmt.Errorf("tracing the locus: %w", err)
	}
	fig, err := chart.RootLocus(tr, &chart.LocusSettings{
		PlaneSettings: chart.PlaneSettings{
			Title:         "Root locus of the servo over the proportional gain Kp (V/rad)",
			DampingRatios: []float64{targetDamping},
		},
		Mark: &chart.LocusMark{Value: d.Kp, Poles: d.ClosedLoopPoles},
	})
	if err != nil {
		return nil, fmt.Errorf("locus plot: %w", err)
	}
	paths, err := output.Save(fig, dir, "root-locus")
	files = append(files, paths...)
	if err != nil {
		return files, err
	}
	freq, err := margins.FrequencyResponse(d.Loop, nil)
	if err != nil {
		return files, fmt.Errorf("frequency response: %w", err)
	}
	fig, err = chart.FrequencyResponse(freq, &d.Margins, &chart.FrequencySettings{
		Title: fmt.Sprintf("Frequency response of the servo loop at Kp = %.3g V/rad", d.Kp),
	})
	if err != nil {
		return files, fmt.Errorf("frequency plot: %w", err)
	}
	paths, err = output.Save(fig, dir, "frequency-response")
	files = append(files, paths...)
	if err != nil {
		return files, err
	}
	step, err := response.Step(d.ClosedLoop, nil)
	if err != nil {
		return nil, fmt.Errorf("step response: %w", err)
	}
	fig, err = chart.StepResponse(step, &d.Step, &chart.StepSettings{
		Title:       fmt.Sprintf("Table angle after a 1 rad reference step, Kp = %.3g V/rad", d.Kp),
		OutputLabel: "table angle (rad)",
	})
	if err != nil {
		return nil, fmt.Errorf("step plot: %w", err)
	}
	paths, err = output.Save(fig, dir, "step-response")
	files = append(files, paths...)
	return files, err
}
