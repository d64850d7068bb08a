package locus_test

import (
	"fmt"
	"log"

	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/tf"
)

// A position loop of this project's own invention: a motor with an
// integrator, a mechanical pole at 2 rad/s and an amplifier pole at
// 8 rad/s, under a proportional gain K.
func Example() {
	loop, err := tf.Parse("1/(s(s+2)(s+8))")
	if err != nil {
		log.Fatal(err)
	}
	an, err := locus.Analyze(loop, nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("%d branches, %d to infinity, asymptotes from %.4g at %v degrees\n",
		an.Branches, an.BranchesToInfinity, an.CentroidReal, an.AsymptoteAnglesDeg)
	for _, b := range an.BreakPoints {
		fmt.Printf("break-away at %.4g for gain %.4g (%d branches)\n", real(b.Point), b.Value, b.Branches)
	}
	for _, c := range an.AxisCrossings {
		fmt.Printf("imaginary-axis crossing at %.4g rad/s for gain %.4g\n", c.FrequencyRadPerSec, c.Value)
	}
	for _, iv := range an.StableIntervals {
		fmt.Printf("stable for %g < gain < %.4g\n", iv.Lo, iv.Hi)
	}
	// The gain for a damping ratio of 0.5, and the closed-loop poles there.
	dp, err := locus.DampingCrossings(loop, 0.5, nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("damping 0.5 at gain %.4g, poles at %.4g\n", dp[0].Value, dp[0].Point)
	loc, err := locus.Trace(loop, nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("traced %d branches\n", len(loc.Branches))
	// Output:
	// 3 branches, 3 to infinity, asymptotes from -3.333 at [60 180 300] degrees
	// break-away at -0.9296 for gain 7.035 (2 branches)
	// imaginary-axis crossing at 4 rad/s for gain 160
	// stable for 0 < gain < 160
	// damping 0.5 at gain 21.5, poles at (-0.8+1.386i)
	// traced 3 branches
}

// A parameter locus: how the closed-loop poles move with the derivative
// time Td of a controller 60(1 + Td·s) around 1/(s(s+1)(s+5)).
func ExampleFromText() {
	plant := tf.MustParse("1/(s(s+1)(s+5))")
	par, err := locus.FromText("Td", "60(1 + Td*s)", plant)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("a(s) = %s, b(s) = %s\n", par.A.Format("s"), par.B.Format("s"))
	an, err := locus.Analyze(par.Loop, &locus.Settings{Variable: par.Name})
	if err != nil {
		log.Fatal(err)
	}
	for _, iv := range an.StableIntervals {
		fmt.Printf("stable for %.4g < %s < %g\n", iv.Lo, an.Variable, iv.Hi)
	}
	// Output:
	// a(s) = s^3 + 6*s^2 + 5*s + 60, b(s) = 60*s
	// stable for 0.08333 < Td < +Inf
}
