package locus_test

import (
	"fmt"
	"log"

	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/tf"
)

// The locus of a first-order lag with 0.5 s of dead time under
// proportional control, with the dead time exact: the root from the pole
// meets a root that came in from the left at s = −3, and the pair crosses
// the imaginary axis at k = 3.807.
func ExampleDelayedAnalyze() {
	loop, err := tf.MustParse("1/(s+1)").WithDelay(0.5)
	if err != nil {
		log.Fatal(err)
	}
	an, err := locus.DelayedAnalyze(loop, nil)
	if err != nil {
		log.Fatal(err)
	}
	for _, b := range an.BreakPoints {
		fmt.Printf("break point s = %.4g at k = %.4g\n", real(b.Point), b.Value)
	}
	for _, c := range an.AxisCrossings {
		fmt.Printf("crossing at %.4g rad/s, k = %.4g\n", c.FrequencyRadPerSec, c.Value)
	}
	fmt.Printf("stable for k in (%.4g, %.4g)\n", an.StableIntervals[0].Lo, an.StableIntervals[0].Hi)
	// Output:
	// break point s = -3 at k = 0.4463
	// crossing at 3.673 rad/s, k = 3.807
	// stable for k in (0, 3.807)
}
