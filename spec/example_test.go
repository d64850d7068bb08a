package spec_test

import (
	"fmt"
	"log"

	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// A speed loop of a conveyor drive: a PI controller on a first-order motor
// model with a current loop modelled as two lags. In a Go test the check reads
//
//	if err := spec.Check(loop, req).Err(); err != nil {
//		t.Fatal(err)
//	}
func Example() {
	loop, err := tf.Parse("3(0.25s + 1)/(0.25s*(0.4s + 1)(0.02s + 1)^2)")
	if err != nil {
		log.Fatal(err)
	}
	req := spec.Requirements{
		spec.MinPhaseMarginDeg(45),
		spec.MinGainMarginDB(10),
		spec.MaxOvershootPct(5),
		spec.MaxSettlingTimeSec(1),
	}
	report := spec.Check(loop, req)
	for _, r := range report.Results {
		fmt.Printf("%-46s limit %-4.3g measured %-6.4g pass %v\n", r.Name, r.Limit, r.Value, r.Pass)
	}
	if err := report.Err(); err != nil {
		fmt.Println(err)
	}
	// Output:
	// minimum phase margin                           limit 45   measured 62.85  pass true
	// minimum gain margin                            limit 10   measured 21.95  pass true
	// maximum step-response overshoot                limit 5    measured 8.865  pass false
	// maximum step-response settling time (2 % band) limit 1    measured 0.7776 pass true
	// spec: 1 of 4 requirements not met:
	//   - The step-response overshoot is 8.865 %, above the allowed maximum of 5 %: not met.
}

// The damping ratio of a loop with dead time is judged on its dominant
// exact closed-loop roots: here e^(−s)/s, whose closed loop
// s + e^(−s) = 0 has infinitely many roots.
func ExampleDominantClosedLoopRoots() {
	loop := tf.MustParse("exp(-s)/s")
	d, err := spec.DominantClosedLoopRoots(loop, nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("%d roots with Re s > %.4g rad/s\n", len(d.Roots), d.AbscissaRadPerSec)
	for _, r := range d.Roots {
		if imag(r) >= 0 {
			fmt.Printf("%.4g ± %.4gj  ζ = %.4g\n", real(r), imag(r), spec.DampingRatio(r, 0))
		}
	}
	// Output:
	// 6 roots with Re s > -3 rad/s
	// -0.3181 ± 1.337j  ζ = 0.2314
	// -2.062 ± 7.589j  ζ = 0.2622
	// -2.653 ± 13.95j  ζ = 0.1869
}
