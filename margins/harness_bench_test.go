package margins

import (
	"fmt"
	"testing"

	"github.com/loopwise/loopwise/internal/testutil"
	"github.com/loopwise/loopwise/tf"
)

// harnessFamily returns the harness's family loop of order n,
// k0·num/den (internal/testutil.HarnessFamily).
func harnessFamily(n int) tf.TF {
	num, den, k0 := testutil.HarnessFamily(n)
	for i := range num {
		num[i] *= k0
	}
	g, err := tf.New(num, den)
	if err != nil {
		panic(err)
	}
	return g
}

// harnessOrders are the harness's family orders and its growth orders.
var harnessOrders = []int{2, 4, 8, 12, 16, 24, 40, 60}

// BenchmarkHarnessCompute times Compute on the harness's family loops;
// run it side by side with BenchmarkHarnessGrid (the harness's 10⁴-point
// grid, 1e-3 to 1e3 rad/s) and read the ratios per order:
//
//	go test ./margins -run '^$' -bench 'Harness' -benchtime 200x -count 3
func BenchmarkHarnessCompute(b *testing.B) {
	for _, n := range harnessOrders {
		g := harnessFamily(n)
		b.Run(fmt.Sprintf("order=%d", n), func(b *testing.B) {
			for b.Loop() {
				r, err := Compute(g, nil)
				if err != nil {
					b.Fatal(err)
				}
				sinkResult = r
			}
		})
	}
}

// BenchmarkHarnessGrid times the grid baseline on the harness's loops.
func BenchmarkHarnessGrid(b *testing.B) {
	for _, n := range harnessOrders {
		g := harnessFamily(n)
		b.Run(fmt.Sprintf("order=%d", n), func(b *testing.B) {
			for b.Loop() {
				sinkBaseline = baselineGrid(g)
			}
		})
	}
}
