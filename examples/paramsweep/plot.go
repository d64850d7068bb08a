package main

import (
	"fmt"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/examples/internal/output"
)

// plot writes the figures into dir and returns the paths written.
func (d gimbal) plot(dir string) ([]string, error) {
	var files []string
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
