package margins

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/poly"
)

// xPoly is the polynomial x.
var xPoly = poly.MustNew(1, 0)

// squaredModulus returns |p(jv)|² = re² + x·im² as a polynomial in x = v².
func squaredModulus(re, im poly.Poly) poly.Poly {
	return productSum(re, re, im, im)
}

// productSum returns a·b + x·(c·d), with the same operations in the same
// order as a.Mul(b).Add(xPoly.Mul(c.Mul(d))) (so bit for bit the same
// coefficients), but with one working buffer instead of four polynomials.
func productSum(a, b, c, d poly.Poly) poly.Poly {
	na, nb, nc, nd := a.Degree(), b.Degree(), c.Degree(), d.Degree()
	lab, lcd := 0, 0
	if !a.IsZero() && !b.IsZero() {
		lab = na + nb + 1
	}
	if !c.IsZero() && !d.IsZero() {
		lcd = nc + nd + 1
	}
	buf := make([]float64, max(lab, lcd+1)+lcd)
	out, cd := buf[:len(buf)-lcd], buf[len(buf)-lcd:]
	if lab > 0 {
		for i := 0; i <= na; i++ {
			ai := a.Coef(i)
			for j := 0; j <= nb; j++ {
				out[i+j] += ai * b.Coef(j)
			}
		}
	}
	if lcd > 0 {
		for i := 0; i <= nc; i++ {
			ci := c.Coef(i)
			for j := 0; j <= nd; j++ {
				cd[i+j] += ci * d.Coef(j)
			}
		}
		for i, v := range cd {
			out[i+1] += v
		}
	}
	q, _ := poly.FromAscending(out) // finite: products of finite coefficients
	return q
}

// crossing is a phase crossover found by a search.
type crossing struct {
	w     float64 // rad/s
	k     float64 // gain factor 1/|L|
	slope float64 // dψ/dω of the continuous phase, rad per rad/s
}

// gainCrossovers returns every ω > 0 (below π/T for discrete loops) with
// |L| = 1, ascending. The candidates are the positive real roots of
// |an(jv)|² − |ad(jv)|², a polynomial in x = v²; each is polished by
// Newton's method on ln|L(ω)| evaluated directly.
func (lp *loop) gainCrossovers() ([]float64, error) {
	pn := squaredModulus(lp.nr, lp.ni)
	pd := squaredModulus(lp.dr, lp.di)
	m := pn.Sub(pd)
	if allPass(m, lp) {
		return nil, fmt.Errorf("%w: |L| = 1 at every frequency (all-pass loop)", ErrDegenerate)
	}
	f := func(w float64) (float64, float64) {
		v, d := lp.logValue(w)
		return real(v), real(d)
	}
	var out []float64
	for _, x := range positiveCandidates(m) {
		w0 := lp.fromX(x)
		w, ok := newton(f, w0, 0, lp.nyquist())
		if !ok {
			w = w0
		}
		if v, _ := lp.logValue(w); math.Abs(real(v)) <= 1e-7 {
			out = append(out, w)
		}
	}
	return sortUnique(out, dedupeRel), nil
}

// numeratorVanishes reports whether num is zero at the frequency point of ω
// within the rounding of its coefficients, by the criterion of
// poly.VanishesAt: |num(x)| ≤ 8·(n+1)·u·Σ|cᵢ|·|x|ⁱ. L is then 0 there, and
// a point where L = 0 is no phase crossover.
func (lp *loop) numeratorVanishes(w float64) bool {
	x := lp.point(w)
	v, _ := lp.num.EvalWithBound(x)
	ax, a := cmplx.Abs(x), 0.0
	n := lp.num.Degree()
	for i := n; i >= 0; i-- {
		a = a*ax + math.Abs(lp.num.Coef(i))
	}
	return cmplx.Abs(v) <= 8*float64(n+1)*0x1p-53*a
}

// allPass reports whether m = |an|² − |ad|² vanishes identically within
// rounding, coefficient by coefficient: |mᵢ| ≤ 8·(n+1)·u·Aᵢ, where Aᵢ is
// the coefficient of the same squared moduli formed from the absolute
// values of the coefficients (the size of the terms that cancel), n the
// degree, u = 2⁻⁵³. Judged per coefficient on the scaled polynomials, a
// loop whose gain or time scale is extreme (1e20/(s + 1e10)², whose
// constant terms cancel exactly) is not mistaken for an all-pass one.
func allPass(m poly.Poly, lp *loop) bool {
	abs := func(p poly.Poly) poly.Poly {
		c := p.Ascending()
		for i := range c {
			c[i] = math.Abs(c[i])
		}
		q, _ := poly.FromAscending(c)
		return q
	}
	a := squaredModulus(abs(lp.nr), abs(lp.ni)).Add(squaredModulus(abs(lp.dr), abs(lp.di)))
	tol := 8 * float64(a.Degree()+1) * 0x1p-53
	for i := 0; i <= m.Degree(); i++ {
		if math.Abs(m.Coef(i)) > tol*a.Coef(i) {
			return false
		}
	}
	return true
}

// endpointCrossings returns the phase crossovers at ω = 0 (L(0) finite and
// negative) and, for discrete loops, at the Nyquist frequency π/T.
func (lp *loop) endpointCrossings() (low, high *crossing) {
	x0 := 0.0
	if lp.discrete() {
		x0 = 1
	}
	// A denominator that vanishes within rounding (a discrete integrator
	// (z − 1)(z − a) expands to coefficients whose sum is 1e-16, not 0) is
	// a pole: L is infinite there, not a huge negative number.
	// Likewise a numerator that vanishes within rounding is a zero: L = 0
	// is no phase crossover (|L| > 0 is needed; 1/s³ sampled by matched
	// pole–zero mapping has its zeros at z = −1).
	if !lp.den.VanishesAt(x0) && !lp.num.VanishesAt(x0) {
		if l := lp.num.Eval(x0) / lp.den.Eval(x0); l < 0 {
			low = &crossing{w: 0, k: -1 / l, slope: math.NaN()}
		}
	}
	if lp.discrete() && !lp.den.VanishesAt(-1) && !lp.num.VanishesAt(-1) {
		if l := lp.num.Eval(-1) / lp.den.Eval(-1); l < 0 {
			high = &crossing{w: lp.nyquist(), k: -1 / l, slope: math.NaN()}
		}
	}
	return low, high
}

// rationalPhaseCrossovers returns the phase crossovers ω > 0 of a loop
// without dead time: the positive real roots of Im(an·conj ad)/v, a
// polynomial in x = v², at which L is real and negative, polished by
// Newton's method on the directly evaluated phase.
func (lp *loop) rationalPhaseCrossovers() ([]crossing, error) {
	j := lp.ni.Mul(lp.dr).Sub(lp.nr.Mul(lp.di))
	scale := math.Max(lp.ni.Mul(lp.dr).NormInf(), lp.nr.Mul(lp.di).NormInf())
	if j.NormInf() <= 1e-14*scale || j.IsZero() {
		// L(jω) is real at every frequency: an even loop (k/s², k/(s²+1)),
		// whose phase crossovers fill whole bands; none is listed.
		lp.even = true
		return nil, nil
	}
	var out []crossing
	for _, x := range positiveCandidates(j) {
		if c, ok := lp.polishPhaseCrossing(lp.fromX(x)); ok {
			out = append(out, c)
		}
	}
	return uniqueCrossings(out), nil
}

// polishPhaseCrossing refines a candidate phase crossover by Newton's
// method on the wrapped phase error and checks that L is real and negative
// there.
func (lp *loop) polishPhaseCrossing(w0 float64) (crossing, bool) {
	f := func(w float64) (float64, float64) {
		v, d := lp.logValue(w)
		return math.Remainder(imag(v)-math.Pi, 2*math.Pi), imag(d)
	}
	w, ok := newton(f, w0, 0, lp.nyquist())
	if !ok {
		w = w0
	}
	l := lp.value(w)
	if cmplx.IsInf(l) || cmplx.IsNaN(l) || l == 0 || real(l) >= 0 || lp.numeratorVanishes(w) {
		return crossing{}, false
	}
	if v, _ := f(w); math.Abs(v) > 1e-7 {
		return crossing{}, false
	}
	_, d := lp.logValue(w)
	return crossing{w: w, k: 1 / cmplx.Abs(l), slope: imag(d)}, true
}

func uniqueCrossings(cs []crossing) []crossing {
	sortCrossings(cs)
	out := cs[:0]
	for _, c := range cs {
		if len(out) > 0 && math.Abs(c.w-out[len(out)-1].w) <= dedupeRel*c.w {
			continue
		}
		out = append(out, c)
	}
	return out
}

func sortCrossings(cs []crossing) {
	for i := 1; i < len(cs); i++ {
		for j := i; j > 0 && cs[j].w < cs[j-1].w; j-- {
			cs[j], cs[j-1] = cs[j-1], cs[j]
		}
	}
}

// phaseCriticalPoints returns the frequencies ω > 0 where the continuous
// phase ψ(ω) = θ(ω) − ωτ of a continuous-time loop is stationary. With
// F(ω) = an(jω)·conj ad(jω) = R(x) + jω·J(x), x = ω², the phase of the
// rational part has θ′ = (R·I′ − I·R′)/(R² + I²), I = ωJ, so θ′ = τ is the
// polynomial equation
//
//	R·J + 2x·(R·J′ − J·R′) − τ·(R² + x·J²) = 0  in x.
//
// Between consecutive critical points (and poles on the imaginary axis) ψ is
// strictly monotone, so every level −π + 2πk it passes is crossed exactly
// once there: the search cannot miss a crossover.
func (lp *loop) phaseCriticalPoints() []float64 {
	j := lp.ni.Mul(lp.dr).Sub(lp.nr.Mul(lp.di))
	r := productSum(lp.nr, lp.dr, lp.ni, lp.di)
	c := r.Mul(j).Add(xPoly.Mul(r.Mul(j.Derivative()).Sub(j.Mul(r.Derivative()))).Scale(2))
	// In the scaled variable u = ω/σ the condition reads dθ/du = σ·τ.
	c = c.Sub(r.Mul(r).Add(xPoly.Mul(j.Mul(j))).Scale(lp.sigma * lp.tau))
	var out []float64
	for _, x := range positiveRoots(c) {
		out = append(out, lp.fromX(x))
	}
	return out
}

// delayPhaseCrossovers returns every phase crossover with 0 < ω ≤ wmax of a
// continuous-time loop with dead time. The interval is cut at the critical
// points of the phase and at poles and zeros on the imaginary axis; on each piece the
// phase is monotone, the levels −π + 2πk between its end values are
// bracketed and each is refined by Brent's method (Brent 1973).
//
// It returns ErrBadSettings, before any refinement, when the interval holds
// more than maxDelayCrossings crossovers.
func (lp *loop) delayPhaseCrossovers(wmax float64) ([]crossing, error) {
	cuts := []float64{0}
	for _, w := range lp.phaseCriticalPoints() {
		if w < wmax {
			cuts = append(cuts, w)
		}
	}
	// Poles and zeros on the axis are points where the phase jumps (by −π
	// and +π each) and |L| is infinite or 0: no crossover lies there.
	jumps := map[float64]bool{}
	for _, w := range lp.onAxisFrequencies(true) {
		if w < wmax {
			cuts = append(cuts, w)
			jumps[w] = true
		}
	}
	cuts = append(cuts, wmax)
	cuts = sortUnique(cuts, 0)
	// The phase falls by about τ·ω over [0, ω]; refuse searches that would
	// list an unreasonable number of crossovers.
	total := math.Abs(lp.phase(wmax)-lp.sumPhase(0))/(2*math.Pi) + float64(len(cuts))
	if total > maxDelayCrossings {
		return nil, fmt.Errorf("%w: OmegaMaxRadPerSec = %v rad/s spans about %.3g phase crossovers, more than %d", ErrBadSettings, wmax, total, maxDelayCrossings)
	}
	var out []crossing
	for i := 0; i+1 < len(cuts); i++ {
		a, b := cuts[i], cuts[i+1]
		if jumps[a] {
			a = math.Nextafter(a, b) * (1 + 8*eps)
		}
		if jumps[b] {
			b = math.Nextafter(b, a) * (1 - 8*eps)
		}
		if !(b > a) {
			continue
		}
		pa := lp.sumPhase(0)
		if a > 0 {
			pa = lp.phase(a)
		}
		pb := lp.phase(b)
		lo, hi := math.Min(pa, pb), math.Max(pa, pb)
		kLo := math.Floor((lo+math.Pi)/(2*math.Pi)) + 1
		kHi := math.Ceil((hi+math.Pi)/(2*math.Pi)) - 1
		for k := kLo; k <= kHi; k++ {
			level := -math.Pi + 2*math.Pi*k
			h := func(w float64) float64 { return lp.phase(w) - level }
			fa, fb := pa-level, pb-level
			if a == 0 && math.Abs(fa) <= 1e-9 {
				// L(0) is real and negative: the crossover at ω = 0,
				// listed by endpointCrossings.
				continue
			}
			if fa == 0 || fb == 0 || (fa > 0) == (fb > 0) {
				continue
			}
			w := brent(h, a, b, fa, fb)
			l := lp.value(w)
			if cmplx.IsInf(l) || l == 0 || lp.numeratorVanishes(w) {
				continue
			}
			_, d := lp.logValue(w)
			out = append(out, crossing{w: w, k: 1 / cmplx.Abs(l), slope: imag(d)})
		}
	}
	return uniqueCrossings(out), nil
}

// maxDelayCrossings bounds the number of phase crossovers a dead-time
// search may list (it grows like τ·OmegaMaxRadPerSec/2π).
const maxDelayCrossings = 100000
