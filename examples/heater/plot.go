package main

import (
	"fmt"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/examples/internal/output"
	"github.com/loopwise/loopwise/response"
)

// stepPadeOrder is the Padé order used for the closed-loop step response:
// a closed loop around a dead time is not a rational transfer function, so
// the response is that of the loop with the delay approximated.
const stepPadeOrder = 8

// plot writes the figures into dir and returns the paths written.
func (d heater) plot(dir string) ([]string, error) {
	var files []string
	approx, err := d.Loop.Pade(stepPadeOrder)
	if err != nil {
		return nil, err
	}
	closed, err := approx.ClosedLoop()
	if err != nil {
		return nil, err
	}
	m, err := response.StepMetrics(closed, nil)
	if err != nil {
		return nil, fmt.Errorf("step metrics: %w", err)
	}
	step, err := response.Step(closed, nil)
	if err != nil {
		return nil, fmt.Errorf("step response: %w", err)
	}
	fig, err := chart.StepResponse(step, &m, &chart.StepSettings{
		Title:       fmt.Sprintf("Temperature after a 1 °C set-point step (dead time as Padé order %d)", stepPadeOrder),
		OutputLabel: "temperature change (°C)",
	})
	if err != nil {
		return nil, fmt.Errorf("step plot: %w", err)
	}
	paths, err := output.Save(fig, dir, "step-response")
	files = append(files, paths...)
	return files, err
}
