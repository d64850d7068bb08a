package poly

import (
	"fmt"
	"math"
	"math/big"
	"slices"
)

// This file holds the root-finding pipeline behind RootsWithMultiplicity for
// a polynomial whose constant term is non-zero:
//
//  1. The variable is scaled by a power of two, x = 2ᵉ·y, so that the
//     geometric mean of the root moduli, |a₀/aₙ|^(1/n), is near 1. The
//     scaling is exact (barring overflow), so the scaled polynomial has
//     exactly the scaled roots of the double-precision coefficients.
//  2. Degree 2 uses the closed form; degree ≥ 3 takes the eigenvalues of the
//     balanced companion matrix (mat.Eigen, which balances with Dgebal;
//     Edelman & Murakami 1995, "Polynomial roots from companion matrix
//     eigenvalues", Math. Comp. 64(210), show that these are the exact roots
//     of a polynomial whose coefficients are perturbed by a small multiple
//     of u·‖p‖, so starting values are good in norm, not to full accuracy).
//  3. All n approximations are refined together by the Ehrlich–Aberth
//     iteration (Aberth 1973, "Iteration methods for finding all zeros of a
//     polynomial simultaneously", Math. Comp. 27(122); Ehrlich 1967) in
//     Gauss–Seidel order (as in Bini 1996, "Numerical computation of
//     polynomial zeros by means of Aberth's method", Numer. Algorithms 13).
//     The residual p(z) is computed by the compensated Horner scheme, so the
//     iteration converges to the roots of the double-precision coefficients
//     as if it ran in twice the working precision; the Aberth term keeps
//     the approximations apart, so two starting values never converge to the
//     same simple root, and Gauss–Seidel order breaks the conjugate symmetry
//     of the eigenvalues, which lets a pair of complex starting values split
//     into two real roots.
//  4. Clusters are recognised as multiple roots (cluster.go).
//  5. A simple root whose compensated residual is still too noisy to fix
//     the root to a few units in the last place is polished by Newton steps
//     with p(z) evaluated in math/big at 256 bits.
//  6. Real roots are made exactly real and complex roots exact conjugate
//     pairs; the scaling is undone.

const (
	// maxAberthIterations bounds the simultaneous iteration. Starting from
	// companion eigenvalues, simple roots converge in 2–6 sweeps (cubic
	// convergence); clusters converge linearly and stop on the noise test.
	maxAberthIterations = 60
	// bigFallbackUlps: a simple root is re-polished with math/big when the
	// compensated residual leaves it uncertain by more than this many units
	// of its last place (u·|z|).
	bigFallbackUlps = 8
	// bigPrecision is the mantissa length in bits of the math/big fallback
	// evaluation: 256 bits make its error about 2⁻²⁵⁶·p̃(|z|), negligible
	// next to the 2⁻¹⁰⁶·p̃(|z|) of the compensated scheme.
	bigPrecision = 256
	// kickWindow is the number of Aberth sweeps over which a step must
	// halve; otherwise the approximation is moved (see aberth).
	kickWindow = 6
)

// candidate is a root in the pipeline: its value (in the scaled variable),
// multiplicity, and noise, the uncertainty of the value caused by rounding
// in evaluating the function whose simple root it is (p for m = 1, p^(m−1)
// for a multiple root): errBound/|derivative|.
type candidate struct {
	z     complex128
	m     int
	noise float64
	// members are the indices of the refined approximations merged into
	// a multiple root (nil for a simple root).
	members []int
}

// rootsNonZero returns the roots of the polynomial with ascending
// coefficients c, c[0] ≠ 0, degree ≥ 1.
func rootsNonZero(c []float64, s *RootSettings) ([]Root, error) {
	n := len(c) - 1
	if n == 1 {
		r := -c[0] / c[1]
		if math.IsInf(r, 0) {
			return nil, fmt.Errorf("%w: the root −(%g)/(%g) of the degree-1 polynomial is beyond ±%g", ErrOverflow, c[0], c[1], math.MaxFloat64)
		}
		return []Root{{Value: complex(r, 0), Multiplicity: 1}}, nil
	}
	sc, e := scaleToUnitRoots(c)
	var z, vals0 []complex128
	tc := newTaylor(sc)
	if n == 2 {
		q := quadraticRoots(sc[2], sc[1], sc[0])
		if len(q) == 1 {
			return unscale([]candidate{{z: q[0].Value, m: 2}}, e), nil
		}
		z = []complex128{q[0].Value, q[1].Value}
	} else {
		vals, err := companionEigenvalues(sc)
		if err != nil {
			return nil, err
		}
		z = vals
		vals0 = slices.Clone(vals)
		aberth(tc, z)
		if bad := unconverged(tc, z); len(bad) > 0 {
			// Second chance: move the stragglers off their spot by a
			// thousandth of their modulus (off the real axis) and
			// iterate again from the whole set.
			for _, k := range bad {
				z[k] += complex(0, 1e-3*math.Max(abs(z[k]), 0x1p-1000))
			}
			aberth(tc, z)
			if bad := unconverged(tc, z); len(bad) > 0 {
				// Third stage: the residual of a root far from the unit
				// circle of the scaled variable can overflow float64
				// (|z|ⁿ beyond 1e308 with coefficients spread over many
				// decades), which stops the compensated iteration. Such
				// roots are refined by Aberth steps whose ratio p/p′ is
				// evaluated in math/big (its exponent range does not
				// overflow), starting from the better of the eigenvalue
				// and the current value; what does not converge keeps the
				// better of the two, so the result is never worse than the
				// plain eigenvalues.
				for _, k := range bad {
					z[k] = wideAberth(sc, z, k, vals0[k])
				}
			}
		}
	}
	cands, err := finish(tc, z, s)
	if err != nil && vals0 != nil {
		// The refined set lost its conjugate symmetry (members of a huge
		// unrecognised cluster, such as (x+1)⁵⁰⁰, wander in its disc):
		// fall back on the eigenvalues, which come in exact conjugate
		// pairs and are the roots of a polynomial within a small multiple
		// of u·‖p‖ (Edelman & Murakami 1995): never fail where they do
		// not.
		cands = make([]candidate, len(vals0))
		for i, v := range vals0 {
			cands[i] = candidate{z: v, m: 1}
		}
		if symmetrize(tc, cands) == 0 {
			err = nil
		}
	}
	if err != nil {
		return nil, err
	}
	return unscale(cands, e), nil
}

// unconverged returns the indices of approximations that are not roots of
// a nearby polynomial: a z is kept when its componentwise backward error
// |p(z)|/p̃(|z|) is at most 4n·u (a root rounded to float64 has about
// |z·p′(z)|·u/p̃(|z|) ≤ n·u; members of a cluster have far less). This is
// a safety net against iterations that stopped early, not the accuracy
// test of the refinement.
func unconverged(tc *taylor, z []complex128) []int {
	var bad []int
	n := len(tc.c) - 1
	for k, v := range z {
		f, fb := evalComp(tc.c, v)
		if !(abs(f) <= 4*float64(n)*unitRoundoff*absPoly(tc.c, abs(v))+fb) {
			bad = append(bad, k)
		}
	}
	return bad
}

// wideAberth refines z[k] by Aberth steps zₖ ← zₖ − r/(1 − r·Σⱼ≠ₖ 1/(zₖ − zⱼ))
// with r = p(zₖ)/p′(zₖ) evaluated with a wide exponent (wideRatio), from the better
// (smaller |r|) of z[k] and the eigenvalue e. It stops when the step falls
// below 2u·|zₖ| or stops shrinking, and returns the value with the
// smallest |r| seen.
func wideAberth(c []float64, z []complex128, k int, e complex128) complex128 {
	x := z[k]
	best, bestR := x, math.Inf(1)
	if r := abs(wideRatio(c, e)); r < bestR {
		best, bestR = e, r
	}
	if r := abs(wideRatio(c, x)); r < bestR {
		best, bestR = x, r
	}
	x = best
	last := math.Inf(1)
	for range maxAberthIterations {
		r := wideRatio(c, x)
		var sum complex128
		for j, zj := range z {
			if j != k && zj != x {
				sum += 1 / (x - zj)
			}
		}
		delta := r / (1 - r*sum)
		ad := abs(delta)
		if math.IsNaN(ad) || math.IsInf(ad, 0) || ad >= 2*last {
			break
		}
		x -= delta
		last = ad
		if ar := abs(wideRatio(c, x)); ar < bestR {
			best, bestR = x, ar
		}
		if ad <= 2*unitRoundoff*abs(x) {
			break
		}
	}
	return best
}

// wideRatio returns the Newton correction p(z)/p′(z) with p and p′
// evaluated by Horner's scheme in a wide-exponent float64 arithmetic (a
// complex mantissa and a separate int exponent, see wide): no overflow or
// underflow for any double coefficients and argument, at the accuracy of
// the plain Horner scheme (relative error about 2n·u·p̃(|z|)/|p(z)|,
// Higham 2002, "Accuracy and Stability of Numerical Algorithms", 2nd ed.,
// §5.1). It replaces an evaluation in math/big at 256 bits that cost about
// a hundred times more: these roots lie where |z|ⁿ leaves the float64
// range, and the step needs the exponent range, not the precision. NaN
// when z or a coefficient is not finite.
func wideRatio(c []float64, z complex128) complex128 {
	n := len(c) - 1
	if !finite([]float64{real(z), imag(z)}) || !finite(c) {
		return complex(math.NaN(), math.NaN())
	}
	zw := newWide(z)
	p := newWide(complex(c[n], 0))
	var d wide
	for i := n - 1; i >= 0; i-- {
		d = d.mul(zw).add(p)
		p = p.mul(zw).add(newWide(complex(c[i], 0)))
	}
	if d.m == 0 {
		return complex(math.Inf(1), 0)
	}
	q := p.m / d.m
	e := p.e - d.e
	return complex(math.Ldexp(real(q), e), math.Ldexp(imag(q), e))
}

// wide is the complex number m·2^e, kept with max(|Re m|, |Im m|) in
// [2⁻⁴⁰⁰, 2⁴⁰⁰] (or m = 0), so that no product or sum of two wides
// overflows or underflows; m is rescaled (by a power of two, exactly) only
// when it leaves that range, so in the common case e stays 0 and the
// arithmetic is plain complex128.
type wide struct {
	m complex128
	e int
}

func newWide(z complex128) wide { return wide{m: z}.norm() }

// norm rescales m into [1/2, 1) by a power of two when it has left
// [2⁻⁴⁰⁰, 2⁴⁰⁰].
func (w wide) norm() wide {
	a := math.Max(math.Abs(real(w.m)), math.Abs(imag(w.m)))
	switch {
	case a == 0:
		return wide{}
	case a >= 0x1p-400 && a <= 0x1p400:
		return w
	}
	_, e := math.Frexp(a)
	return wide{m: complex(math.Ldexp(real(w.m), -e), math.Ldexp(imag(w.m), -e)), e: w.e + e}
}

func (w wide) mul(v wide) wide { return wide{m: w.m * v.m, e: w.e + v.e}.norm() }

// add returns w + v, aligning the smaller to the larger exponent (a term
// more than 2^1100 times smaller vanishes, as it would in any precision
// below that).
func (w wide) add(v wide) wide {
	switch {
	case w.m == 0:
		return v
	case v.m == 0:
		return w
	case w.e == v.e:
		return wide{m: w.m + v.m, e: w.e}.norm()
	}
	if w.e < v.e {
		w, v = v, w
	}
	k := v.e - w.e
	if k < -1100 {
		return w
	}
	m := w.m + complex(math.Ldexp(real(v.m), k), math.Ldexp(imag(v.m), k))
	return wide{m: m, e: w.e}.norm()
}

// finish turns refined approximations z of the roots of the scaled
// polynomial sc into the final candidates: clusters, math/big fallback,
// symmetry.
func finish(tc *taylor, z []complex128, s *RootSettings) ([]candidate, error) {
	var cands []candidate
	if s.clusterTolerance() > 0 {
		cands = findClusters(tc, z, s.clusterTolerance())
		cands = checkConsistency(tc, z, cands)
	} else {
		cands = make([]candidate, len(z))
		for i, v := range z {
			cands[i] = candidate{z: v, m: 1, noise: simpleNoise(tc, v)}
		}
	}
	for i := range cands {
		if c := &cands[i]; c.m == 1 && (math.IsNaN(c.noise) || math.IsInf(c.noise, 0)) {
			// The compensated residual overflowed (see wideAberth): the
			// uncertainty is the size of the Newton correction in math/big.
			c.noise = abs(wideRatio(tc.c, c.z))
		}
	}
	polishWithBig(tc, cands)
	if k := symmetrize(tc, cands); k > 0 {
		return nil, fmt.Errorf("%w: %d complex roots found without their conjugate", ErrNoConvergence, k)
	}
	return cands, nil
}

// scaleToUnitRoots returns the coefficients of p(2ᵉ·y)/2^k for the e that
// brings |a₀/aₙ|^(1/n) near 1 and a k that brings the leading coefficient
// near 1. Multiplying by powers of two is exact; if it would overflow or
// underflow a coefficient, e = 0 and the coefficients are returned as they
// are.
func scaleToUnitRoots(c []float64) ([]float64, int) {
	n := len(c) - 1
	r := (math.Log2(math.Abs(c[0])) - math.Log2(math.Abs(c[n]))) / float64(n)
	e := int(math.Round(r))
	_, k := math.Frexp(math.Ldexp(c[n], e*n))
	out := make([]float64, len(c))
	for i, v := range c {
		w := math.Ldexp(v, e*i-k)
		if v != 0 && (w == 0 || math.IsInf(w, 0) || math.Abs(w) < 0x1p-1000 || math.Abs(w) > 0x1p1000) {
			out := append([]float64(nil), c...)
			return out, 0
		}
		out[i] = w
	}
	return out, e
}

// unscale turns candidates in the scaled variable into roots of p.
func unscale(cands []candidate, e int) []Root {
	out := make([]Root, len(cands))
	for i, c := range cands {
		out[i] = Root{Value: complex(math.Ldexp(real(c.z), e), math.Ldexp(imag(c.z), e)), Multiplicity: c.m}
	}
	return out
}

// deriv returns p′(z) from the exactly split coefficients (k+1)·a_{k+1}
// by the compensated scheme. Plain Horner would not do: near the roots of
// an ill-conditioned polynomial (Wilkinson's of degree 25, say) its error
// γ₂ₙ·p̃′(|z|) exceeds |p′(z)| itself, and Newton's method then wanders.
func (t *taylor) deriv(z complex128) complex128 {
	d, _ := t.eval(1, z)
	return d
}

// evalComp returns p(z) and its error bound by the compensated scheme.
func evalComp(c []float64, z complex128) (complex128, float64) {
	if imag(z) == 0 {
		v, e := compHorner(c, real(z))
		return complex(v, 0), e
	}
	return compHornerComplex(c, z)
}

// simpleNoise returns the uncertainty of z as a simple root of p caused by
// rounding in the compensated residual: errBound/|p′(z)|.
func simpleNoise(tc *taylor, z complex128) float64 {
	_, eb := evalComp(tc.c, z)
	return eb / abs(tc.deriv(z))
}

// aberth refines all roots z of p (ascending coefficients c) in place by the
// Ehrlich–Aberth iteration in Gauss–Seidel order,
//
//	zₖ ← zₖ − p(zₖ) / (p′(zₖ) − p(zₖ)·Σⱼ≠ₖ 1/(zₖ − zⱼ)),
//
// with p(zₖ) and p′(zₖ) from the compensated Horner scheme. A root stops when its step
// falls below 2u·|zₖ| (the next step would not change it), when the step is
// below the noise of the residual (errBound/|p′|; this is where members of
// a cluster stop), or when the values stop being finite.
func aberth(tc *taylor, z []complex128) {
	c := tc.c
	n := len(z)
	// Equal starting values (the eigen solver can return a double root
	// twice exactly) would receive equal corrections forever: separate
	// them by a relative 2⁻²⁶ ≈ 1.5e-8 off the real axis.
	for k := range z {
		for j := range k {
			if z[j] == z[k] {
				z[k] += complex(0, 0x1p-26*math.Max(abs(z[k]), 0x1p-1000))
			}
		}
	}
	done := make([]bool, n)
	hist := make([][kickWindow]float64, n)
	lastKick := make([]int, n)
	for it := range maxAberthIterations {
		active := false
		for k := range z {
			if done[k] {
				continue
			}
			zk := z[k]
			f, fb := evalComp(c, zk)
			if f == 0 {
				done[k] = true
				continue
			}
			d := tc.deriv(zk)
			var s complex128
			for j, zj := range z {
				if j != k && zj != zk {
					s += 1 / (zk - zj)
				}
			}
			den := d - f*s
			delta := f / den
			ad := abs(delta)
			if den == 0 || math.IsNaN(ad) || math.IsInf(ad, 0) {
				done[k] = true
				continue
			}
			z[k] = zk - delta
			if ad <= 2*unitRoundoff*abs(z[k]) || ad <= fb/abs(d) {
				done[k] = true
				continue
			}
			// Two symmetries can trap an approximation for good: the real
			// axis is invariant under the iteration for a real polynomial
			// (a real approximation never reaches a complex root, for
			// instance when the eigenvalues of a nearly double complex
			// pair come out real), and so is the perpendicular bisector
			// of two close roots (an exact conjugate pair of eigenvalues
			// with the real part of the midpoint of two close real roots
			// takes only imaginary steps). An approximation whose step
			// stops shrinking (it has not halved over the last
			// kickWindow sweeps; linear convergence to a multiple root is
			// faster) is
			// moved by the size of its step, at most its distance to the
			// nearest other approximation, in a direction that belongs to
			// neither symmetry (golden-angle turns); the iteration then
			// resumes from there.
			hist[k][it%kickWindow] = ad
			if it-lastKick[k] >= kickWindow && ad > 0.5*hist[k][(it+1)%kickWindow] {
				theta := 2.399963229728653 * float64(it+k+1) // golden angle, radians
				r := math.Min(ad, nearestOther(z, k))
				z[k] += complex(r*math.Cos(theta), r*math.Sin(theta))
				lastKick[k] = it
			}
			active = true
		}
		if !active {
			return
		}
	}
}

// nearestOther returns the distance from z[k] to the nearest other
// approximation (+Inf when there is none).
func nearestOther(z []complex128, k int) float64 {
	d := math.Inf(1)
	for j, v := range z {
		if j != k {
			d = math.Min(d, abs(v-z[k]))
		}
	}
	return d
}

// polishWithBig re-polishes simple roots whose compensated residual is too
// noisy: Newton steps (with the Aberth correction against the other roots,
// so a step cannot jump to a neighbour) whose residual p(z) is evaluated in
// math/big at bigPrecision bits from the exact double coefficients and the
// exact double argument.
func polishWithBig(tc *taylor, cands []candidate) {
	c := tc.c
	for k := range cands {
		ck := &cands[k]
		if ck.m != 1 || !(ck.noise > bigFallbackUlps*unitRoundoff*abs(ck.z)) || math.IsInf(ck.noise, 0) {
			continue
		}
		z := ck.z
		last := math.Inf(1)
		for range 10 {
			f := bigHorner(c, z)
			if f == 0 {
				break
			}
			d := tc.deriv(z)
			var s complex128
			for j, o := range cands {
				if j != k && o.z != z {
					s += complex(float64(o.m), 0) / (z - o.z)
				}
			}
			delta := f / (d - f*s)
			ad := abs(delta)
			if math.IsNaN(ad) || math.IsInf(ad, 0) || ad >= last {
				break
			}
			last = ad
			z -= delta
			if ad <= unitRoundoff*abs(z) {
				break
			}
		}
		ck.z = z
		// The residual is now exact to far below the rounding of z.
		ck.noise = 0
	}
}

// bigHorner returns p(z) evaluated in math/big at bigPrecision bits and
// rounded to complex128.
func bigHorner(c []float64, z complex128) complex128 {
	n := len(c) - 1
	nf := func() *big.Float { return new(big.Float).SetPrec(bigPrecision) }
	zr, zi := nf().SetFloat64(real(z)), nf().SetFloat64(imag(z))
	sr, si := nf().SetFloat64(c[n]), nf()
	t1, t2, t3, t4 := nf(), nf(), nf(), nf()
	for i := n - 1; i >= 0; i-- {
		t1.Mul(sr, zr)
		t2.Mul(si, zi)
		t3.Mul(sr, zi)
		t4.Mul(si, zr)
		sr.Sub(t1, t2)
		sr.Add(sr, t2.SetFloat64(c[i]))
		si.Add(t3, t4)
	}
	r, _ := sr.Float64()
	i, _ := si.Float64()
	return complex(r, i)
}

// symmetrize makes the root set of a real polynomial exactly symmetric:
// a root whose imaginary part is within its uncertainty (max(4u|z|,
// 2·noise)) of the axis becomes real, and every remaining root in the upper
// half-plane is paired with the nearest unused root of the same
// multiplicity in the lower half-plane; both are replaced by the average of
// the pair, mirrored, provided the two are within 1e-6 relative (plus
// their noise) of being mirror images.
//
// A complex simple root left without a partner (members of an
// unrecognised cluster, which stop anywhere in the cluster's disc) is then
// made real if its imaginary part is within its first-order sensitivity
// κ = u·p̃(|z|)/|p′(z)| (a relative coefficient change of u can make it
// real), and the pairing is repeated. It returns the number of complex
// roots still without a partner (0 unless the iteration failed).
func symmetrize(tc *taylor, cands []candidate) int {
	for i := range cands {
		c := &cands[i]
		tol := math.Max(4*unitRoundoff*abs(c.z), 2*c.noise)
		if math.Abs(imag(c.z)) <= tol {
			c.z = complex(real(c.z), 0)
		}
	}
	used := pairConjugates(cands)
	snapped := false
	for i := range cands {
		c := &cands[i]
		if used[i] || imag(c.z) == 0 || c.m != 1 {
			continue
		}
		kappa := unitRoundoff * absPoly(tc.c, abs(c.z)) / abs(tc.deriv(c.z))
		if math.Abs(imag(c.z)) <= kappa {
			c.z = complex(real(c.z), 0)
			snapped = true
		}
	}
	if snapped {
		used = pairConjugates(cands)
	}
	unpaired := 0
	for i := range cands {
		if !used[i] && imag(cands[i].z) != 0 {
			unpaired++
		}
	}
	return unpaired
}

// pairConjugates pairs the complex roots (see symmetrize) and reports which
// are paired.
func pairConjugates(cands []candidate) []bool {
	order := make([]int, len(cands))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(a, b int) int {
		return compareComplex(cands[a].z, cands[b].z)
	})
	used := make([]bool, len(cands))
	for _, i := range order {
		if used[i] || imag(cands[i].z) <= 0 {
			continue
		}
		u := cands[i].z
		best, bd := -1, math.Inf(1)
		for j := range cands {
			if used[j] || imag(cands[j].z) >= 0 || cands[j].m != cands[i].m {
				continue
			}
			if d := abs(cands[j].z - complex(real(u), -imag(u))); d < bd {
				best, bd = j, d
			}
		}
		if best < 0 || bd > 1e-6*abs(u)+4*(cands[i].noise+cands[best].noise) {
			continue
		}
		used[i], used[best] = true, true
		l := cands[best].z
		v := complex((real(u)+real(l))/2, (imag(u)-imag(l))/2)
		cands[i].z = v
		cands[best].z = complex(real(v), -imag(v))
	}
	return used
}
