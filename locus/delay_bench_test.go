package locus

import "testing"

// BenchmarkDelayedRoots: the 20 rightmost roots of an order-6 loop with
// dead time (issue 14 target: under 10 ms), verified by the argument
// principle. The loop is 2(s+1.5)/((s+0.5)(s+1)(s+2)(s+3)(s²+0.8s+4))
// with 0.7 s of dead time at gain 1.3.
func BenchmarkDelayedRoots(b *testing.B) {
	den := []float64{1, 7.3, 23.2, 48.7, 68.2, 48.4, 12}
	loop := delayedLoop(b, []float64{2, 3}, den, 0.7)
	for _, m := range []int{6, 20, 60} {
		b.Run(map[int]string{6: "rightmost6", 20: "rightmost20", 60: "rightmost60"}[m], func(b *testing.B) {
			for b.Loop() {
				r, err := DelayedRoots(loop, 1.3, &DelaySettings{Count: m})
				if err != nil || !r.CountVerified {
					b.Fatal(err)
				}
			}
		})
	}
}
