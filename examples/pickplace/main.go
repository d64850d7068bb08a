// Command pickplace proves the position loop of a pick-and-place axis for
// every payload it may carry, instead of for the nominal one.
//
// The scenario is this project's own: a belt-driven linear axis carries a
// gripper and a payload of 0 to 2 kg. The payload changes the load time
// constant m of the drive (50 to 80 ms) and, through the belt stretch and
// the current limit's derating, the gain factor g (0.8 to 1.2 of nominal).
// From the drive command (V) to the carriage position (mm) the plant is
//
//	G(s) = 9·g / (s² (m s + 1)),
//
// and a PD controller with a 10 ms roll-off closes the loop,
// C(s) = (0.4 + 0.3 s)/(1 + 0.01 s). The program proves the closed loop
// stable for the whole payload box (g, m) — a proof, not a sample — finds
// the worst margins with guaranteed bounds, gives the robust verdict on
// each requirement, estimates the probability of meeting each requirement
// over the payload distribution (Monte Carlo, Wilson intervals), and draws
// the Nyquist band of the box and the margin histograms.
//
// Usage:
//
//	go run ./examples/pickplace [-out folder]
package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/examples/internal/output"
	"github.com/loopwise/loopwise/robust"
	"github.com/loopwise/loopwise/spec"
)

func main() { output.Main("pickplace", "pickplace-output", run) }

// The uncertain loop of the axis.
var (
	plantText      = "9*g/(s^2 (m s + 1))"
	controllerText = "(0.4 + 0.3 s)/(1 + 0.01 s)"
	params         = []robust.Param{
		{Name: "g", Min: 0.8, Max: 1.2},
		{Name: "m", Min: 0.05, Max: 0.08, Distribution: robust.Normal},
	}
)

// requirements are the axis' sign-off limits.
func requirements() spec.Requirements {
	return spec.Requirements{
		spec.MinPhaseMarginDeg(45),
		spec.MinGainMarginDB(6),
		spec.MaxPeakSensitivity(1.5),
		spec.MinDelayMarginSec(0.1),
		spec.MaxOvershootPct(40),
	}
}

// study is everything the program computes.
type study struct {
	Loop         *robust.Loop
	Stability    robust.StabilityResult
	Worst        []robust.WorstCase
	Requirements []robust.RequirementResult
	MonteCarlo   robust.SampleResult
}

func analyse() (study, error) {
	var s study
	var err error
	s.Loop, err = robust.NewLoop(robust.Description{Expressions: []string{plantText, controllerText}, Params: params})
	if err != nil {
		return s, err
	}
	if s.Worst, s.Stability, err = robust.WorstCases(s.Loop, nil); err != nil {
		return s, err
	}
	if s.Requirements, err = robust.CheckRequirements(s.Loop, requirements(), nil, nil); err != nil {
		return s, err
	}
	s.MonteCarlo, err = robust.MonteCarlo(context.Background(), s.Loop, requirements(), &robust.SampleSettings{Samples: 2000, Seed: 1})
	return s, err
}

func run(stdout io.Writer, outDir string) error {
	s, err := analyse()
	if err != nil {
		return err
	}
	return output.Report(stdout, outDir, s.print, s.plot)
}

func at(p []robust.Param, v []float64) string {
	var parts []string
	for i, x := range v {
		parts = append(parts, fmt.Sprintf("%s = %.4g", p[i].Name, x))
	}
	return strings.Join(parts, ", ")
}

func (s study) print(w io.Writer) error {
	p := s.Loop.Params()
	fmt.Fprintf(w, "Pick-and-place axis: L = %s · %s, g in [%g, %g], m in [%g, %g] s\n", plantText, controllerText, p[0].Min, p[0].Max, p[1].Min, p[1].Max)
	fmt.Fprintf(w, "Verdict: %s (%s dependence; %s)\n", s.Stability.Verdict, s.Loop.Class(), s.Stability.Method)
	if ce := s.Stability.Counterexample; ce != nil {
		fmt.Fprintf(w, "  unstable at %s, closed-loop roots %v\n", at(p, ce.Values), ce.UnstableRoots)
	}
	fmt.Fprintln(w, "Worst cases over the box (found at a point; guaranteed bound for the whole box):")
	for _, c := range s.Worst {
		bound := "no bound (" + c.BoundNote + ")"
		if !math.IsNaN(c.Bound) {
			rel := "≥"
			if c.Quantity == robust.PeakSensitivity {
				rel = "≤"
			}
			bound = fmt.Sprintf("guaranteed %s %.4g", rel, c.Bound)
		}
		fmt.Fprintf(w, "  %-26s %s at %s; %s\n", c.Quantity, strings.TrimSpace(fmt.Sprintf("%.4g %s", c.Value, c.Quantity.Unit())), at(p, c.At), bound)
	}
	fmt.Fprintln(w, "Requirements over the box:")
	for _, r := range s.Requirements {
		fmt.Fprintf(w, "  %-40s %s", r.Requirement, r.Verdict)
		if r.Verdict == robust.ViolatedAtPoint {
			fmt.Fprintf(w, " (%.4g at %s)", r.Value, at(p, r.At))
		}
		fmt.Fprintln(w)
	}
	mc := s.MonteCarlo
	fmt.Fprintf(w, "Monte Carlo, %d samples (seed %d; m normal, g uniform):\n", mc.Done, mc.Seed)
	for _, r := range mc.Requirements {
		fmt.Fprintf(w, "  %-40s pass %.4f (95 %% interval %.4f to %.4f)\n", r.Name, r.Estimate, r.Low, r.High)
	}
	return nil
}

func (s study) plot(dir string) ([]string, error) {
	var files []string
	band, err := robust.NyquistBandOf(s.Loop, nil)
	if err != nil {
		return nil, err
	}
	fig, err := chart.RobustNyquist(band, &chart.NyquistSettings{Title: "Pick-and-place axis: Nyquist curves for every payload"})
	if err != nil {
		return nil, err
	}
	paths, err := output.Save(fig, dir, "nyquist-band")
	files = append(files, paths...)
	if err != nil {
		return files, err
	}
	mc := s.MonteCarlo
	fig, err = chart.MarginHistograms(mc, requirements(), 24, &chart.HistogramSettings{Title: fmt.Sprintf("Pick-and-place axis: margins over %d sampled payloads", mc.Done)})
	if err != nil {
		return files, err
	}
	paths, err = output.Save(fig, dir, "margin-histograms")
	return append(files, paths...), err
}
