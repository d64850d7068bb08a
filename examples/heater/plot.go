package main

import (
	"fmt"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/examples/internal/output"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/response"
)

// stepPadeOrder is the Padé order used for the closed-loop step response:
// a closed loop around a dead time is not a rational transfer function, so
// the response is that of the loop with the delay approximated.
const stepPadeOrder = 8

// plot writes the figures into dir and returns the paths written.
func (d heater) plot(dir string) ([]string, error) {
	var files []string
	save := func(fig *chart.Figure, base string) error {
		paths, err := output.Save(fig, dir, base)
		files = append(files, paths...)
		return err
	}

	freq, err := margins.FrequencyResponse(d.Loop, nil)
	if err != nil {
		return nil, fmt.Errorf("frequency response: %w", err)
	}
	fig, err := chart.FrequencyResponse(freq, &d.Margins, &chart.FrequencySettings{
		Title: "Frequency response of the heater loop, dead time exact",
	})
	if err != nil {
		return nil, fmt.Errorf("frequency plot: %w", err)
	}
	if err := save(fig, "frequency-response"); err != nil {
		return files, err
	}

	for _, n := range []int{1, 3} {
		tr, err := locus.Trace(d.Loop, &locus.Settings{PadeOrder: n, Variable: "k"})
		if err != nil {
			return files, fmt.Errorf("tracing the Padé order %d locus: %w", n, err)
		}
		fig, err := chart.RootLocus(tr, &chart.LocusSettings{
			PlaneSettings: chart.PlaneSettings{Title: fmt.Sprintf("Root locus over the factor k on Kc, dead time as Padé order %d (near the origin)", n)},
			Mark:          &chart.LocusMark{Value: 1},
		})
		if err != nil {
			return files, fmt.Errorf("locus plot: %w", err)
		}
		// The branches that matter cross the imaginary axis near
		// π/(2·12 s) ≈ 0.13 rad/s; the far ends of the locus would squeeze
		// them into a corner, so the view is set by hand around them.
		p := fig.Panels[0]
		p.X.Min, p.X.Max = -0.6, 0.6
		p.Y.Min, p.Y.Max = -0.45, 0.45
		if err := save(fig, fmt.Sprintf("root-locus-pade-%d", n)); err != nil {
			return files, err
		}
	}

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
	fig, err = chart.StepResponse(step, &m, &chart.StepSettings{
		Title:       fmt.Sprintf("Temperature after a 1 °C set-point step (dead time as Padé order %d)", stepPadeOrder),
		OutputLabel: "temperature change (°C)",
	})
	if err != nil {
		return nil, fmt.Errorf("step plot: %w", err)
	}
	return files, save(fig, "step-response")
}
