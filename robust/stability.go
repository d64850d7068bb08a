package robust

import (
	"fmt"
	"math"
	"math/big"
	"math/cmplx"
	"math/rand/v2"

	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// Verdict is the answer of a guaranteed analysis.
type Verdict int

const (
	// StableForBox: proven for every parameter value in the box.
	StableForBox Verdict = iota
	// UnstableAtPoint: a point of the box where the closed loop is
	// unstable was found and verified by its closed-loop roots.
	UnstableAtPoint
	// Undecided: neither proven nor refuted within the sub-box limit.
	Undecided
)

// String returns the verdict in words.
func (v Verdict) String() string {
	switch v {
	case StableForBox:
		return "stable for the whole box"
	case UnstableAtPoint:
		return "unstable at a point"
	case Undecided:
		return "undecided"
	}
	return fmt.Sprintf("Verdict(%d)", int(v))
}

// Counterexample is a parameter point of the box with an unstable closed loop.
type Counterexample struct {
	// Values are the parameter values, in the order of Loop.Params.
	Values []float64
	// UnstableRoots are the closed-loop roots with Re s ≥ 0 (discrete
	// |z| ≥ 1); with dead time, the exact roots of the quasi-polynomial
	// (locus.DelayedRoots), empty when they cannot be counted with proof
	// (the instability itself is proven by the Nyquist criterion).
	UnstableRoots []complex128
}

// Box is a sub-box of the parameter ranges, in parameter values.
type Box struct {
	Min, Max []float64
}

// StabilityResult is the robust-stability verdict for a loop's box.
type StabilityResult struct {
	Verdict Verdict
	// Method names the theorem and test used.
	Method string
	// Class is the dependence found in the coefficients.
	Class Class
	// Counterexample is set when Verdict is UnstableAtPoint.
	Counterexample *Counterexample
	// UnprovenBoxes lists (up to 20, merged over frequency) the parameter
	// sub-boxes left unproven when Verdict is Undecided.
	UnprovenBoxes []Box
	// Reason says why the verdict is Undecided.
	Reason string
	// Cells is the number of (frequency × parameter) cells examined.
	Cells int
}

// Settings controls the guaranteed analyses. A nil *Settings means the
// defaults.
type Settings struct {
	// MaxCells is the limit of cells (frequency interval × parameter
	// sub-box) examined before the verdict is Undecided. If zero, defaults
	// to 200000.
	MaxCells int
	// Probes is the number of pseudo-random points (besides the centre and
	// up to 1024 corners) tested for instability before a proof is tried.
	// If zero, defaults to 64.
	Probes int
	// Seed seeds the probes.
	Seed uint64
}

func (s *Settings) withDefaults() (Settings, error) {
	var out Settings
	if s != nil {
		out = *s
	}
	if out.MaxCells < 0 || out.Probes < 0 {
		return out, fmt.Errorf("%w: MaxCells %d and Probes %d must be ≥ 0", ErrSettings, out.MaxCells, out.Probes)
	}
	if out.MaxCells == 0 {
		out.MaxCells = 200000
	}
	if out.Probes == 0 {
		out.Probes = 64
	}
	return out, nil
}

// family returns the loop's characteristic function in continuous form: as
// is for a continuous loop; for a discrete loop, the exact bilinear image
// (1 − w)ⁿ·P((1 + w)/(1 − w)) of numerator and denominator (poly.CircleToAxis,
// a fixed linear map of the coefficients, so the dependence class is kept),
// which maps the unit circle to the imaginary axis.
func (l *Loop) family() *family {
	f := &family{n: len(l.mid), den: l.den, num: l.num, tau: l.tau,
		gain: point(1), ray: math.Pi / 2}
	if l.ts == 0 {
		return f
	}
	n := max(degree(l.den), degree(l.num))
	mapped := func(ps []mpoly) []mpoly {
		out := make([]mpoly, n+1)
		for j := 0; j <= n; j++ {
			w := make([]float64, len(ps))
			for k := range ps {
				if k > n {
					continue
				}
				e := make([]float64, k+1)
				e[k] = 1
				p, _ := poly.FromAscending(e)
				w[k] = p.CircleToAxis(n).Coef(j)
			}
			out[j] = combine(ps, w, f.n)
		}
		return out
	}
	f.den, f.num = mapped(l.den), mapped(l.num)
	return f
}

// pointStability reports whether the real loop at scaled point t is stable,
// with its unstable closed-loop roots.
func (l *Loop) pointStability(t []float64) (stable bool, unstable []complex128, err error) {
	g, err := l.At(l.valuesOf(t))
	if err != nil {
		return false, nil, err
	}
	if g.DelaySec() > 0 {
		m, err := margins.Compute(g, &margins.Settings{})
		if err != nil {
			return false, nil, err
		}
		if m.ClosedLoopStable {
			return true, nil, nil
		}
		return false, delayedUnstableRoots(g), nil
	}
	stable, unstable = rootsOutside(g.CharacteristicPolynomial(), l.ts)
	return stable, unstable, nil
}

// delayedUnstableRoots returns the exact closed-loop roots with Re s ≥ 0 of
// a continuous loop with dead time, the roots of its quasi-polynomial
// (locus.DelayedRoots, polished by Newton's method to 1e-12 and counted by
// the argument principle), or nil when they cannot all be found with that
// proof: the instability itself is proven by the Nyquist criterion, and no
// approximation's roots are listed in their place.
func delayedUnstableRoots(g tf.TF) []complex128 {
	rs, err := locus.DelayedRoots(g, 1, &locus.DelaySettings{Region: locus.Above, MinRealPart: -unstableRootTol})
	if err != nil || !rs.CountVerified {
		return nil
	}
	var bad []complex128
	for _, z := range rs.Roots {
		if real(z) >= -unstableRootTol*math.Max(1, cmplx.Abs(z)) {
			bad = append(bad, z)
		}
	}
	return bad
}

// unstableRootTol is the relative distance left of the imaginary axis
// within which an exact root of a delayed loop counts as unstable (on the
// axis), as the rounding of its polish allows.
const unstableRootTol = 1e-12

func rootsOutside(p poly.Poly, sample float64) (bool, []complex128) {
	r, err := p.Roots()
	if err != nil {
		return false, nil
	}
	var bad []complex128
	for _, z := range r {
		if (sample == 0 && real(z) >= 0) || (sample > 0 && math.Hypot(real(z), imag(z)) >= 1) {
			bad = append(bad, z)
		}
	}
	return len(bad) == 0, bad
}

// counterexample tests the point and returns it if unstable.
func (l *Loop) counterexample(t []float64) *Counterexample {
	ok, roots, err := l.pointStability(t)
	if err != nil || ok {
		return nil
	}
	return &Counterexample{Values: l.valuesOf(t), UnstableRoots: roots}
}

// corners returns the centre, up to 1024 corners and the probes.
func (l *Loop) probePoints(count int, seed uint64) [][]float64 {
	n := len(l.mid)
	pts := [][]float64{make([]float64, n)}
	nc := 1 << min(n, 10)
	for c := range nc {
		t := make([]float64, n)
		for i := range n {
			t[i] = -1
			if i < 10 && c>>i&1 == 1 {
				t[i] = 1
			}
		}
		pts = append(pts, t)
	}
	rng := rand.New(rand.NewPCG(seed, 0x9e3779b97f4a7c15))
	for range count {
		t := make([]float64, n)
		for i := range t {
			t[i] = 2*rng.Float64() - 1
		}
		pts = append(pts, t)
	}
	return pts
}

// Stability decides whether the closed loop is stable for every parameter
// value in the box, with a proof, a verified counterexample, or — beyond the
// cell limit — Undecided with the unproven sub-boxes listed. It never
// guesses.
//
// First the centre, the corners and Settings.Probes random points are tested
// (closed-loop roots of the loop read at that point); an unstable one is the
// counterexample. Then, by class (Loop.Class):
//
//   - Interval, continuous: Kharitonov's theorem (V. L. Kharitonov, 1978,
//     Differential'nye Uravneniya 14(11)): the interval polynomial is
//     Hurwitz iff its four Kharitonov polynomials are; each is tested by a
//     Routh array in exact rational arithmetic (math/big), on coefficient
//     bounds rounded outward.
//   - Interval (discrete) and Affine: the edge theorem (A. C. Bartlett,
//     C. V. Hollot & H. Lin, 1988, Math. Control Signals Systems 1): a
//     polytope of polynomials of constant degree is stable iff its exposed
//     edges are; each edge of the parameter box (n·2ⁿ⁻¹ of them, n ≤ 8) is
//     checked by zero exclusion along the axis with interval arithmetic.
//     Kharitonov's four polynomials do not suffice on the unit circle
//     (Bhattacharyya, Chapellat & Keel 1995, ch. 5, from memory), so
//     discrete interval families, after the bilinear map, take the edges.
//   - Multilinear, Polynomial, WithDelay (and affine with n > 8): zero
//     exclusion of the value set on a subdivided box — the idea of the
//     mapping theorem (L. A. Zadeh & C. A. Desoer, "Linear System Theory",
//     1963; Bhattacharyya, Chapellat & Keel 1995, ch. 11) with its
//     convex-hull bound replaced by an outward-rounded interval enclosure of
//     F(jω) over each (frequency interval × sub-box) cell, which also covers
//     polynomial dependence and dead time. Cells are bisected until each
//     excludes zero; deep cells have their centre tested for instability.
//
// Constant degree is proven first (the leading coefficient excludes zero on
// the box); if it changes sign, a point on the unstable side is searched.
// Dead time requires a numerator of lower degree than the denominator
// (retarded type). All proofs are about the coefficient polynomials
// recovered by NewLoop (verified against the parser to 1e-9).
func Stability(l *Loop, set *Settings) (StabilityResult, error) {
	s, err := set.withDefaults()
	if err != nil {
		return StabilityResult{}, err
	}
	res := StabilityResult{Class: l.class}
	for _, t := range l.probePoints(s.Probes, s.Seed) {
		if ce := l.counterexample(t); ce != nil {
			res.Verdict, res.Counterexample = UnstableAtPoint, ce
			res.Method = "closed-loop roots at a sampled point (centre, corners or probes)"
			return res, nil
		}
	}
	f := l.family()
	if degree(f.num) > degree(f.den) {
		return res, fmt.Errorf("%w: the loop is improper (numerator degree above the denominator's)", ErrUnsupported)
	}
	if l.class == WithDelay && degree(f.num) >= degree(f.den) {
		return res, fmt.Errorf("%w: dead time with a numerator of the denominator's degree (neutral type)", ErrUnsupported)
	}
	low, ok, badCell := f.leadBound(4096)
	if !ok {
		// Degree drop: look for the unstable side near the bad cell.
		res.Verdict = Undecided
		res.Method = "constant-degree check of the leading coefficient"
		res.Reason = "the degree of the characteristic polynomial drops inside the box"
		rng := rand.New(rand.NewPCG(s.Seed, 1))
		for range 256 {
			t := make([]float64, f.n)
			for i := range t {
				c := badCell[1+i]
				t[i] = c.lo + rng.Float64()*c.width()
			}
			if ce := l.counterexample(t); ce != nil {
				res.Verdict, res.Counterexample, res.Reason = UnstableAtPoint, ce, ""
				return res, nil
			}
		}
		res.UnprovenBoxes = []Box{l.boxOf(badCell)}
		return res, nil
	}
	if l.class == Interval && l.ts == 0 {
		return l.kharitonov(res)
	}
	probe := func(t []float64) bool {
		ce := l.counterexample(t)
		if ce != nil {
			res.Counterexample = ce
		}
		return ce != nil
	}
	r := f.frequencyBound(low)
	if (l.class == Affine || l.class == Interval) && f.n <= 8 {
		res.Method = "edge theorem (Bartlett, Hollot & Lin 1988); each edge by zero exclusion with interval arithmetic"
		if l.ts > 0 {
			res.Method += " after the exact bilinear map of the unit circle to the axis"
		}
		var unproven [][]interval
		for i := range f.n {
			for c := range 1 << (f.n - 1) {
				fix := func(cell []interval) {
					bit := 0
					for j := range f.n {
						if j == i {
							continue
						}
						v := -1.0
						if c>>bit&1 == 1 {
							v = 1
						}
						bit++
						cell[1+j] = point(v)
					}
				}
				st, cells, un := f.zeroExclusion(r, s.MaxCells-res.Cells, fix, probe)
				res.Cells += cells
				switch st {
				case foundPoint:
					res.Verdict = UnstableAtPoint
					return res, nil
				case notProven:
					unproven = append(unproven, un...)
				}
			}
		}
		return l.finish(res, unproven), nil
	}
	res.Method = "zero exclusion on a subdivided box with interval arithmetic (mapping-theorem approach, Zadeh & Desoer 1963)"
	if l.ts > 0 {
		res.Method += " after the exact bilinear map of the unit circle to the axis"
	}
	st, cells, un := f.zeroExclusion(r, s.MaxCells, nil, probe)
	res.Cells = cells
	if st == foundPoint {
		res.Verdict = UnstableAtPoint
		return res, nil
	}
	return l.finish(res, un), nil
}

func (l *Loop) finish(res StabilityResult, unproven [][]interval) StabilityResult {
	if len(unproven) == 0 {
		res.Verdict = StableForBox
		return res
	}
	res.Verdict = Undecided
	res.Reason = fmt.Sprintf("cell limit reached with %d cells unproven", len(unproven))
	seen := map[string]bool{}
	for _, c := range unproven {
		b := l.boxOf(c)
		key := fmt.Sprint(b)
		if seen[key] {
			continue
		}
		seen[key] = true
		res.UnprovenBoxes = append(res.UnprovenBoxes, b)
		if len(res.UnprovenBoxes) == 20 {
			break
		}
	}
	return res
}

func (l *Loop) boxOf(cell []interval) Box {
	n := len(l.mid)
	b := Box{Min: make([]float64, n), Max: make([]float64, n)}
	for i := range n {
		b.Min[i] = l.mid[i] + l.rad[i]*cell[1+i].lo
		b.Max[i] = l.mid[i] + l.rad[i]*cell[1+i].hi
	}
	return b
}

// coefficientIntervals returns outward-rounded bounds of each coefficient of
// an interval family (affine, each parameter in one coefficient).
func coefficientIntervals(ch []mpoly) []interval {
	out := make([]interval, len(ch))
	box := make([]interval, 0)
	for k, c := range ch {
		if len(box) == 0 && len(c.terms) > 0 {
			box = make([]interval, len(c.terms[0].exp))
			for i := range box {
				box[i] = interval{-1, 1}
			}
		}
		if c.isZero() {
			out[k] = point(0)
			continue
		}
		out[k] = c.evalInterval(box)
	}
	return out
}

// kharitonovPattern gives, for power k (ascending), whether each of the four
// Kharitonov polynomials takes the upper bound.
var kharitonovPattern = [4][4]bool{
	{false, false, true, true},
	{true, true, false, false},
	{false, true, true, false},
	{true, false, false, true},
}

func (l *Loop) kharitonov(res StabilityResult) (StabilityResult, error) {
	res.Method = "Kharitonov's theorem (Kharitonov 1978): four polynomials, each by an exact Routh array in rational arithmetic"
	ch := l.charPoly()
	n := degree(ch)
	ch = ch[:n+1]
	iv := coefficientIntervals(ch)
	sign := 1.0
	if iv[n].hi < 0 {
		sign = -1
		for k := range iv {
			iv[k] = iv[k].neg()
		}
	}
	for q := range 4 {
		c := make([]float64, n+1)
		for k := range c {
			if kharitonovPattern[q][k%4] {
				c[k] = iv[k].hi
			} else {
				c[k] = iv[k].lo
			}
		}
		if HurwitzExact(c) {
			continue
		}
		// A failing Kharitonov polynomial is a vertex of the family: find
		// its parameters (each parameter sits in one coefficient).
		t := make([]float64, len(l.mid))
		for k := range ch {
			for i := range t {
				a := sign * ch[k].linear(i)
				if a == 0 {
					continue
				}
				up := kharitonovPattern[q][k%4]
				t[i] = 1
				if (a > 0) != up {
					t[i] = -1
				}
			}
		}
		if ce := l.counterexample(t); ce != nil {
			res.Verdict, res.Counterexample = UnstableAtPoint, ce
			return res, nil
		}
		// The vertex is stable within rounding: the outward rounding made the
		// test fail. No guess.
		res.Verdict = Undecided
		res.Reason = fmt.Sprintf("Kharitonov polynomial %d fails on the outward-rounded bounds but its vertex tests stable (a boundary case)", q+1)
		return res, nil
	}
	res.Verdict = StableForBox
	return res, nil
}

// HurwitzExact reports whether the real polynomial with the given
// coefficients (ascending powers, as in poly.Ascending) has every root in
// the open left half plane. The Routh array (Routh 1877) is computed in
// exact rational arithmetic from the float64 values, so the answer has no
// rounding error: the polynomial is Hurwitz iff the array is regular and its
// first column has one sign. Trailing zero coefficients (a root at 0) and
// a zero leading coefficient give false.
func HurwitzExact(ascending []float64) bool {
	n := len(ascending) - 1
	if n < 0 || ascending[n] == 0 {
		return false
	}
	m := n/2 + 1
	rows := [2][]*big.Rat{make([]*big.Rat, m), make([]*big.Rat, m)}
	for j := range m {
		rows[0][j], rows[1][j] = new(big.Rat), new(big.Rat)
		if k := n - 2*j; k >= 0 {
			rows[0][j].SetFloat64(ascending[k])
		}
		if k := n - 1 - 2*j; k >= 0 {
			rows[1][j].SetFloat64(ascending[k])
		}
	}
	sign := rows[0][0].Sign()
	prev, cur := rows[0], rows[1]
	for i := 1; i <= n; i++ {
		if cur[0].Sign() != sign {
			return false
		}
		next := make([]*big.Rat, m)
		for j := range m {
			next[j] = new(big.Rat)
			if j+1 < m {
				v := new(big.Rat).Mul(prev[0], cur[j+1])
				v.Quo(v, cur[0])
				next[j].Sub(prev[j+1], v)
			}
		}
		prev, cur = cur, next
	}
	return true
}
