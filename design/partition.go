package design

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"slices"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/spec"
)

// PlaneSettings controls Partition.
type PlaneSettings struct {
	// XRange and YRange are the rectangle of the plane, Min < Max, both
	// finite. Required.
	XRange, YRange Range
	// ChordTolerance bounds the distance of the middle of every traced
	// chord of a boundary curve from the exact curve, as a fraction of the
	// rectangle's diagonal, in (0, 0.1]. If zero, defaults to 0.002.
	ChordTolerance float64
	// Scanlines is the number of lines y = const (including both edges of
	// the rectangle) on which the regions are computed exactly, 3 to
	// 10000. If zero, defaults to 121.
	Scanlines int
	// Requirements, when not empty, adds one requirement region per
	// requirement and the boundary curves of the damping-ratio and
	// phase-margin requirements.
	Requirements spec.Requirements
	// RequirementScanlines is the number of scanlines of the requirement
	// regions (each runs Solve on the line), 3 to 10000. If zero, defaults
	// to 81.
	RequirementScanlines int
	// PadeOrder is the Padé order for dead time, 1 to 20; 6 if zero.
	PadeOrder int
	// Context cancels a long computation. If nil, context.Background().
	Context context.Context
}

// Boundary is a curve of the D-partition, as a polyline inside the
// rectangle.
type Boundary struct {
	// Kind names the curve: "imaginary-axis crossing" (unit-circle crossing
	// in discrete time), "real root at s = 0" (z = 1, z = −1), "degree
	// drop", "singular line at ω = …", "damping ratio ζ = …",
	// "phase margin = …°".
	Kind string
	// Points are the (x, y) points of the polyline.
	Points [][2]float64
	// FrequencyRadPerSec is the frequency of each point on a curve
	// parameterised by ω (the natural frequency ωn on a damping line); NaN
	// on a straight line.
	FrequencyRadPerSec []float64
}

// Region is a polygon of the plane (closed: the last point repeats the
// first) inside which the number of closed-loop poles with Re s ≥ 0
// (|z| ≥ 1) is UnstableRoots.
type Region struct {
	Polygon       [][2]float64
	UnstableRoots int
}

// RequirementRegion is the part of the plane where one requirement holds
// and the loop is stable.
type RequirementRegion struct {
	Key, Name string
	Regions   [][][2]float64
}

// PlanePartition is the D-partition of a rectangle of the plane.
type PlanePartition struct {
	X, Y           string
	XRange, YRange Range
	// Boundaries are the boundary curves of the D-partition, then those of
	// the requirements.
	Boundaries []Boundary
	// Regions cover the rectangle; each carries its number of unstable
	// closed-loop roots.
	Regions []Region
	// StableRegions are the polygons of Regions with no unstable root.
	StableRegions [][][2]float64
	// RequirementRegions has one entry per requirement of the settings.
	RequirementRegions []RequirementRegion
}

// Partition computes the D-partition (Neimark 1948) of the rectangle: the
// boundary curves on which a closed-loop root lies on the stability
// boundary, and the regions between them with their number of unstable
// roots.
//
// On the imaginary axis, a(jω) + x·b(jω) + y·c(jω) = 0 is a pair of real
// linear equations in (x, y) at each ω, solved exactly by Cramer's rule:
//
//	x = −Im(a·c̄)/Im(b·c̄),  y = −Im(a·b̄)/Im(c·b̄);
//
// the crossing curve is traced adaptively in ω until the middle of every
// chord lies within ChordTolerance of the curve. At a singular frequency
// (Im(b·c̄) = 0, a real polynomial in ω) the equations are dependent; where
// they are consistent the whole line x·Re b + y·Re c = −Re a is a boundary
// (the singular line), else the curve goes to infinity there. The
// real-root boundary a(0) + x·b(0) + y·c(0) = 0 (discrete: z = 1 and z = −1)
// and the degree-drop boundary (the leading coefficient vanishes) are
// straight lines. Discrete loops use z = e^(jωT), 0 < ω < π/T.
//
// The regions are computed exactly on Scanlines lines y = const: on each,
// the values of x where a root meets the boundary are the solutions of the
// one-variable crossing equation (see Solve), and the number of unstable
// roots of each piece is counted from the roots of the characteristic
// polynomial at its middle. Pieces of neighbouring lines with the same count
// that overlap are joined into polygons whose vertices at the lines are
// exact boundary points (between lines the polygon edges are chords). With
// requirements, each line is solved with Solve in x and the sets where the
// requirement holds are joined the same way.
func Partition(pl Plane, set *PlaneSettings) (PlanePartition, error) {
	if set == nil {
		return PlanePartition{}, fmt.Errorf("%w: Partition needs PlaneSettings with XRange and YRange", ErrInvalidInput)
	}
	s := *set
	for _, r := range []struct {
		name string
		r    Range
	}{{pl.x, s.XRange}, {pl.y, s.YRange}} {
		if !(r.r.Min < r.r.Max) || math.IsInf(r.r.Min, 0) || math.IsInf(r.r.Max, 0) {
			return PlanePartition{}, fmt.Errorf("%w: the range [%v, %v] of %s must be finite and non-empty", ErrInvalidInput, r.r.Min, r.r.Max, r.name)
		}
	}
	if s.ChordTolerance == 0 {
		s.ChordTolerance = 0.002
	}
	if s.Scanlines == 0 {
		s.Scanlines = 121
	}
	if s.RequirementScanlines == 0 {
		s.RequirementScanlines = 81
	}
	if s.PadeOrder == 0 {
		s.PadeOrder = 6
	}
	if !(s.ChordTolerance > 0 && s.ChordTolerance <= 0.1) || s.Scanlines < 3 || s.Scanlines > 10000 ||
		s.RequirementScanlines < 3 || s.RequirementScanlines > 10000 || s.PadeOrder < 1 || s.PadeOrder > 20 {
		return PlanePartition{}, fmt.Errorf("%w: PlaneSettings out of range (chord tolerance %v, scanlines %d, %d, Padé order %d)", ErrInvalidInput, s.ChordTolerance, s.Scanlines, s.RequirementScanlines, s.PadeOrder)
	}
	if s.Context == nil {
		s.Context = context.Background()
	}
	a, b, c, err := pl.Characteristic(s.PadeOrder)
	if err != nil {
		return PlanePartition{}, err
	}
	out := PlanePartition{X: pl.x, Y: pl.y, XRange: s.XRange, YRange: s.YRange}
	rect := rectangle{s.XRange, s.YRange}
	disc := pl.ts > 0

	// The crossing curve and the lines.
	kind := "imaginary-axis crossing"
	if disc {
		kind = "unit-circle crossing"
	}
	ev := func(q poly.Poly) func(float64) complex128 {
		return func(w float64) complex128 { return q.EvalComplex(boundaryPoint(w, pl.ts)) }
	}
	out.Boundaries = append(out.Boundaries, traceCurve(kind, ev(a), ev(b), ev(c), pl.ts, freqScale(a, b, c, pl.ts), rect, s.ChordTolerance)...)
	out.Boundaries = append(out.Boundaries, singularLines(a, b, c, pl.ts, rect)...)
	lines := []struct {
		kind string
		z    complex128
	}{{"real root at s = 0", 0}}
	if disc {
		lines = []struct {
			kind string
			z    complex128
		}{{"real root at z = 1", 1}, {"real root at z = −1", -1}}
	}
	for _, l := range lines {
		if bd, ok := lineBoundary(l.kind, real(a.EvalComplex(l.z)), real(b.EvalComplex(l.z)), real(c.EvalComplex(l.z)), rect); ok {
			out.Boundaries = append(out.Boundaries, bd)
		}
	}
	n := max(a.Degree(), b.Degree(), c.Degree())
	if bd, ok := lineBoundary("degree drop", a.Coef(n), b.Coef(n), c.Coef(n), rect); ok && (b.Degree() == n || c.Degree() == n) {
		out.Boundaries = append(out.Boundaries, bd)
	}

	// Regions from exact scanlines.
	ys := linspace(s.YRange.Min, s.YRange.Max, s.Scanlines)
	rows := make([][]span, len(ys))
	for j, y := range ys {
		if err := s.Context.Err(); err != nil {
			return out, err
		}
		rows[j] = stabilitySpans(a.Add(c.Scale(y)), b, pl.ts, s.XRange)
	}
	for _, poly := range joinSpans(ys, rows) {
		out.Regions = append(out.Regions, Region{Polygon: poly.points, UnstableRoots: poly.count})
		if poly.count == 0 {
			out.StableRegions = append(out.StableRegions, poly.points)
		}
	}

	// Requirements.
	if len(s.Requirements) > 0 {
		if err := requirementRegions(pl, &s, a, b, c, rect, &out); err != nil {
			return out, err
		}
	}
	return out, nil
}

// rectangle is the plotted part of the plane.
type rectangle struct{ x, y Range }

func (r rectangle) contains(p [2]float64, slack float64) bool {
	dx, dy := slack*(r.x.Max-r.x.Min), slack*(r.y.Max-r.y.Min)
	return p[0] >= r.x.Min-dx && p[0] <= r.x.Max+dx && p[1] >= r.y.Min-dy && p[1] <= r.y.Max+dy
}

func (r rectangle) diag() float64 { return math.Hypot(r.x.Max-r.x.Min, r.y.Max-r.y.Min) }

func boundaryPoint(w, ts float64) complex128 {
	if ts > 0 {
		return cmplx.Exp(complex(0, w*ts))
	}
	return complex(0, w)
}

// freqScale returns the range of frequencies to trace: (0, π/T) in discrete
// time, and in continuous time six decades below and three above the
// largest root modulus bound (Cauchy) of a, b, c.
func freqScale(a, b, c poly.Poly, ts float64) [2]float64 {
	if ts > 0 {
		return [2]float64{1e-9 * math.Pi / ts, math.Pi / ts * (1 - 1e-9)}
	}
	r := 1.0
	for _, q := range []poly.Poly{a, b, c} {
		if q.Degree() < 1 {
			continue
		}
		lead := math.Abs(q.Lead())
		for i := 0; i < q.Degree(); i++ {
			r = math.Max(r, 1+math.Abs(q.Coef(i))/lead)
		}
	}
	return [2]float64{1e-6 * r, 1e3 * r}
}

// solveXY solves A + x·B + y·C = 0 for real (x, y) by Cramer's rule.
func solveXY(av, bv, cv complex128) (x, y float64, ok bool) {
	det := imag(bv * cmplx.Conj(cv))
	if det == 0 {
		return 0, 0, false
	}
	x = -imag(av*cmplx.Conj(cv)) / det
	y = imag(av*cmplx.Conj(bv)) / det
	return x, y, !math.IsNaN(x) && !math.IsNaN(y) && !math.IsInf(x, 0) && !math.IsInf(y, 0)
}

// traceCurve traces the curve ω ↦ (x(ω), y(ω)) solving A + xB + yC = 0,
// adaptively: starting from 400 frequencies (log-spaced in continuous time,
// linear in discrete time), every interval whose chord's middle is farther
// than tol·diagonal from the curve's point at the middle frequency, or whose
// chord is longer than 5·tol·diagonal, is halved, to a depth of 30. The
// curve is cut where it leaves the rectangle (by 2 %) or goes to infinity
// (a singular frequency).
func traceCurve(kind string, A, B, C func(float64) complex128, ts float64, wr [2]float64, rect rectangle, tol float64) []Boundary {
	type pt struct {
		w  float64
		p  [2]float64
		ok bool
	}
	at := func(w float64) pt {
		x, y, ok := solveXY(A(w), B(w), C(w))
		return pt{w, [2]float64{x, y}, ok}
	}
	const n0 = 400
	var ws []float64
	for i := range n0 {
		t := float64(i) / (n0 - 1)
		if ts > 0 {
			ws = append(ws, wr[0]+(wr[1]-wr[0])*t)
		} else {
			ws = append(ws, wr[0]*math.Pow(wr[1]/wr[0], t))
		}
	}
	d := rect.diag()
	mid := func(a, b float64) float64 {
		if ts > 0 {
			return (a + b) / 2
		}
		return math.Sqrt(a * b)
	}
	var pts []pt
	var refine func(p, q pt, depth int)
	refine = func(p, q pt, depth int) {
		if depth < 30 && p.ok && q.ok && (rect.contains(p.p, 0.02) || rect.contains(q.p, 0.02)) {
			m := at(mid(p.w, q.w))
			chord := math.Hypot(q.p[0]-p.p[0], q.p[1]-p.p[1])
			dev := math.Hypot(m.p[0]-(p.p[0]+q.p[0])/2, m.p[1]-(p.p[1]+q.p[1])/2)
			if !m.ok || dev > tol*d || chord > 5*tol*d {
				refine(p, m, depth+1)
				refine(m, q, depth+1)
				return
			}
		} else if depth < 12 && p.ok && q.ok {
			// Both ends outside: look for a visit of the rectangle between.
			m := at(mid(p.w, q.w))
			if m.ok && rect.contains(m.p, 0.02) {
				refine(p, m, depth+1)
				refine(m, q, depth+1)
				return
			}
		}
		pts = append(pts, q)
	}
	first := at(ws[0])
	pts = append(pts, first)
	for i := 1; i < len(ws); i++ {
		refine(at(ws[i-1]), at(ws[i]), 0)
	}
	// Cut into polylines inside the rectangle.
	var out []Boundary
	var cur Boundary
	flush := func() {
		if len(cur.Points) >= 2 {
			out = append(out, cur)
		}
		cur = Boundary{Kind: kind}
	}
	cur.Kind = kind
	for i, q := range pts {
		in := q.ok && rect.contains(q.p, 0.02)
		if in && i > 0 && len(cur.Points) > 0 {
			prev := cur.Points[len(cur.Points)-1]
			if math.Hypot(q.p[0]-prev[0], q.p[1]-prev[1]) > 0.25*d {
				flush() // a jump through infinity
			}
		}
		if !in {
			flush()
			continue
		}
		cur.Points = append(cur.Points, q.p)
		cur.FrequencyRadPerSec = append(cur.FrequencyRadPerSec, q.w)
	}
	flush()
	return out
}

// lineBoundary returns the line α + x·β + y·γ = 0 clipped to the
// rectangle, if it crosses it.
func lineBoundary(kind string, alpha, beta, gamma float64, rect rectangle) (Boundary, bool) {
	if beta == 0 && gamma == 0 {
		return Boundary{}, false
	}
	var ps [][2]float64
	add := func(p [2]float64) {
		if rect.contains(p, 1e-12) {
			for _, q := range ps {
				if math.Abs(q[0]-p[0]) <= 1e-12*math.Max(1, math.Abs(p[0])) && math.Abs(q[1]-p[1]) <= 1e-12*math.Max(1, math.Abs(p[1])) {
					return
				}
			}
			ps = append(ps, p)
		}
	}
	if gamma != 0 {
		for _, x := range []float64{rect.x.Min, rect.x.Max} {
			add([2]float64{x, -(alpha + beta*x) / gamma})
		}
	}
	if beta != 0 {
		for _, y := range []float64{rect.y.Min, rect.y.Max} {
			add([2]float64{-(alpha + gamma*y) / beta, y})
		}
	}
	if len(ps) < 2 {
		return Boundary{}, false
	}
	return Boundary{Kind: kind, Points: ps[:2], FrequencyRadPerSec: []float64{math.NaN(), math.NaN()}}, true
}

// singularLines returns the lines of the singular frequencies at which the
// two equations are dependent and consistent.
func singularLines(a, b, c poly.Poly, ts float64, rect rectangle) []Boundary {
	var bb, cc cpoly
	if ts > 0 {
		n := max(a.Degree(), b.Degree(), c.Degree())
		bb, cc = onAxis(b.CircleToAxis(n)), onAxis(c.CircleToAxis(n))
	} else {
		bb, cc = onAxis(b), onAxis(c)
	}
	var out []Boundary
	for _, nu := range positiveRoots(imConj(bb, cc)) {
		w := nu
		if ts > 0 {
			w = 2 * math.Atan(nu) / ts
		}
		z := boundaryPoint(w, ts)
		av, bv, cv := a.EvalComplex(z), b.EvalComplex(z), c.EvalComplex(z)
		// Dependent rows: use the row with the larger coefficients; the
		// other must agree (consistency).
		if math.Hypot(real(bv), real(cv)) < math.Hypot(imag(bv), imag(cv)) {
			av, bv, cv = complex(imag(av), real(av)), complex(imag(bv), real(bv)), complex(imag(cv), real(cv))
		}
		alpha, beta, gamma := real(av), real(bv), real(cv)
		s := math.Hypot(beta, gamma)
		if s == 0 {
			continue
		}
		// Consistency: the other row is proportional, including α.
		k := (imag(bv)*beta + imag(cv)*gamma) / (s * s)
		if math.Abs(imag(av)-k*alpha) > 1e-8*(math.Abs(imag(av))+math.Abs(alpha)+1e-300) {
			continue
		}
		if bd, ok := lineBoundary(fmt.Sprintf("singular line at %s rad/s", fmtNum(w)), alpha, beta, gamma, rect); ok {
			out = append(out, bd)
		}
	}
	return out
}

func linspace(lo, hi float64, n int) []float64 {
	out := make([]float64, n)
	for i := range out {
		out[i] = lo + (hi-lo)*float64(i)/float64(n-1)
	}
	out[n-1] = hi
	return out
}

// span is a piece [lo, hi] of a scanline with a count (unstable roots, or
// 0/1 for a requirement).
type span struct {
	lo, hi float64
	count  int
}

// stabilitySpans cuts the line x ↦ a + x·b (y fixed) at the exact values of
// x where a root lies on the boundary, and counts the unstable roots of
// each piece.
func stabilitySpans(a, b poly.Poly, ts float64, xr Range) []span {
	v := Variable{name: "x", num0: poly.Poly{}, num1: b, den0: a, ts: ts}
	f := newFrame(v)
	xs := []float64{xr.Min, xr.Max}
	for _, pt := range solveTarget(expr{{1, f.d0}}, expr{{1, f.n1}}) {
		xs = append(xs, pt.v)
	}
	ends := []complex128{0}
	if ts > 0 {
		ends = []complex128{1, -1}
	}
	for _, z := range ends {
		if bz := real(b.EvalComplex(z)); bz != 0 {
			xs = append(xs, -real(a.EvalComplex(z))/bz)
		}
	}
	n := max(a.Degree(), b.Degree())
	if b.Coef(n) != 0 {
		xs = append(xs, -a.Coef(n)/b.Coef(n))
	}
	var in []float64
	for _, x := range xs {
		if x >= xr.Min && x <= xr.Max && !math.IsNaN(x) {
			in = append(in, x)
		}
	}
	slices.Sort(in)
	in = slices.CompactFunc(in, sameValue)
	var out []span
	for i := 0; i+1 < len(in); i++ {
		m := in[i] + (in[i+1]-in[i])/2
		cnt := unstableRoots(a.Add(b.Scale(m)), ts)
		if k := len(out); k > 0 && out[k-1].count == cnt {
			out[k-1].hi = in[i+1]
			continue
		}
		out = append(out, span{in[i], in[i+1], cnt})
	}
	return out
}

// unstableRoots counts the roots with Re s ≥ 0 (|z| ≥ 1); a polynomial whose
// degree dropped has a root at infinity, which counts as unstable in
// discrete time (z = ∞) and, in continuous time, is simply absent.
func unstableRoots(q poly.Poly, ts float64) int {
	rs, err := q.Roots()
	if err != nil {
		return -1
	}
	n := 0
	for _, r := range rs {
		if ts > 0 && cmplx.Abs(r) >= 1 || ts == 0 && real(r) >= 0 {
			n++
		}
	}
	return n
}

// polygon is a joined chain of spans.
type polygon struct {
	points [][2]float64
	count  int
}

// joinSpans joins spans of neighbouring scanlines with the same count that
// overlap into chains (one span per line) and returns each chain as a
// closed polygon: left ends upwards, right ends downwards.
func joinSpans(ys []float64, rows [][]span) []polygon {
	type chain struct {
		count int
		y     []float64
		spans []span
	}
	var chains []*chain
	active := map[int]*chain{} // index of span in previous row → chain
	for j, row := range rows {
		next := map[int]*chain{}
		// How many spans of this row overlap each previous span, and vice
		// versa: a chain continues only through a one-to-one overlap.
		prev := []span(nil)
		if j > 0 {
			prev = rows[j-1]
		}
		for i, sp := range row {
			var match []int
			for k, ps := range prev {
				if ps.count == sp.count && ps.lo < sp.hi && sp.lo < ps.hi {
					match = append(match, k)
				}
			}
			var c *chain
			if len(match) == 1 {
				k := match[0]
				cnt := 0
				for _, s2 := range row {
					if s2.count == prev[k].count && s2.lo < prev[k].hi && prev[k].lo < s2.hi {
						cnt++
					}
				}
				if cnt == 1 {
					c = active[k]
				}
			}
			if c == nil {
				c = &chain{count: sp.count}
				chains = append(chains, c)
				// Start from the previous line's overlapping span so that
				// neighbouring chains share their edge.
				if len(match) >= 1 {
					ps := prev[match[0]]
					c.y = append(c.y, ys[j-1])
					c.spans = append(c.spans, span{math.Max(ps.lo, sp.lo), math.Min(ps.hi, sp.hi), sp.count})
				}
			}
			c.y = append(c.y, ys[j])
			c.spans = append(c.spans, sp)
			next[i] = c
		}
		active = next
	}
	var out []polygon
	for _, c := range chains {
		var pts [][2]float64
		for i := range c.spans {
			pts = append(pts, [2]float64{c.spans[i].lo, c.y[i]})
		}
		for i := len(c.spans) - 1; i >= 0; i-- {
			pts = append(pts, [2]float64{c.spans[i].hi, c.y[i]})
		}
		pts = append(pts, pts[0])
		out = append(out, polygon{pts, c.count})
	}
	return out
}
