package response

import (
	"fmt"
	"math"
	"testing"

	"github.com/loopwise/loopwise/internal/rootfind"
	"github.com/loopwise/loopwise/tf"
	"gonum.org/v1/gonum/mat"
)

// exactAt is the slow reference for the lattice: y^(order)(t) from the
// stored sample x_k and the block exponential Φ(τ), Γ(τ) of the remaining
// τ = t − t_k (Van Loan 1978), formed afresh for every t — what StepMetrics
// did before the lattice.
func exactAt(t *testing.T, ev *evaluator, tt float64, order int) float64 {
	n := ev.n
	k := min(int(math.Floor(tt/ev.h)), len(ev.ys)-1)
	tau := tt - float64(k)*ev.h
	x0, _ := ev.stateAt(k, make([]float64, n), make([]float64, n))
	x := append([]float64(nil), x0...)
	if tau > 0 {
		phi, g, err := ev.s.m.ZeroOrderHold(tau)
		if err != nil {
			t.Fatal(err)
		}
		var xv mat.VecDense
		xv.MulVec(phi, mat.NewVecDense(n, x))
		for i := range x {
			x[i] = xv.AtVec(i) + g[i]
		}
	}
	return dot(ev.rows[order], x) + ev.cons[order]
}

func TestHermite5ReproducesQuintics(t *testing.T) {
	// p(θ) = 2 − θ + 3θ² − 5θ³ + θ⁴ + 4θ⁵: the interpolant of its own
	// values and derivatives at 0 and 1 is p itself (uniqueness of Hermite
	// interpolation).
	c := []float64{2, -1, 3, -5, 1, 4}
	p := func(x float64, d int) float64 {
		s := 0.0
		for i := d; i < len(c); i++ {
			f := 1.0
			for j := 0; j < d; j++ {
				f *= float64(i - j)
			}
			s += c[i] * f * math.Pow(x, float64(i-d))
		}
		return s
	}
	for _, th := range []float64{0, 0.1, 0.37, 0.5, 0.9, 1} {
		got := hermite5(th, p(0, 0), p(0, 1), p(0, 2), p(1, 0), p(1, 1), p(1, 2))
		if want := p(th, 0); math.Abs(got-want) > 1e-14 {
			t.Errorf("θ = %v: %v, want %v", th, got, want)
		}
	}
}

// TestLatticeMatchesExactExponential compares every extremum and a level
// crossing in every tenth interval, located on the lattice, with the root
// of the exact evaluation (a fresh block exponential per trial point,
// Brent 1973) on the benchmark family and the stiff closed loops. Values
// must agree to 1e-13 of the output scale (the metrics are specified to
// 1e-12 of the peak); level-crossing times to 4 ulps or the time in which
// the output moves by 1e-13 of the scale, whichever is larger.
func TestLatticeMatchesExactExponential(t *testing.T) {
	g, err := loadGolden()
	if err != nil {
		t.Fatal(err)
	}
	var cases []namedSystem
	for _, f := range g.BenchmarkFamily {
		cases = append(cases, namedSystem{fmt.Sprint("family order ", f.Order), tf.MustNew(f.Num, f.Den)})
	}
	cases = append(cases, closedLoopFamily()...)
	cases = append(cases, namedSystem{"triple pole", tf.MustNew([]float64{1}, []float64{1, 3, 3, 1})})
	for _, c := range cases {
		if testing.Short() && len(c.sys.Den().Coeffs()) > 14 {
			continue
		}
		s, err := prepare(c.sys, "test")
		if err != nil {
			t.Fatal(err)
		}
		if err := s.findPoles(); err != nil {
			t.Fatal(err)
		}
		final, _ := c.sys.StaticGain()
		ev, _, err := s.continuousPoints(final, 0.02, new(stepWork))
		if err != nil {
			t.Fatal(err)
		}
		scale := 0.0
		for _, y := range ev.ys {
			scale = math.Max(scale, math.Abs(y))
		}
		worstY, worstT, checked := 0.0, 0.0, 0
		for k := 0; k+1 < len(ev.ys); k++ {
			a, b := float64(k)*ev.h, float64(k+1)*ev.h
			if ev.ds[k]*ev.ds[k+1] < 0 && (k%7 == 0 || !testing.Short()) {
				_, yl := ev.locate(a, b, 1, 0)
				f := func(x float64) float64 { return exactAt(t, ev, x, 1) }
				te := rootfind.Brent(f, a, b, ev.ds[k], ev.ds[k+1], 4*0x1p-52)
				ye := exactAt(t, ev, te, 0)
				worstY = math.Max(worstY, math.Abs(yl-ye)/scale)
				checked++
			}
			if k%10 == 0 && ev.ds[k]*ev.ds[k+1] > 0 && ev.ys[k] != ev.ys[k+1] {
				// A level 3/4 of the way across a monotone interval: the
				// exact output at the located time must equal it, and the
				// time must agree with the exact root to within the time
				// that rounding of y (1e-13 of scale) leaves undetermined.
				level := (ev.ys[k] + 3*ev.ys[k+1]) / 4
				tl, _ := ev.locate(a, b, 0, level)
				f := func(x float64) float64 { return exactAt(t, ev, x, 0) - level }
				te := rootfind.Brent(f, a, b, ev.ys[k]-level, ev.ys[k+1]-level, 4*0x1p-52)
				worstY = math.Max(worstY, math.Abs(f(tl))/scale)
				slope := math.Abs(ev.ys[k+1]-ev.ys[k]) / ev.h
				worstT = math.Max(worstT, math.Abs(tl-te)/math.Max(4*0x1p-52*te, 1e-13*scale/slope))
				checked++
			}
		}
		t.Logf("%s: %d roots, lattice L = %d, worst value error %.2g of scale, worst crossing time error %.2g of its allowance", c.name, checked, len(ev.lphi), worstY, worstT)
		if worstY > 1e-13 || worstT > 1 {
			t.Errorf("%s: lattice disagrees with the exact exponential: value %.3g of scale, time %.3g relative", c.name, worstY, worstT)
		}
	}
}
