package locus

// Tracing by predictor–corrector continuation.
//
// Between two consecutive special values of k (range ends, k = 0, break
// points, the value where the degree of a + k·b drops) every root of
// a + k·b is simple, so each root is an analytic function of k there and
// can be followed by continuation (Allgower & Georg, Introduction to
// Numerical Continuation Methods, SIAM 2003, ch. 2). Each root is first
// followed on its own (branch.go: cubic Hermite predictor along
// ds/dk = −b/(a′ + k·b′), Newton's method on a(s) + k·b(s) = 0 at the new
// k, a step of its own), and the piece is checked as a whole afterwards.
// When that is inconclusive the piece is traced in lockstep (engine.go
// cont): an Euler–Hermite predictor for all roots with one common step,
// accepted only if (i) Newton converges, (ii) the correction is small
// against the distance to every other root, so the iterate cannot have
// been captured by a neighbouring branch, (iii) the chord and the turn of
// every branch stay within the tolerances; otherwise the step is halved.
//
// The singular ends are handled by the parameterisation, not by small
// steps:
//
//   - At a special value k₀ where roots coincide (a break point of ν
//     branches, or a multiple open-loop pole at k = 0) the branches behave
//     like (k − k₀)^(1/ν) (Puiseux). Writing k = k₀ + Δ·τ^μ with μ the least
//     common multiple of the multiplicities makes every branch analytic in
//     τ. The first step leaves the cluster along the ν directions of the
//     local expansion (ν!/P^(ν))·δ^ν = −Δk·b(s₀). Each piece between two
//     special values is traced from both ends towards its middle, so a trace
//     always leaves a singular point and never has to enter one; the two
//     halves are matched at the middle value, where all roots are simple.
//   - Towards k = ±∞ and towards the value where the degree drops, branches
//     go to open-loop zeros (or to the finite roots there) like a power of
//     1/k, or to infinity. There k = k₀·e^u (or k = k_d + (k₀ − k_d)·e^(−u))
//     turns both into smooth exponential behaviour in u; a branch stops when
//     it reaches its limit point (which is then appended exactly) or leaves
//     the disc of radius ExtentRadius.
//
// Roots at special values are the eigenvalues of the companion matrix of
// a + k·b at that exact value (one solve per special value), snapped to
// the exactly known points: break points and open-loop poles. Crossings
// are waypoints inside the pieces: the step is shortened to land on their
// value and the root is set to the crossing point exactly.

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"slices"

	"github.com/loopwise/loopwise/tf"
)

// Point is one traced point of a branch: the value of the locus variable
// and the closed-loop pole. The last point of a branch that ends at an
// open-loop zero as k → ±∞ has Value = ±Inf and S the zero exactly (the
// first point, for a range that starts at −∞).
type Point struct {
	Value float64
	S     complex128
}

// Branch is a traced branch, its points ordered by increasing value. Index
// identifies the closed-loop root (0 ≤ Index < Analysis.Branches); a branch
// that passes through infinity at a finite value (where the degree of
// a + k·b drops) is split there into two Branch entries with the same Index.
type Branch struct {
	Index  int
	Points []Point
}

// Rect is a rectangle of the complex plane.
type Rect struct{ ReMin, ReMax, ImMin, ImMax float64 }

// TraceStats counts the work of a trace.
type TraceStats struct {
	// Steps and RejectedSteps count accepted and rejected continuation
	// steps (a step moves one root in the per-branch continuation, every
	// active root in the lockstep one; an exact conjugate is mirrored and
	// not counted).
	Steps, RejectedSteps int
	// NewtonIterations counts single-root Newton iterations.
	NewtonIterations int
	// RootSolves counts full polynomial root computations (at special
	// values only).
	RootSolves int
	// Retraced counts the pieces traced again in lockstep because the
	// per-branch continuation was inconclusive there.
	Retraced int
	// Points is the total number of points in Branches.
	Points int
}

// Locus is a traced root locus with its construction quantities.
type Locus struct {
	// Analysis holds the construction quantities.
	Analysis Analysis
	// Branches are the traced branches (see Branch for the split at
	// infinity).
	Branches []Branch
	// View is a suggested plot rectangle: it covers the open-loop poles
	// and zeros, break points, crossings and the asymptote centroid (and
	// the unit circle in discrete time), with a 20 % margin.
	View Rect
	// ExtentRadius is the radius around the centre of View beyond which
	// branches to infinity were not traced.
	ExtentRadius float64
	// Stats counts the work done.
	Stats TraceStats
}

// Trace returns the branches of the root locus of a + k·b = 0 for the loop
// b/a, k in set.Range, traced by predictor–corrector continuation from the
// start of the range to its end (see the file comment of trace.go and the
// package documentation). Every traced point satisfies
// |a(s) + k·b(s)| ≤ 1e-9·(Σ|a_i||s|^i + |k|·Σ|b_i||s|^i), with a and b
// after division by the roots they share (those stay fixed and are
// returned as constant branches). Break points,
// crossings and range ends are points of the branches, exactly. It honours
// set.Context and reports progress through set.Progress. On cancellation,
// ErrTraceFailed or ErrTooManyPoints it returns the partial locus with the
// error.
func Trace(loop tf.TF, set *Settings) (Locus, error) {
	r, err := resolve(set)
	if err != nil {
		return Locus{}, err
	}
	p, err := newProblem(loop, r)
	if err != nil {
		return Locus{}, err
	}
	an, err := p.analyze()
	if err != nil {
		return Locus{}, err
	}
	t := newTracer(p.moving(), an, r)
	loc, err := t.run()
	loc.Analysis = an
	loc.Analysis.Notes = append(slices.Clone(an.Notes), t.notes...)
	// Roots shared by a and b stay put for every value.
	idx := t.p.order
	for _, c := range p.common {
		for range c.Multiplicity {
			loc.Branches = append(loc.Branches, Branch{Index: idx, Points: []Point{{Value: p.rng.Min, S: c.Value}, {Value: p.rng.Max, S: c.Value}}})
			idx++
		}
	}
	return loc, err
}

// nodeKind classifies the special values along the range.
type nodeKind int

const (
	regularNode nodeKind = iota // all roots finite
	dropNode                    // some roots at infinity (degree drop)
	infNode                     // k = ±∞
)

type node struct {
	k     float64
	kind  nodeKind
	slots []complex128 // one per branch; cmplx.Inf() for a root at infinity
	clus  []int        // cluster id per slot (−1: simple)
	mult  []int        // multiplicity of the slot's cluster
}

type tracer struct {
	p        *problem
	an       Analysis
	r        resolved
	view     Rect
	centre   complex128
	scale    float64
	extent   float64
	chordAbs float64
	stats    TraceStats
	kTyp     float64
	notes    []string
	coef     []float64 // scratch coefficients of a + k·b
	coefEach []float64 // the same for the per-branch continuation
	arena    []Point   // points of the per-branch continuation (see follow)
	waysAll  []Crossing
	traced   int
}

func newTracer(p *problem, an Analysis, r resolved) *tracer {
	t := &tracer{p: p, an: an, r: r, arena: make([]Point, 0, 64*p.order)}
	var pts []complex128
	for _, x := range an.Poles {
		pts = append(pts, x.Value)
	}
	for _, x := range an.Zeros {
		pts = append(pts, x.Value)
	}
	for _, x := range an.BreakPoints {
		pts = append(pts, x.Point)
	}
	for _, x := range an.AxisCrossings {
		pts = append(pts, x.Point, cmplx.Conj(x.Point))
	}
	if an.HasAsymptotes {
		pts = append(pts, complex(an.CentroidReal, 0))
	}
	if p.discrete {
		pts = append(pts, 1, -1, 1i, -1i)
	}
	if len(pts) == 0 {
		pts = append(pts, 0)
	}
	v := Rect{math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)}
	big := 0.0
	for _, x := range pts {
		v.ReMin, v.ReMax = math.Min(v.ReMin, real(x)), math.Max(v.ReMax, real(x))
		v.ImMin, v.ImMax = math.Min(v.ImMin, imag(x)), math.Max(v.ImMax, imag(x))
		big = math.Max(big, cabs(x))
	}
	w := math.Max(v.ReMax-v.ReMin, v.ImMax-v.ImMin)
	if w <= 1e-9*big {
		w = math.Max(2*big, 2)
	}
	pad := 0.2 * w
	// Give both axes at least half the larger span, so that the view is
	// not degenerate when every point is real.
	cr, ci := (v.ReMin+v.ReMax)/2, (v.ImMin+v.ImMax)/2
	hr := math.Max((v.ReMax-v.ReMin)/2, w/4) + pad
	hi := math.Max((v.ImMax-v.ImMin)/2, w/4) + pad
	t.view = Rect{cr - hr, cr + hr, ci - hi, ci + hi}
	t.centre = complex(cr, ci)
	t.scale = math.Hypot(hr, hi)
	t.extent = r.extent
	if t.extent == 0 {
		t.extent = 2 * t.scale
	}
	t.chordAbs = r.chordTol * t.scale
	// A typical magnitude of k: |a/b| at a generic point of the view.
	g := t.centre + complex(0.31*hr, 0.53*hi)
	t.kTyp = cabs(p.a.EvalComplex(g)) / cabs(p.b.EvalComplex(g))
	if !(t.kTyp > 0) || math.IsInf(t.kTyp, 0) {
		t.kTyp = 1
	}
	return t
}

// run traces every piece and assembles the branches.
func (t *tracer) run() (Locus, error) {
	loc := Locus{View: t.view, ExtentRadius: t.extent}
	if t.p.order == 0 {
		return loc, nil
	}
	nodes, err := t.nodes()
	if err != nil {
		return loc, err
	}
	links := make([]link, 0, len(nodes)-1)
	for i := 0; i+1 < len(nodes); i++ {
		if err := t.r.ctx.Err(); err != nil {
			return t.finish(loc, nodes, links), fmt.Errorf("locus: trace cancelled: %w", err)
		}
		l, err := t.traceLink(nodes[i], nodes[i+1])
		if err != nil {
			return t.finish(loc, nodes, links), err
		}
		links = append(links, l)
		if t.r.progress != nil {
			t.r.progress(float64(i+1) / float64(len(nodes)-1))
		}
	}
	return t.finish(loc, nodes, links), nil
}

// nodes returns the special values along the range with their root sets,
// with regular buffer values inserted next to infinite and degree-drop
// ends so that every piece is either regular–regular or regular–end.
func (t *tracer) nodes() ([]node, error) {
	p := t.p
	rng := p.rng
	kd, hasDrop := p.degreeDrop()
	var ks []float64
	in := func(k float64) bool { return rng.Min < k && k < rng.Max }
	for _, b := range t.an.BreakPoints {
		if in(b.Value) {
			ks = append(ks, b.Value)
		}
	}
	// Crossings are waypoints inside the pieces (simple roots, no root
	// solve needed), not nodes.
	t.waysAll = t.an.AxisCrossings
	if hasDrop && in(kd) {
		ks = append(ks, kd)
	}
	if in(0) {
		// k = 0 inside the range: the branches pass through the poles,
		// which may be multiple.
		ks = append(ks, 0)
	}
	for _, e := range []float64{rng.Min, rng.Max} {
		if !math.IsInf(e, 0) {
			ks = append(ks, e)
		}
	}
	slices.Sort(ks)
	ks = slices.CompactFunc(ks, sameValue)
	var raw []node
	if math.IsInf(rng.Min, -1) {
		raw = append(raw, node{k: math.Inf(-1), kind: infNode})
	}
	for _, k := range ks {
		kind := regularNode
		if hasDrop && sameValue(k, kd) {
			kind = dropNode
			k = kd
		}
		raw = append(raw, node{k: k, kind: kind})
	}
	if math.IsInf(rng.Max, 1) {
		raw = append(raw, node{k: math.Inf(1), kind: infNode})
	}
	// Insert regular buffers between an end-type node and its neighbour.
	var out []node
	for i, nd := range raw {
		if i > 0 && (raw[i-1].kind != regularNode || nd.kind != regularNode) {
			out = append(out, node{k: t.buffer(raw[i-1].k, nd.k), kind: regularNode})
		}
		out = append(out, nd)
	}
	// A trace towards ±∞ starts from a value of that sign.
	var fixed []node
	for i, nd := range out {
		if i > 0 && nd.kind == infNode && nd.k > 0 && out[i-1].k <= 0 {
			fixed = append(fixed, node{k: t.kTyp, kind: regularNode})
		}
		fixed = append(fixed, nd)
		if i+1 < len(out) && nd.kind == infNode && nd.k < 0 && out[i+1].k >= 0 {
			fixed = append(fixed, node{k: -t.kTyp, kind: regularNode})
		}
	}
	out = fixed
	for i := range out {
		if err := t.fillNode(&out[i]); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// sameValue reports whether two special values are equal within the
// accuracy with which they are known (2e-10 relative: a break value is
// −a(s₀)/b(s₀) evaluated in the monomial basis, whose rounding error can
// reach that size for clustered roots). Values this close become one node
// of the trace, with all their exact points; the residual of those points
// at the common value stays within the documented 1e-9.
func sameValue(x, y float64) bool {
	return math.Abs(x-y) <= 2e-10*math.Max(math.Abs(x), math.Abs(y))
}

// buffer returns a regular value strictly between lo and hi.
func (t *tracer) buffer(lo, hi float64) float64 {
	switch {
	case math.IsInf(lo, -1) && math.IsInf(hi, 1):
		return 0
	case math.IsInf(hi, 1):
		if lo <= 0 {
			return t.kTyp
		}
		return lo + math.Max(lo, t.kTyp)
	case math.IsInf(lo, -1):
		if hi >= 0 {
			return -t.kTyp
		}
		return hi - math.Max(-hi, t.kTyp)
	}
	return lo + (hi-lo)/2
}

// fillNode computes the root set of a node.
func (t *tracer) fillNode(nd *node) error {
	p := t.p
	N := p.order
	switch nd.kind {
	case infNode:
		for _, z := range p.zeros {
			for range z.Multiplicity {
				nd.slots = append(nd.slots, z.Value)
			}
		}
	default:
		if nd.k == 0 {
			for _, z := range p.poles {
				for range z.Multiplicity {
					nd.slots = append(nd.slots, z.Value)
				}
			}
		} else {
			c := p.charPoly(nd.k)
			if c.IsZero() {
				return fmt.Errorf("%w: at %s = %v", ErrDegenerate, p.variable, nd.k)
			}
			rs, err := fastRoots(c)
			t.stats.RootSolves++
			if err != nil {
				return fmt.Errorf("locus: roots at %s = %v: %w", p.variable, nd.k, err)
			}
			nd.slots = append(nd.slots, rs...)
		}
	}
	finite := len(nd.slots)
	for len(nd.slots) < N {
		nd.slots = append(nd.slots, cmplx.Inf())
	}
	if len(nd.slots) != N {
		return fmt.Errorf("%w: %d roots at %s = %v, expected %d", ErrTraceFailed, len(nd.slots), p.variable, nd.k, N)
	}
	if nd.kind == regularNode && finite < N {
		return fmt.Errorf("%w: roots at infinity at the regular value %v", ErrTraceFailed, nd.k)
	}
	// Snap to exactly known points.
	near := func(k float64) bool {
		return nd.kind == regularNode && sameValue(k, nd.k)
	}
	used := make([]bool, N)
	for _, c := range t.an.AxisCrossings {
		if !near(c.Value) {
			continue
		}
		for _, x := range []complex128{c.Point, cmplx.Conj(c.Point)} {
			if j := nearestSlot(nd.slots, used, x); j >= 0 {
				nd.slots[j] = x
				used[j] = true
			}
			if imag(x) == 0 {
				break
			}
		}
	}
	// Clusters: from the multiplicities found, then snapped to break points.
	nd.clus = make([]int, N)
	nd.mult = make([]int, N)
	for i := range nd.clus {
		nd.clus[i] = -1
		nd.mult[i] = 1
	}
	next := 0
	for i := 0; i < N; i++ {
		if nd.clus[i] >= 0 || cmplx.IsInf(nd.slots[i]) {
			continue
		}
		var mem []int
		for j := i; j < N; j++ {
			if nd.slots[j] == nd.slots[i] {
				mem = append(mem, j)
			}
		}
		if len(mem) > 1 {
			for _, j := range mem {
				nd.clus[j], nd.mult[j] = next, len(mem)
			}
			next++
		}
	}
	for _, b := range t.an.BreakPoints {
		if !near(b.Value) || nd.kind != regularNode {
			continue
		}
		taken := make([]bool, N)
		var mem []int
		for range b.Branches {
			if j := nearestSlot(nd.slots, taken, b.Point); j >= 0 {
				taken[j] = true
				mem = append(mem, j)
			}
		}
		for _, j := range mem {
			nd.slots[j] = b.Point
			nd.clus[j], nd.mult[j] = next, len(mem)
		}
		next++
	}
	return nil
}

func nearestSlot(slots []complex128, used []bool, x complex128) int {
	best, bd := -1, math.Inf(1)
	for j, s := range slots {
		if used[j] || cmplx.IsInf(s) {
			continue
		}
		if d := cabs(s - x); d < bd {
			best, bd = j, d
		}
	}
	return best
}

// link is the trace between two consecutive nodes: for every slot of the
// left node, the slot it reaches at the right node and the points between
// (from the left node's point to the right node's point, both included when
// finite).
type link struct {
	to    []int
	paths [][]Point
}

func (t *tracer) traceLink(left, right node) (link, error) {
	N := t.p.order
	switch {
	case left.kind == regularNode && right.kind == regularNode:
		mid := left.k + (right.k-left.k)/2
		saved := t.traced
		lp, lend, err := t.traceHalfEach(left, mid)
		var rp [][]Point
		var rend []complex128
		if err == nil {
			rp, rend, err = t.traceHalfEach(right, mid)
		}
		if err == nil {
			if perm, ok := t.matchFast(lend, rend); ok {
				return t.joinHalves(lp, rp, perm), nil
			}
			err = errFast
		}
		if !errors.Is(err, errFast) {
			return link{}, err
		}
		// Inconclusive: trace the piece again in lockstep.
		t.traced = saved
		t.stats.Retraced++
		lp, lend, err = t.traceHalf(left, mid)
		if err != nil {
			return link{}, err
		}
		rp, rend, err = t.traceHalf(right, mid)
		if err != nil {
			return link{}, err
		}
		perm, worst := matchSets(lend, rend)
		if worst > 1e-6*t.scale && !t.withinNoise(lend, rend, perm, mid) {
			return link{}, fmt.Errorf("%w: the traces from %s = %v and %v disagree by %.3g at %v", ErrTraceFailed, t.p.variable, left.k, right.k, worst, mid)
		}
		return t.joinHalves(lp, rp, perm), nil
	case left.kind == regularNode:
		paths, to, err := t.traceToEnd(left, right)
		return link{to: to, paths: paths}, err
	case right.kind == regularNode:
		paths, to, err := t.traceToEnd(right, left)
		if err != nil {
			return link{}, err
		}
		// Invert: the traced paths run from the right node towards the
		// left end; reverse them and index by the left slot.
		l := link{to: make([]int, N), paths: make([][]Point, N)}
		for i := range N {
			j := to[i] // left slot reached from right slot i
			if j < 0 {
				return link{}, fmt.Errorf("%w: a branch from %s = %v reached no end", ErrTraceFailed, t.p.variable, right.k)
			}
			l.to[j] = i
			path := paths[i]
			slices.Reverse(path)
			l.paths[j] = path
		}
		return l, nil
	}
	return link{}, fmt.Errorf("%w: two end values %v and %v are adjacent", ErrTraceFailed, left.k, right.k)
}

// joinHalves joins the half traces of a piece, lp from the left node and
// rp from the right one, paired by perm at the middle.
func (t *tracer) joinHalves(lp, rp [][]Point, perm []int) link {
	l := link{to: perm, paths: make([][]Point, len(lp))}
	for i := range lp {
		r := rp[perm[i]]
		path := make([]Point, len(lp[i]), len(lp[i])+len(r)-1)
		copy(path, lp[i])
		for j := len(r) - 2; j >= 0; j-- {
			path = append(path, r[j])
		}
		l.paths[i] = path
	}
	return l
}

// withinNoise reports whether every matched pair agrees within 1e-6 of the
// scale or within 1e3 times the rounding noise of its roots (rootNoise).
// pseudoRoot reports whether x is a root of a + k·b within the rounding
// error of the working-precision evaluation that the continuation uses:
// |a(x) + k·b(x)| ≤ 20n·u·(Σ|aᵢ||x|ⁱ + |k|·Σ|bᵢ||x|ⁱ) (Higham 2002,
// Accuracy and Stability of Numerical Algorithms, 2nd ed., §5.1: Horner's
// error bound is γ₂ₙ times that sum). Inside a tight cluster of roots of a
// high-order polynomial every point of such a region is a root as far as
// double precision can tell, and the first-order noise estimate rootNoise
// (which assumes a simple, isolated root) is far too small.
func (t *tracer) pseudoRoot(x complex128, k float64) bool {
	f, _ := t.p.eval(x, k)
	return cabs(f) <= 20*float64(t.p.order)*0x1p-53*t.p.magnitude(x, k)
}

func (t *tracer) withinNoise(a, b []complex128, perm []int, k float64) bool {
	for i, j := range perm {
		d := cabs(a[i] - b[j])
		if d > 1e-6*t.scale && d > 1e3*(t.rootNoise(a[i], k)+t.rootNoise(b[j], k)) && !(t.pseudoRoot(a[i], k) && t.pseudoRoot(b[j], k)) {
			return false
		}
	}
	return true
}

// matchSets pairs a with b (same length) greedily by increasing distance
// and returns perm (a[i] ↔ b[perm[i]]) and the largest distance paired.
func matchSets(a, b []complex128) ([]int, float64) {
	// Fast path: when every a[i] has a distinct nearest b[j], that is the
	// pairing (the sets agree to rounding at the middle of a piece).
	perm := make([]int, len(a))
	usedB := make([]bool, len(b))
	worst := 0.0
	unique := true
	for i, x := range a {
		best, bd := -1, math.Inf(1)
		for j, y := range b {
			if d := cabs(x - y); d < bd {
				best, bd = j, d
			}
		}
		if best < 0 || usedB[best] {
			unique = false
			break
		}
		usedB[best] = true
		perm[i] = best
		worst = math.Max(worst, bd)
	}
	if unique {
		return perm, worst
	}
	return matchSetsSorted(a, b)
}

// matchSetsSorted pairs a with b greedily by increasing distance.
func matchSetsSorted(a, b []complex128) ([]int, float64) {
	type pair struct {
		i, j int
		d    float64
	}
	var ps []pair
	for i, x := range a {
		for j, y := range b {
			ps = append(ps, pair{i, j, cabs(x - y)})
		}
	}
	slices.SortFunc(ps, func(x, y pair) int { return cmp.Compare(x.d, y.d) })
	perm := make([]int, len(a))
	for i := range perm {
		perm[i] = -1
	}
	usedB := make([]bool, len(b))
	worst := 0.0
	for _, q := range ps {
		if perm[q.i] >= 0 || usedB[q.j] {
			continue
		}
		perm[q.i] = q.j
		usedB[q.j] = true
		worst = math.Max(worst, q.d)
	}
	return perm, worst
}

// finish assembles the branches from the links traced so far.
func (t *tracer) finish(loc Locus, nodes []node, links []link) Locus {
	N := t.p.order
	for b := range N {
		cur := Branch{Index: b}
		slot := b
		emit := func(pts []Point) {
			// Consecutive pieces share their end point.
			if n := len(cur.Points); n > 0 && len(pts) > 0 && cur.Points[n-1] == pts[0] {
				pts = pts[1:]
			}
			cur.Points = append(cur.Points, pts...)
		}
		if n0 := nodes[0]; !cmplx.IsInf(n0.slots[slot]) && n0.kind != infNode {
			emit([]Point{{Value: n0.k, S: n0.slots[slot]}})
		}
		for li, l := range links {
			if slot < 0 {
				break
			}
			emit(l.paths[slot])
			next := l.to[slot]
			if next >= 0 && cmplx.IsInf(nodes[li+1].slots[next]) && li+1 < len(links) {
				// Through infinity: split the branch here.
				if len(cur.Points) > 0 {
					loc.Branches = append(loc.Branches, cur)
				}
				cur = Branch{Index: b}
			}
			slot = next
		}
		if len(cur.Points) > 0 {
			loc.Branches = append(loc.Branches, cur)
		}
	}
	for _, br := range loc.Branches {
		t.stats.Points += len(br.Points)
	}
	loc.Stats = t.stats
	return loc
}
