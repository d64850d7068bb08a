package locus

// The root locus of a loop with dead time, exact (issue 14, item 4). This
// file is new; nothing else in the package depends on it.
//
// The closed loop of k·N/D·e^(−sτ) has the characteristic function
// f(s) = D(s) + k·N(s)·e^(−sτ), with infinitely many roots for every k > 0:
// the n roots that start at the open-loop poles and chains that come in
// from Re s = −∞ as k grows (Bellman & Cooke 1963, ch. 12). No Padé
// approximation is used: the drawn points are roots of f itself, and the
// construction quantities come from f:
//
//   - on the real axis, k = −D(σ)e^(στ)/N(σ) has the sign of −D(σ)/N(σ),
//     so the real-axis segments are those of the rational part;
//   - a break point is a real σ where dk/dσ = 0, that is a real root of
//     D′N − DN′ + τ·DN (a polynomial), with k in the range;
//   - the departure angle at a simple complex open-loop pole p is
//     180° + arg N(p) − arg D′(p) − Im(p)·τ (in degrees), from
//     k·N(p)e^(−pτ)/(D′(p)(s − p)) = −1 near p; the arrival angle at a
//     simple complex zero z is 180° + arg D(z) − arg N′(z) + Im(z)·τ;
//   - axis crossings and stable intervals are those of DelayedStableGains.

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"github.com/loopwise/loopwise/internal/quasipoly"
	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// delayLocusSamples is the number of values of the locus variable at which
// the roots are first computed; the sampling is refined where a root moves
// more than delayLocusMove of the view's size between neighbours.
const (
	delayLocusSamples = 160
	delayLocusMove    = 0.02
	delayLocusDepth   = 7
)

// DelayedTrace returns the root locus of the loop k·N/D·e^(−sτ) (or of the
// Parametric.Loop of a parameter entering affinely) with the dead time
// exact, inside a view that frames the dominant region: the open-loop
// poles and zeros, the break points and the axis crossings, about 1.3
// times their extent. Branches are the exact closed-loop roots in the view
// (every one found: the argument principle counts them, see DelayedRoots)
// at values of the locus variable that are refined until no root moves
// more than 2 % of the view between neighbours, joined by straight lines.
// The chains of roots that enter from Re s = −∞ appear where they enter
// the view. The Analysis holds the exact construction quantities described
// at the top of this file; HasAsymptotes is false (with dead time the
// branches to infinity have no straight asymptotes).
//
// set.Range must lie in [0, +Inf); an unbounded Max is replaced by twice
// the largest crossing value (or 10 times the smallest positive gain of the
// rational part's locus when there is none). PadeOrder is ignored.
//
// Errors: as DelayedStableGains; ErrUnsupported for a negative range, a
// loop without dead time (use Trace) and a discrete loop; ErrTraceFailed
// when the roots at some value cannot be counted (a view too far left for
// a long dead time).
func DelayedTrace(loop tf.TF, set *Settings) (Locus, error) {
	r, err := resolve(set)
	if err != nil {
		return Locus{}, err
	}
	if loop.IsDiscrete() || loop.DelaySec() <= 0 {
		return Locus{}, fmt.Errorf("%w: DelayedTrace is for continuous loops with dead time; use Trace", ErrUnsupported)
	}
	if r.rng.Min < 0 {
		return Locus{}, fmt.Errorf("%w: DelayedTrace needs a range in [0, +Inf), not [%g, %g]", ErrUnsupported, r.rng.Min, r.rng.Max)
	}
	st, err := DelayedStableGains(loop, set)
	if err != nil {
		return Locus{}, err
	}
	an, err := delayedAnalysis(loop, r, st)
	if err != nil {
		return Locus{}, err
	}
	view := delayView(an)
	kLo, kHi := r.rng.Min, r.rng.Max
	if math.IsInf(kHi, 1) {
		kHi = 0
		for _, c := range st.Crossings {
			kHi = math.Max(kHi, 2*c.Value)
		}
		for _, b := range an.BreakPoints {
			kHi = math.Max(kHi, 2*b.Value)
		}
		if kHi == 0 {
			kHi = 10
		}
	}
	if kLo <= 0 {
		kLo = kHi * 1e-4
	}
	q := quasipoly.Q{D: loop.Den().Coeffs(), N: loop.Num().Coeffs(), Tau: loop.DelaySec()}
	tr := newDelayTracer(view, func(k float64) quasipoly.Q { q.K = k; return q }, func(a, b float64) float64 { return math.Sqrt(a * b) })
	return tr.trace(an, kLo, kHi, func(u float64) float64 { return kLo * math.Pow(kHi/kLo, u) }, r, loop.DelaySec())
}

// trace traces the locus over [lo, hi] at delayLocusSamples values
// at(u), u evenly spaced in [0, 1], the crossing values and the break
// values of an, and returns it with the view and a note.
func (t *delayTracer) trace(an Analysis, lo, hi float64, at func(u float64) float64, r resolved, tau float64) (Locus, error) {
	values := make([]float64, 0, delayLocusSamples+len(an.AxisCrossings)+len(an.BreakPoints))
	for i := range delayLocusSamples {
		values = append(values, at(float64(i)/float64(delayLocusSamples-1)))
	}
	for _, c := range an.AxisCrossings {
		values = append(values, c.Value)
	}
	for _, b := range an.BreakPoints {
		values = append(values, b.Value)
	}
	if err := t.run(values, lo, hi, r); err != nil {
		return Locus{}, err
	}
	out := Locus{Analysis: an, View: t.view, Branches: t.finish()}
	out.Analysis.Notes = append(out.Analysis.Notes, fmt.Sprintf("dead time of %s s kept exact: the branches are the closed-loop roots in the view at %d values of %s", fmtG(tau), t.samples, variableName(an.Variable)))
	return out, nil
}

func fmtG(x float64) string { return fmt.Sprintf("%.4g", x) }

func variableName(v string) string {
	if v == "" {
		return "the gain"
	}
	return v
}

// DelayedAnalyze returns the construction quantities of the root locus of
// the loop k·N/D·e^(−sτ) (or of the Parametric.Loop of an affine
// parameter) with the dead time exact, over set.Range: the open-loop poles
// and zeros of the rational part, the real-axis segments, the break points
// on the real axis (real roots of D′N − DN′ + τ·DN with k in the range),
// the departure and arrival angles at simple complex poles and zeros, upper
// half plane (with the
// angle −Im(s)·τ of e^(−sτ)), and the axis crossings and stable intervals
// of DelayedStableGains. HasAsymptotes is false: with dead time the
// branches to infinity have no straight asymptotes. See DelayedTrace for
// the branches.
//
// Errors: as DelayedStableGains; ErrUnsupported for a discrete loop or a
// loop without dead time (use Analyze).
func DelayedAnalyze(loop tf.TF, set *Settings) (Analysis, error) {
	r, err := resolve(set)
	if err != nil {
		return Analysis{}, err
	}
	if loop.IsDiscrete() || loop.DelaySec() <= 0 {
		return Analysis{}, fmt.Errorf("%w: DelayedAnalyze is for continuous loops with dead time; use Analyze", ErrUnsupported)
	}
	st, err := DelayedStableGains(loop, set)
	if err != nil {
		return Analysis{}, err
	}
	return delayedAnalysis(loop, r, st)
}

// delayedAnalysis computes the exact construction quantities.
func delayedAnalysis(loop tf.TF, r resolved, st DelayGainStability) (Analysis, error) {
	d, n := loop.Den(), loop.Num()
	tau := loop.DelaySec()
	an := Analysis{Variable: r.variable, Range: r.rng, StableIntervals: st.StableIntervals, AxisCrossings: []Crossing{}}
	var err error
	if an.Poles, err = d.RootsWithMultiplicity(); err != nil {
		return Analysis{}, fmt.Errorf("%w: open-loop poles: %v", ErrTraceFailed, err)
	}
	if n.Degree() > 0 {
		if an.Zeros, err = n.RootsWithMultiplicity(); err != nil {
			return Analysis{}, fmt.Errorf("%w: open-loop zeros: %v", ErrTraceFailed, err)
		}
	}
	an.Branches = d.Degree()
	for _, c := range st.Crossings {
		an.AxisCrossings = append(an.AxisCrossings, Crossing{FrequencyRadPerSec: c.FrequencyRadPerSec, Point: complex(0, c.FrequencyRadPerSec), Value: c.Value})
	}
	// Real-axis segments: where −D(σ)/N(σ) > 0, between the real poles
	// and zeros (and left of the leftmost).
	var marks []float64
	for _, p := range append(append([]poly.Root{}, an.Poles...), an.Zeros...) {
		if imag(p.Value) == 0 {
			marks = append(marks, real(p.Value))
		}
	}
	sort.Float64s(marks)
	kSign := func(x float64) bool { return -d.Eval(x)/n.Eval(x) > 0 }
	edges := append([]float64{math.Inf(-1)}, marks...)
	edges = append(edges, math.Inf(1))
	for i := 0; i+1 < len(edges); i++ {
		lo, hi := edges[i], edges[i+1]
		if lo == hi {
			continue
		}
		mid := 0.5 * (lo + hi)
		switch {
		case math.IsInf(lo, -1) && math.IsInf(hi, 1):
			mid = 0
		case math.IsInf(lo, -1):
			mid = hi - 1 - math.Abs(hi)
		case math.IsInf(hi, 1):
			mid = lo + 1 + math.Abs(lo)
		}
		if kSign(mid) {
			if m := len(an.RealAxisSegments); m > 0 && an.RealAxisSegments[m-1].Hi == lo {
				an.RealAxisSegments[m-1].Hi = hi
			} else {
				an.RealAxisSegments = append(an.RealAxisSegments, Interval{lo, hi})
			}
		}
	}
	// Break points: real roots of D′N − DN′ + τ·DN.
	bp := d.Derivative().Mul(n).Sub(d.Mul(n.Derivative())).Add(d.Mul(n).Scale(tau))
	if bp.Degree() > 0 {
		roots, err := bp.RootsWithMultiplicity()
		if err != nil {
			return Analysis{}, fmt.Errorf("%w: break points: %v", ErrTraceFailed, err)
		}
		for _, rt := range roots {
			if math.Abs(imag(rt.Value)) > 1e-9*math.Max(1, cmplx.Abs(rt.Value)) {
				continue
			}
			x := real(rt.Value)
			nx := n.Eval(x)
			if nx == 0 {
				continue
			}
			k := -d.Eval(x) * math.Exp(x*tau) / nx
			if k > 0 && r.rng.Contains(k) {
				an.BreakPoints = append(an.BreakPoints, BreakPoint{Point: complex(x, 0), Value: k, Branches: rt.Multiplicity + 1})
			}
		}
	}
	// Departure and arrival angles at simple poles and zeros (exact, with
	// the angle −Im(s)·τ of e^(−sτ)).
	dd, nd := d.Derivative(), n.Derivative()
	deg := 180 / math.Pi
	for _, p := range an.Poles {
		if p.Multiplicity != 1 || imag(p.Value) <= 0 {
			continue
		}
		a := 180 + deg*(cmplx.Phase(n.EvalComplex(p.Value))-cmplx.Phase(dd.EvalComplex(p.Value))-imag(p.Value)*tau)
		an.Departures = append(an.Departures, AngleAt{Point: p.Value, AngleDeg: wrapDeg(a), Multiplicity: 1})
	}
	for _, z := range an.Zeros {
		if z.Multiplicity != 1 || imag(z.Value) <= 0 {
			continue
		}
		a := 180 + deg*(cmplx.Phase(d.EvalComplex(z.Value))-cmplx.Phase(nd.EvalComplex(z.Value))+imag(z.Value)*tau)
		an.Arrivals = append(an.Arrivals, AngleAt{Point: z.Value, AngleDeg: wrapDeg(a), Multiplicity: 1})
	}
	return an, nil
}

// wrapDeg maps an angle in degrees to (−180, 180].
func wrapDeg(a float64) float64 {
	a = math.Mod(a, 360)
	if a <= -180 {
		a += 360
	} else if a > 180 {
		a -= 360
	}
	return a
}

// delayView frames the open-loop poles and zeros, the break points and the
// axis crossings: extent E = the largest modulus among them; the view is
// [−1.3E, 0.3E] × [−1.3E, 1.3E] moved right to include every point.
func delayView(an Analysis) Rect {
	var pts []complex128
	for _, p := range an.Poles {
		pts = append(pts, p.Value)
	}
	for _, z := range an.Zeros {
		pts = append(pts, z.Value)
	}
	for _, b := range an.BreakPoints {
		pts = append(pts, b.Point)
	}
	for _, c := range an.AxisCrossings {
		pts = append(pts, c.Point)
	}
	return delayViewOf(pts)
}

// delayViewOf frames the points pts as delayView does.
func delayViewOf(pts []complex128) Rect {
	e, reMax := 0.0, 0.0
	for _, p := range pts {
		e = math.Max(e, cmplx.Abs(p))
		reMax = math.Max(reMax, real(p))
	}
	if e == 0 {
		e = 1
	}
	return Rect{ReMin: -1.3 * e, ReMax: math.Max(0.3*e, 1.1*reMax+0.1*e), ImMin: -1.3 * e, ImMax: 1.3 * e}
}

// delayTracer joins the roots at successive values of the locus variable
// into branches. It is generic over the quasi-polynomial: qAt returns the
// characteristic function at a value (the gain k of D + k·N·e^(−sτ), or
// the parameter p of A0 + A1·e^(−sτ) + p·(B0 + B1·e^(−sτ))), mid the value
// halfway between two (geometric for the gain, arithmetic for a
// parameter).
type delayTracer struct {
	qAt     func(v float64) quasipoly.Q
	mid     func(a, b float64) float64
	view    Rect
	size    float64
	open    []*Branch // branches still being extended
	done    []Branch
	last    []complex128
	samples int
	next    int
}

func newDelayTracer(view Rect, qAt func(float64) quasipoly.Q, mid func(a, b float64) float64) *delayTracer {
	return &delayTracer{qAt: qAt, mid: mid, view: view, size: math.Max(view.ReMax-view.ReMin, view.ImMax-view.ImMin)}
}

// run traces the branches over the sorted values in [lo, hi] (values
// outside are dropped), refining between neighbours where roots move far.
func (t *delayTracer) run(values []float64, lo, hi float64, r resolved) error {
	vs := make([]float64, 0, len(values))
	for _, v := range values {
		if v >= lo && v <= hi {
			vs = append(vs, v)
		}
	}
	sort.Float64s(vs)
	if len(vs) == 0 {
		return fmt.Errorf("%w: no value of %s to trace in [%g, %g]", ErrInvalidRange, variableName(r.variable), lo, hi)
	}
	prevK := vs[0]
	prev, err := t.rootsAt(prevK)
	if err != nil {
		return err
	}
	t.start(prevK, prev)
	for i, k := range vs[1:] {
		if r.ctx != nil && r.ctx.Err() != nil {
			return fmt.Errorf("locus: trace cancelled: %w", r.ctx.Err())
		}
		if k == prevK {
			continue
		}
		if err := t.advance(prevK, prev, k, 0); err != nil {
			return err
		}
		prevK, prev = k, t.last
		if r.progress != nil {
			r.progress(float64(i+1) / float64(len(vs)-1))
		}
	}
	return nil
}

// rootsAt returns the exact roots in the view at the value k.
func (t *delayTracer) rootsAt(k float64) ([]complex128, error) {
	t.samples++
	res, err := t.qAt(k).Above(t.view.ReMin, nil)
	if err != nil {
		return nil, fmt.Errorf("%w: roots at %g: %v", ErrTraceFailed, k, err)
	}
	var out []complex128
	for _, s := range res.Roots {
		if real(s) <= t.view.ReMax && imag(s) >= t.view.ImMin && imag(s) <= t.view.ImMax {
			out = append(out, s)
		}
	}
	return out, nil
}

func (t *delayTracer) start(k float64, roots []complex128) {
	for _, s := range roots {
		t.open = append(t.open, &Branch{Index: t.next, Points: []Point{{Value: k, S: s}}})
		t.next++
	}
	t.last = roots
}

// advance goes from (k0, roots0) to k1, bisecting while a matched root
// moves more than delayLocusMove of the view.
func (t *delayTracer) advance(k0 float64, roots0 []complex128, k1 float64, depth int) error {
	roots1, err := t.rootsAt(k1)
	if err != nil {
		return err
	}
	if depth < delayLocusDepth && t.maxMove(roots0, roots1) > delayLocusMove*t.size {
		km := t.mid(k0, k1)
		if err := t.advance(k0, roots0, km, depth+1); err != nil {
			return err
		}
		return t.advance(km, t.last, k1, depth+1)
	}
	t.link(k1, roots1)
	return nil
}

// pairs matches the roots a to b greedily by distance; it returns for each
// index of b the index of a (−1 for a root that entered the view).
func pairs(a, b []complex128, limit float64) []int {
	type cand struct {
		i, j int
		d    float64
	}
	var cs []cand
	for i, x := range a {
		for j, y := range b {
			if d := cmplx.Abs(x - y); d <= limit {
				cs = append(cs, cand{i, j, d})
			}
		}
	}
	sort.Slice(cs, func(u, v int) bool { return cs[u].d < cs[v].d })
	from := make([]int, len(b))
	for j := range from {
		from[j] = -1
	}
	used := make([]bool, len(a))
	for _, c := range cs {
		if !used[c.i] && from[c.j] < 0 {
			used[c.i], from[c.j] = true, c.i
		}
	}
	return from
}

// maxMove is the largest distance between matched roots (the view size
// when the counts differ inside the view's interior, so that entries and
// exits are resolved too).
func (t *delayTracer) maxMove(a, b []complex128) float64 {
	from := pairs(a, b, math.Inf(1))
	m := 0.0
	for j, i := range from {
		if i >= 0 {
			m = math.Max(m, cmplx.Abs(a[i]-b[j]))
		}
	}
	return m
}

// link extends the open branches with the roots at k.
func (t *delayTracer) link(k float64, roots []complex128) {
	ends := make([]complex128, len(t.open))
	for i, b := range t.open {
		ends[i] = b.Points[len(b.Points)-1].S
	}
	from := pairs(ends, roots, 0.25*t.size)
	cont := make([]bool, len(t.open))
	var open []*Branch
	for j, i := range from {
		if i >= 0 {
			t.open[i].Points = append(t.open[i].Points, Point{Value: k, S: roots[j]})
			cont[i] = true
			open = append(open, t.open[i])
		} else {
			open = append(open, &Branch{Index: t.next, Points: []Point{{Value: k, S: roots[j]}}})
			t.next++
		}
	}
	for i, b := range t.open {
		if !cont[i] {
			t.done = append(t.done, *b)
		}
	}
	t.open = open
	t.last = roots
}

// finish returns every branch with at least two points.
func (t *delayTracer) finish() []Branch {
	for _, b := range t.open {
		t.done = append(t.done, *b)
	}
	var out []Branch
	for _, b := range t.done {
		if len(b.Points) > 1 {
			out = append(out, b)
		}
	}
	sort.SliceStable(out, func(i, j int) bool { return out[i].Index < out[j].Index })
	return out
}
