package locus

import (
	"cmp"
	"fmt"
	"math"
	"math/cmplx"
	"slices"

	"github.com/loopwise/loopwise/poly"
)

// partsOnAxis returns the real and imaginary parts of q(jω) as real
// polynomials in ω.
func partsOnAxis(q poly.Poly) (re, im poly.Poly) {
	n := q.Degree()
	r := make([]float64, n+1)
	i := make([]float64, n+1)
	for k := 0; k <= n; k++ {
		c := q.Coef(k)
		switch k % 4 {
		case 0:
			r[k] = c
		case 1:
			i[k] = c
		case 2:
			r[k] = -c
		case 3:
			i[k] = -c
		}
	}
	re, _ = poly.FromAscending(r)
	im, _ = poly.FromAscending(i)
	return re, im
}

// boundaryCandidates returns the ω > 0 at which A(jω) + k·B(jω) = 0 for a
// real k: the positive real roots x = ω² of Im(A(jω)·conj B(jω))/ω, an
// even polynomial in ω. ok is false when that polynomial is identically
// zero (the locus then runs along the axis).
func boundaryCandidates(A, B poly.Poly) (omegas []float64, ok bool) {
	ar, ai := partsOnAxis(A)
	br, bi := partsOnAxis(B)
	im := ai.Mul(br).Sub(ar.Mul(bi)) // odd in ω
	if im.IsZero() {
		return nil, false
	}
	var x []float64
	for k := 1; k <= im.Degree(); k += 2 {
		x = append(x, im.Coef(k))
	}
	xp, _ := poly.FromAscending(x)
	if xp.Degree() < 1 {
		return nil, true
	}
	rs, err := xp.RootsWithMultiplicity()
	if err != nil {
		return nil, true
	}
	for _, r := range rs {
		v := r.Value
		if real(v) > 0 && math.Abs(imag(v)) <= 1e-6*real(v) {
			omegas = append(omegas, math.Sqrt(real(v)))
		}
	}
	return omegas, true
}

// crossings returns the crossings of the stability boundary with k in the
// open range, sorted by frequency. Continuous time: ω ≥ 0 with
// a(jω) + k·b(jω) = 0; candidates are the real roots of an even polynomial
// in ω (Routh's and Hurwitz's boundary condition written as the vanishing of
// Im(a·conj b) on the axis), each then polished by Newton's method on the
// two real equations in (ω, k). Discrete time: the bilinear map
// z = (1 + w)/(1 − w) moves the unit circle to the axis; z = −1 (w = ∞) is
// checked separately. Open-loop poles and zeros on the boundary (k = 0 or
// ∞) are not crossings.
func (p *problem) crossings() ([]Crossing, error) {
	A, B := p.a, p.b
	if p.discrete {
		A, B = p.a.CircleToAxis(p.order), p.b.CircleToAxis(p.order)
	}
	cand, ok := boundaryCandidates(A, B)
	if !ok {
		p.notes = append(p.notes, "the locus runs along the stability boundary (Im(a·conj b) vanishes on it identically); no isolated crossings are reported")
	}
	var out []Crossing
	// ω = 0 (z = 1) and, in discrete time, z = −1: real points, exact k.
	reals := []float64{0}
	if p.discrete {
		reals = append(reals, math.Pi)
	}
	for _, t := range reals {
		x := p.boundaryPoint(t)
		// An open-loop pole or zero here (within the rounding of expanded
		// coefficients, as for a discrete integrator (z − 1)(z − a)) is
		// not a crossing: k would be 0 or ∞.
		if p.a.VanishesAt(real(x)) || p.b.VanishesAt(real(x)) {
			continue
		}
		k := -p.a.Eval(real(x)) / p.b.Eval(real(x))
		if k != 0 && p.rng.Min < k && k < p.rng.Max {
			out = append(out, Crossing{FrequencyRadPerSec: p.freq(t), Point: x, Value: k})
		}
	}
	for _, c := range cand {
		t := c
		if p.discrete {
			t = 2 * math.Atan(c)
		}
		t, k, good := p.polishCrossing(t)
		if !good || t <= 0 || (p.discrete && t >= math.Pi) {
			continue
		}
		if k == 0 || !(p.rng.Min < k && k < p.rng.Max) {
			continue
		}
		out = append(out, Crossing{FrequencyRadPerSec: p.freq(t), Point: p.boundaryPoint(t), Value: k})
	}
	slices.SortFunc(out, func(x, y Crossing) int { return cmp.Compare(x.FrequencyRadPerSec, y.FrequencyRadPerSec) })
	out = slices.CompactFunc(out, func(x, y Crossing) bool {
		return math.Abs(x.FrequencyRadPerSec-y.FrequencyRadPerSec) <= 1e-10*math.Max(1, x.FrequencyRadPerSec) &&
			math.Abs(x.Value-y.Value) <= 1e-8*math.Max(1, math.Abs(x.Value))
	})
	return out, nil
}

// boundaryPoint returns jt (continuous) or e^(jt) (discrete).
func (p *problem) boundaryPoint(t float64) complex128 {
	if p.discrete {
		if t == math.Pi {
			return -1
		}
		if t == 0 {
			return 1
		}
		return cmplx.Rect(1, t)
	}
	return complex(0, t)
}

// freq converts the boundary parameter to rad/s.
func (p *problem) freq(t float64) float64 {
	if p.discrete {
		return t / p.ts
	}
	return t
}

// polishCrossing refines a boundary parameter t (ω, or θ in discrete
// time) and the value k with Newton's method on F(t, k) = a(x(t)) +
// k·b(x(t)) = 0 (two real equations), and reports whether the result is a
// genuine crossing: small relative residual, not an open-loop pole or
// zero on the boundary.
func (p *problem) polishCrossing(t float64) (float64, float64, bool) {
	kOf := func(t float64) float64 {
		x := p.boundaryPoint(t)
		av, bv := p.a.EvalComplex(x), p.b.EvalComplex(x)
		return -real(av*cmplx.Conj(bv)) / real(bv*cmplx.Conj(bv))
	}
	k := kOf(t)
	res := func(t, k float64) (complex128, float64) {
		x := p.boundaryPoint(t)
		f, _ := p.eval(x, k)
		return f, cabs(f) / p.magnitude(x, k)
	}
	f, rel := res(t, k)
	for range 8 {
		x := p.boundaryPoint(t)
		_, df := p.eval(x, k)
		dx := complex(0, 1)
		if p.discrete {
			dx = complex(0, 1) * x
		}
		ft := df * dx
		fk := p.b.EvalComplex(x)
		// Solve [Re ft, Re fk; Im ft, Im fk]·[dt; dk] = −[Re f; Im f].
		det := real(ft)*imag(fk) - imag(ft)*real(fk)
		if det == 0 {
			break
		}
		dt := (-real(f)*imag(fk) + imag(f)*real(fk)) / det
		dk := (-real(ft)*imag(f) + imag(ft)*real(f)) / det
		nt, nk := t+dt, k+dk
		nf, nrel := res(nt, nk)
		if !(nrel < rel) {
			break
		}
		t, k, f, rel = nt, nk, nf, nrel
		if rel < 1e-16 {
			break
		}
	}
	if x := p.boundaryPoint(t); p.atPoleOrZero(x) {
		return t, k, false
	}
	return t, k, rel <= 1e-9
}

// stable reports whether every root of a + k·b has Re < 0 (discrete:
// |z| < 1). It uses the Routh array (Routh 1877; Hurwitz 1895) on a + k·b,
// or in discrete time on its bilinear transform (the unit disc maps to the
// left half plane), and falls back to the closed-loop roots when a pivot
// of the array is within rounding of zero (the singular cases of the
// array) or the degree exceeds routhMaxDegree. A verdict from the roots
// is only given when the inclusion disc of every root (inclusionRadius)
// stays off the boundary; otherwise it returns ErrIllConditioned. A
// polynomial that vanishes identically is not stable.
//
// In continuous time a coefficient of a + k·b whose sign certainly
// differs from the leading one decides the verdict first, in O(n):
// a real polynomial with every root in Re < 0 is a product of factors
// s + α and s² + βs + γ with α, β, γ > 0, so all its coefficients have
// one sign (Stodola's necessary condition, common practice; stated in
// Gantmacher 1959, The Theory of Matrices, vol. 2, ch. XV, from memory).
// This spares the roots above
// routhMaxDegree on the pieces of the range where the loop is clearly
// unstable.
func (p *problem) stable(k float64) (bool, error) {
	c := p.charPoly(k)
	if c.IsZero() {
		return false, nil
	}
	if !p.discrete && p.signsDiffer(c, k) {
		return false, nil
	}
	h := c
	if p.discrete {
		h = c.CircleToAxis(c.Degree())
		if h.Degree() < c.Degree() {
			// A root at z = −1 (on the circle): not stable.
			return false, nil
		}
	}
	if h.Degree() <= routhMaxDegree {
		if st, ok := routhStable(h); ok {
			return st, nil
		}
	}
	rs, err := c.RootsWithMultiplicity()
	if err != nil {
		return false, fmt.Errorf("locus: closed-loop poles at %s = %v: %w", p.variable, k, err)
	}
	stable := true
	for i, r := range rs {
		dist := math.Abs(real(r.Value)) // distance to the boundary
		if p.discrete {
			dist = math.Abs(cabs(r.Value) - 1)
		}
		// A root within rounding of the boundary (an exact zero or
		// imaginary root, a shared pole on the boundary) is a marginal
		// root: not stable, as decided below. Only a root whose
		// uncertainty is larger than rounding and reaches the boundary
		// leaves the verdict open.
		// The disc also covers the rounding of the coefficients of
		// a + k·b when they were formed, u·(|aᵢ| + |k|·|bᵢ|) each (the
		// verdict is about a + k·b, not about its rounded coefficients):
		// where the conditioning of the roots makes that error reach the
		// boundary, double precision cannot decide (1/(s+1)^200).
		if rad := inclusionRadius(c, rs, i, 0x1p-53*p.magnitude(r.Value, k)); !(rad < dist) && !(rad <= 8*0x1p-53*math.Max(1, cabs(r.Value))) {
			return false, fmt.Errorf("%w: at %s = %v the closed-loop pole %v lies within its rounding uncertainty %.3g of the stability boundary (degree %d): double precision cannot decide stability", ErrIllConditioned, p.variable, k, r.Value, rad, c.Degree())
		}
		if p.discrete {
			stable = stable && cabs(r.Value) < 1
		} else {
			stable = stable && real(r.Value) < 0
		}
	}
	return stable, nil
}

// signsDiffer reports whether a coefficient of c = fl(a + k·b) certainly
// has the sign opposite to the leading coefficient of the exact a + k·b:
// the computed cᵢ = fl(aᵢ + fl(k·bᵢ)) is within 2u·(|aᵢ| + |k·bᵢ|) of the
// exact value (two roundings, Higham 2002, §2.2), so a coefficient larger
// than 4u·(|aᵢ| + |k·bᵢ|) in modulus has the computed sign.
func (p *problem) signsDiffer(c poly.Poly, k float64) bool {
	const u4 = 4 * 0x1p-53
	n := c.Degree()
	bound := func(i int) float64 { return u4 * (math.Abs(p.a.Coef(i)) + math.Abs(k*p.b.Coef(i))) }
	lead := c.Coef(n)
	if !(math.Abs(lead) > bound(n)) {
		return false
	}
	for i := range n {
		if ci := c.Coef(i); (ci > 0) != (lead > 0) && ci != 0 && math.Abs(ci) > bound(i) {
			return true
		}
	}
	return false
}

// inclusionRadius returns the radius of a disc about the computed root
// rs[i] of c that contains a root of c in the sense of the Weierstrass
// (Durand–Kerner) inclusion discs of Braess & Hadeler (1973, "Simultaneous
// inclusion of the zeros of a polynomial", Numer. Math. 21): for simple
// roots the disc |z − rᵢ| ≤ n·|Wᵢ|, Wᵢ = c(rᵢ)/(cₙ·∏ⱼ≠ᵢ(rᵢ − rⱼ)) holds a
// root of the double coefficients c; the residual c(rᵢ) is taken with
// the error bound of its compensated evaluation (poly.EvalComplexCompensated),
// so the disc also covers what the evaluation cannot resolve, plus pert (a
// bound on |δc(rᵢ)| for a perturbation δc of the coefficients that the
// caller wants covered: then the disc holds a root of every c + δc, as the
// residual bound of c + δc at rᵢ is at most the sum). For a root of
// multiplicity m the m-th root of the same bound is used (a cluster of m
// roots moves as the m-th root of a perturbation). The product is formed
// in logarithms (no overflow at degree 500).
func inclusionRadius(c poly.Poly, rs []poly.Root, i int, pert float64) float64 {
	n := c.Degree()
	r := rs[i].Value
	v, eb := c.EvalComplexCompensated(r)
	res := cabs(v) + eb + pert
	lg := math.Log(res) - math.Log(math.Abs(c.Lead())) + math.Log(float64(n))
	for j, o := range rs {
		if j != i {
			lg -= float64(o.Multiplicity) * math.Log(cabs(r-o.Value))
		}
	}
	rad := math.Exp(lg / float64(rs[i].Multiplicity))
	if math.IsNaN(rad) {
		return math.Inf(1) // the residual bound overflowed: nothing is known
	}
	return rad
}

// routhMaxDegree is the largest degree for which stable trusts the Routh
// array. Above it the entries of the array can lose every digit to
// cancellation without a pivot becoming small (1/(s+1)^200 was reported
// unstable for every gain), so the verdict comes from the closed-loop
// roots with inclusion discs (inclusionRadius), which either decide it or
// return ErrIllConditioned.
const routhMaxDegree = 40

// routhStable applies the Routh array to q and reports whether every root
// has a negative real part; ok is false when a pivot is within 1e-10 of
// the size of its row (then the array is not trustworthy in floating
// point and the caller uses roots).
func routhStable(q poly.Poly) (stable, ok bool) {
	n := q.Degree()
	if n <= 0 {
		return true, true
	}
	c := q.Coeffs() // highest power first
	if c[0] < 0 {
		for i := range c {
			c[i] = -c[i]
		}
	}
	w := n/2 + 1
	r0 := make([]float64, w+1)
	r1 := make([]float64, w+1)
	for i := 0; i <= n; i++ {
		if i%2 == 0 {
			r0[i/2] = c[i]
		} else {
			r1[i/2] = c[i]
		}
	}
	if !(r0[0] > 0) {
		return false, true
	}
	for i := 1; i <= n; i++ {
		// r1 is row i of the array; its first entry is the pivot.
		size := 0.0
		for _, v := range r1 {
			size = math.Max(size, math.Abs(v))
		}
		if size == 0 || math.Abs(r1[0]) <= 1e-10*size {
			return false, false
		}
		if r1[0] < 0 {
			return false, true
		}
		if i == n {
			break
		}
		next := make([]float64, w+1)
		for j := 0; j < w; j++ {
			next[j] = (r1[0]*r0[j+1] - r0[0]*r1[j+1]) / r1[0]
		}
		r0, r1 = r1, next
	}
	return true, true
}

// stableIntervals splits the open range at the critical values — crossing
// values, the value where the degree of a + k·b drops, and 0 when an
// open-loop pole lies on the boundary — and keeps the pieces whose closed
// loop is stable at an interior sample value (closed-loop roots). Between
// critical values no root can cross the boundary, so one sample decides a
// piece.
func (p *problem) stableIntervals(cr []Crossing) ([]Interval, error) {
	var crit []float64
	in := func(k float64) bool { return p.rng.Min < k && k < p.rng.Max }
	for _, c := range cr {
		crit = append(crit, c.Value)
	}
	if kd, ok := p.degreeDrop(); ok && in(kd) {
		crit = append(crit, kd)
	}
	if in(0) {
		for _, r := range p.poles {
			onB := math.Abs(real(r.Value)) <= 1e-12*math.Max(1, cabs(r.Value))
			if p.discrete {
				onB = math.Abs(cabs(r.Value)-1) <= 1e-12
			}
			if onB {
				crit = append(crit, 0)
				break
			}
		}
	}
	slices.Sort(crit)
	crit = slices.CompactFunc(crit, func(x, y float64) bool { return math.Abs(x-y) <= 1e-13*math.Max(1, math.Abs(x)) })
	pts := append(append([]float64{p.rng.Min}, crit...), p.rng.Max)
	var out []Interval
	for i := 0; i+1 < len(pts); i++ {
		lo, hi := pts[i], pts[i+1]
		st, err := p.stable(sampleBetween(lo, hi))
		if err != nil {
			return nil, err
		}
		if st {
			out = append(out, Interval{lo, hi})
		}
	}
	return out, nil
}

// sampleBetween returns a value inside (lo, hi); ends may be infinite.
func sampleBetween(lo, hi float64) float64 {
	switch {
	case math.IsInf(lo, -1) && math.IsInf(hi, 1):
		return 0
	case math.IsInf(lo, -1):
		return hi - math.Max(1, math.Abs(hi))
	case math.IsInf(hi, 1):
		return lo + math.Max(1, math.Abs(lo))
	}
	return lo + (hi-lo)/2
}
