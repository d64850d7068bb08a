package poly

import (
	"fmt"
	"math"
	"slices"
	"sync"
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
	// RelTolerance, in [0, 1e-3], is the relative width to which each
	// isolated root is refined, for callers that need the roots only
	// roughly (interval bounds, starting points of their own polishing).
	// If zero, defaults to 4u (u = 2⁻⁵³): full accuracy.
	RelTolerance float64
	// MaxRoots, ≥ 0, limits the result to the MaxRoots smallest roots: the
	// search then visits the interval in ascending order and stops early.
	// If zero, every root is returned.
	MaxRoots int
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
	case set != nil && set.MaxRoots < 0:
		return nil, fmt.Errorf("%w: RealRootSettings.MaxRoots is %d, want ≥ 0", ErrBadTolerance, set.MaxRoots)
	case set != nil && !(set.RelTolerance >= 0 && set.RelTolerance <= 1e-3):
		return nil, fmt.Errorf("%w: RealRootSettings.RelTolerance is %v, want in [0, 1e-3]", ErrBadTolerance, set.RelTolerance)
	}
	tol, limit := 4*0x1p-53, 0
	if set != nil {
		tol, limit = math.Max(tol, set.RelTolerance), set.MaxRoots
	}
	if p.Degree() < 1 {
		return nil, nil
	}
	// Möbius map from y ∈ (0, ∞) onto (lo, hi).
	var m mobius
	switch {
	case math.IsInf(lo, -1) && math.IsInf(hi, 1):
		// The smallest roots are the most negative: the negative half is
		// searched completely.
		all := (*RealRootSettings)(nil)
		if set != nil {
			c := *set
			c.MaxRoots = 0
			all = &c
		}
		neg, err1 := RealRootsInWithSettings(p, lo, 0, all)
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
		out := append(neg, pos...)
		if set != nil && set.MaxRoots > 0 && len(out) > set.MaxRoots {
			out = out[:set.MaxRoots]
		}
		return out, nil
	case math.IsInf(hi, 1):
		m = mobius{1, lo, 0, 1}
	case math.IsInf(lo, -1):
		m = mobius{-1, hi, 0, 1}
	default:
		m = mobius{hi, lo, 1, 1}
	}
	sh := newShifter(p.Degree())
	q, e := m.apply(p, sh)
	xs, ok := isolatePositive(p, q, e, m, tol, limit, sh)
	if !ok && m != (mobius{1, 0, 0, 1}) && (lo >= 0 || hi <= 0) {
		// The image of a short interval far from the origin can be too
		// ill-conditioned to decide; the whole half-line, reached by the
		// search in well-conditioned steps, often is not.
		half := mobius{1, 0, 0, 1}
		if hi <= 0 {
			half = mobius{-1, 0, 0, 1}
		}
		sh.resize(p.Degree())
		q, e = half.apply(p, sh)
		if all, okAll := isolatePositive(p, q, e, half, tol, 0, sh); okAll {
			xs, ok = xs[:0], true
			for _, x := range all {
				if x > lo && x < hi {
					xs = append(xs, x)
				}
			}
			slices.Sort(xs)
		}
	}
	if ok {
		if limit > 0 && len(xs) > limit {
			xs = xs[:limit]
		}
		out := make([]RealRoot, len(xs))
		for i, x := range xs {
			out[i] = RealRoot{Value: x, Multiplicity: 1}
		}
		return out, nil
	}
	rs, err := eigenRealRoots(p, lo, hi, set)
	if limit > 0 && len(rs) > limit {
		rs = rs[:limit]
	}
	return rs, err
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
// (p(a·y + b)) or a = hi, b = lo, c = d = 1. A shift by b ≠ 0 is done as
// p(b·(1 + t)) with the binomial shift by 1 between two scalings. The
// four coefficient vectors share one allocation.
func (m mobius) apply(p Poly, sh *shifter) (q, e []float64) {
	l := len(p.c)
	slab := make([]float64, 4*l)
	q, e = slab[:l:l], slab[l:2*l:2*l]
	t, te := slab[2*l:3*l:3*l], slab[3*l:]
	copy(q, p.c)
	w := m.a
	if m.c != 0 {
		w = m.a - m.b
	}
	if m.b != 0 {
		scaleVariable(q, e, m.b)
		sh.shift1(t, te, q, e)
		q, e, t, te = t, te, q, e
		w /= m.b
	}
	scaleVariable(q, e, w)
	if m.c == 0 {
		return q, e
	}
	// (1 + y)ⁿ·r(y/(1 + y)) with r(t) = p(lo + (hi − lo)·t) is the
	// reverse of shift₁(reverse r).
	slices.Reverse(q)
	slices.Reverse(e)
	sh.shift1(t, te, q, e)
	slices.Reverse(t)
	slices.Reverse(te)
	return t, te
}

// scaleVariable replaces c by the coefficients of q(s·y) and e by a bound
// on the error of the result: the power sⁱ carries at most i roundings and
// the product one more, γ_{i+1} relative.
func scaleVariable(c, e []float64, s float64) {
	if s == 1 {
		return
	}
	x := 1.0
	for i := range c {
		c[i] *= x
		e[i] = e[i]*math.Abs(x) + gammaN(i+1)*math.Abs(c[i])
		x *= s
	}
}

// gammaN is γₖ = k·u/(1 − k·u), u = 2⁻⁵³ (Higham 2002, §3.1).
func gammaN(k int) float64 {
	ku := float64(k) * 0x1p-53
	return ku / (1 - ku)
}

// shifter forms q(y + 1) of polynomials of degree n as the binomial
// sums q'ₖ = Σⱼ₌ₖⁿ C(j, k)·qⱼ: the same values as Horner's shift, but with
// independent sums instead of one chain of dependent additions, so that it
// runs several times faster. The shift is linear with non-negative weights,
// so an error e in the input becomes at most T(e) (T the shift), and the
// rounding of the sums is at most γ₂ₙ₊₂·T(|c|) (Higham 2002, §3.1):
// hence e ← (1 + γ₂ₙ₊₂)·T(e + γ₂ₙ₊₂·|c|). The binomials are exact
// integers up to n = 56 and rounded once per Pascal step beyond; each sum
// adds n + 1 roundings, which γ₂ₙ₊₂ covers.
type shifter struct {
	n      int
	stride int
	binom  []float64 // binom[k*stride+j] = C(j, k)
	g      float64
	work   []float64 // n+1 values for shift1
	tmp    []float64 // 2(n+1) values for shiftBy
	// free holds coefficient and bound buffers of isolation nodes that
	// are done, for reuse by later nodes of the same search (each of
	// length 2(n+1)); a shifter belongs to one call and is not shared.
	free [][]float64
}

// sharedBinomialDegree is the degree up to which the binomial table is
// built once and shared (read-only) by every call.
const sharedBinomialDegree = 128

var sharedBinomials = sync.OnceValue(func() []float64 { return binomials(sharedBinomialDegree) })

// binomials returns C(j, k) at [k*(n+1)+j] for 0 ≤ k ≤ j ≤ n, by Pascal's
// rule (exact up to n = 56).
func binomials(n int) []float64 {
	b := make([]float64, (n+1)*(n+1))
	row := make([]float64, n+1) // C(j, ·) for the current j
	for j := 0; j <= n; j++ {
		for k := j; k > 0; k-- {
			row[k] += row[k-1]
		}
		row[0] = 1
		for k := 0; k <= j; k++ {
			b[k*(n+1)+j] = row[k]
		}
	}
	return b
}

func newShifter(n int) *shifter {
	buf := make([]float64, 3*(n+1))
	s := &shifter{n: n, g: gammaN(2*n + 2), work: buf[:n+1], tmp: buf[n+1:]}
	if n <= sharedBinomialDegree {
		s.binom, s.stride = sharedBinomials(), sharedBinomialDegree+1
	} else {
		s.binom, s.stride = binomials(n), n+1
	}
	return s
}

// resize makes s work on polynomials of degree m ≤ its original degree
// (the binomial table and the buffers serve every smaller degree); the
// buffers of the free list, sized for the old degree, are dropped.
func (s *shifter) resize(m int) {
	if m != s.n {
		s.n, s.g, s.free = m, gammaN(2*m+2), s.free[:0]
	}
}

// node returns coefficient and bound buffers of length n+1 for an
// isolation node, from the free list when it has one.
func (s *shifter) node() (c, e []float64) {
	m := s.n + 1
	var buf []float64
	if k := len(s.free); k > 0 {
		buf, s.free = s.free[k-1], s.free[:k-1]
	} else {
		buf = make([]float64, 2*m)
	}
	return buf[:m], buf[m : 2*m : 2*m]
}

// release returns the buffers of a node obtained from node (c and e
// adjacent in one buffer) to the free list; others are left alone.
func (s *shifter) release(c, e []float64) {
	m := s.n + 1
	if len(c) == m && cap(c) == 2*m && len(e) == m && &c[:2*m][m] == &e[0] {
		s.free = append(s.free, c[:2*m])
	}
}

// shift1 writes q(y + 1) of c into dst and its error bound given the bound
// e on c into edst (see shifter).
func (s *shifter) shift1(dst, edst, c, e []float64) {
	n, g := s.n, s.g
	a := s.work[:n+1]
	for j := range a {
		a[j] = e[j] + g*math.Abs(c[j])
	}
	for k := 0; k <= n; k++ {
		b := s.binom[k*s.stride : k*s.stride+n+1]
		var c0, c1, e0, e1 float64
		j := k
		for ; j < n; j += 2 {
			b0, b1 := b[j], b[j+1]
			c0 += b0 * c[j]
			c1 += b1 * c[j+1]
			e0 += b0 * a[j]
			e1 += b1 * a[j+1]
		}
		if j == n {
			c0 += b[j] * c[j]
			e0 += b[j] * a[j]
		}
		dst[k] = c0 + c1
		edst[k] = (e0 + e1) * (1 + g)
	}
}

// shiftBy writes q(y + 2^p) of c into dst, edst (bounds as in shift1): the
// variable is scaled by 2^p exactly, shifted by 1 and scaled back exactly.
func (s *shifter) shiftBy(dst, edst, c, e []float64, p int) {
	tc, te := s.tmp[:s.n+1], s.tmp[s.n+1:2*(s.n+1)]
	if p*s.n > 900 || p*s.n < -900 {
		// Powers beyond the range of float64: scale with Ldexp.
		for i := range c {
			tc[i], te[i] = math.Ldexp(c[i], p*i), math.Ldexp(e[i], p*i)
		}
		s.shift1(dst, edst, tc, te)
		for i := range dst {
			dst[i], edst[i] = math.Ldexp(dst[i], -p*i), math.Ldexp(edst[i], -p*i)
		}
		return
	}
	// Powers of two within range: exact multiplications.
	f, fi := math.Ldexp(1, p), math.Ldexp(1, -p)
	x := 1.0
	for i := range c {
		tc[i], te[i] = c[i]*x, e[i]*x
		x *= f
	}
	s.shift1(dst, edst, tc, te)
	x = 1
	for i := range dst {
		dst[i] *= x
		edst[i] *= x
		x *= fi
	}
}

// signVariations returns the smallest and largest number of sign changes
// of c consistent with the error bounds e: a coefficient with |cᵢ| ≤ eᵢ
// may have either sign or be zero. known reports whether the first and
// last coefficients have a known sign.
func signVariations(c, e []float64) (vmin, vmax int, known bool) {
	certain := true
	last := 0.0
	for i, x := range c {
		if !(math.Abs(x) > e[i]) {
			certain = false
			break
		}
		if last != 0 && (x > 0) != (last > 0) {
			vmin++
		}
		last = x
	}
	if certain {
		return vmin, vmin, true
	}
	vmin = 0
	// vmin: the unknown coefficients set to zero add no change. vmax:
	// dynamic programming over the sign of the last non-zero coefficient
	// (best[0] for +, best[1] for −; empty: all zero so far is possible).
	const impossible = math.MinInt / 2
	best := [2]int{impossible, impossible}
	empty := true
	last = 0.0
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
// polynomial (see lmqBound). It returns +Inf when the reversed
// polynomial has no sign change (no positive root).
func positiveLowerBound(c []float64) float64 {
	ub := lmqBound(c, true)
	if ub == 0 {
		return math.Inf(1)
	}
	return 1 / ub
}

// lmqBound returns the local-max quadratic bound on the positive
// roots of c (ascending, leading coefficient non-zero; Akritas, Strzeboński
// & Vigklas 2008, "Improving the performance of the continued fractions
// method using new bounds of positive roots", Nonlinear Analysis:
// Modelling and Control 13(3), 265–279): with the leading coefficient
// positive, each coefficient cᵢ < 0 is paired with the higher coefficients
// cⱼ > 0, the j-th used for the t-th time at the weight 2^(−t), giving
// (2^t·|cᵢ|/cⱼ)^(1/(j−i)); the bound is the largest over i of the smallest
// over j. It is 0 when there is no sign change and NaN when a coefficient
// is NaN or infinite.
//
// lmqBound applies it to c, or to c reversed when rev is set.
func lmqBound(c []float64, rev bool) float64 {
	n := len(c) - 1
	// Work with base-2 logarithms: (2^t·|cᵢ|/cⱼ)^(1/(j−i)) is
	// 2^((t + lg|cᵢ| − lg|cⱼ|)/(j−i)), so the double loop needs no powers.
	var buf [3 * 64]float64
	var v, lg, times []float64
	if 3*(n+1) <= len(buf) {
		v, lg, times = buf[:n+1], buf[n+1:2*(n+1)], buf[2*(n+1):3*(n+1)]
	} else {
		v, lg, times = make([]float64, n+1), make([]float64, n+1), make([]float64, n+1)
	}
	copy(v, c)
	if rev {
		slices.Reverse(v)
	}
	if v[n] < 0 {
		for i := range v {
			v[i] = -v[i]
		}
	}
	for j, x := range v {
		if x > 0 {
			lg[j] = roughLog2(x)
		}
		times[j] = 1
	}
	ub, any := math.Inf(-1), false
	for i := n - 1; i >= 0; i-- {
		if v[i] >= 0 {
			continue
		}
		lgi := roughLog2(v[i])
		best, bj := math.Inf(1), -1
		for j := i + 1; j <= n; j++ {
			if v[j] <= 0 {
				continue
			}
			// roughLog2 errs by less than 0.01: the margin 0.02 keeps
			// the bound valid (and at most 1.4 % looser).
			if t := (times[j] + lgi - lg[j] + 0.02) * reciprocal(j-i); t < best {
				best, bj = t, j
			}
		}
		if bj < 0 {
			return math.NaN() // a NaN coefficient: no bound
		}
		times[bj]++
		ub, any = math.Max(ub, best), true
	}
	if !any {
		return 0
	}
	return math.Exp2(ub)
}

// roughLog2 returns log2|x| within 0.01 for finite x ≠ 0: the exponent,
// plus m·(1.3466 − 0.3466·m) for the mantissa 1 + m, m ∈ [0, 1) (a
// quadratic fit, common practice; error below 0.008 on [0, 1)).
func roughLog2(x float64) float64 {
	f, e := math.Frexp(math.Abs(x)) // f ∈ [0.5, 1)
	m := 2*f - 1
	return float64(e-1) + m*(1.3466-0.3466*m)
}

// kioustelidisBound returns the Kioustelidis bound on the positive roots
// of c (ascending, leading coefficient non-zero; Kioustelidis 1986, J.
// Comput. Appl. Math. 16, 241–244): 2·max over the coefficients of sign
// opposite to the leading one of (|cᵢ|/|cₙ|)^(1/(n−i)), in O(n) (with
// roughLog2 and a margin that keeps it valid).
func kioustelidisBound(c []float64) float64 {
	n := len(c) - 1
	ln := roughLog2(c[n])
	ub, any := math.Inf(-1), false
	for i := 0; i < n; i++ {
		if c[i] != 0 && (c[i] > 0) != (c[n] > 0) {
			ub, any = math.Max(ub, (roughLog2(c[i])-ln+0.02)*reciprocal(n-i)), true
		}
	}
	if !any {
		return 0
	}
	return 2 * math.Exp2(ub)
}

// reciprocals holds 1/k for small k.
var reciprocals = func() (r [256]float64) {
	for k := 1; k < len(r); k++ {
		r[k] = 1 / float64(k)
	}
	return r
}()

func reciprocal(k int) float64 {
	if k < len(reciprocals) {
		return reciprocals[k]
	}
	return 1 / float64(k)
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
// ascending, given q = (c·y + d)ⁿ·p(M(y)) (ascending), each refined to
// the relative width tol. ok is false when the
// search cannot decide (see the comment at the top of this file).
func isolatePositive(p0 Poly, q, e []float64, m mobius, tol float64, limit int, sh *shifter) (roots []float64, ok bool) {
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
	sc := int(math.Round(float64(e0-en) / float64(deg)))
	if sc != 0 {
		for i := range q {
			q[i] = math.Ldexp(q[i], sc*i)
			e[i] = math.Ldexp(e[i], sc*i)
		}
		f := math.Ldexp(1, sc)
		m = mobius{m.a * f, m.b, m.c * f, m.d}
	}
	sh.resize(deg)
	stack := []isolationNode{{c: q, e: e, m: m}}
	for len(stack) > 0 && (limit == 0 || len(roots) < limit) {
		nd := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if !visitNode(&nd, sh, p0, tol, &roots, &stack) {
			return nil, false
		}
	}
	slices.Sort(roots)
	return roots, true
}

// visitNode decides one node of the search: it appends an isolated root to
// roots, or pushes the node's two children on the stack, or drops a
// root-free node. The node's buffers go back to sh's free list. It
// returns false when the search cannot decide.
func visitNode(nd *isolationNode, sh *shifter, p0 Poly, tol float64, roots *[]float64, stack *[]isolationNode) bool {
	defer sh.release(nd.c, nd.e)
	if !finite(nd.c) {
		return false // the transformed polynomial overflowed
	}
	found := func() bool {
		x, good := rootIn(p0, *nd, tol)
		if good {
			*roots = append(*roots, x)
		}
		return good
	}
	vmin, vmax, known := signVariations(nd.c, nd.e)
	if vmax == 0 {
		return true
	}
	if known && vmin == 1 && vmax == 1 {
		return found()
	}
	if nd.depth >= maxIsolationDepth || !known {
		return false
	}
	// Shift the root-free part away (by the lower bound rounded down
	// to a power of two, so that the scalings are exact).
	if lb := positiveLowerBound(nd.c); lb >= 1 {
		if math.IsInf(lb, 1) {
			return true
		}
		_, p := math.Frexp(lb)
		p--
		nc, ne := sh.node()
		defer sh.release(nc, ne)
		sh.shiftBy(nc, ne, nd.c, nd.e, p)
		f := math.Ldexp(1, p)
		nd.c, nd.e = nc, ne
		nd.m = mobius{nd.m.a, nd.m.a*f + nd.m.b, nd.m.c, nd.m.c*f + nd.m.d}
		vmin, vmax, known = signVariations(nd.c, nd.e)
		if vmax == 0 {
			return true
		}
		if !known {
			return false
		}
		if vmin == 1 && vmax == 1 {
			return found()
		}
	}
	// Split at y = 1.
	right := isolationNode{depth: nd.depth + 1}
	right.c, right.e = sh.node()
	sh.shift1(right.c, right.e, nd.c, nd.e)
	right.m = mobius{nd.m.a, nd.m.a + nd.m.b, nd.m.c, nd.m.c + nd.m.d}
	if math.Abs(right.c[0]) <= right.e[0] {
		return false // a root at (or within rounding of) the cut
	}
	left := isolationNode{depth: nd.depth + 1}
	left.c, left.e = sh.node()
	slices.Reverse(nd.c)
	slices.Reverse(nd.e)
	sh.shift1(left.c, left.e, nd.c, nd.e)
	left.m = mobius{nd.m.b, nd.m.a + nd.m.b, nd.m.d, nd.m.c + nd.m.d}
	// Visit the children in ascending x (the last pushed is next):
	// the left one first when M is increasing (a·d − b·c > 0).
	if nd.m.a*nd.m.d-nd.m.b*nd.m.c > 0 {
		*stack = append(*stack, right, left)
	} else {
		*stack = append(*stack, left, right)
	}
	return true
}

// rootIn returns the single root of p in the interval of an isolating node,
// bracketed by the interval's ends (the far end replaced by the image of an
// upper bound of the positive roots of the node's polynomial), by Newton's
// method safeguarded by bisection (common practice): a Newton step is
// taken when it stays inside the bracket and at least halves it, otherwise
// the bracket is bisected (geometrically while its ends differ by more than
// a factor 4), so convergence is guaranteed and quadratic near the simple
// root. It stops when the bracket or the step is below tol relative.
// ok is false when p does not change sign between the ends in floating
// point (a root within rounding of an end).
func rootIn(p Poly, nd isolationNode, tol float64) (float64, bool) {
	ub := kioustelidisBound(nd.c)
	if !(ub > 0) || math.IsInf(ub, 0) {
		return 0, false
	}
	lo, hi := nd.m.at(0), nd.m.at(ub)
	if lo > hi {
		lo, hi = hi, lo
	}
	c := p.c
	eval := func(x float64) (v, d float64) {
		for i := len(c) - 1; i >= 0; i-- {
			d = d*x + v
			v = v*x + c[i]
		}
		return v, d
	}
	flo, _ := eval(lo)
	fhi, _ := eval(hi)
	if flo == 0 || fhi == 0 || (flo > 0) == (fhi > 0) || math.IsNaN(flo) || math.IsNaN(fhi) {
		return 0, false
	}
	x := 0.5 * (lo + hi)
	if lo > 0 && hi > 4*lo {
		x = math.Sqrt(lo * hi)
	} else if hi < 0 && lo < 4*hi {
		x = -math.Sqrt(lo * hi)
	}
	for range 300 {
		fx, dx := eval(x)
		if fx == 0 {
			return x, true
		}
		if (fx > 0) == (flo > 0) {
			lo, flo = x, fx
		} else {
			hi = x
		}
		if hi-lo <= tol*math.Max(math.Abs(lo), math.Abs(hi)) {
			break
		}
		xn := x - fx/dx
		if dx != 0 && xn > lo && xn < hi && math.Abs(fx/dx) <= 0.5*(hi-lo) {
			if math.Abs(xn-x) <= tol*math.Abs(xn) {
				return xn, true
			}
			x = xn
			continue
		}
		switch {
		case lo > 0 && hi > 4*lo:
			x = math.Sqrt(lo * hi)
		case hi < 0 && lo < 4*hi:
			x = -math.Sqrt(lo * hi)
		default:
			x = 0.5 * (lo + hi)
		}
	}
	return 0.5 * (lo + hi), true
}

// finite reports whether every element of c is finite.
func finite(c []float64) bool {
	for _, x := range c {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return false
		}
	}
	return true
}
