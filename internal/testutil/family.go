package testutil

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
)

// HarnessFamily rebuilds the loop N/D of order n of the shared performance
// harness (../shared/perf/baseline/loops.go, Family, seed 21): n − 2
// zeros, an integrator for n ≥ 4, mixed real and complex poles (some
// unstable) and zeros (some non-minimum-phase), magnitudes log-uniform in
// [0.1, 10], and the gain k0 that puts |k0·N/D| = 1 at the geometric mean
// of the non-zero pole magnitudes. num and den are highest power first
// (the harness's loop is k0·num/den; its locus span is k0·[1e-4, 1e4]).
// The same generator as the harness, so that benchmarks time what the
// harness times.
func HarnessFamily(n int) (num, den []float64, k0 float64) {
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
	na, da := fromRoots(zeros), fromRoots(poles)
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
	k0 = 1 / cmplx.Abs(eval(na, wc)/eval(da, wc))
	rev := func(c []float64) []float64 {
		out := make([]float64, len(c))
		for i, x := range c {
			out[len(c)-1-i] = x
		}
		return out
	}
	return rev(na), rev(da), k0
}
