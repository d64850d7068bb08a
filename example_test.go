package loopwise_test

import (
	"fmt"
	"log"

	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
)

// Example follows a conveyor-drive speed loop from the gain locus to the
// margins and the step response. It is the code sample of the README.
func Example() {
	// Loop transfer function per unit of controller gain k.
	loop, err := tf.Parse("20/(s(s+4)(s+10))")
	if err != nil {
		log.Fatal(err)
	}

	// For which gains is the closed loop stable? (exact interval ends;
	// by hand, Routh–Hurwitz on s³ + 14s² + 40s + 20k gives 0 < k < 28,
	// and the phase crossover is at ω = √40 = 6.325 rad/s.)
	an, err := locus.Analyze(loop, nil)
	if err != nil {
		log.Fatal(err)
	}
	for _, iv := range an.StableIntervals {
		fmt.Printf("stable for %.6g < k < %.6g\n", iv.Lo, iv.Hi)
	}

	// Margins and step response at the chosen gain k = 5.
	l5, err := loop.Scale(5)
	if err != nil {
		log.Fatal(err)
	}
	m, err := margins.Compute(l5, nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("gain margin %.4g dB at %.4g rad/s\n", m.GainMarginDB, m.PhaseCrossoverRadPerSec)
	fmt.Printf("phase margin %.4g° at %.4g rad/s\n", m.PhaseMarginDeg, m.GainCrossoverRadPerSec)

	closed, err := l5.ClosedLoop()
	if err != nil {
		log.Fatal(err)
	}
	st, err := response.StepMetrics(closed, nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("overshoot %.4g %%, settling time %.4g s\n", st.OvershootPct, st.SettlingTimeSec)
	// Output:
	// stable for 0 < k < 28
	// gain margin 14.96 dB at 6.325 rad/s
	// phase margin 49.57° at 2.152 rad/s
	// overshoot 18.53 %, settling time 2.867 s
}
