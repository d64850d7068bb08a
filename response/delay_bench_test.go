package response

import (
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// BenchmarkClosedLoopStepDelay compares, side by side at equal sample
// count, the exact delayed closed-loop step response (ClosedLoopStep) with
// the naive baseline the issue names: the Padé(6) approximation of the
// loop, closed with tf.Feedback and sampled by Step. Both start from the
// loop. The target: exact within 5× the Padé cost.
//
//	go test -run '^$' -bench ClosedLoopStepDelay -benchtime 50x ./response/
func BenchmarkClosedLoopStepDelay(b *testing.B) {
	cases := []struct {
		name     string
		num, den []float64
		tau      float64
		horizon  float64
		step     float64
	}{
		{"order2", []float64{2}, []float64{1, 4, 3}, 0.3, 10, 0.005},
		{"order6", []float64{2, 3}, []float64{1, 7.3, 23.2, 48.7, 68.2, 48.4, 12}, 0.7, 40, 0.01},
		{"lag-long-delay", []float64{0.8}, []float64{5, 1}, 4, 200, 0.05},
	}
	for _, c := range cases {
		loop := delayLoop(b, c.num, c.den, c.tau)
		b.Run(c.name+"/exact", func(b *testing.B) {
			set := &ClosedLoopSettings{HorizonSec: c.horizon, StepSec: c.step}
			for b.Loop() {
				if _, err := ClosedLoopStep(loop, set); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(c.name+"/pade6", func(b *testing.B) {
			set := &Settings{HorizonSec: c.horizon, StepSec: c.step}
			for b.Loop() {
				p, err := loop.Pade(6)
				if err != nil {
					b.Fatal(err)
				}
				cl, err := tf.Feedback(p, tf.MustNew([]float64{1}, []float64{1}))
				if err != nil {
					b.Fatal(err)
				}
				if _, err := Step(cl, set); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
