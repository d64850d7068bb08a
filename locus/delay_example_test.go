package locus_test

import (
	"fmt"
	"log"

	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/tf"
)

// The four rightmost closed-loop roots of a first-order lag with 0.5 s of
// dead time under proportional control 3·e^(−0.5s)/(s + 1), exact (no Padé
// approximation), with the proof that none was missed.
func ExampleDelayedRoots() {
	plant, err := tf.New([]float64{1}, []float64{1, 1})
	if err != nil {
		log.Fatal(err)
	}
	loop, err := plant.WithDelay(0.5)
	if err != nil {
		log.Fatal(err)
	}
	r, err := locus.DelayedRoots(loop, 3, &locus.DelaySettings{Count: 4})
	if err != nil {
		log.Fatal(err)
	}
	for _, s := range r.Roots {
		fmt.Printf("%.6f\n", s)
	}
	fmt.Printf("every root with Re s > %.3g found: %v\n", r.MinRealPart, r.CountVerified)
	// Output:
	// (-0.347556+3.509238i)
	// (-0.347556-3.509238i)
	// (-3.295041+15.412317i)
	// (-3.295041-15.412317i)
	// every root with Re s > -3.89 found: true
}
