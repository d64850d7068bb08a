package response

import (
	"fmt"
	"github.com/loopwise/loopwise/internal/testutil"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"runtime"
	"testing"
	"time"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// BenchmarkMetricsRatio times StepMetrics against one Step on the same
// automatic grid (both with nil settings), interleaved in every iteration
// and measured on thread CPU time (see BenchmarkRatio), over the benchmark
// family (orders 2…24). It reports metrics/step, the ratio of the two CPU
// times; the goal of issue 12 is metrics/step ≤ 3 at every order ≤ 24.
//
//	go test -cpu 1 -run '^$' -bench MetricsRatio -benchtime 20x ./response/
func BenchmarkMetricsRatio(b *testing.B) {
	for _, f := range benchFamily(b) {
		sys, err := tf.New(f.Num, f.Den)
		if err != nil {
			b.Fatal(err)
		}
		benchMetricsRatio(b, fmt.Sprintf("family/order=%d", f.Order), sys)
	}
	for _, c := range closedLoopFamily() {
		benchMetricsRatio(b, c.name, c.sys)
	}
}

func benchMetricsRatio(b *testing.B, name string, sys tf.TF) {
	b.Run(name, func(b *testing.B) {
		if _, err := StepMetrics(sys, nil); err != nil {
			b.Fatal(err)
		}
		ts := interleavedCPU(b,
			func() error { _, err := Step(sys, nil); return err },
			func() error { _, err := StepMetrics(sys, nil); return err })
		tStep, tMetrics := ts[0], ts[1]
		b.ReportMetric(float64(tStep.Microseconds())/float64(b.N), "step-µs/op")
		b.ReportMetric(float64(tMetrics.Microseconds())/float64(b.N), "metrics-µs/op")
		b.ReportMetric(tMetrics.Seconds()/tStep.Seconds(), "metrics/step")
	})
}

type namedSystem struct {
	name string
	sys  tf.TF
}

// closedLoopFamily returns stiff, oscillatory closed loops of orders 4…24
// (a scenario of this project, shaped like the closed loops of the shared
// performance harness): a slow real pole at −0.1, a quarter of the poles
// as lightly to well damped pairs (ζ in [0.1, 0.8]) and the rest real,
// magnitudes log-uniform in [0.1, 10], n − 2 real zeros of either sign,
// unit static gain. The long horizon (10/0.1 s) over fast, lightly damped
// modes gives hundreds of extrema: the worst case for StepMetrics.
func closedLoopFamily() []namedSystem {
	var out []namedSystem
	for _, n := range []int{4, 8, 12, 16, 24} {
		r := rand.New(rand.NewPCG(12, uint64(n)))
		mag := func() float64 { return math.Pow(10, -1+2*r.Float64()) }
		poles := []complex128{-0.1}
		for range (n - 1) / 4 {
			w, z := mag(), 0.1+0.7*r.Float64()
			p := complex(-z*w, w*math.Sqrt(1-z*z))
			poles = append(poles, p, cmplx.Conj(p))
		}
		for len(poles) < n {
			poles = append(poles, complex(-mag(), 0))
		}
		var zeros []complex128
		for range n - 2 {
			z := mag()
			if r.Float64() < 0.8 {
				z = -z
			}
			zeros = append(zeros, complex(z, 0))
		}
		num, _ := poly.FromRoots(zeros)
		den, _ := poly.FromRoots(poles)
		nc := num.Coeffs()
		dc := den.Coeffs()
		g := dc[len(dc)-1] / nc[len(nc)-1]
		for i := range nc {
			nc[i] *= g
		}
		out = append(out, namedSystem{fmt.Sprintf("closedloop/order=%d", n), tf.MustNew(nc, dc)})
	}
	return out
}

// BenchmarkMetricsDeadTime times StepMetrics of the sampled loop with a
// 100-sample dead time (delayedLoop, order 101, settling after 958 779
// samples) against one Step on the automatic grid (20 000 samples) and one
// Step over the horizon the metrics need (the samples of discretePoints),
// on thread CPU time. It reports metrics/step and metrics/samegrid.
//
//	go test -cpu 1 -run '^$' -bench MetricsDeadTime -benchtime 5x ./response/
func BenchmarkMetricsDeadTime(b *testing.B) {
	sys, _, _ := delayedLoop(b)
	s, err := prepare(sys, "step metrics")
	if err != nil {
		b.Fatal(err)
	}
	if err := s.findPoles(); err != nil {
		b.Fatal(err)
	}
	pts, err := s.discretePoints(0.5, 0.02)
	if err != nil {
		b.Fatal(err)
	}
	same := &Settings{HorizonSec: pts[len(pts)-1].t}
	ts := interleavedCPU(b,
		func() error { _, err := Step(sys, nil); return err },
		func() error { _, err := Step(sys, same); return err },
		func() error { _, err := StepMetrics(sys, nil); return err })
	tStep, tSame, tMetrics := ts[0], ts[1], ts[2]
	b.ReportMetric(float64(tMetrics.Microseconds())/float64(b.N), "metrics-µs/op")
	b.ReportMetric(tMetrics.Seconds()/tStep.Seconds(), "metrics/step")
	b.ReportMetric(tMetrics.Seconds()/tSame.Seconds(), "metrics/samegrid")
}

// interleavedCPU runs every function once per benchmark iteration, in
// turn, and returns the thread CPU time each took in total (see
// BenchmarkRatio). It stops the benchmark on the first error.
func interleavedCPU(b *testing.B, fns ...func() error) []time.Duration {
	total := make([]time.Duration, len(fns))
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	for b.Loop() {
		for i, f := range fns {
			t0 := testutil.ThreadCPU()
			if err := f(); err != nil {
				b.Fatal(err)
			}
			total[i] += testutil.ThreadCPU() - t0
		}
	}
	return total
}
