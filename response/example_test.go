package response_test

import (
	"fmt"
	"log"

	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
)

// A speed loop of a small conveyor drive: a proportional–integral
// controller on a motor with a 0.5 s mechanical and a 0.05 s electrical
// time constant (a scenario of this project's own). The closed loop's step
// metrics, the loop's steady-state errors, and a few samples of the step
// response.
func Example() {
	loop, err := tf.Parse("4(s+2)/(s(0.5s+1)(0.05s+1))")
	if err != nil {
		log.Fatal(err)
	}
	closed, err := loop.ClosedLoop()
	if err != nil {
		log.Fatal(err)
	}
	m, err := response.StepMetrics(closed, nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("final value %.4g\n", m.FinalValue)
	fmt.Printf("rise time (10–90 %%) %.4g s\n", m.RiseTimeSec)
	fmt.Printf("overshoot %.4g %% (peak %.4g at %.4g s)\n", m.OvershootPct, m.PeakValue, m.PeakTimeSec)
	fmt.Printf("settling time (2 %%) %.4g s\n", m.SettlingTimeSec)

	e, err := response.SteadyState(loop)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("system type %d, velocity constant %.4g 1/s, ramp error %.4g\n", e.SystemType, e.VelocityConstant, e.RampError)

	r, err := response.Step(closed, &response.Settings{HorizonSec: 0.6, StepSec: 0.1})
	if err != nil {
		log.Fatal(err)
	}
	for k, t := range r.TimeSec {
		fmt.Printf("y(%.1f s) = %.4f\n", t, r.Output[k])
	}
	// Output:
	// final value 1
	// rise time (10–90 %) 0.1923 s
	// overshoot 1.732 % (peak 1.017 at 0.4056 s)
	// settling time (2 %) 0.2912 s
	// system type 1, velocity constant 8 1/s, ramp error 0.125
	// y(0.0 s) = 0.0000
	// y(0.1 s) = 0.4049
	// y(0.2 s) = 0.8224
	// y(0.3 s) = 0.9871
	// y(0.4 s) = 1.0173
	// y(0.5 s) = 1.0108
	// y(0.6 s) = 1.0034
}
