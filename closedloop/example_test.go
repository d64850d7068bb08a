package closedloop_test

import (
	"fmt"
	"log"

	"github.com/loopwise/loopwise/closedloop"
	"github.com/loopwise/loopwise/tf"
)

// A belt-drive speed loop (a scenario of this project's own): a third-order
// plant with a filtered PID. The load-disturbance step, the control effort
// for a reference step and the noise gains.
func Example() {
	plant := tf.MustNew([]float64{2}, []float64{1, 7, 14, 8})
	pid, err := tf.PID{Gain: 3, IntegralTimeSec: 1.2, DerivativeTimeSec: 0.25, DerivativeFilter: 10}.TF()
	if err != nil {
		log.Fatal(err)
	}
	fs, err := closedloop.Of(closedloop.Loop{Plant: plant, Controller: pid}, nil)
	if err != nil {
		log.Fatal(err)
	}
	m, err := fs.Analyze(nil)
	if err != nil {
		log.Fatal(err)
	}
	d := m.LoadDisturbance
	fmt.Printf("load step: peak %.4g at %.4g s, recovered (2 %%) at %.4g s, offset %.2g, IAE %.4g\n",
		d.PeakDeviation, d.PeakTimeSec, d.RecoveryTimeSec, d.FinalValue, d.IntegratedAbsoluteError)
	u := m.ReferenceControl
	fmt.Printf("reference step: u(0+) %.4g, peak %.4g at %.4g s, final %.4g\n", u.InitialValue, u.PeakValue, u.PeakTimeSec, u.FinalValue)
	fmt.Printf("noise: to control H2 %v, high-frequency gain %.4g, to output H2 %.4g\n",
		m.Noise.ToControlH2, m.Noise.ToControlHighFrequencyGain, m.Noise.ToOutputH2)
	fmt.Printf("peak |load → output| %.4g at %.4g rad/s\n", m.LoadToOutputPeak.Value, m.LoadToOutputPeak.FrequencyRadPerSec)
	// Output:
	// load step: peak 0.1225 at 2.147 s, recovered (2 %) at 7.284 s, offset 0, IAE 0.4031
	// reference step: u(0+) 33, peak 33 at 0 s, final 4
	// noise: to control H2 +Inf, high-frequency gain 33, to output H2 0.552
	// peak |load → output| 0.1809 at 0.7566 rad/s
}
