package main

import (
	"fmt"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/examples/internal/output"
	"github.com/loopwise/loopwise/response"
)

// plot writes the figures into dir and returns the paths written.
func (d servoDesign) plot(dir string) ([]string, error) {
	var files []string
	step, err := response.Step(d.ClosedLoop, nil)
	if err != nil {
		return nil, fmt.Errorf("step response: %w", err)
	}
	fig, err := chart.StepResponse(step, &d.Step, &chart.StepSettings{
		Title:       fmt.Sprintf("Table angle after a 1 rad reference step, Kp = %.3g V/rad", d.Kp),
		OutputLabel: "table angle (rad)",
	})
	if err != nil {
		return nil, fmt.Errorf("step plot: %w", err)
	}
	paths, err := output.Save(fig, dir, "step-response")
	files = append(files, paths...)
	return files, err
}
