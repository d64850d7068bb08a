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
func (d levitation) plot(dir string) ([]string, error) {
	var files []string
	save := func(fig *chart.Figure, base string) error {
		paths, err := output.Save(fig, dir, base)
		files = append(files, paths...)
		return err
	}

	tr, err := locus.Trace(d.PerUnitGain, &locus.Settings{Variable: "Kc"})
	if err != nil {
		return nil, fmt.Errorf("tracing the locus: %w", err)
	}
	poles, err := locus.ClosedLoopPoles(d.PerUnitGain, d.Kc)
	if err != nil {
		return nil, err
	}
	fig, err := chart.RootLocus(tr, &chart.LocusSettings{
		PlaneSettings: chart.PlaneSettings{Title: "Root locus of the levitation loop over the controller gain Kc (A/m)"},
		Mark:          &chart.LocusMark{Value: d.Kc, Poles: poles},
	})
	if err != nil {
		return nil, fmt.Errorf("locus plot: %w", err)
	}
	if err := save(fig, "root-locus"); err != nil {
		return files, err
	}

	ny, err := margins.NyquistCurve(d.Loop, nil)
	if err != nil {
		return files, fmt.Errorf("the Nyquist curve: %w", err)
	}
	fig, err = chart.Nyquist(ny, &d.Margins, &chart.NyquistSettings{
		Title: fmt.Sprintf("Nyquist curve of the levitation loop at Kc = %.4g A/m", d.Kc),
		// Wide enough for the line of margins written under the plot.
		Size: chart.Size{WidthCm: 21},
	})
	if err != nil {
		return files, fmt.Errorf("the Nyquist plot: %w", err)
	}
	if err := save(fig, "nyquist"); err != nil {
		return files, err
	}

	closed, err := d.Loop.ClosedLoop()
	if err != nil {
		return files, err
	}
	step, err := response.Step(closed, nil)
	if err != nil {
		return files, fmt.Errorf("step response: %w", err)
	}
	fig, err = chart.StepResponse(step, &d.Step, &chart.StepSettings{
		Title:       fmt.Sprintf("Ball height after a 1 mm reference step, Kc = %.4g A/m", d.Kc),
		OutputLabel: "ball height change (mm)",
	})
	if err != nil {
		return files, fmt.Errorf("step plot: %w", err)
	}
	return files, save(fig, "step-response")
}
