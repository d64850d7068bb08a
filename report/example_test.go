package report_test

import (
	"fmt"
	"log"

	"github.com/loopwise/loopwise/report"
)

// A test rig reads a loop file, runs every analysis and checks the results
// in code. The loop K/(s(s+1)(s+2)) at K = 1 has the gain margin 6 at
// √2 rad/s (Ogata, Modern Control Engineering, 5th ed., Example 6-1, from
// memory).
func Example() {
	lf, err := report.ReadLoop("rig.json", []byte(`{
		"name": "fixture",
		"plant": "1/(s*(s+1)*(s+2))",
		"requirements": {"min_gain_margin_db": 12}
	}`))
	if err != nil {
		log.Fatal(err)
	}
	r, err := report.Analyze(lf, nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("stable: %v\n", *r.ClosedLoop.Stable)
	fmt.Printf("gain margin %.4g at %.4g rad/s\n", r.Margins.GainMargin, r.Margins.PhaseCrossoverRadPerSec)
	fmt.Printf("stable for k in %.4g\n", r.Locus.StableIntervals)
	for _, q := range r.Requirements {
		fmt.Printf("%s: pass %v\n", q.Name, q.Pass)
	}
	// Output:
	// stable: true
	// gain margin 6 at 1.414 rad/s
	// stable for k in [[0 6]]
	// minimum gain margin: pass true
}

// A Loop written in Go needs only the plant; the zero values of the other
// fields are their defaults.
func ExampleAnalyze() {
	r, err := report.Analyze(&report.Loop{Plant: "4/(s*(s+2))"}, nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("overshoot %.4g %%, peak at %.4g s\n", r.Step.OvershootPct, r.Step.PeakTimeSec)
	// Output:
	// overshoot 16.3 %, peak at 1.814 s
}
