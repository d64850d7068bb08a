package response_test

import (
	"fmt"
	"log"

	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
)

// The step response of the closed loop of 1.5·e^(−0.8s)/(2s + 1), with
// the dead time exact: samples and metrics.
func ExampleClosedLoopStepMetrics() {
	plant, err := tf.New([]float64{1.5}, []float64{2, 1})
	if err != nil {
		log.Fatal(err)
	}
	loop, err := plant.WithDelay(0.8)
	if err != nil {
		log.Fatal(err)
	}
	r, err := response.ClosedLoopStep(loop, &response.ClosedLoopSettings{HorizonSec: 4, StepSec: 1})
	if err != nil {
		log.Fatal(err)
	}
	for k, t := range r.TimeSec {
		fmt.Printf("y(%g s) = %.6f\n", t, r.Output[k])
	}
	m, err := response.ClosedLoopStepMetrics(loop, nil, nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("final %.4g, overshoot %.4g %%, peak at %.4g s, settles in %.4g s\n",
		m.FinalValue, m.OvershootPct, m.PeakTimeSec, m.SettlingTimeSec)
	// Output:
	// y(0 s) = 0.000000
	// y(1 s) = 0.142744
	// y(2 s) = 0.637356
	// y(3 s) = 0.662280
	// y(4 s) = 0.594188
	// final 0.6, overshoot 14.87 %, peak at 2.499 s, settles in 4.631 s
}
