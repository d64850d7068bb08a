package design_test

import (
	"fmt"
	"log"

	"github.com/loopwise/loopwise/design"
	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// The gains of k/(s(s+1)(s+2)) that meet a phase margin, a gain margin and
// an overshoot limit, and the gain that gives exactly 60° of phase margin.
func Example() {
	v, err := design.Gain(tf.MustParse("1/(s*(s+1)*(s+2))"))
	if err != nil {
		log.Fatal(err)
	}
	req := spec.Requirements{spec.MinPhaseMarginDeg(45), spec.MinGainMarginDB(6), spec.MaxOvershootPct(10)}
	res, err := design.Solve(v, req, nil)
	if err != nil {
		log.Fatal(err)
	}
	for _, r := range res.Requirements {
		for _, iv := range r.Intervals {
			fmt.Printf("%s: k in [%.4g, %.4g], upper end: %s\n", r.Requirement, iv.Lo, iv.Hi, iv.HiBinding)
		}
	}
	fmt.Printf("all met: k in [%.4g, %.4g]\n", res.AllMet[0].Lo, res.AllMet[0].Hi)
	sol, err := design.Values(v, design.PhaseMarginDeg(60), nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("phase margin 60° at k = %.6g (crossover %.4g rad/s)\n", sol[0].Value, sol[0].FrequencyRadPerSec)
	// Output:
	// phase margin at least 45°: k in [0, 1.338], upper end: phase margin = 45° at 0.5616 rad/s
	// gain margin at least 6 dB: k in [0, 3.007], upper end: gain margin = 6 dB at 1.414 rad/s
	// step-response overshoot at most 10 %: k in [0, 0.8499], upper end: step-response overshoot = 10 %
	// all met: k in [0, 0.8499]
	// phase margin 60° at k = 0.777443 (crossover 0.36 rad/s)
}

// The stable region of PI gains for the plant 1/(s+1)³.
func ExamplePartition() {
	pl, err := design.NewPlane("Kp", "Ki", "(Kp*s + Ki)/s", tf.MustParse("1/(s+1)^3"))
	if err != nil {
		log.Fatal(err)
	}
	pp, err := design.Partition(pl, &design.PlaneSettings{XRange: design.Range{Min: -2, Max: 10}, YRange: design.Range{Min: -1, Max: 3}})
	if err != nil {
		log.Fatal(err)
	}
	for _, r := range pp.Regions {
		fmt.Printf("region with %d unstable roots\n", r.UnstableRoots)
	}
	fmt.Println(len(pp.StableRegions), "stable region")
	// Output:
	// region with 1 unstable roots
	// region with 3 unstable roots
	// region with 2 unstable roots
	// region with 0 unstable roots
	// region with 2 unstable roots
	// region with 2 unstable roots
	// 1 stable region
}
