package locus

import (
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// BenchmarkDelayedTraceVersusPade times the exact locus of a PI loop on a
// lag with 20 ms of dead time (DelayedTrace) side by side with the traced
// locus of its 6th-order Padé approximation (Trace); compare the two lines.
func BenchmarkDelayedTraceVersusPade(b *testing.B) {
	loop, err := tf.MustParse("20(s+20)/(s(s+10))").WithDelay(0.02)
	if err != nil {
		b.Fatal(err)
	}
	b.Run("exact", func(b *testing.B) {
		for b.Loop() {
			if _, err := DelayedTrace(loop, nil); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("pade6", func(b *testing.B) {
		for b.Loop() {
			if _, err := Trace(loop, &Settings{PadeOrder: 6}); err != nil {
				b.Fatal(err)
			}
		}
	})
}
