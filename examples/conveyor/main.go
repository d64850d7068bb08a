// Command conveyor picks the PI gains of a conveyor belt's speed loop from
// the plane of the two gains and checks them against the requirements.
//
// The scenario is this project's own. A belt conveyor is driven by a
// motor whose current loop is closed by the drive; from the speed command
// of the outer loop's controller output (torque-producing current, % of
// rated) to the belt speed (% of rated) the plant is
//
//	G(s) = 400 / ((s + 2)(s + 50))
//
// a mechanical lag of 0.5 s (belt, rollers and load) and the closed current
// loop of 20 ms. The speed controller is a PI controller C(s) = Kp + Ki/s.
//
// The program
//
//  1. draws the plane of (Kp, Ki): where the loop is stable and where the
//     closed-loop poles have a damping ratio of at least 0.7 and the phase
//     margin is at least 60° (package design, D-partition);
//  2. walks along the line Ki = 2·Kp, on which the PI zero cancels the
//     mechanical pole at −2, and finds exactly the largest Kp on it that
//     meets both requirements;
//  3. backs off by 20 % from that edge for robustness to load changes
//     (common practice) and checks the chosen gains with package spec.
//
// Usage:
//
//	go run ./examples/conveyor [-out folder]
package main

import (
	"fmt"
	"io"

	"github.com/loopwise/loopwise/chart"
	"github.com/loopwise/loopwise/design"
	"github.com/loopwise/loopwise/examples/internal/output"
	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

func main() { output.Main("conveyor", "conveyor-output", run) }

const (
	plantText = "400/((s+2)*(s+50))"
	// mechanicalPole is the pole the PI zero cancels on the line
	// Ki = mechanicalPole·Kp.
	mechanicalPole = 2.0
	// backOff is the fraction of the largest admissible Kp that is used.
	backOff = 0.8
)

// designRequirements shape the plane; checkRequirements are the acceptance
// test of the chosen gains.
var (
	designRequirements = spec.Requirements{spec.MinDampingRatio(0.7), spec.MinPhaseMarginDeg(60)}
	checkRequirements  = spec.Requirements{
		spec.MinDampingRatio(0.7), spec.MinPhaseMarginDeg(60), spec.MinGainMarginDB(10),
		spec.MaxPeakSensitivity(1.4), spec.MaxOvershootPct(5), spec.MaxSettlingTimeSec(0.3),
		spec.MaxSteadyStateError(0.001),
	}
)

// conveyor holds the results of the study.
type conveyor struct {
	Plane     design.PlanePartition
	Line      design.Result // along Ki = 2·Kp, variable Kp
	KpMax     float64
	Kp, Ki    float64
	Loop      tf.TF
	Check     spec.Report
	planeSpec design.Plane
}

func analyse() (conveyor, error) {
	var c conveyor
	plant, err := tf.Parse(plantText)
	if err != nil {
		return c, err
	}
	if c.planeSpec, err = design.NewPlane("Kp", "Ki", "(Kp*s + Ki)/s", plant); err != nil {
		return c, err
	}
	c.Plane, err = design.Partition(c.planeSpec, &design.PlaneSettings{
		XRange: design.Range{Min: -0.5, Max: 5}, YRange: design.Range{Min: -2, Max: 20},
		Requirements: designRequirements,
	})
	if err != nil {
		return c, fmt.Errorf("plane: %w", err)
	}
	line, err := design.ParameterText("Kp", fmt.Sprintf("Kp*(s + %g)/s", mechanicalPole), plant)
	if err != nil {
		return c, err
	}
	if c.Line, err = design.Solve(line, designRequirements, &design.Settings{Range: design.Range{Min: 0, Max: 5}}); err != nil {
		return c, err
	}
	if len(c.Line.AllMet) == 0 {
		return c, fmt.Errorf("no gain on the line Ki = %g·Kp meets the requirements: %s", mechanicalPole, c.Line.Binding)
	}
	c.KpMax = c.Line.AllMet[len(c.Line.AllMet)-1].Hi
	c.Kp = backOff * c.KpMax
	c.Ki = mechanicalPole * c.Kp
	if c.Loop, err = c.planeSpec.LoopAt(c.Kp, c.Ki); err != nil {
		return c, err
	}
	c.Check = spec.Check(c.Loop, checkRequirements)
	return c, nil
}

func run(stdout io.Writer, outDir string) error {
	c, err := analyse()
	if err != nil {
		return err
	}
	return output.Report(stdout, outDir, c.print, c.plot)
}

func (c conveyor) print(w io.Writer) error {
	fmt.Fprintf(w, "Conveyor speed loop, plant G(s) = %s, PI controller Kp + Ki/s\n\n", plantText)
	for _, r := range c.Plane.Regions {
		if r.UnstableRoots == 0 {
			fmt.Fprintf(w, "The stable region of the plane Kp ∈ [%g, %g], Ki ∈ [%g, %g] is one region (outline of %d points).\n",
				c.Plane.XRange.Min, c.Plane.XRange.Max, c.Plane.YRange.Min, c.Plane.YRange.Max, len(r.Polygon))
		}
	}
	fmt.Fprintf(w, "Along Ki = %g·Kp (the PI zero cancels the mechanical pole):\n", mechanicalPole)
	for _, r := range c.Line.Requirements {
		for _, iv := range r.Intervals {
			fmt.Fprintf(w, "  %-45s Kp in [%.6g, %.6g]; upper end: %s\n", r.Requirement.String()+":", iv.Lo, iv.Hi, iv.HiBinding)
		}
	}
	iv := c.Line.AllMet[len(c.Line.AllMet)-1]
	fmt.Fprintf(w, "  both hold up to Kp = %.6g (%s)\n\n", c.KpMax, iv.HiBinding)
	fmt.Fprintf(w, "Chosen gains (%.0f %% of the largest): Kp = %.4g, Ki = %.4g\n", 100*backOff, c.Kp, c.Ki)
	fmt.Fprintf(w, "Acceptance check:\n%s", c.Check)
	if err := c.Check.Err(); err != nil {
		return err
	}
	return nil
}

func (c conveyor) plot(dir string) ([]string, error) {
	var files []string
	fig, err := chart.ParameterPlane(c.Plane, &chart.ParameterPlaneSettings{
		Title:   "Conveyor speed loop: PI gains",
		Nominal: &[2]float64{c.Kp, c.Ki},
	})
	if err != nil {
		return nil, err
	}
	paths, err := output.Save(fig, dir, "parameter-plane")
	files = append(files, paths...)
	if err != nil {
		return files, err
	}
	fig, err = chart.DesignAxis(c.Line, &chart.DesignAxisSettings{
		Title: fmt.Sprintf("Conveyor speed loop along Ki = %g·Kp", mechanicalPole),
		Min:   0, Max: 5,
	})
	if err != nil {
		return files, err
	}
	paths, err = output.Save(fig, dir, "design-axis")
	files = append(files, paths...)
	return files, err
}
