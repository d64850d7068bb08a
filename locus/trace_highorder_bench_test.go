package locus

import (
	"fmt"
	"testing"
)

// BenchmarkTraceHighOrder times Trace on the harness's family loops of
// order 40 and 60 (issue 12: they must trace without error), reporting
// the points and root computations per trace; compare side by side with
// a test binary of the baseline branch:
//
//	go test ./locus -run '^$' -bench TraceHighOrder -benchtime 5x -count 3
func BenchmarkTraceHighOrder(b *testing.B) {
	for _, n := range []int{40, 60} {
		g, set := harnessFamilyLoop(b, n)
		b.Run(fmt.Sprintf("order=%d", n), func(b *testing.B) {
			var loc Locus
			for b.Loop() {
				var err error
				if loc, err = Trace(g, set); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(loc.Stats.Points), "points/trace")
			b.ReportMetric(float64(loc.Stats.RootSolves), "rootsolves/trace")
		})
	}
}
