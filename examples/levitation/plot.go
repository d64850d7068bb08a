package main

import (
	"fmt"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/examples/internal/output"
	"github.com/loopwise/loopwise/response"
)

// plot writes the figures into dir and returns the paths written.
func (d levitation) plot(dir string) ([]string, error) {
	var files []string
	closed, err := d.Loop.ClosedLoop()
	if err != nil {
		return nil, err
	}
	step, err := response.Step(closed, nil)
	if err != nil {
		return nil, fmt.Errorf("step response: %w", err)
	}
	fig, err := chart.StepResponse(step, &d.Step, &chart.StepSettings{
		Title:       fmt.Sprintf("Ball height after a 1 mm reference step, Kc = %.4g A/m", d.Kc),
		OutputLabel: "ball height change (mm)",
	})
	if err != nil {
		return nil, fmt.Errorf("step plot: %w", err)
	}
	paths, err := output.Save(fig, dir, "step-response")
	files = append(files, paths...)
	return files, err
}
