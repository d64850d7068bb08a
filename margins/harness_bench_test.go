package margins

import (
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// harnessFamily rebuilds the loops of the shared performance harness
// (../shared/perf/baseline/loops.go, Family, seed 21): order n with n − 2
// zeros, an integrator for n ≥ 4, mixed real and complex poles (some
// unstable) and zeros (some non-minimum-phase), magnitudes log-uniform in
// [0.1, 10], and the gain K0 that puts |L| = 1 at the geometric mean of the
// non-zero pole magnitudes. The same generator, so that the margins
// benchmarks time what the harness times.
func harnessFamily(n int) tf.TF {
	r := rand.New(rand.NewPCG(21, uint64(n)))
	randomRoots := func(cnt int, zlo, zhi, pNeg float64) []complex128 {
		pairs := cnt / 4
		if cnt == 2 {
			pairs = 1
		}
		var out []complex128
		for range pairs {
			mag := math.Pow(10, -1+2*r.Float64())
			z := zlo + (zhi-zlo)*r.Float64()
			out = append(out, complex(-z*mag, mag*math.Sqrt(1-z*z)))
		}
		for range cnt - 2*pairs {
			mag := math.Pow(10, -1+2*r.Float64())
			if r.Float64() < pNeg {
				mag = -mag
			}
			out = append(out, complex(mag, 0))
		}
		return out
	}
	var poles []complex128
	rest := n
	if n >= 4 {
		poles = append(poles, 0)
		rest--
	}
	poles = append(poles, randomRoots(rest, -0.15, 0.8, 0.8)...)
	zeros := randomRoots(n-2, 0.05, 0.9, 0.85)
	fromRoots := func(rs []complex128) []float64 {
		p := []float64{1} // ascending
		for _, x := range rs {
			f := []float64{-real(x), 1}
			if imag(x) != 0 {
				f = []float64{real(x)*real(x) + imag(x)*imag(x), -2 * real(x), 1}
			}
			q := make([]float64, len(p)+len(f)-1)
			for i, a := range p {
				for j, b := range f {
					q[i+j] += a * b
				}
			}
			p = q
		}
		return p
	}
	num, den := fromRoots(zeros), fromRoots(poles)
	eval := func(c []float64, s complex128) complex128 {
		var v complex128
		for k := len(c) - 1; k >= 0; k-- {
			v = v*s + complex(c[k], 0)
		}
		return v
	}
	lg, cnt := 0.0, 0
	for _, p := range poles {
		if p != 0 {
			lg += math.Log(cmplx.Abs(p))
			cnt++
		}
	}
	wc := complex(0, math.Exp(lg/float64(cnt)))
	k0 := 1 / cmplx.Abs(eval(num, wc)/eval(den, wc))
	desc := func(c []float64, k float64) []float64 {
		out := make([]float64, len(c))
		for i, x := range c {
			out[len(c)-1-i] = k * x
		}
		return out
	}
	g, err := tf.New(desc(num, k0), desc(den, 1))
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
