package closedloop

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/internal/rootfind"
	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// Peak returns the largest magnitude over frequency of the function from
// input to output and the frequency where it is reached.
//
// Without dead time the peak is exact: with |F(jω)|² = P(x)/Q(x), x = ω²
// (P = |N(jω)|², Q = |D(jω)|², real polynomials in x), the candidates are
// x = 0, the positive real roots of P′·Q − P·Q′ and the limit ω → ∞; the
// largest value, evaluated directly, wins — the method margins uses for
// Ms and Mt. A discrete function is first mapped by the bilinear map
// z = (1 + w)/(1 − w) (poly.CircleToAxis), which takes the unit circle to
// the imaginary axis (ω = 2·atan(v)/T at w = jv), so the same candidates
// hold with ω = π/T in place of ∞.
//
// With a continuous dead time in the loop the magnitude is not rational:
// it is evaluated exactly from the parts (FrequencyResponse) on a
// logarithmic grid of 4000 points spanning three decades beyond the
// slowest and fastest pole and zero and 1/τ, and the largest sample is
// refined by golden-section search to 1e-10 relative in ω.
//
// An improper function (noise → control with an unfiltered derivative)
// has the peak +Inf at ω = +Inf. Errors: ErrInternallyUnstable.
func (fs *Functions) Peak(from Input, to Output) (FrequencyPeak, error) {
	if err := fs.requireStable(); err != nil {
		return FrequencyPeak{}, err
	}
	g := fs.fns[from][to].TF
	if !g.IsProper() {
		return FrequencyPeak{math.Inf(1), math.Inf(1)}, nil
	}
	if g.IsZero() {
		return FrequencyPeak{0, 0}, nil
	}
	if fs.DelayApproximated || g.DelaySec() != 0 && from == Reference && to == Error {
		return fs.gridPeak(from, to, g)
	}
	return rationalPeak(g)
}

// axisParts returns Re and Im/v of p(j·v) as polynomials in x = v².
func axisParts(p poly.Poly) (re, im poly.Poly) {
	asc := p.Ascending()
	var r, i []float64
	for k, c := range asc {
		sign := 1.0
		if (k/2)%2 == 1 {
			sign = -1
		}
		if k%2 == 0 {
			for len(r) <= k/2 {
				r = append(r, 0)
			}
			r[k/2] = sign * c
		} else {
			for len(i) <= k/2 {
				i = append(i, 0)
			}
			i[k/2] = sign * c
		}
	}
	re, _ = poly.FromAscending(append(r, 0))
	im, _ = poly.FromAscending(append(i, 0))
	return re, im
}

func squaredModulus(p poly.Poly) poly.Poly {
	re, im := axisParts(p)
	x := poly.X()
	return re.Mul(re).Add(x.Mul(im.Mul(im)))
}

func rationalPeak(g tf.TF) (FrequencyPeak, error) {
	num, den := g.Num(), g.Den()
	discrete := g.IsDiscrete()
	ts := g.SampleTimeSec()
	if discrete {
		n := max(num.Degree(), den.Degree())
		num, den = num.CircleToAxis(n), den.CircleToAxis(n)
	}
	P, Q := squaredModulus(num), squaredModulus(den)
	toOmega := func(v float64) float64 {
		if discrete {
			return 2 * math.Atan(v) / ts
		}
		return v
	}
	val := func(w float64) float64 {
		v, _ := g.FrequencyResponse(w)
		return cmplx.Abs(v)
	}
	best := FrequencyPeak{val(0), 0}
	if math.IsNaN(best.Value) || math.IsInf(best.Value, 0) {
		best.Value = math.Inf(1)
		return best, nil
	}
	consider := func(w, v float64) {
		if v > best.Value*(1+1e-13) {
			best = FrequencyPeak{v, w}
		}
	}
	dd := P.Derivative().Mul(Q).Sub(P.Mul(Q.Derivative()))
	if !dd.IsZero() && dd.Degree() > 0 {
		roots, err := dd.Roots()
		if err != nil {
			return FrequencyPeak{}, fmt.Errorf("%w: stationary points of |%v|: %v", ErrNumerical, g, err)
		}
		for _, r := range roots {
			if real(r) > 0 && math.Abs(imag(r)) <= 1e-8*cmplx.Abs(r) {
				w := toOmega(math.Sqrt(real(r)))
				consider(w, val(w))
			}
		}
	}
	if discrete {
		w := math.Pi / ts
		consider(w, val(w))
	} else if !g.IsStrictlyProper() {
		consider(math.Inf(1), math.Abs(g.GainFactor()))
	}
	return best, nil
}

func (fs *Functions) gridPeak(from Input, to Output, g tf.TF) (FrequencyPeak, error) {
	lo, hi := math.Inf(1), 0.0
	zs, _ := g.Zeros()
	ps, err := g.Poles()
	if err != nil {
		return FrequencyPeak{}, fmt.Errorf("%w: %v", ErrNumerical, err)
	}
	for _, r := range append(ps, zs...) {
		if a := cmplx.Abs(r); a > 0 {
			lo, hi = math.Min(lo, a), math.Max(hi, a)
		}
	}
	for _, p := range []tf.TF{fs.exact.c, fs.exact.g, fs.exact.h, fs.exact.f} {
		if d := p.DelaySec(); d > 0 {
			lo, hi = math.Min(lo, 1/d), math.Max(hi, 1/d)
		}
	}
	if hi == 0 {
		lo, hi = 1, 1
	}
	lo, hi = lo*1e-3, hi*1e3
	if fs.SampleTimeSec > 0 {
		hi = math.Pi / fs.SampleTimeSec
		lo = math.Min(lo, hi*1e-4)
	}
	f := func(w float64) float64 { return cmplx.Abs(fs.FrequencyResponse(from, to, w)) }
	const N = 4000
	best := FrequencyPeak{f(0), 0}
	if math.IsNaN(best.Value) || math.IsInf(best.Value, 0) {
		return FrequencyPeak{math.Inf(1), 0}, nil
	}
	r := math.Pow(hi/lo, 1/float64(N-1))
	ws := make([]float64, N)
	vals := make([]float64, N)
	bi := -1
	for i := range ws {
		ws[i] = lo * math.Pow(r, float64(i))
		vals[i] = f(ws[i])
		if vals[i] > best.Value {
			best, bi = FrequencyPeak{vals[i], ws[i]}, i
		}
	}
	if bi > 0 && bi < N-1 {
		// Golden-section refinement (Kiefer 1953) between the neighbours.
		w, v := rootfind.GoldenMax(f, ws[bi-1], ws[bi+1], 200, 5e-11)
		if v > best.Value {
			best = FrequencyPeak{v, w}
		}
	}
	return best, nil
}
