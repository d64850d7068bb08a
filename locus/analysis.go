package locus

import (
	"cmp"
	"math"
	"math/big"
	"math/cmplx"
	"slices"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// Interval is an interval of the real line; ±Inf ends are allowed.
// RealAxisSegments are closed intervals, StableIntervals open ones.
type Interval struct{ Lo, Hi float64 }

// AngleAt is a departure angle (from a pole) or an arrival angle (at a
// zero) of one branch, in degrees in (−180, 180].
type AngleAt struct {
	// Point is the open-loop pole or zero.
	Point complex128
	// AngleDeg is the direction of the branch at Point, in degrees.
	AngleDeg float64
	// Multiplicity is the multiplicity of the pole or zero; it has as many
	// entries, one per branch.
	Multiplicity int
}

// BreakPoint is a point where branches meet and part (break-away or
// break-in), on or off the real axis.
type BreakPoint struct {
	// Point is where the branches meet.
	Point complex128
	// Value is the locus variable there.
	Value float64
	// Branches is the number of branches that meet (the multiplicity of
	// Point as a root of a + Value·b).
	Branches int
}

// Crossing is a point where a branch crosses the stability boundary: the
// imaginary axis in continuous time, the unit circle in discrete time.
type Crossing struct {
	// FrequencyRadPerSec is ω ≥ 0 with Point = jω in continuous time, or
	// θ/T with Point = e^(jθ), θ ∈ [0, π], in discrete time.
	FrequencyRadPerSec float64
	// Point is the closed-loop pole on the boundary (upper half plane).
	Point complex128
	// Value is the locus variable there.
	Value float64
}

// Analysis holds the construction quantities of a root locus, each computed
// exactly (no grid): see the package documentation for the definitions.
type Analysis struct {
	// Variable is the name of the locus variable ("gain" or a parameter).
	Variable string
	// Range is the range of the variable analysed.
	Range Range
	// Discrete reports a loop in z; SampleTimeSec is its sample period.
	Discrete      bool
	SampleTimeSec float64
	// Poles and Zeros are the open-loop poles (roots of a) and zeros
	// (roots of b) with multiplicity, in the order of poly.SortRoots.
	Poles, Zeros []poly.Root
	// Branches is the number of branches, max(deg a, deg b).
	// BranchesToInfinity is how many of them go to (or come from) infinity
	// within the range: |deg a − deg b| when the range reaches the end
	// where they do, else 0.
	Branches, BranchesToInfinity int
	// HasAsymptotes reports whether there are asymptotes; CentroidReal is
	// their meeting point on the real axis, (Σpoles − Σzeros)/(n − m).
	HasAsymptotes bool
	CentroidReal  float64
	// AsymptoteAnglesDeg are the asymptote directions in [0, 360),
	// ascending.
	AsymptoteAnglesDeg []float64
	// RealAxisSegments are the maximal closed intervals of the real axis
	// on the locus, ascending.
	RealAxisSegments []Interval
	// Departures has one entry per branch leaving a pole with Im > 0 or a
	// real multiple pole (the conjugate pole's angles are the negatives).
	Departures []AngleAt
	// Arrivals has one entry per branch arriving at a zero with Im > 0 or a
	// real multiple zero.
	Arrivals []AngleAt
	// BreakPoints lists every break-away and break-in point with its value
	// in the range, complex ones with their conjugates, ordered by real
	// then imaginary part.
	BreakPoints []BreakPoint
	// AxisCrossings lists the crossings of the imaginary axis (unit circle
	// in discrete time), by ascending frequency.
	AxisCrossings []Crossing
	// StableIntervals is the exact set of values in the range for which
	// every closed-loop pole has Re < 0 (discrete: |z| < 1), as ascending
	// open intervals.
	StableIntervals []Interval
	// Notes records approximations and special situations (dead time,
	// common factors, improper loops).
	Notes []string
}

// Analyze returns the construction quantities of the root locus of
// a(s) + k·b(s) = 0 for the loop k·b/a (a = loop.Den(), b = loop.Num())
// under negative feedback, k in set.Range. Dead time is replaced by a Padé
// approximation (continuous time) or by an exact power of z (discrete time,
// whole samples). It returns ErrZeroNumerator when b ≡ 0, ErrInvalidRange
// or ErrInvalidSettings for bad settings and ErrUnsupported for a fractional
// delay in discrete time.
func Analyze(loop tf.TF, set *Settings) (Analysis, error) {
	r, err := resolve(set)
	if err != nil {
		return Analysis{}, err
	}
	p, err := newProblem(loop, r)
	if err != nil {
		return Analysis{}, err
	}
	return p.analyze()
}

func (p *problem) analyze() (Analysis, error) {
	an := Analysis{
		Variable:      p.variable,
		Range:         p.rng,
		Discrete:      p.discrete,
		SampleTimeSec: p.ts,
		Poles:         slices.Clone(p.poles),
		Zeros:         slices.Clone(p.zeros),
		Branches:      p.order,
	}
	p.asymptotes(&an)
	an.RealAxisSegments = p.realAxisSegments()
	mv := p.moving()
	an.Departures = mv.angles(mv.poles, mv.zeros, mv.a.Lead(), mv.b.Lead(), p.startSigns())
	an.Arrivals = mv.angles(mv.zeros, mv.poles, mv.b.Lead(), mv.a.Lead(), p.infSigns())
	an.BreakPoints = mv.breakPoints()
	cr, err := mv.crossings()
	if mv != p {
		p.notes = append(p.notes, mv.notes...)
	}
	if err != nil {
		return Analysis{}, err
	}
	an.AxisCrossings = cr
	st, err := p.stableIntervals(cr)
	if err != nil {
		return Analysis{}, err
	}
	an.StableIntervals = st
	an.Notes = slices.Clone(p.notes)
	return an, nil
}

// startSigns returns the signs of k near k = 0 inside the range.
func (p *problem) startSigns() []float64 {
	switch {
	case p.rng.Min == 0:
		return []float64{1}
	case p.rng.Max == 0:
		return []float64{-1}
	case p.rng.Min < 0 && p.rng.Max > 0:
		return []float64{1, -1}
	}
	return nil
}

// infSigns returns the signs of k at the infinite ends of the range.
func (p *problem) infSigns() []float64 {
	var s []float64
	if math.IsInf(p.rng.Max, 1) {
		s = append(s, 1)
	}
	if math.IsInf(p.rng.Min, -1) {
		s = append(s, -1)
	}
	return s
}

// asymptotes fills the asymptote fields. With n > m the branches go to
// infinity as |k| → ∞; with m > n they come from infinity as k → 0. In both
// cases s^|n−m| ≈ −a₀/(k·b₀) far out, so the angles are (2q+1)·180°/|n−m|
// when k·b₀/a₀ > 0 and q·360°/|n−m| otherwise, and the centroid is
// (Σpoles − Σzeros)/(n − m), computed from the coefficients exactly.
func (p *problem) asymptotes(an *Analysis) {
	if p.n == p.m {
		return
	}
	signs := p.infSigns()
	if p.m > p.n {
		signs = p.startSigns()
	}
	if len(signs) == 0 {
		return
	}
	q := p.n - p.m
	if q < 0 {
		q = -q
	}
	an.HasAsymptotes = true
	an.BranchesToInfinity = q
	sumP := 0.0
	if p.n >= 1 {
		sumP = -p.a.Coef(p.n-1) / p.a.Lead()
	}
	sumZ := 0.0
	if p.m >= 1 {
		sumZ = -p.b.Coef(p.m-1) / p.b.Lead()
	}
	an.CentroidReal = (sumP - sumZ) / float64(p.n-p.m)
	lead := math.Copysign(1, p.b.Lead()) * math.Copysign(1, p.a.Lead())
	var angles []float64
	for _, sg := range signs {
		for i := range q {
			var a float64
			if sg*lead > 0 {
				a = float64(2*i+1) * 180 / float64(q)
			} else {
				a = float64(i) * 360 / float64(q)
			}
			if !slices.Contains(angles, a) {
				angles = append(angles, a)
			}
		}
	}
	slices.Sort(angles)
	an.AsymptoteAnglesDeg = angles
}

// realAxisSegments returns the maximal closed intervals of real σ with
// −a(σ)/b(σ) in the closed range. The ends are real poles and zeros and,
// for finite range ends, real roots of a + Min·b and a + Max·b.
func (p *problem) realAxisSegments() []Interval {
	var cand []float64
	addReal := func(rs []poly.Root) {
		for _, r := range rs {
			if imag(r.Value) == 0 {
				cand = append(cand, real(r.Value))
			}
		}
	}
	addReal(p.poles)
	addReal(p.zeros)
	for _, k := range []float64{p.rng.Min, p.rng.Max} {
		if k == 0 || math.IsInf(k, 0) {
			continue
		}
		// Only the real roots are needed: real-root isolation
		// (poly.RealRootsIn, Descartes' rule with continued fractions)
		// instead of all complex roots.
		if rs, err := poly.RealRootsIn(p.charPoly(k), math.Inf(-1), math.Inf(1)); err == nil {
			for _, r := range rs {
				cand = append(cand, r.Value)
			}
		}
	}
	slices.Sort(cand)
	cand = slices.Compact(cand)
	onLocus := func(x float64) bool {
		bv := p.b.Eval(x)
		if bv == 0 {
			return false
		}
		return p.rng.Contains(-p.a.Eval(x) / bv)
	}
	var segs []Interval
	add := func(lo, hi, probe float64) {
		if !onLocus(probe) {
			return
		}
		if n := len(segs); n > 0 && segs[n-1].Hi == lo {
			segs[n-1].Hi = hi
			return
		}
		segs = append(segs, Interval{lo, hi})
	}
	if len(cand) == 0 {
		add(math.Inf(-1), math.Inf(1), 0)
		return segs
	}
	add(math.Inf(-1), cand[0], cand[0]-1-math.Abs(cand[0]))
	for i := 0; i+1 < len(cand); i++ {
		add(cand[i], cand[i+1], (cand[i]+cand[i+1])/2)
	}
	last := cand[len(cand)-1]
	add(last, math.Inf(1), last+1+math.Abs(last))
	return segs
}

// angles returns the departure angles (own = poles) or the arrival angles
// (own = zeros) by Evans' angle condition
// (Evans 1950): for a root r of multiplicity μ, locus points r + δ satisfy
// μ·∠δ ≡ ∠(−σ·b₀/a₀) + Σ∠(r − other roots of b) − Σ∠(r − other roots of
// a) (mod 360°), σ the sign of k at the end where the branches meet r.
// The sums are over exact root sets with multiplicities.
func (p *problem) angles(own, other []poly.Root, ownLead, otherLead float64, signs []float64) []AngleAt {
	var out []AngleAt
	for _, r := range own {
		if !(imag(r.Value) > 0 || (imag(r.Value) == 0 && r.Multiplicity > 1)) {
			continue
		}
		sum := 0.0
		for _, z := range other {
			sum += float64(z.Multiplicity) * cmplx.Phase(r.Value-z.Value)
		}
		for _, q := range own {
			if q.Value == r.Value {
				continue
			}
			sum -= float64(q.Multiplicity) * cmplx.Phase(r.Value-q.Value)
		}
		mu := float64(r.Multiplicity)
		var list []float64
		for _, sg := range signs {
			// angle of −σ·otherLead/ownLead: 180° when that ratio is
			// positive, 0° when negative.
			base := 0.0
			if sg*otherLead/ownLead > 0 {
				base = math.Pi
			}
			t := base + sum
			for l := range r.Multiplicity {
				list = append(list, wrap180((t+2*math.Pi*float64(l))/mu*180/math.Pi))
			}
		}
		slices.Sort(list)
		for _, a := range list {
			out = append(out, AngleAt{Point: r.Value, AngleDeg: a, Multiplicity: r.Multiplicity})
		}
	}
	return out
}

// wrap180 maps degrees into (−180, 180].
func wrap180(a float64) float64 {
	a = math.Mod(a, 360)
	if a > 180 {
		a -= 360
	}
	if a <= -180 {
		a += 360
	}
	return a
}

// breakPoints returns the roots s₀ of a′·b − a·b′ = 0 that are neither
// poles nor zeros, at which k₀ = −a(s₀)/b(s₀) is real and in the range,
// with branches = 1 + multiplicity of s₀ (Evans 1950; Ogata, Modern
// Control Engineering, 5th ed., §6-2, rule 5). The roots of the expanded
// polynomial come from poly; each simple one is then polished against the
// unexpanded form (polishBreak), whose rounding error is far smaller than
// that of the expanded coefficients at high order. k₀ is stationary there,
// so its error is second order in the error of s₀.
func (p *problem) breakPoints() []BreakPoint {
	B := p.ad.Mul(p.b).Sub(p.a.Mul(p.bd))
	if B.Degree() < 1 {
		return nil
	}
	// The roots without multiplicity recognition first: recognition tests
	// every near-cluster of the degree-(2n − 2) polynomial with a backward
	// error in math/big (a fifth of Analyze at n = 60). Only where two
	// roots lie close together at a value k that could be on the locus
	// (mayMerge) can a multiple break point hide; then B is solved again
	// with recognition.
	rs, err := B.RootsWithSettings(&poly.RootSettings{ClusterTolerance: -1})
	if err != nil {
		return nil
	}
	if p.mayMerge(rs) {
		if rs, err = B.RootsWithMultiplicity(); err != nil {
			return nil
		}
	}
	var out []BreakPoint
	for _, r := range rs {
		s := r.Value
		if imag(s) < 0 {
			continue // added with its conjugate
		}
		if r.Multiplicity == 1 {
			// k is stationary at a break point, so the unpolished root
			// gives k to second order in its error (about 1e-14 relative
			// at order 24): a value that is clearly complex or clearly
			// outside the range does not need the polished point.
			if av, bv := p.a.EvalComplex(s), p.b.EvalComplex(s); bv != 0 && av != 0 {
				k := -av / bv
				if math.Abs(imag(k)) > 1e-4*cabs(k) || outside(p.rng, real(k), 1e-6) {
					continue
				}
			}
			s = p.polishBreak(s)
		}
		av, bv := evalComp(p.a, s), evalComp(p.b, s)
		if p.atPoleOrZero(s) || av == 0 || bv == 0 {
			continue // a multiple pole or zero: k₀ = 0 or ∞
		}
		k := -av / bv
		if math.Abs(imag(k)) > 1e-7*cabs(k) {
			continue // complex value: not on the locus
		}
		kv := real(k)
		if !p.rng.Contains(kv) || kv == 0 {
			continue
		}
		out = append(out, BreakPoint{Point: s, Value: kv, Branches: r.Multiplicity + 1})
		if imag(s) > 0 {
			out = append(out, BreakPoint{Point: cmplx.Conj(s), Value: kv, Branches: r.Multiplicity + 1})
		}
	}
	slices.SortFunc(out, func(x, y BreakPoint) int {
		if c := cmp.Compare(real(x.Point), real(y.Point)); c != 0 {
			return c
		}
		return cmp.Compare(imag(x.Point), imag(y.Point))
	})
	return out
}

// mayMerge reports whether two of the roots rs of B (simple, from the
// solver without cluster recognition) lie within 1e-3 of each other,
// relative to the larger modulus (or 1e-3 of the largest modulus for
// roots near the origin), at a point where −a/b is nearly real (1e-3
// relative) and not clearly outside the range. A multiple root of B of
// multiplicity m splits in double precision into a cluster of radius
// about (cond·u)^(1/m) relative, below 1e-3 up to m = 4 for the
// conditioning the recognition itself accepts; a wider split is not
// recognised as one root by RootsWithMultiplicity either.
func (p *problem) mayMerge(rs []poly.Root) bool {
	top := 0.0
	for _, r := range rs {
		top = math.Max(top, cabs(r.Value))
	}
	for i, r := range rs {
		for _, q := range rs[i+1:] {
			d := cabs(r.Value - q.Value)
			if d > 1e-3*math.Max(math.Max(cabs(r.Value), cabs(q.Value)), 1e-3*top) {
				continue
			}
			c := (r.Value + q.Value) / 2
			av, bv := p.a.EvalComplex(c), p.b.EvalComplex(c)
			if bv == 0 || av == 0 {
				return true
			}
			k := -av / bv
			if math.Abs(imag(k)) <= 1e-3*cabs(k) && !outside(p.rng, real(k), 1e-3) {
				return true
			}
		}
	}
	return false
}

// atPoleOrZero reports whether s is an open-loop pole or zero: within
// 1e-9 (relative) of a simple one, or 1e-6 of a multiple one (known only to
// about ε^(1/μ)).
// outside reports whether k lies outside the range r by more than rel
// relative to |k| (or to 1 near zero).
func outside(r Range, k, rel float64) bool {
	m := rel * math.Max(math.Abs(k), 1)
	return k < r.Min-m || k > r.Max+m
}

func (p *problem) atPoleOrZero(s complex128) bool {
	for _, rs := range [][]poly.Root{p.poles, p.zeros} {
		for _, r := range rs {
			tol := 1e-9
			if r.Multiplicity > 1 {
				tol = 1e-6
			}
			if cabs(s-r.Value) <= tol*math.Max(1, cabs(r.Value)) {
				return true
			}
		}
	}
	return false
}

// polishBreak refines a simple root s of B = a′·b − a·b′ by Newton's method
// on the unexpanded form, B(s) = a′(s)·b(s) − a(s)·b′(s) and
// B′(s) = a″(s)·b(s) − a(s)·b″(s), with a, a′, b, b′ evaluated by the
// compensated Horner scheme (Graillat, Langlois & Louvet 2005, through
// poly.EvalComplexCompensated). The roots of the expanded B carry the
// rounding of its coefficients, u·Σ|Bᵢ||s|ⁱ, which exceeds u·|a′b| by
// orders of magnitude at high order (1.2e-7 relative in s at n = 24); the
// unexpanded residual only carries the latter. A real s stays real. The
// iteration stops when the step falls below 2u·|s| or stops shrinking; a
// step larger than 1e-3·|s| (the expanded root was not near a simple root
// of the unexpanded form) is refused and s is returned unchanged.
func (p *problem) polishBreak(s complex128) complex128 {
	ev := evalComp
	add, bdd := p.ad.Derivative(), p.bd.Derivative()
	start, last := s, math.Inf(1)
	for range 8 {
		av, bv := ev(p.a, s), ev(p.b, s)
		adv, bdv := ev(p.ad, s), ev(p.bd, s)
		f := adv*bv - av*bdv
		df := ev(add, s)*bv - av*ev(bdd, s)
		if f == 0 || df == 0 {
			break
		}
		d := f / df
		if imag(s) == 0 {
			d = complex(real(d), 0)
		}
		ad := cabs(d)
		if !(ad < 0.5*last) && last < math.Inf(1) || math.IsNaN(ad) {
			break
		}
		s -= d
		last = ad
		if cabs(s-start) > 1e-3*math.Max(cabs(start), 1e-300) {
			return start
		}
		if ad <= 2*0x1p-53*cabs(s) {
			break
		}
	}
	if imag(s) == 0 && s != start {
		// B itself is a difference of two products that cancel at the
		// root, so its double value is only good to about u·|a′b|; for a
		// real break point, two more Newton steps take B from math/big
		// (128 bits, exact double coefficients and argument).
		x := real(s)
		for range 2 {
			f := breakResidualBig(p, x)
			df := real(evalComp(add, s)*evalComp(p.b, s) - evalComp(p.a, s)*evalComp(bdd, s))
			if f == 0 || df == 0 {
				break
			}
			d := f / df
			if !(math.Abs(d) <= 1e-9*math.Abs(x)) {
				break
			}
			x -= d
			s = complex(x, 0)
		}
	}
	return s
}

// breakResidualBig returns a′(x)·b(x) − a(x)·b′(x) evaluated in math/big
// at 128 bits from the exact double coefficients of a and b (the
// derivatives' coefficients i·cᵢ are formed exactly in math/big: in
// float64 they round, which alone moved a break point of an order-24 loop
// by 1.4e-11) and rounded to float64.
func breakResidualBig(p *problem, x float64) float64 {
	hor := func(q poly.Poly, deriv bool) *big.Float {
		xb := new(big.Float).SetPrec(128).SetFloat64(x)
		v := new(big.Float).SetPrec(128)
		c := new(big.Float).SetPrec(128)
		lo := 0
		if deriv {
			lo = 1
		}
		for i := q.Degree(); i >= lo; i-- {
			v.Mul(v, xb)
			c.SetFloat64(q.Coef(i))
			if deriv {
				c.Mul(c, new(big.Float).SetInt64(int64(i)))
			}
			v.Add(v, c)
		}
		return v
	}
	l := new(big.Float).SetPrec(128).Mul(hor(p.a, true), hor(p.b, false))
	r := new(big.Float).SetPrec(128).Mul(hor(p.a, false), hor(p.b, true))
	v, _ := l.Sub(l, r).Float64()
	return v
}

// evalComp returns q(z) by the compensated Horner scheme (real arithmetic
// for a real z).
func evalComp(q poly.Poly, z complex128) complex128 {
	if imag(z) == 0 {
		v, _ := q.EvalCompensated(real(z))
		return complex(v, 0)
	}
	v, _ := q.EvalComplexCompensated(z)
	return v
}
