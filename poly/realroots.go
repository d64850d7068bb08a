package poly

import (
	"fmt"
	"math"
	"slices"

	"github.com/loopwise/loopwise/internal/rootfind"
)

// Real-root isolation by Descartes' rule of signs and continued fractions.
//
// A node of the search is a polynomial q(y) together with a Möbius map
// x = M(y) = (a·y + b)/(c·y + d) that takes y ∈ (0, ∞) to an interval of
// x; q(y) = (c·y + d)ⁿ·p(M(y)), so the positive roots of q are the roots of
// p in that interval. By Descartes' rule of signs (Descartes 1637; Henrici
// 1974, Applied and Computational Complex Analysis, vol. 1, §6.2) the
// number V of sign changes in the coefficients of q exceeds the number of
// its positive roots by an even number: V = 0 means no root, V = 1 exactly
// one. Otherwise the interval is cut: first the root-free part below a
// lower bound ℓ ≥ 1 of the positive roots is shifted away (y → y + ℓ),
// then q splits at y = 1 into q(1 + y) (the part beyond) and
// (1 + y)ⁿ·q(1/(1 + y)) (the part below). This is the continued-fraction
// method of Vincent, Collins and Akritas (Akritas & Strzeboński 2005, "A
// comparative study of two real root isolation methods", Nonlinear
// Analysis: Modelling and Control 10(4), 297–304); the lower bound is the
// Kioustelidis bound (Kioustelidis 1986, J. Comput. Appl. Math. 16, 241–244)
// of the reversed polynomial. The vincent theorem (Alesina & Galuzzi 1998)
// guarantees that the search ends for square-free polynomials.
//
// In floating point every coefficient of q carries a running bound on its
// rounding error, propagated through each Taylor shift (the same shift
// applied to the absolute values, plus 2u per operation; Higham 2002,
// Accuracy and Stability of Numerical Algorithms, 2nd ed., §5.1). A
// coefficient whose size does not exceed its bound has an unknown sign; V
// is then only known to lie between a smallest and a largest count, and a
// node is decided only when both agree. When the search cannot decide
// (a multiple root, a cluster of roots closer than double precision can
// separate, or a root on a cut point) it gives up and the caller falls back
// to the eigenvalues of the companion matrix, so the answer is never less
// complete than theirs.

// RealRoot is a real root of a polynomial with its multiplicity.
type RealRoot struct {
	// Value is the root.
	Value float64
	// Multiplicity is how many times the root is repeated (≥ 1); see
	// RealRootsIn.
	Multiplicity int
}

// RealRootSettings tunes RealRootsInWithSettings. A nil *RealRootSettings
// and the zero value mean the defaults.
type RealRootSettings struct {
	// CandidateImagTolerance, ≥ 0, is for callers that verify every root
	// they get: when isolation falls back to the companion eigenvalues, a
	// computed complex root r with |Im r| ≤ CandidateImagTolerance·|Re r|
	// is also reported (as Re r, multiplicity 1), so that a nearly double
	// real root that the eigenvalue solver splits into a complex pair is not
	// lost. If zero, only the roots that RootsWithMultiplicity reports as
	// real are returned.
	CandidateImagTolerance float64
}

// RealRootsIn returns the real roots x of p with lo < x < hi, ascending,
// each with its multiplicity. lo may be −Inf and hi +Inf; lo < hi.
//
// Method: Descartes' rule of signs with continued-fraction isolation
// (Vincent–Collins–Akritas; Akritas & Strzeboński 2005) on a Möbius image
// of (lo, hi), with a running rounding-error bound on every transformed
// coefficient, so that each reported interval provably holds one root of
// the polynomial with the given (double) coefficients; the root is then
// found by Brent's method (Brent 1973) on p itself to a few ulps of its
// conditioning. It costs O(n²) per node of the search and needs no
// complex roots, which makes it far cheaper than the companion eigenvalues
// when only a few real roots are wanted.
//
// Multiple roots: an isolated root is simple (multiplicity 1). When the
// search meets a multiple root, a cluster of roots closer together than
// double precision can separate, or a root exactly on one of its cut
// points, it falls back to RootsWithMultiplicity (companion eigenvalues
// with cluster recognition) and returns its real roots in (lo, hi) with
// the multiplicities recognised there; roots exactly at lo or hi are not
// returned.
//
// It returns ErrZeroPolynomial for the zero polynomial, ErrNotFinite for
// non-finite coefficients and ErrBadTolerance for lo ≥ hi or NaN bounds.
// A non-zero constant has no roots.
func RealRootsIn(p Poly, lo, hi float64) ([]RealRoot, error) {
	return RealRootsInWithSettings(p, lo, hi, nil)
}

// RealRootsInWithSettings is RealRootsIn with settings (see
// RealRootSettings).
func RealRootsInWithSettings(p Poly, lo, hi float64, set *RealRootSettings) ([]RealRoot, error) {
	switch {
	case p.IsZero():
		return nil, ErrZeroPolynomial
	case !p.IsFinite():
		return nil, fmt.Errorf("%w: a coefficient of the polynomial", ErrNotFinite)
	case math.IsNaN(lo) || math.IsNaN(hi) || !(lo < hi):
		return nil, fmt.Errorf("%w: interval (%v, %v) is empty", ErrBadTolerance, lo, hi)
	case set != nil && !(set.CandidateImagTolerance >= 0):
		return nil, fmt.Errorf("%w: RealRootSettings.CandidateImagTolerance is %v, want ≥ 0", ErrBadTolerance, set.CandidateImagTolerance)
	}
	if p.Degree() < 1 {
		return nil, nil
	}
	// Möbius map from y ∈ (0, ∞) onto (lo, hi).
	var m mobius
	switch {
	case math.IsInf(lo, -1) && math.IsInf(hi, 1):
		neg, err1 := RealRootsInWithSettings(p, lo, 0, set)
		pos, err2 := RealRootsInWithSettings(p, 0, hi, set)
		if err := firstErr(err1, err2); err != nil {
			return nil, err
		}
		if p.Coef(0) == 0 {
			k := 0
			for p.Coef(k) == 0 {
				k++
			}
			neg = append(neg, RealRoot{Value: 0, Multiplicity: k})
		}
		return append(neg, pos...), nil
	case math.IsInf(hi, 1):
		m = mobius{1, lo, 0, 1}
	case math.IsInf(lo, -1):
		m = mobius{-1, hi, 0, 1}
	default:
		m = mobius{hi, lo, 1, 1}
	}
	q, e := m.apply(p)
	xs, ok := isolatePositive(p, q, e, m)
	if ok {
		out := make([]RealRoot, len(xs))
		for i, x := range xs {
			out[i] = RealRoot{Value: x, Multiplicity: 1}
		}
		return out, nil
	}
	return eigenRealRoots(p, lo, hi, set)
}

func firstErr(errs ...error) error {
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// eigenRealRoots is the fallback of RealRootsIn: the real roots in (lo, hi)
// among the companion eigenvalues.
func eigenRealRoots(p Poly, lo, hi float64, set *RealRootSettings) ([]RealRoot, error) {
	tol := 0.0
	cs := (*RootSettings)(nil)
	if set != nil && set.CandidateImagTolerance > 0 {
		tol = set.CandidateImagTolerance
		cs = &RootSettings{ClusterTolerance: -1}
	}
	rs, err := p.RootsWithSettings(cs)
	if err != nil {
		return nil, err
	}
	var out []RealRoot
	for _, r := range rs {
		x := real(r.Value)
		if x > lo && x < hi && math.Abs(imag(r.Value)) <= tol*math.Abs(x) {
			out = append(out, RealRoot{Value: x, Multiplicity: r.Multiplicity})
		}
	}
	slices.SortFunc(out, func(a, b RealRoot) int {
		switch {
		case a.Value < b.Value:
			return -1
		case a.Value > b.Value:
			return 1
		}
		return 0
	})
	return out, nil
}

// mobius is x = (a·y + b)/(c·y + d).
type mobius struct{ a, b, c, d float64 }

func (m mobius) at(y float64) float64 {
	if math.IsInf(y, 1) {
		return m.a / m.c
	}
	return (m.a*y + m.b) / (m.c*y + m.d)
}

// apply returns (c·y + d)ⁿ·p(M(y)), ascending, with bounds on the
// rounding errors of its coefficients, for the initial maps used: c = 0
// (p(a·y + b)) or a = hi, b = lo, c = d = 1.
func (m mobius) apply(p Poly) (q, e []float64) {
	q = p.Ascending()
	e = make([]float64, len(q))
	taylorShift(q, e, m.b)
	w := m.a
	if m.c != 0 {
		w = m.a - m.b
	}
	s := 1.0
	for i := range q {
		q[i] *= s
		e[i] = e[i]*math.Abs(s) + 0x1p-53*math.Abs(q[i])
		s *= w
	}
	if m.c == 0 {
		return q, e
	}
	// (1 + y)ⁿ·r(y/(1 + y)) with r(t) = p(lo + (hi − lo)·t) is the
	// reverse of shift₁(reverse r).
	slices.Reverse(q)
	slices.Reverse(e)
	taylorShift(q, e, 1)
	slices.Reverse(q)
	slices.Reverse(e)
	return q, e
}

// taylorShift replaces c (ascending) by the coefficients of q(y + s), and
// e, when not nil, by a bound on the rounding error of the result given the
// bounds e on c: each step cᵢ ← cᵢ + s·cᵢ₊₁ adds at most 2u·(|cᵢ| + |s·cᵢ₊₁|).
// Horner's scheme, n(n+1)/2 steps.
func taylorShift(c, e []float64, s float64) {
	n := len(c) - 1
	if s == 0 {
		return
	}
	as := math.Abs(s)
	const u2 = 0x1p-52
	for i := 0; i < n; i++ {
		for j := n - 1; j >= i; j-- {
			if e != nil {
				e[j] += as*e[j+1] + u2*(math.Abs(c[j])+math.Abs(s*c[j+1]))
			}
			c[j] += s * c[j+1]
		}
	}
	if e != nil {
		for i := range e {
			e[i] *= 1 + 4*float64(n+1)*0x1p-53
		}
	}
}

// taylorShift1 is taylorShift by 1 (additions only).
func taylorShift1(c, e []float64) {
	n := len(c) - 1
	const u2 = 0x1p-52
	for i := 0; i < n; i++ {
		for j := n - 1; j >= i; j-- {
			e[j] += e[j+1] + u2*(math.Abs(c[j])+math.Abs(c[j+1]))
			c[j] += c[j+1]
		}
	}
	for i := range e {
		e[i] *= 1 + 4*float64(n+1)*0x1p-53
	}
}

// signVariations returns the smallest and largest number of sign changes
// of c consistent with the error bounds e: a coefficient with |cᵢ| ≤ eᵢ
// may have either sign or be zero. known reports whether the first and
// last coefficients have a known sign.
func signVariations(c, e []float64) (vmin, vmax int, known bool) {
	// vmin: the unknown coefficients set to zero add no change. vmax:
	// dynamic programming over the sign of the last non-zero coefficient
	// (best[0] for +, best[1] for −; empty: all zero so far is possible).
	const impossible = math.MinInt / 2
	best := [2]int{impossible, impossible}
	empty := true
	last := 0.0
	for i, x := range c {
		certain := math.Abs(x) > e[i]
		allowed := [2]bool{true, true}
		next := best // a zero keeps the state
		if certain {
			if last != 0 && (x > 0) != (last > 0) {
				vmin++
			}
			last = x
			allowed = [2]bool{x > 0, x < 0}
			next = [2]int{impossible, impossible}
		}
		for sg := range 2 {
			if !allowed[sg] {
				continue
			}
			v := max(best[sg], best[1-sg]+1)
			if empty {
				v = max(v, 0)
			}
			next[sg] = max(next[sg], v)
		}
		empty = empty && !certain
		best = next
	}
	vmax = max(best[0], best[1], 0)
	known = math.Abs(c[0]) > e[0] && math.Abs(c[len(c)-1]) > e[len(e)-1]
	return vmin, vmax, known
}

// positiveLowerBound returns a lower bound of the positive roots of c
// (ascending, c[0] ≠ 0): the reciprocal of the upper bound of the reversed
// polynomial (see positiveUpperBound). It returns +Inf when the reversed
// polynomial has no sign change (no positive root).
func positiveLowerBound(c []float64) float64 {
	r := slices.Clone(c)
	slices.Reverse(r)
	ub := positiveUpperBound(r)
	if ub == 0 {
		return math.Inf(1)
	}
	return 1 / ub
}

// positiveUpperBound returns the local-max quadratic bound on the positive
// roots of c (ascending, leading coefficient non-zero; Akritas, Strzeboński
// & Vigklas 2008, "Improving the performance of the continued fractions
// method using new bounds of positive roots", Nonlinear Analysis:
// Modelling and Control 13(3), 265–279): with the leading coefficient
// positive, each coefficient cᵢ < 0 is paired with the higher coefficients
// cⱼ > 0, the j-th used for the t-th time at the weight 2^(−t), giving
// (2^t·|cᵢ|/cⱼ)^(1/(j−i)); the bound is the largest over i of the smallest
// over j. It is 0 when there is no sign change.
func positiveUpperBound(c []float64) float64 {
	n := len(c) - 1
	sg := 1.0
	if c[n] < 0 {
		sg = -1
	}
	// Work with base-2 logarithms: (2^t·|cᵢ|/cⱼ)^(1/(j−i)) is
	// 2^((t + lg|cᵢ| − lg|cⱼ|)/(j−i)), so the double loop needs no powers.
	var buf [2 * 64]float64
	var lg, times []float64
	if 2*(n+1) <= len(buf) {
		lg, times = buf[:n+1], buf[n+1:2*(n+1)]
	} else {
		lg, times = make([]float64, n+1), make([]float64, n+1)
	}
	for j, x := range c {
		if x != 0 {
			lg[j] = math.Log2(math.Abs(x))
		}
		times[j] = 1
	}
	ub, any := math.Inf(-1), false
	for i := n - 1; i >= 0; i-- {
		if sg*c[i] >= 0 {
			continue
		}
		best, bj := math.Inf(1), -1
		for j := i + 1; j <= n; j++ {
			if sg*c[j] <= 0 {
				continue
			}
			if t := (times[j] + lg[i] - lg[j]) / float64(j-i); t < best {
				best, bj = t, j
			}
		}
		times[bj]++
		ub, any = math.Max(ub, best), true
	}
	if !any {
		return 0
	}
	return math.Exp2(ub)
}

// isolationNode is one node of the continued-fraction search.
type isolationNode struct {
	c, e  []float64
	m     mobius
	depth int
}

// maxIsolationDepth bounds the depth of the search; deeper means roots
// closer than double precision separates (the caller falls back).
const maxIsolationDepth = 400

// isolatePositive returns the roots of p in the image of (0, ∞) under m,
// ascending, given q = (c·y + d)ⁿ·p(M(y)) (ascending). ok is false when the
// search cannot decide (see the comment at the top of this file).
func isolatePositive(p Poly, q, e []float64, m mobius) (roots []float64, ok bool) {
	n := len(q) - 1
	for n > 0 && q[n] == 0 {
		n-- // the image has lower degree (a root at the far end of the interval)
	}
	q, e = q[:n+1], e[:n+1]
	// Roots at y = 0 are at the near end of the interval: not inside.
	k := 0
	for k < n && q[k] == 0 {
		k++
	}
	q, e = q[k:], e[k:]
	if len(q) < 2 {
		return nil, true
	}
	// Balance the variable by a power of two: y = 2^s·y', 2^s near the
	// geometric mean of the root moduli |q₀/qₙ|^(1/n).
	deg := len(q) - 1
	_, e0 := math.Frexp(q[0])
	_, en := math.Frexp(q[deg])
	sh := int(math.Round(float64(e0-en) / float64(deg)))
	if sh != 0 {
		for i := range q {
			q[i] = math.Ldexp(q[i], sh*i)
			e[i] = math.Ldexp(e[i], sh*i)
		}
		f := math.Ldexp(1, sh)
		m = mobius{m.a * f, m.b, m.c * f, m.d}
	}
	stack := []isolationNode{{c: q, e: e, m: m}}
	for len(stack) > 0 {
		nd := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		vmin, vmax, known := signVariations(nd.c, nd.e)
		if vmax == 0 {
			continue
		}
		if known && vmin == 1 && vmax == 1 {
			x, good := rootIn(p, nd)
			if !good {
				return nil, false
			}
			roots = append(roots, x)
			continue
		}
		if nd.depth >= maxIsolationDepth || !known {
			return nil, false
		}
		// Shift the root-free part away.
		if lb := positiveLowerBound(nd.c); lb >= 1 {
			if math.IsInf(lb, 1) {
				continue
			}
			taylorShift(nd.c, nd.e, lb)
			nd.m = mobius{nd.m.a, nd.m.a*lb + nd.m.b, nd.m.c, nd.m.c*lb + nd.m.d}
			vmin, vmax, known = signVariations(nd.c, nd.e)
			if vmax == 0 {
				continue
			}
			if !known {
				return nil, false
			}
			if vmin == 1 && vmax == 1 {
				x, good := rootIn(p, nd)
				if !good {
					return nil, false
				}
				roots = append(roots, x)
				continue
			}
		}
		// Split at y = 1.
		right := isolationNode{c: slices.Clone(nd.c), e: slices.Clone(nd.e), depth: nd.depth + 1}
		taylorShift1(right.c, right.e)
		right.m = mobius{nd.m.a, nd.m.a + nd.m.b, nd.m.c, nd.m.c + nd.m.d}
		if math.Abs(right.c[0]) <= right.e[0] {
			return nil, false // a root at (or within rounding of) the cut
		}
		left := isolationNode{c: nd.c, e: nd.e, depth: nd.depth + 1}
		slices.Reverse(left.c)
		slices.Reverse(left.e)
		taylorShift1(left.c, left.e)
		left.m = mobius{nd.m.b, nd.m.a + nd.m.b, nd.m.d, nd.m.c + nd.m.d}
		stack = append(stack, left, right)
	}
	slices.Sort(roots)
	return roots, true
}

// rootIn returns the single root of p in the interval of an isolating node
// by Brent's method on p, bracketed by the interval's ends (the far end
// replaced by the image of an upper bound of the positive roots of the
// node's polynomial). ok is false when p does not change sign between the
// ends in floating point (a root within rounding of an end).
func rootIn(p Poly, nd isolationNode) (float64, bool) {
	ub := positiveUpperBound(nd.c)
	if !(ub > 0) || math.IsInf(ub, 0) {
		return 0, false
	}
	x0, x1 := nd.m.at(0), nd.m.at(ub)
	if x0 > x1 {
		x0, x1 = x1, x0
	}
	f0, f1 := p.Eval(x0), p.Eval(x1)
	if f0 == 0 || f1 == 0 || (f0 > 0) == (f1 > 0) || math.IsNaN(f0) || math.IsNaN(f1) {
		return 0, false
	}
	return rootfind.Brent(p.Eval, x0, x1, f0, f1, 2*0x1p-52), true
}
