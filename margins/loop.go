package margins

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// loop is the analysed form of a loop transfer function.
//
// Frequencies are handled through an "axis variable" v ≥ 0 in which the
// frequency response is a rational function of jv:
//
//   - continuous time: v = ω and L(jω) = num(jω)/den(jω)·e^(−jωτ);
//   - discrete time: the bilinear map z = (1+w)/(1−w) takes the unit circle
//     z = e^(jωT) to the imaginary axis w = jv with v = tan(ωT/2), and
//     L(e^(jωT)) = an(jv)/ad(jv) exactly, an(w) = (1−w)ⁿ·num((1+w)/(1−w)),
//     ad likewise, n = max(deg num, deg den). The Nyquist frequency π/T is
//     v = ∞.
//
// The polynomials an and ad serve for candidate crossovers (roots of
// polynomials in x = v²) and for the continuous phase; every value reported
// is then polished on the original num and den.
type loop struct {
	num, den poly.Poly    // original polynomials in s or z (integer discrete delay absorbed into den)
	ts       float64      // sample period, 0 for continuous time
	tau      float64      // continuous-time dead time in seconds
	an, ad   poly.Poly    // polynomials in the axis variable
	zeros    []complex128 // roots of an (after ensureRoots)
	poles    []complex128 // roots of ad (after ensureRoots)
	rooted   bool
	even     bool // L(jω) real at every frequency (set by rationalPhaseCrossovers)
	// openUnstable and openIntegrators are set by countOpenLoop.
	openUnstable, openIntegrators int
	c0                            float64 // phase of the ratio of leading coefficients of an and ad: 0 or π
	// sigma is the power of two that scales the axis variable, v = sigma·u,
	// and san, sad are an(sigma·u) and ad(sigma·u) divided by a common
	// power of two (see axisScaled): the polynomials whose roots give the
	// crossovers, free of overflow for any gain or time scale.
	sigma    float64
	san, sad poly.Poly
	// axis parts: san(ju) = nr(u²) + j·u·ni(u²), likewise sad.
	nr, ni, dr, di poly.Poly
}

// MaxDelaySamples is the largest dead time of a discrete loop, in sample
// periods, that Compute and the other analyses accept: each sample is a pole
// at z = 0, so the dead time raises the degree of the denominator by as
// much, and every analysis solves polynomials of about that degree (500 is
// also the largest degree the tf parser builds).
const MaxDelaySamples = 500

// newLoop validates g and builds its analysed form.
func newLoop(g tf.TF) (*loop, error) {
	if g.IsZero() {
		return nil, fmt.Errorf("%w: the numerator is the zero polynomial", ErrZeroLoop)
	}
	if !g.IsProper() {
		return nil, fmt.Errorf("%w: numerator degree %d exceeds denominator degree %d", ErrImproper, g.Num().Degree(), g.Den().Degree())
	}
	lp := &loop{num: g.Num(), den: g.Den(), ts: g.SampleTimeSec()}
	if !lp.num.IsFinite() || !lp.den.IsFinite() {
		return nil, fmt.Errorf("%w: a coefficient of the loop", ErrNotFinite)
	}
	if d := g.DelaySec(); d != 0 {
		if math.IsNaN(d) || math.IsInf(d, 0) || d < 0 {
			return nil, fmt.Errorf("%w: dead time %v s", ErrNotFinite, d)
		}
		if lp.ts > 0 {
			k := math.Round(d / lp.ts)
			if k > MaxDelaySamples {
				return nil, fmt.Errorf("%w: discrete loop with dead time %v s = %.3g sample periods of %v s, more than %d (each is a pole at z = 0)", ErrUnsupported, d, d/lp.ts, lp.ts, MaxDelaySamples)
			}
			if math.Abs(d/lp.ts-k) > 1e-9*math.Max(1, k) {
				return nil, fmt.Errorf("%w: discrete loop with dead time %v s, not a whole number of sample periods %v s", ErrUnsupported, d, lp.ts)
			}
			lp.den = lp.den.ShiftUp(int(k))
		} else {
			lp.tau = d
		}
	}
	if lp.ts > 0 {
		n := max(lp.num.Degree(), lp.den.Degree())
		lp.an = lp.num.CircleToAxis(n)
		lp.ad = lp.den.CircleToAxis(n)
		if lp.ad.IsZero() {
			return nil, fmt.Errorf("%w: the denominator vanishes on the unit circle identically", ErrDegenerate)
		}
	} else {
		lp.an, lp.ad = lp.num, lp.den
	}
	if lp.an.Lead()*lp.ad.Lead() < 0 {
		lp.c0 = math.Pi
	}
	lp.sigma, lp.san, lp.sad = axisScaled(lp.an, lp.ad)
	lp.nr, lp.ni = axisParts(lp.san)
	lp.dr, lp.di = axisParts(lp.sad)
	return lp, nil
}

// axisScaled returns sigma = 2^e and an(sigma·u)/2^m, ad(sigma·u)/2^m: the
// axis polynomials in a scaled variable u = v/sigma, divided by a common
// power of two so that their largest coefficient is about 1. Scaling by
// powers of two is exact, so the ratio an/ad and every root are unchanged
// (up to underflow of negligible terms); it keeps the squared moduli
// |an|², |ad|² finite for loop gains or time constants near the limits of
// float64 (1e300/(s+1), 1/(1e308·s+1)), whose crossovers are then found
// like any other. The exponent e balances the crossover scale: with a
// relative degree r > 0 it is the frequency where the leading terms have
// equal size, (|lead an|/|lead ad|)^(1/r); otherwise the geometric mean of
// the non-zero root moduli of ad (common practice for balancing).
func axisScaled(an, ad poly.Poly) (sigma float64, san, sad poly.Poly) {
	lg := func(x float64) float64 { return math.Log2(math.Abs(x)) }
	est := 0.0
	if r := ad.Degree() - an.Degree(); r > 0 && !an.IsZero() {
		est = (lg(an.Lead()) - lg(ad.Lead())) / float64(r)
	} else {
		c := ad.Ascending()
		k := 0
		for k < len(c) && c[k] == 0 {
			k++
		}
		if n := len(c) - 1; n > k {
			est = (lg(c[k]) - lg(c[n])) / float64(n-k)
		}
	}
	if math.IsNaN(est) || math.IsInf(est, 0) {
		est = 0
	}
	e := int(math.Round(math.Max(-1000, math.Min(1000, est))))
	top := math.MinInt
	for _, p := range []poly.Poly{an, ad} {
		for i := 0; i <= p.Degree(); i++ {
			if c := p.Coef(i); c != 0 {
				_, x := math.Frexp(c)
				top = max(top, x+e*i)
			}
		}
	}
	scale := func(p poly.Poly) poly.Poly {
		c := p.Ascending()
		for i := range c {
			c[i] = math.Ldexp(c[i], e*i-top)
		}
		q, _ := poly.FromAscending(c)
		return q
	}
	return math.Ldexp(1, e), scale(an), scale(ad)
}

// fromX maps a root x = u² of a polynomial in the scaled axis variable to
// the frequency in rad/s.
func (lp *loop) fromX(x float64) float64 {
	return lp.fromAxis(lp.sigma * math.Sqrt(x))
}

// axisSnapTol: a root r with |Re r| ≤ axisSnapTol·|r| is taken to lie on
// the imaginary axis (Re r = 0), and a root with |r| ≤ axisSnapTol times the
// largest root modulus is taken to be 0. Poles on the axis (integrators,
// undamped modes; for discrete loops, poles on the unit circle, whose
// bilinear images carry rounding errors) are thereby recognised and avoided
// by indentation instead of being counted as stable or unstable by chance.
const axisSnapTol = 1e-13

// ensureRoots computes the zeros and poles of the loop in the axis variable,
// once.
func (lp *loop) ensureRoots() error {
	if lp.rooted {
		return nil
	}
	var err error
	if !lp.an.IsZero() && lp.an.Degree() > 0 {
		if lp.zeros, err = lp.an.Roots(); err != nil {
			return fmt.Errorf("margins: zeros of the loop: %w", err)
		}
	}
	if lp.poles, err = lp.ad.Roots(); err != nil {
		return fmt.Errorf("margins: poles of the loop: %w", err)
	}
	snapToAxis(lp.zeros)
	snapToAxis(lp.poles)
	lp.rooted = true
	return nil
}

func snapToAxis(rs []complex128) {
	m := 0.0
	for _, r := range rs {
		m = math.Max(m, cmplx.Abs(r))
	}
	for i, r := range rs {
		switch {
		case cmplx.Abs(r) <= axisSnapTol*m:
			rs[i] = 0
		case math.Abs(real(r)) <= axisSnapTol*cmplx.Abs(r):
			rs[i] = complex(0, imag(r))
		}
	}
}

// axisParts returns re and im with p(jv) = re(v²) + j·v·im(v²).
func axisParts(p poly.Poly) (re, im poly.Poly) {
	l := p.Degree() + 1
	r := make([]float64, l/2+1)
	i := make([]float64, l/2+1)
	for k := range l {
		a := p.Coef(k)
		m := k / 2
		sign := 1.0
		if m%2 == 1 {
			sign = -1
		}
		if k%2 == 0 {
			r[m] += sign * a
		} else {
			i[m] += sign * a
		}
	}
	re, _ = poly.FromAscending(r)
	im, _ = poly.FromAscending(i)
	return re, im
}

// discrete reports whether the loop is in discrete time.
func (lp *loop) discrete() bool { return lp.ts > 0 }

// nyquist returns π/T for discrete loops and +Inf for continuous ones.
func (lp *loop) nyquist() float64 {
	if lp.discrete() {
		return math.Pi / lp.ts
	}
	return math.Inf(1)
}

// toAxis maps a frequency ω in rad/s to the axis variable v.
func (lp *loop) toAxis(w float64) float64 {
	if !lp.discrete() {
		return w
	}
	if w >= lp.nyquist() {
		return math.Inf(1)
	}
	return math.Tan(w * lp.ts / 2)
}

// fromAxis maps the axis variable v to the frequency ω in rad/s.
func (lp *loop) fromAxis(v float64) float64 {
	if !lp.discrete() {
		return v
	}
	return 2 * math.Atan(v) / lp.ts
}

// point returns s = jω or z = e^(jωT).
func (lp *loop) point(w float64) complex128 {
	if lp.discrete() {
		return cmplx.Rect(1, w*lp.ts)
	}
	return complex(0, w)
}

// parts returns num and den at the frequency point of ω, and the delay
// factor e^(−jωτ).
func (lp *loop) parts(w float64) (n, d, e complex128) {
	x := lp.point(w)
	n = lp.num.EvalComplex(x)
	d = lp.den.EvalComplex(x)
	e = 1
	if lp.tau != 0 {
		e = cmplx.Rect(1, -w*lp.tau)
	}
	return n, d, e
}

// value returns L at frequency ω (complex infinity at a pole).
func (lp *loop) value(w float64) complex128 {
	n, d, e := lp.parts(w)
	if d == 0 {
		return cmplx.Inf()
	}
	return n / d * e
}

// logValue returns ln L(ω) = ln|L| + j·(principal phase − ωτ) and its
// derivative with respect to ω.
func (lp *loop) logValue(w float64) (val, der complex128) {
	x := lp.point(w)
	n, n1 := lp.num.EvalWithDerivative(x)
	d, d1 := lp.den.EvalWithDerivative(x)
	val = cmplx.Log(n/d) - complex(0, w*lp.tau)
	dx := complex(0, 1) // ds/dω
	if lp.discrete() {
		dx = complex(0, lp.ts) * x // dz/dω
	}
	der = dx*(n1/n-d1/d) - complex(0, lp.tau)
	return val, der
}

// factorAngle returns the continuous phase, in radians, of the normalised
// factor 1 − jv/r of a non-zero root r, for v ≥ 0 (v = +Inf gives the
// limit). It is 0 at v = 0 and continuous: with r = a + jb,
//
//	1 − jv/r = (|r|² − v·b − j·v·a)/|r|²,
//
// whose imaginary part keeps the sign of −a for v > 0, so the principal
// value atan2(−v·a, |r|² − v·b) lies in (0, π) for a < 0 and in (−π, 0) for
// a > 0 and never wraps. A root on the imaginary axis (a = 0, b > 0) gives
// a jump of +π where v passes b (the value after the jump is returned at
// v = b); with b < 0 the factor stays positive for v ≥ 0.
func factorAngle(v float64, r complex128) float64 {
	a, b := real(r), imag(r)
	if a == 0 {
		if b > 0 && v >= b {
			return math.Pi
		}
		return 0
	}
	if math.IsInf(v, 1) {
		return math.Atan2(-a, -b)
	}
	m := cmplx.Abs(r)
	// Both parts divided by |r| > 0, which avoids overflow of |r|².
	return math.Atan2(-v*(a/m), m-v*(b/m))
}

// lowFrequencyPhase returns the phase of L as ω → 0⁺, in radians: the angle
// of its low-frequency asymptote K0·(jv)^(z₀−p₀), z₀ and p₀ the numbers of
// zeros and poles at the origin, K0 = c·Π(−zᵢ)/Π(−pⱼ) over the non-zero
// roots (c the ratio of the leading coefficients) a real number whose
// angle, 0 or π, is taken as its principal value in (−π, π]. The result is
// arg K0 + (z₀ − p₀)·π/2: −90° per integrator, +90° per differentiator,
// 180° for a negative low-frequency gain.
func (lp *loop) lowFrequencyPhase() float64 {
	k0, orders := lp.c0, 0
	for _, z := range lp.zeros {
		if z == 0 {
			orders++
		} else {
			k0 += cmplx.Phase(-z)
		}
	}
	for _, p := range lp.poles {
		if p == 0 {
			orders--
		} else {
			k0 -= cmplx.Phase(-p)
		}
	}
	// K0 is real: its angle is a multiple of π up to the rounding of the
	// roots; take the principal value 0 or π.
	k0 = math.Abs(math.Remainder(math.Pi*math.Round(k0/math.Pi), 2*math.Pi))
	return k0 + float64(orders)*math.Pi/2
}

// sumPhase returns the continuous phase of the rational part, in radians,
// accumulated factor by factor from the roots of an and ad:
//
//	ψ(v) = ψ(0⁺) + Σ ∠(1 − jv/zᵢ) − Σ ∠(1 − jv/pⱼ)
//
// over the non-zero roots, ψ(0⁺) the low-frequency phase (see
// lowFrequencyPhase) and each factor angle continuous from 0 (see
// factorAngle). It therefore starts at the true low-frequency angle
// whatever the roots (a pair of right-half-plane zeros contributes 0 at
// v = 0, not 2π), and it is exact up to the accuracy of the roots; it
// serves to choose the branch of the accurately evaluated phase.
func (lp *loop) sumPhase(v float64) float64 {
	if err := lp.ensureRoots(); err != nil {
		return math.NaN()
	}
	p := lp.lowFrequencyPhase()
	for _, z := range lp.zeros {
		if z != 0 {
			p += factorAngle(v, z)
		}
	}
	for _, q := range lp.poles {
		if q != 0 {
			p -= factorAngle(v, q)
		}
	}
	return p
}

// phase returns the continuous (unwrapped) phase of L at ω in radians,
// dead time included: the principal phase of the directly evaluated L on
// the branch selected by sumPhase.
func (lp *loop) phase(w float64) float64 {
	v := lp.toAxis(w)
	ref := lp.sumPhase(v)
	n, d, _ := lp.parts(w)
	// Where num or den overflows (or the ratio underflows) the evaluated
	// phase means nothing: the sum over the roots is the phase.
	q := n / d
	if d == 0 || n == 0 || q == 0 || cmplx.IsInf(q) || cmplx.IsNaN(q) {
		return ref - w*lp.tau
	}
	p := cmplx.Phase(q)
	p += 2 * math.Pi * math.Round((ref-p)/(2*math.Pi))
	return p - w*lp.tau
}

// onAxisFrequencies returns the frequencies ω > 0 of the poles (and zeros)
// of L on the imaginary axis (unit circle for discrete loops), ascending.
func (lp *loop) onAxisFrequencies(includeZeros bool) []float64 {
	if lp.ensureRoots() != nil {
		return nil
	}
	var out []float64
	add := func(rs []complex128) {
		for _, r := range rs {
			if real(r) == 0 && imag(r) > 0 {
				out = append(out, lp.fromAxis(imag(r)))
			}
		}
	}
	add(lp.poles)
	if includeZeros {
		add(lp.zeros)
	}
	return sortUnique(out, 0)
}

// countOpenLoop sets lp.openUnstable, the number of poles of L with
// Re s > 0 (|z| > 1), and lp.openIntegrators, the number at s = 0 (z = 1):
// by the Routh array or the winding count for continuous loops when one is
// conclusive, otherwise
// from the poles.
func (lp *loop) countOpenLoop() error {
	if !lp.discrete() {
		if rhp, z, ok := countRightHalfPlane(lp.ad); ok {
			lp.openUnstable, lp.openIntegrators = rhp, z
			return nil
		}
	}
	if err := lp.ensureRoots(); err != nil {
		return err
	}
	lp.openUnstable, lp.openIntegrators = 0, 0
	for _, p := range lp.poles {
		switch {
		case p == 0:
			lp.openIntegrators++
		case real(p) > 0:
			lp.openUnstable++
		}
	}
	return nil
}

// characteristicScale returns the smallest and largest non-zero magnitudes
// of the poles and zeros, as frequencies in rad/s (0, 0 when there are none).
func (lp *loop) characteristicScale() (lo, hi float64) {
	if lp.ensureRoots() != nil {
		return 0, 0
	}
	lo = math.Inf(1)
	for _, rs := range [][]complex128{lp.zeros, lp.poles} {
		for _, r := range rs {
			m := cmplx.Abs(r)
			if m == 0 {
				continue
			}
			w := lp.fromAxis(m)
			lo = math.Min(lo, w)
			hi = math.Max(hi, w)
		}
	}
	if math.IsInf(lo, 1) {
		return 0, 0
	}
	return lo, hi
}
