package response

import (
	"fmt"
	"github.com/loopwise/loopwise/internal/testutil"
	"math"
	"runtime"
	"testing"
	"time"

	"github.com/loopwise/loopwise/internal/statespace"
	"github.com/loopwise/loopwise/tf"
)

// The benchmark family (testdata/gen_reference.py): order n = 2…24, n/2
// damped pairs with natural frequencies spread over [1, 9] rad/s, unit
// static gain, exact mpmath step references. Run side by side:
//
//	go test -run '^$' -bench 'Step|BaselineRK4' -benchtime 20x ./response/
//
// Metrics: samples/s (output samples per second), err/peak*1e15 (max error over
// the reference samples divided by the peak of the response, times 1e15),
// substeps (RK4 steps per output sample). BenchmarkFloor gives the n²
// floor. Summarise several runs (-count 5) by the fastest of each, since
// the machine is shared: testdata/summarize_bench.py.

func benchFamily(b *testing.B) []familyMember {
	g, err := loadGolden()
	if err != nil {
		b.Fatal(err)
	}
	return g.BenchmarkFamily
}

// BenchmarkFloor is the cost floor of the exact recursion: n² multiply–adds
// per output sample at full scalar throughput in a plain loop over a flat
// slice (no output, no input term), for as many samples as BenchmarkStep
// produces.
// The floor ratio of the issue is BenchmarkStep ns/op ÷ BenchmarkFloor
// ns/op for the same order and spacing.
func BenchmarkFloor(b *testing.B) {
	for _, f0 := range benchFamily(b) {
		for _, sp := range spacings {
			f := coarsen(f0, sp.stride)
			n := f.Order
			b.Run(fmt.Sprintf("order=%d/spacing=%s", n, sp.name), func(b *testing.B) {
				a, x, nx := floorData(n)
				for b.Loop() {
					floorLoop(a, x, nx, f.Count)
				}
				b.ReportMetric(float64(f.Count+1)*float64(b.N)/b.Elapsed().Seconds(), "samples/s")
			})
		}
	}
}

func floorData(n int) (a, x, nx []float64) {
	// Row-stochastic: x stays of order 1, never subnormal (subnormal
	// arithmetic would make the floor slow and the ratio meaningless).
	a = make([]float64, n*n)
	for i := range a {
		a[i] = 1 / float64(n)
	}
	return a, make([]float64, n), make([]float64, n)
}

// floorLoop performs count·n² multiply–adds over the flat n×n slice a,
// as dot products of a with a vector of length n² … in four independent
// accumulators, so that they run at the machine's full scalar multiply–add
// throughput (not limited by the latency of one chain of additions): the
// cost floor of a sample of the exact recursion. x is refreshed from the
// result so the work cannot be hoisted out of the loop.
func floorLoop(a, x, nx []float64, count int) {
	n := len(x)
	nn := n * n
	v := make([]float64, nn)
	for i := range v {
		v[i] = 1
	}
	a = a[:nn]
	for k := range count {
		var s0, s1, s2, s3 float64
		i := 0
		for ; i+4 <= nn; i += 4 {
			s0 += a[i] * v[i]
			s1 += a[i+1] * v[i+1]
			s2 += a[i+2] * v[i+2]
			s3 += a[i+3] * v[i+3]
		}
		for ; i < nn; i++ {
			s0 += a[i] * v[i]
		}
		v[k%nn] = (s0 + s1 + s2 + s3) * 1e-3
	}
	nx[0] = v[0]
}

// spacings are the output grids benchmarked: the automatic rule's
// 0.1/max|p| of the reference file, and ten times coarser (1/max|p|, still
// six samples per period of the fastest mode).
var spacings = []struct {
	name   string
	stride int
}{{"auto", 1}, {"10x", 10}}

// coarsen returns f on an output grid stride times coarser, keeping the
// reference samples that fall on it.
func coarsen(f familyMember, stride int) familyMember {
	g := f
	g.StepSec = f.StepSec * float64(stride)
	g.Count = f.Count / stride
	g.HorizonSec = float64(g.Count) * g.StepSec
	g.Index, g.Step = nil, nil
	for i, k := range f.Index {
		if k%stride == 0 && k/stride <= g.Count {
			g.Index = append(g.Index, k/stride)
			g.Step = append(g.Step, f.Step[i])
		}
	}
	return g
}

func BenchmarkStep(b *testing.B) {
	for _, f0 := range benchFamily(b) {
		for _, sp := range spacings {
			f := coarsen(f0, sp.stride)
			b.Run(fmt.Sprintf("order=%d/spacing=%s", f.Order, sp.name), func(b *testing.B) {
				sys, err := tf.New(f.Num, f.Den)
				if err != nil {
					b.Fatal(err)
				}
				set := &Settings{HorizonSec: f.HorizonSec, StepSec: f.StepSec}
				relErr, _ := familyError(b, f)
				b.ResetTimer()
				for b.Loop() {
					if _, err := Step(sys, set); err != nil {
						b.Fatal(err)
					}
				}
				samples := float64(f.Count+1) * float64(b.N)
				b.ReportMetric(samples/b.Elapsed().Seconds(), "samples/s")
				b.ReportMetric(relErr*1e15, "err/peak*1e15")
			})
		}
	}
}

// rk4 integrates x' = A·x + B (unit step) with classical fourth-order
// Runge–Kutta, m substeps per output interval h, on the same realisation,
// and writes y = C·x + D at every output sample. Plain loops over flat
// slices, like the exact recursion.
func rk4(m statespace.Model, h float64, sub int, out []float64) {
	n := m.Order()
	a := flat(m.A)
	x := make([]float64, n)
	k1, k2, k3, k4, tmp := make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
	deriv := func(dst, v []float64) {
		for i := 0; i < n; i++ {
			row := a[i*n : i*n+n]
			s := m.B[i]
			for j, e := range row {
				s += e * v[j]
			}
			dst[i] = s
		}
	}
	dt := h / float64(sub)
	for k := range out {
		out[k] = dot(m.C, x) + m.D
		if k+1 == len(out) {
			break
		}
		for range sub {
			deriv(k1, x)
			for i := range tmp {
				tmp[i] = x[i] + dt/2*k1[i]
			}
			deriv(k2, tmp)
			for i := range tmp {
				tmp[i] = x[i] + dt/2*k2[i]
			}
			deriv(k3, tmp)
			for i := range tmp {
				tmp[i] = x[i] + dt*k3[i]
			}
			deriv(k4, tmp)
			for i := range x {
				x[i] += dt / 6 * (k1[i] + 2*k2[i] + 2*k3[i] + k4[i])
			}
		}
	}
}

func rk4Error(m statespace.Model, f familyMember, sub int) float64 {
	out := make([]float64, f.Count+1)
	rk4(m, f.StepSec, sub, out)
	worst := 0.0
	for i, k := range f.Index {
		worst = math.Max(worst, math.Abs(out[k]-f.Step[i]))
	}
	return worst / f.Peak
}

// BenchmarkBaselineRK4 is the naive baseline of the issue: fixed-step RK4
// with the smallest number of substeps per output sample (from 1, 2, 3, 4,
// 6, 8, 12, …) that brings the error to 1e-8 of the peak (target=1e-8),
// and, for comparison at equal accuracy, to the error of the exact
// recursion on the same grid or 1e-12 of the peak, whichever is larger
// (target=exact).
func BenchmarkBaselineRK4(b *testing.B) {
	for _, f0 := range benchFamily(b) {
		for _, sp := range spacings {
			f := coarsen(f0, sp.stride)
			for _, target := range []string{"1e-8", "exact"} {
				b.Run(fmt.Sprintf("order=%d/spacing=%s/target=%s", f.Order, sp.name, target), func(b *testing.B) {
					benchRK4(b, f, target)
				})
			}
		}
	}
}

func benchRK4(b *testing.B, f familyMember, target string) {
	m, err := statespace.FromTransferFunction(f.Num, f.Den)
	if err != nil {
		b.Fatal(err)
	}
	want := 1e-8
	if target == "exact" {
		exact, _ := familyError(b, f)
		want = math.Max(exact, 1e-12)
	}
	sub, relErr := 0, math.Inf(1)
	for _, s := range []int{1, 2, 3, 4, 6, 8, 12, 16, 24, 32, 48, 64, 96, 128} {
		if e := rk4Error(m, f, s); e <= want {
			sub, relErr = s, e
			break
		}
	}
	if sub == 0 {
		b.Skipf("order %d: RK4 does not reach %g of the peak with 128 substeps", f.Order, want)
	}
	out := make([]float64, f.Count+1)
	b.ResetTimer()
	for b.Loop() {
		// Realisation set-up counted as in Step.
		mm, _ := statespace.FromTransferFunction(f.Num, f.Den)
		rk4(mm, f.StepSec, sub, out)
	}
	samples := float64(f.Count+1) * float64(b.N)
	b.ReportMetric(samples/b.Elapsed().Seconds(), "samples/s")
	b.ReportMetric(relErr*1e15, "err/peak*1e15")
	b.ReportMetric(float64(sub), "substeps")
}

// rk4Substeps returns the smallest substep count (from 1, 2, 3, 4, 6, …)
// for which RK4 reaches want (error/peak), or 0.
func rk4Substeps(m statespace.Model, f familyMember, want float64) int {
	for _, s := range []int{1, 2, 3, 4, 6, 8, 12, 16, 24, 32, 48, 64, 96, 128} {
		if rk4Error(m, f, s) <= want {
			return s
		}
	}
	return 0
}

// BenchmarkRatio interleaves, in every iteration, one exact Step, one RK4
// run at 1e-8, one RK4 run at the exact recursion's accuracy and one floor
// run (n² multiply–adds per sample) on the same family member, and reports
// the ratios of their accumulated thread CPU times (clock_gettime on
// Linux, wall clock elsewhere). Interleaving and CPU time make the ratios
// robust to the load of a shared machine, where separate benchmarks drift.
// cost/floor is the whole Step call (realisation, matrix exponential,
// allocation) against the floor; loop/floor is the recursion alone
// (stepLoop on a prepared Φ, Γ), the marginal cost per sample.
func BenchmarkRatio(b *testing.B) {
	for _, f0 := range benchFamily(b) {
		for _, sp := range spacings {
			f := coarsen(f0, sp.stride)
			b.Run(fmt.Sprintf("order=%d/spacing=%s", f.Order, sp.name), func(b *testing.B) {
				sys, err := tf.New(f.Num, f.Den)
				if err != nil {
					b.Fatal(err)
				}
				m, err := statespace.FromTransferFunction(f.Num, f.Den)
				if err != nil {
					b.Fatal(err)
				}
				exact, _ := familyError(b, f)
				sub8 := rk4Substeps(m, f, 1e-8)
				subEq := rk4Substeps(m, f, math.Max(exact, 1e-12))
				set := &Settings{HorizonSec: f.HorizonSec, StepSec: f.StepSec}
				out := make([]float64, f.Count+1)
				a, x, nx := floorData(f.Order)
				phiD, gam, err := m.ZeroOrderHold(f.StepSec)
				if err != nil {
					b.Fatal(err)
				}
				phi := flat(phiD)
				x0 := make([]float64, f.Order)
				var tStep, t8, tEq, tFloor, tLoop time.Duration
				runtime.LockOSThread()
				defer runtime.UnlockOSThread()
				for b.Loop() {
					t0 := testutil.ThreadCPU()
					if _, err := Step(sys, set); err != nil {
						b.Fatal(err)
					}
					t1 := testutil.ThreadCPU()
					mm, _ := statespace.FromTransferFunction(f.Num, f.Den)
					rk4(mm, f.StepSec, sub8, out)
					t2 := testutil.ThreadCPU()
					if subEq > 0 {
						mm, _ := statespace.FromTransferFunction(f.Num, f.Den)
						rk4(mm, f.StepSec, subEq, out)
					}
					t3 := testutil.ThreadCPU()
					floorLoop(a, x, nx, f.Count)
					t4 := testutil.ThreadCPU()
					for i := range x0 {
						x0[i] = 0
					}
					stepLoop(phi, x0, gam, m.C, m.D, out)
					t5 := testutil.ThreadCPU()
					tLoop += t5 - t4
					tStep += t1 - t0
					t8 += t2 - t1
					tEq += t3 - t2
					tFloor += t4 - t3
				}
				b.ReportMetric(float64(f.Count+1)*float64(b.N)/tStep.Seconds(), "samples/cpu-s")
				b.ReportMetric(exact*1e15, "err/peak*1e15")
				b.ReportMetric(t8.Seconds()/tStep.Seconds(), "speedup-vs-rk4-1e-8")
				b.ReportMetric(float64(sub8), "rk4-substeps")
				if subEq > 0 {
					b.ReportMetric(tEq.Seconds()/tStep.Seconds(), "speedup-vs-rk4-equal")
					b.ReportMetric(float64(subEq), "rk4-equal-substeps")
				}
				b.ReportMetric(tStep.Seconds()/tFloor.Seconds(), "cost/floor")
				b.ReportMetric(tLoop.Seconds()/tFloor.Seconds(), "loop/floor")
			})
		}
	}
}
