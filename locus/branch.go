package locus

// Per-branch continuation.
//
// Within a piece every root of a + k·b is simple and analytic in the
// piece's parameter t, so each root can be followed on its own, with a step
// of its own: a slow branch is not sampled at the pace of the fastest one.
// The step of each branch is set by its own chord (against the chord limit
// of chordLimit) and turn (against the angle tolerance); the predictor is
// the cubic Hermite interpolant of the last two points and their tangents
// ds/dt = −b(s)/(a′(s) + k·b′(s))·dk/dt, extrapolated (Allgower & Georg
// 2003, §6.1: higher-order predictors; the tangent comes with the corrector's
// last evaluation at no extra cost), and the corrector is Newton's method
// on a + k·b at the new value.
//
// Without the other roots at the same value, a step cannot compare its
// correction with the distance to every other root as the lockstep engine
// (cont) does. The local guard is the correction against |P′/P″| (for a
// root ζ of P, P″/(2P′) = Σⱼ 1/(ζ − ζⱼ), so |P′/P″| is about half the
// distance to a dominant neighbour); the result of a whole piece is
// accepted only after checks that a jump onto another branch cannot pass
// (a path that jumps follows the other branch from there on, so two
// branches end at the same root):
//
//   - a piece traced from both ends towards its middle: the end points of
//     the two halves, each started from an independent root computation,
//     must pair off one to one, unambiguously (matchFast);
//   - a piece traced towards k = ±∞ or the degree drop: every root must
//     reach its own limit point or leave the extent disc, and no two roots
//     may leave it within one step of each other.
//
// Anything else (a step that underflows, a failed check) returns errFast,
// and the piece is traced again by the lockstep engine, which compares
// every correction with the distance to every other root at the same value
// and can restart from computed roots inside ill-conditioned clusters.

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
)

// errFast reports that the per-branch continuation of a piece was not
// conclusive; the caller traces the piece again in lockstep.
// stepTarget is the ratio of the next step's chord (or turn) to its limit
// that the step control aims at; predTarget is the target ratio of the
// predictor error to the chord.
const (
	stepTarget = 0.9
	predTarget = 0.5
)

var errFast = errors.New("locus: per-branch continuation inconclusive")

// branchStart describes how one root leaves the start of a piece.
type branchStart struct {
	s       complex128
	cluster bool       // member of a multiple root: leaves along a Puiseux direction
	rho     complex128 // Puiseux coefficient (cluster members)
	nu      int        // multiplicity of the cluster
	member  int        // index within the cluster
}

// branchRun is the result of following one root.
type branchRun struct {
	path    []Point
	fin     complex128
	stopped bool
	exit    bool    // stopped by leaving the extent disc
	lastCh  float64 // length of the last step
	wayAt   []int   // index in path of the point at each waypoint (−1: none)
}

// contEach follows the roots start from t = 0 to tEnd, each with its own
// step (see the file comment), or until stop has finished it. It returns
// each root's points from its start point on, the final positions, and
// which roots stop finished (with exit telling those that left the extent
// disc). The roots finished by stop are passed to it in index order, a
// root's points in order. It returns errFast when a root cannot be
// followed; other errors (cancellation, too many points) are final.
func (t *tracer) contEach(km kMap, tEnd float64, start []complex128, clus, mult []int, mu int, stop stopFunc, ways []waypoint) ([]branchRun, error) {
	p := t.p
	n := len(start)
	k0, _ := km(0)
	runs := make([]branchRun, n)
	inCluster := func(i int) bool { return clus != nil && clus[i] >= 0 }
	// Exact conjugates of another simple root are mirrored, not followed:
	// a + k·b has real coefficients and k is real, so the conjugate of a
	// path is a path, and it is computed bit for bit the same way.
	mirror := make([]int, n)
	active := make([]bool, n)
	for i := range n {
		active[i] = !cmplx.IsInf(start[i]) && !inCluster(i)
	}
	findMirrors(start, active, mirror, false)
	count := map[int]int{}
	for i := range n {
		if cmplx.IsInf(start[i]) {
			runs[i].fin = start[i]
			continue
		}
		if mirror[i] >= 0 {
			continue
		}
		bs := branchStart{s: start[i]}
		if inCluster(i) {
			nu := mult[i]
			an := p.a.DerivativeN(nu).EvalComplex(start[i])
			bn := p.b.DerivativeN(nu).EvalComplex(start[i])
			bs.cluster, bs.nu, bs.member = true, nu, count[clus[i]]
			count[clus[i]]++
			bs.rho = -p.b.EvalComplex(start[i]) * complex(factorial(nu), 0) / (an + complex(k0, 0)*bn)
		}
		r, err := t.follow(km, tEnd, bs, mu, i, stop, ways)
		if err != nil {
			return nil, err
		}
		runs[i] = r
	}
	for i, j := range mirror {
		if j < 0 {
			continue
		}
		src := runs[j]
		r := branchRun{path: make([]Point, 0, len(src.path)), wayAt: src.wayAt, lastCh: src.lastCh}
		for q, pt := range src.path {
			c := cmplx.Conj(pt.S)
			r.path = append(r.path, Point{Value: pt.Value, S: c})
			r.fin = c
			if q > 0 && stop != nil && stop(i, c, pt.Value) {
				r.stopped = true
				r.exit = cabs(c-t.centre) > t.extent
				break
			}
		}
		if len(r.path) < len(src.path) {
			// Stopped earlier than its partner: its own limit.
			r.wayAt = append([]int(nil), src.wayAt...)
			for w, at := range r.wayAt {
				if at >= len(r.path) {
					r.wayAt[w] = -1
				}
			}
		}
		t.traced += len(r.path) - 1
		runs[i] = r
	}
	// Crossings: the value and the boundary point exactly.
	for w, wp := range ways {
		for _, x := range []complex128{wp.c.Point, cmplx.Conj(wp.c.Point)} {
			best, bd := -1, math.Inf(1)
			for i := range runs {
				if at := runs[i].wayAt; at != nil && at[w] >= 0 {
					if d := cabs(runs[i].path[at[w]].S - x); d < bd {
						best, bd = i, d
					}
				}
			}
			if best >= 0 && bd <= 1e-6*t.scale {
				runs[best].path[runs[best].wayAt[w]].S = x
				if runs[best].wayAt[w] == len(runs[best].path)-1 {
					runs[best].fin = x
				}
			}
			if imag(x) == 0 {
				break
			}
		}
		for i := range runs {
			if at := runs[i].wayAt; at != nil && at[w] >= 0 {
				runs[i].path[at[w]].Value = wp.c.Value
			}
		}
	}
	return runs, nil
}

// follow follows one root (see contEach).
func (t *tracer) follow(km kMap, tEnd float64, bs branchStart, mu, idx int, stop stopFunc, ways []waypoint) (branchRun, error) {
	// The points go to the tracer's arena (one root at a time); the path
	// is cut from it at the end, its capacity capped so that no later
	// append can overwrite another path.
	base := len(t.arena)
	r, err := t.followArena(km, tEnd, bs, mu, idx, stop, ways, base)
	r.path = t.arena[base:len(t.arena):len(t.arena)]
	return r, err
}

// followArena is follow with the points appended to t.arena from base on.
func (t *tracer) followArena(km kMap, tEnd float64, bs branchStart, mu, idx int, stop stopFunc, ways []waypoint, base int) (branchRun, error) {
	p := t.p
	k0, _ := km(0)
	s := bs.s
	r := branchRun{wayAt: make([]int, len(ways))}
	ds := cabs(s - t.centre) // distance of s from the view's centre
	t.arena = append(t.arena, Point{Value: k0, S: s})
	for w := range r.wayAt {
		r.wayAt[w] = -1
	}
	var tan, firstAcc complex128
	tanOK := false
	h := 0.05
	if bs.cluster {
		kEnd, _ := km(1)
		nu := float64(bs.nu)
		c := math.Pow(cabs(bs.rho)*math.Abs(kEnd-k0), 1/nu)
		if c > 0 {
			h = math.Min(h, math.Pow(0.1*t.chordAbs/c, nu/float64(mu)))
		}
		h = math.Max(h, 1e-12)
	} else {
		var acc complex128
		tan, acc, tanOK = t.tangent2(s, km)
		if v := cabs(tan); tanOK && v > 0 {
			// The first step: the chord target, or half the angle
			// tolerance at the branch's curvature κ = |Im(s″·conj s′)|/|s′|³
			// (in the parameter k; the curvature of the curve does not
			// depend on the parameterisation), so that the first chord
			// shows the direction in which the branch leaves its start
			// (a departure angle) to a quarter of the angle tolerance.
			l := 0.9 * t.chordLimitAt(ds)
			if k0 == 0 {
				// Leaving an open-loop pole: a short first chord, so
				// that the plot shows the departure at the pole itself.
				l = 0.1 * t.chordLimitAt(ds)
			}
			if kap := math.Abs(imag(acc*cmplx.Conj(tan))) / (v * v * v); kap*l > 0.5*t.r.angleTolRad {
				l = 0.5 * t.r.angleTolRad / kap
			}
			h = math.Min(l/v, tEnd)
			firstAcc = acc
		}
	}
	// Hermite data: the previous point (tp, sp, mp) when hasPrev, its
	// tangent valid when prevTan.
	var tp float64
	var sp, mp complex128
	hasPrev, prevTan := false, false
	first := true
	tc := 0.0
	wi := 0
	if cap(t.coefEach) < p.order+1 {
		t.coefEach = make([]float64, p.order+1)
	}
	coef := t.coefEach[:p.order+1]
	steps := 0
	for tc < tEnd {
		steps++
		if steps%64 == 0 {
			if err := t.r.ctx.Err(); err != nil {
				return r, fmt.Errorf("locus: trace cancelled: %w", err)
			}
		}
		if tc+h > tEnd {
			h = tEnd - tc
		}
		hitting := false
		hPlanned := h
		if wi < len(ways) && tc+h >= ways[wi].t {
			h = ways[wi].t - tc
			hitting = true
		}
		tn := tc + h
		kn, dkn := km(tn)
		for i := range coef {
			coef[i] = p.a.Coef(i) + kn*p.b.Coef(i)
		}
		var pred complex128
		switch {
		case first && bs.cluster:
			nu := float64(bs.nu)
			v := bs.rho * complex(kn-k0, 0)
			ang := (cmplx.Phase(v) + 2*math.Pi*float64(bs.member)) / nu
			pred = s + cmplx.Rect(math.Pow(cabs(v), 1/nu), ang)
		case hasPrev && prevTan && tanOK:
			pred = hermite(tp, sp, mp, tc, s, tan, tn)
		case hasPrev && tanOK:
			// Quadratic through the previous point with the current
			// tangent.
			h0 := tc - tp
			c := (sp - s + complex(h0, 0)*tan) / complex(h0*h0, 0)
			pred = s + complex(h, 0)*tan + complex(h*h, 0)*c
		case tanOK:
			pred = s + complex(h, 0)*tan + complex(h*h/2, 0)*firstAcc
		default:
			pred = s
		}
		corr, df, bv, sep2, good := t.newtonSep(pred, kn, coef)
		ratio := 0.0
		de := corr - pred
		e2 := real(de)*real(de) + imag(de)*imag(de)
		// The correction must be small against the distance to the
		// neighbouring roots (estimated by |P′/P″|): e ≤ sep/4.
		good = good && e2 <= 0.0625*sep2
		var ntan complex128
		ntanOK := false
		if good {
			if df != 0 {
				ntan, ntanOK = -bv/df*complex(dkn, 0), true
				if cmplx.IsInf(ntan) || cmplx.IsNaN(ntan) {
					ntan, ntanOK = 0, false
				}
			}
			dc := cabs(corr - t.centre)
			lim := t.chordLimitAt(min(ds, dc))
			ch := cabs(corr - s)
			ratio = ch / lim
			if tanOK && ntanOK && ch > 1e-3*lim && tan != 0 && ntan != 0 {
				a := turnAngle(tan, ntan)
				if !(a > t.r.angleTolRad && (t.tangentNoisy(s, km, tc) || t.tangentNoisy(corr, km, tn))) {
					ratio = max(ratio, a/t.r.angleTolRad)
				}
			}
			if tanOK && tan != 0 && !(first && bs.cluster) && e2 > 0 {
				// The predictor error e against the chord: a correction
				// as long as the step means the prediction was not
				// following the branch (Allgower & Georg 2003, §6.1,
				// step-length control by the first corrector step); the
				// target is half the chord, and e/chord grows as h³.
				ch2 := ch * ch
				if e2 > ch2 {
					ratio = max(ratio, 1.01)
				} else if q := e2 / (predTarget * predTarget * ch2); q > ratio*ratio*ratio*ratio*ratio*ratio {
					ratio = math.Cbrt(math.Sqrt(q))
				}
			}
			good = ratio <= 1
			r.lastCh = ch
		}
		if !good {
			t.stats.RejectedSteps++
			f := 0.5
			if ratio > 1 {
				f = max(0.2, stepTarget/ratio)
			}
			h *= f
			if h < 1e-14*math.Max(1, tc) {
				return r, errFast
			}
			continue
		}
		t.stats.Steps++
		if tanOK {
			tp, sp, mp, hasPrev, prevTan = tc, s, tan, true, true
		} else {
			tp, sp, hasPrev, prevTan = tc, s, true, false
		}
		if first && bs.cluster {
			hasPrev = false // the cluster point is singular: no interpolation through it
		}
		s, tan, tanOK = corr, ntan, ntanOK
		ds = cabs(s - t.centre)
		t.arena = append(t.arena, Point{Value: kn, S: s})
		t.traced++
		if t.traced > t.r.maxPoints {
			return r, fmt.Errorf("%w: more than %d points", ErrTooManyPoints, t.r.maxPoints)
		}
		for hitting && wi < len(ways) && ways[wi].t <= tn {
			r.wayAt[wi] = len(t.arena) - 1 - base
			wi++
		}
		tc = tn
		first = false
		if stop != nil && stop(idx, s, kn) {
			r.stopped = true
			r.exit = ds > t.extent
			break
		}
		f := 4.0
		if ratio > 0 {
			f = min(4, max(0.25, stepTarget/ratio))
		}
		if hitting {
			h = math.Max(h*f, hPlanned)
		} else {
			h *= f
		}
	}
	r.fin = s
	return r, nil
}

// tangent2 returns ds/dt and (the part normal to the branch of) d²s/dt²
// at a simple root s of a + k(0)·b, from P_s·s_k = −b and
// P_ss·s_k² + 2b′·s_k + P_s·s_kk = 0, with s_t = s_k·k_t and
// s_tt ≈ s_kk·k_t² (the term s_k·k_tt lies along the tangent).
func (t *tracer) tangent2(s complex128, km kMap) (complex128, complex128, bool) {
	p := t.p
	k, dk := km(0)
	c := t.charCoeffs(k)
	_, d1, d2 := hornerD2(c, s)
	if d1 == 0 {
		return 0, 0, false
	}
	bv, bd := p.b.EvalWithDerivative(s)
	sk := -bv / d1
	skk := -(d2*sk*sk + 2*bd*sk) / d1
	dkc := complex(dk, 0)
	st, stt := sk*dkc, skk*dkc*dkc
	if cmplx.IsInf(st) || cmplx.IsNaN(st) || cmplx.IsInf(stt) || cmplx.IsNaN(stt) {
		return 0, 0, false
	}
	return st, stt, true
}

// hermite extrapolates the cubic Hermite interpolant of (t0, s0, m0) and
// (t1, s1, m1) to t.
func hermite(t0 float64, s0, m0 complex128, t1 float64, s1, m1 complex128, t float64) complex128 {
	h0 := t1 - t0
	x := (t - t0) / h0
	x2 := x * x
	x3 := x2 * x
	h00 := 2*x3 - 3*x2 + 1
	h10 := x3 - 2*x2 + x
	h01 := -2*x3 + 3*x2
	h11 := x3 - x2
	return complex(h00, 0)*s0 + complex(h10*h0, 0)*m0 + complex(h01, 0)*s1 + complex(h11*h0, 0)*m1
}

// turnAngle returns the angle in [0, π] between the directions u and v,
// for step control: below 14° it is atan by its series to three terms
// (relative error below 1e-5), else math.Atan2.
func turnAngle(u, v complex128) float64 {
	w := v * cmplx.Conj(u)
	x, y := real(w), math.Abs(imag(w))
	if x > 0 && y < 0.25*x {
		q := y / x
		q2 := q * q
		return q * (1 - q2*(1.0/3-q2*(1.0/5)))
	}
	return math.Atan2(y, x)
}

// newtonSep is newtonCoeffs that also returns |P′/P″|² at the predicted
// point (+Inf when P″ = 0), the squared estimate of the distance to the
// neighbouring roots used by the per-branch guard. It works with squared
// magnitudes throughout (no square roots in the loop).
func (t *tracer) newtonSep(s complex128, k float64, c []float64) (complex128, complex128, complex128, float64, bool) {
	if imag(s) == 0 {
		// A real root of a real polynomial stays real within a piece
		// (it can only leave the axis at a break point, a node): the
		// same iteration in real arithmetic.
		x, df, bv, sep2, ok := t.newtonSepReal(real(s), c)
		return complex(x, 0), complex(df, 0), complex(bv, 0), sep2, ok
	}
	p := t.p
	s2 := real(s)*real(s) + imag(s)*imag(s)
	ctl := newNewtonCtl(s2, t.scale)
	var df complex128
	for it := range 12 {
		t.stats.NewtonIterations++
		var f, ddf complex128
		f, df, ddf = hornerIter(c, s, it == 0)
		df2 := real(df)*real(df) + imag(df)*imag(df)
		if df2 == 0 {
			return s, df, p.b.EvalComplex(s), ctl.sep2, false
		}
		d := f / df
		sOld2 := s2
		s -= d
		s2 = real(s)*real(s) + imag(s)*imag(s)
		d2 := real(d)*real(d) + imag(d)*imag(d)
		ddf2 := real(ddf)*real(ddf) + imag(ddf)*imag(ddf)
		switch ctl.step(it, d2, s2, sOld2, df2, ddf2) {
		case newtonDone:
			return s, df, p.b.EvalComplex(s), ctl.sep2, true
		case newtonFail:
			return s, df, 0, ctl.sep2, false
		}
	}
	return s, df, 0, ctl.sep2, false
}

// Outcomes of newtonCtl.step.
const (
	newtonMore = iota // iterate again
	newtonDone        // converged
	newtonFail        // diverged or stagnated
)

// newtonCtl holds the stopping rule shared by the per-branch correctors
// (complex and real), on squared magnitudes.
type newtonCtl struct {
	floor2, tol2, prev2, sep2 float64
}

func newNewtonCtl(s2, scale float64) newtonCtl {
	floor2 := 1e-12 * scale * scale
	// tol = 1e-12·max(|s|, 1e-6·scale), squared.
	return newtonCtl{floor2: floor2, tol2: 1e-24 * max(s2, floor2), prev2: math.Inf(1), sep2: math.Inf(1)}
}

// step judges iteration it, which moved the point by d (d2 = |d|²) to s
// (s2 = |s|², sOld2 before), with |P′|² = df2 and |P″|² = ddf2 at the old
// point (ddf2 on the first iteration only).
func (c *newtonCtl) step(it int, d2, s2, sOld2, df2, ddf2 float64) int {
	if !(d2 < math.Inf(1)) {
		return newtonFail
	}
	if it == 0 {
		if ddf2 != 0 {
			c.sep2 = df2 / ddf2
		}
		if 0x1p-104*sOld2 > 0.0625*1e-24*max(s2, c.floor2) {
			// The result is much smaller than the predicted point: it
			// is only known to the rounding error of the subtraction
			// (relative to the predicted point); iterate from it.
			c.prev2 = d2
			c.tol2 = 1e-24 * max(s2, c.floor2)
			return newtonMore
		}
		// Kantorovich: the next correction is about |d|²·|P″|/(2|P′|);
		// done when below a quarter of the tolerance.
		if d2*d2*ddf2 <= 0.25*c.tol2*df2 {
			return newtonDone
		}
	}
	if d2 <= c.tol2 || (it >= 1 && d2*d2 <= c.tol2*c.prev2 && d2 < 0.0625*c.prev2) {
		return newtonDone
	}
	if it >= 1 && d2 > 0.25*c.prev2 {
		// No contraction: the prediction was too far (or the root is
		// ill-conditioned, which the lockstep engine handles).
		return newtonFail
	}
	c.prev2 = d2
	return newtonMore
}

// newtonSepReal is newtonSep for a real starting point, in real
// arithmetic (the iterates of Newton's method on a real polynomial from a
// real point are real).
func (t *tracer) newtonSepReal(x float64, c []float64) (float64, float64, float64, float64, bool) {
	p := t.p
	x2 := x * x
	ctl := newNewtonCtl(x2, t.scale)
	var df float64
	for it := range 12 {
		t.stats.NewtonIterations++
		var f, ddf float64
		df = 0
		for i := len(c) - 1; i >= 0; i-- {
			if it == 0 {
				ddf = ddf*x + 2*df
			}
			df = df*x + f
			f = f*x + c[i]
		}
		if df == 0 {
			return x, df, p.b.Eval(x), ctl.sep2, false
		}
		d := f / df
		xOld2 := x2
		x -= d
		x2 = x * x
		switch ctl.step(it, d*d, x2, xOld2, df*df, ddf*ddf) {
		case newtonDone:
			return x, df, p.b.Eval(x), ctl.sep2, true
		case newtonFail:
			return x, df, 0, ctl.sep2, false
		}
	}
	return x, df, 0, ctl.sep2, false
}

// matchFast pairs the end points of two half traces (see the file
// comment) and reports whether the pairing is unambiguous: every pair
// within 1e-6 of the scale and at most a tenth of the distance from either
// point to any other point of the other set.
func (t *tracer) matchFast(a, b []complex128) ([]int, bool) {
	perm, worst := matchSets(a, b)
	if worst > 1e-6*t.scale {
		return nil, false
	}
	for i, j := range perm {
		d := cabs(a[i] - b[j])
		for jj := range b {
			if jj != j && cabs(a[i]-b[jj]) <= 10*d {
				return nil, false
			}
		}
		for ii := range a {
			if ii != i && cabs(a[ii]-b[j]) <= 10*d {
				return nil, false
			}
		}
	}
	return perm, true
}
