package locus_test

import (
	"fmt"
	"log"

	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/tf"
)

// The integral gain Ki of a PI controller (Kp = 0.5) on a lag with 0.5 s
// of dead time, with the dead time exact: the closed loop
// s(s+1) + (0.5s + Ki)·e^(−0.5s) is stable for 0 < Ki < 3.008.
func ExampleDelayedParametric_StableIntervals() {
	plant, err := tf.MustParse("1/(s+1)").WithDelay(0.5)
	if err != nil {
		log.Fatal(err)
	}
	dp, err := locus.FromDelayedParameter("Ki", func(ki float64) (tf.TF, error) {
		pi, err := tf.New([]float64{0.5, ki}, []float64{1, 0})
		if err != nil {
			return tf.TF{}, err
		}
		return pi.Series(plant)
	})
	if err != nil {
		log.Fatal(err)
	}
	st, err := dp.StableIntervals(&locus.Settings{Range: locus.Range{Min: -1, Max: 5}})
	if err != nil {
		log.Fatal(err)
	}
	for _, c := range st.Crossings {
		fmt.Printf("crossing at %.4g rad/s, Ki = %.4g\n", c.FrequencyRadPerSec, c.Value)
	}
	for _, p := range st.Pieces {
		fmt.Printf("Ki in (%.4g, %.4g): %d roots in Re s > 0\n", p.Lo, p.Hi, p.UnstableRoots)
	}
	// Output:
	// crossing at 0 rad/s, Ki = 0
	// crossing at 1.63 rad/s, Ki = 3.008
	// Ki in (-1, 0): 1 roots in Re s > 0
	// Ki in (0, 3.008): 0 roots in Re s > 0
	// Ki in (3.008, 5): 2 roots in Re s > 0
}
