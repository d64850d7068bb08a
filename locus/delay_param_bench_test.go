package locus

import (
	"fmt"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// BenchmarkDelayParamVersusPade times the exact stable intervals of the
// integral gain Ki of a PI controller (Kp = 0.5) on 1/(s+1)^n with dead
// time τ (FromDelayedParameter + StableIntervals) side by side with the
// baseline it replaces in the report: the 6th-order Padé parametric locus
// (FromParameter + Analyze). Compare the lines of one run.
func BenchmarkDelayParamVersusPade(b *testing.B) {
	for _, c := range []struct {
		n   int
		tau float64
	}{{1, 0.5}, {6, 2}} {
		plant, err := tf.MustParse(fmt.Sprintf("1/(s+1)^%d", c.n)).WithDelay(c.tau)
		if err != nil {
			b.Fatal(err)
		}
		at := func(ki float64) (tf.TF, error) {
			pi, err := tf.New([]float64{0.5, ki}, []float64{1, 0})
			if err != nil {
				return tf.TF{}, err
			}
			return pi.Series(plant)
		}
		set := &Settings{Range: Range{-1, 5}}
		b.Run(fmt.Sprintf("order%d/exact", c.n), func(b *testing.B) {
			for b.Loop() {
				dp, err := FromDelayedParameter("Ki", at)
				if err != nil {
					b.Fatal(err)
				}
				if _, err := dp.StableIntervals(set); err != nil {
					b.Fatal(err)
				}
			}
		})
		b.Run(fmt.Sprintf("order%d/pade6", c.n), func(b *testing.B) {
			for b.Loop() {
				par, err := FromParameter("Ki", at)
				if err != nil {
					b.Fatal(err)
				}
				if _, err := Analyze(par.Loop, set); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
