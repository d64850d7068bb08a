package locus

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"slices"
)

// waypoint is a crossing inside a piece, at parameter t.
type waypoint struct {
	t float64
	c Crossing
}

// waypoints returns the crossings whose value lies strictly inside the
// piece, with their parameter from inv (NaN when outside), ascending.
func (t *tracer) waypoints(inv func(k float64) float64, tEnd float64) []waypoint {
	var out []waypoint
	for _, c := range t.waysAll {
		if u := inv(c.Value); u > 0 && u < tEnd {
			out = append(out, waypoint{u, c})
		}
	}
	slices.SortFunc(out, func(x, y waypoint) int { return cmp.Compare(x.t, y.t) })
	return out
}

// powerInv inverts powerMap.
func powerInv(k0, d float64, mu int) func(float64) float64 {
	return func(k float64) float64 {
		r := (k - k0) / d
		if !(r > 0 && r < 1) {
			return math.NaN()
		}
		return math.Pow(r, 1/float64(mu))
	}
}

// expInv inverts expMap.
func expInv(k0, e float64) func(float64) float64 {
	return func(k float64) float64 {
		var r float64
		if math.IsInf(e, 0) {
			r = k / k0
			if !(r > 1) {
				return math.NaN()
			}
			return math.Log(r)
		}
		r = (k - e) / (k0 - e)
		if !(r > 0 && r < 1) {
			return math.NaN()
		}
		return -math.Log(r)
	}
}

// kMap is a parameterisation k(t) of a piece, with dk/dt.
type kMap func(t float64) (k, dk float64)

// powerMap is k = k0 + d·τ^μ, τ ∈ [0, 1].
func powerMap(k0, d float64, mu int) kMap {
	return func(t float64) (float64, float64) {
		if mu == 1 {
			return k0 + d*t, d
		}
		tp := math.Pow(t, float64(mu-1))
		return k0 + d*tp*t, float64(mu) * d * tp
	}
}

// expMap is k = k0·e^u (towards ±∞) or k = e + (k0 − e)·e^(−u) (towards
// the finite end e), u ≥ 0.
func expMap(k0, e float64) kMap {
	if math.IsInf(e, 0) {
		return func(u float64) (float64, float64) {
			k := k0 * math.Exp(u)
			return k, k
		}
	}
	return func(u float64) (float64, float64) {
		d := (k0 - e) * math.Exp(-u)
		return e + d, -d
	}
}

// stopFunc decides after each accepted step whether root i at s has
// finished; it may append a final point through the returned flag.
type stopFunc func(i int, s complex128, k float64) bool

// cont follows the roots start (the roots of a + k(0)·b, simple except for
// the clusters given by clus/mult) from t = 0 to tEnd (or until stop has
// finished every root) and returns each root's points, from its start
// point on, and the final positions.
func (t *tracer) cont(km kMap, tEnd float64, start []complex128, clus, mult []int, mu int, stop stopFunc, ways []waypoint) ([][]Point, []complex128, error) {
	p := t.p
	n := len(start)
	s := append([]complex128(nil), start...)
	active := make([]bool, n)
	paths := make([][]Point, n)
	k0, _ := km(0)
	for i := range n {
		active[i] = !cmplx.IsInf(s[i])
		if active[i] {
			paths[i] = make([]Point, 1, 64)
			paths[i][0] = Point{Value: k0, S: s[i]}
		}
	}
	// Puiseux coefficients of the clusters at t = 0: members leave along
	// δ_j = (ρ·Δk)^(1/ν)·e^(2πij/ν), ρ = −b(s₀)·ν!/P^(ν)(s₀).
	rho := make([]complex128, n)
	member := make([]int, n)
	count := map[int]int{}
	hasCluster := false
	for i := range n {
		if clus == nil || clus[i] < 0 || !active[i] {
			continue
		}
		hasCluster = true
		nu := mult[i]
		member[i] = count[clus[i]]
		count[clus[i]]++
		an := p.a.DerivativeN(nu).EvalComplex(s[i])
		bn := p.b.DerivativeN(nu).EvalComplex(s[i])
		pn := an + complex(k0, 0)*bn
		rho[i] = -p.b.EvalComplex(s[i]) * complex(factorial(nu), 0) / pn
	}
	inCluster := func(i int) bool { return clus != nil && clus[i] >= 0 }
	tan := make([]complex128, n)
	acc := make([]complex128, n)
	tanOK := make([]bool, n)
	for i := range n {
		if active[i] && !inCluster(i) {
			tan[i], tanOK[i] = t.tangent(s[i], km, 0)
		}
	}
	// Initial step.
	h := 0.05
	if hasCluster {
		kEnd, _ := km(1)
		dk := kEnd - k0
		for i := range n {
			if !inCluster(i) || !active[i] {
				continue
			}
			nu := float64(mult[i])
			c := math.Pow(cabs(rho[i])*math.Abs(dk), 1/nu)
			if c > 0 {
				hi := math.Pow(0.1*t.chordAbs/c, nu/float64(mu))
				h = math.Min(h, hi)
			}
		}
		h = math.Max(h, 1e-12)
	}
	first := true
	tc := 0.0
	pred := make([]complex128, n)
	corr := make([]complex128, n)
	ntan := make([]complex128, n)
	ntanOK := make([]bool, n)
	mirror := make([]int, n)
	steps := 0
	reseeds := 0
	reseedH := 1e-3 * math.Max(1, tEnd)
	for {
		anyActive := false
		for i := range n {
			anyActive = anyActive || active[i]
		}
		if !anyActive || tc >= tEnd {
			break
		}
		steps++
		if steps%64 == 0 {
			if err := t.r.ctx.Err(); err != nil {
				return paths, s, fmt.Errorf("locus: trace cancelled: %w", err)
			}
		}
		if tc+h > tEnd {
			h = tEnd - tc
		}
		hitting := false
		hPlanned := h
		if len(ways) > 0 && tc+h >= ways[0].t {
			h = ways[0].t - tc
			hitting = true
		}
		tn := tc + h
		kn, dkn := km(tn)
		coef := t.charCoeffs(kn)
		ok := true
		// A root that is the exact conjugate of another active root is
		// not corrected itself: a + k·b has real coefficients and k is
		// real, so its corrected point and tangent are the conjugates of
		// its partner's (a conjugate pair stays one within a piece; it
		// can only meet the real axis at a break point, which is a node).
		findMirrors(s, active, mirror, first && hasCluster)
		for i := range n {
			if !active[i] || mirror[i] >= 0 {
				continue
			}
			switch {
			case first && inCluster(i):
				nu := float64(mult[i])
				v := rho[i] * complex(kn-k0, 0)
				r := math.Pow(cabs(v), 1/nu)
				ang := (cmplx.Phase(v) + 2*math.Pi*float64(member[i])) / nu
				pred[i] = s[i] + cmplx.Rect(r, ang)
			default:
				pred[i] = s[i] + complex(h, 0)*tan[i]
				if !first {
					pred[i] += complex(h*h/2, 0) * acc[i]
				}
			}
			c, df, bv, good := t.newtonCoeffs(pred[i], kn, coef)
			if !good {
				ok = false
				break
			}
			corr[i] = c
			if df != 0 {
				ntan[i], ntanOK[i] = -bv/df*complex(dkn, 0), true
			} else {
				ntan[i], ntanOK[i] = 0, false
			}
		}
		if ok {
			for i, j := range mirror {
				if j >= 0 {
					pred[i], corr[i] = cmplx.Conj(pred[j]), cmplx.Conj(corr[j])
					ntan[i], ntanOK[i] = cmplx.Conj(ntan[j]), ntanOK[j]
				}
			}
		}
		ratio := 0.0
		if ok {
			ratio, ok = t.checkStep(s, pred, corr, active, tan, tanOK, ntan, ntanOK, km, tn)
		}
		if !ok {
			t.stats.RejectedSteps++
			h *= 0.5
			if h < 1e-14*math.Max(1, tc) {
				if reseeds < maxReseeds {
					if dt, ok := t.reseed(km, tc, tEnd, reseedH, reseeds == 0, s, active, paths, tan, tanOK, acc); ok {
						// Continue from the roots computed afresh a little
						// further on, paired with the current ones (see
						// reseed), instead of shrinking the step forever.
						reseeds++
						tc += dt
						for len(ways) > 0 && ways[0].t <= tc {
							ways = ways[1:]
						}
						reseedH = 2 * dt
						h = dt
						first = true
						continue
					}
				}
				return paths, s, fmt.Errorf("%w: step size underflow at %s = %v", ErrTraceFailed, p.variable, kn)
			}
			continue
		}
		t.stats.Steps++
		for i := range n {
			if !active[i] {
				continue
			}
			if tanOK[i] && ntanOK[i] && !first {
				acc[i] = (ntan[i] - tan[i]) / complex(h, 0)
			} else {
				acc[i] = 0
			}
			s[i], tan[i], tanOK[i] = corr[i], ntan[i], ntanOK[i]
			paths[i] = append(paths[i], Point{Value: kn, S: s[i]})
			t.traced++
		}
		for hitting && len(ways) > 0 && ways[0].t <= tn {
			// A crossing: the value and the boundary point exactly (every
			// crossing at this parameter).
			w := ways[0]
			ways = ways[1:]
			for _, x := range []complex128{w.c.Point, cmplx.Conj(w.c.Point)} {
				best, bd := -1, math.Inf(1)
				for i := range n {
					if active[i] {
						if d := cabs(s[i] - x); d < bd {
							best, bd = i, d
						}
					}
				}
				if best >= 0 && bd <= 1e-6*t.scale {
					s[best] = x
				}
				if imag(x) == 0 {
					break
				}
			}
			for i := range n {
				if active[i] {
					paths[i][len(paths[i])-1] = Point{Value: w.c.Value, S: s[i]}
				}
			}
		}
		for i := range n {
			if !active[i] {
				continue
			}
			if stop != nil && stop(i, s[i], kn) {
				active[i] = false
			}
		}
		if t.traced > t.r.maxPoints {
			return paths, s, fmt.Errorf("%w: more than %d points", ErrTooManyPoints, t.r.maxPoints)
		}
		first = false
		tc = tn
		f := 2.0
		if ratio > 0 {
			f = math.Min(2, math.Max(0.5, 0.8/ratio))
		}
		if hitting {
			h = math.Max(h*f, hPlanned) // a waypoint shortened the step
		} else {
			h *= f
		}
	}
	return paths, s, nil
}

func factorial(n int) float64 {
	f := 1.0
	for i := 2; i <= n; i++ {
		f *= float64(i)
	}
	return f
}

// tangent returns ds/dt = −b(s)/(a′(s) + k·b′(s))·dk/dt.
func (t *tracer) tangent(s complex128, km kMap, tt float64) (complex128, bool) {
	k, dk := km(tt)
	_, df := t.p.eval(s, k)
	if df == 0 {
		return 0, false
	}
	v := -t.p.b.EvalComplex(s) / df * complex(dk, 0)
	if cmplx.IsInf(v) || cmplx.IsNaN(v) {
		return 0, false
	}
	return v, true
}

// charCoeffs returns the coefficients of a + k·b, lowest power first, in a
// buffer reused by the tracer.
func (t *tracer) charCoeffs(k float64) []float64 {
	p := t.p
	n := p.order
	if cap(t.coef) < n+1 {
		t.coef = make([]float64, n+1)
	}
	c := t.coef[:n+1]
	for i := range c {
		c[i] = p.a.Coef(i) + k*p.b.Coef(i)
	}
	return c
}

// hornerD returns q(s) and q′(s) for the coefficients c (lowest power
// first).
func hornerD(c []float64, s complex128) (v, d complex128) {
	for i := len(c) - 1; i >= 0; i-- {
		d = d*s + v
		v = v*s + complex(c[i], 0)
	}
	return v, d
}

// hornerIter returns q(s) and q′(s) for the coefficients c, and q″(s)
// too on the first iteration of Newton's method (the Kantorovich test).
func hornerIter(c []float64, s complex128, first bool) (v, d, dd complex128) {
	if first {
		return hornerD2(c, s)
	}
	v, d = hornerD(c, s)
	return v, d, 0
}

// hornerD2 returns q(s), q′(s) and q″(s) for the coefficients c (lowest
// power first).
func hornerD2(c []float64, s complex128) (v, d, dd complex128) {
	for i := len(c) - 1; i >= 0; i-- {
		dd = dd*s + 2*d
		d = d*s + v
		v = v*s + complex(c[i], 0)
	}
	return v, d, dd
}

// newtonCoeffs corrects s to a root of a + k·b by Newton's method, with
// c the coefficients of a + k·b (charCoeffs). It stops when
// the correction falls below 1e-12 relative, or when it stagnates at the
// rounding level (ill-conditioned roots) with a relative residual below
// 1e-11; it reports failure otherwise. It also returns ∂P/∂s and b at the
// last iterate, from which the caller forms the tangent without another
// evaluation.
func (t *tracer) newtonCoeffs(s complex128, k float64, c []float64) (complex128, complex128, complex128, bool) {
	p := t.p
	tol := 1e-12 * math.Max(cabs(s), 1e-6*t.scale)
	tol2 := tol * tol
	prev2 := math.Inf(1)
	var df complex128
	for it := range 12 {
		t.stats.NewtonIterations++
		var f, ddf complex128
		f, df, ddf = hornerIter(c, s, it == 0)
		if df == 0 {
			return s, df, p.b.EvalComplex(s), false
		}
		d := f / df
		s -= d
		d2 := real(d)*real(d) + imag(d)*imag(d)
		if !(d2 < math.Inf(1)) {
			return s, df, 0, false // NaN or Inf
		}
		// After the first step, the next Newton correction is about
		// |d|²·|P″|/(2|P′|) (Kantorovich; Allgower & Georg 2003, §3.3:
		// the corrector of a predictor–corrector method needs only as
		// many steps as the predictor error requires); when that is
		// below the tolerance the first step already is the root.
		if it == 0 && d2*cabs(ddf)/(2*cabs(df)) <= 0.25*tol {
			return s, df, p.b.EvalComplex(s), true
		}
		// Quadratic convergence: the next correction is about
		// |d|²/|d_prev|; stop when it would be below the tolerance.
		if d2 <= tol2 || (it >= 1 && d2*d2 <= tol2*prev2 && d2 < 0.0625*prev2) {
			return s, df, p.b.EvalComplex(s), true
		}
		if it >= 1 && d2 > 0.25*prev2 && d2 <= 1e-12*t.scale*t.scale {
			// Stagnation: accept if the residual is at the rounding level.
			f, _ := p.eval(s, k)
			return s, df, p.b.EvalComplex(s), cabs(f) <= 1e-11*p.magnitude(s, k)
		}
		prev2 = d2
	}
	f, df := p.eval(s, k)
	return s, df, p.b.EvalComplex(s), cabs(f) <= 1e-11*p.magnitude(s, k)
}

// checkStep accepts or rejects a step: every correction must be small
// against the distance to the nearest other corrected root (so no iterate
// was captured by another branch: a quarter of that distance lies well
// inside Newton's basin, Kantorovich), and chords and turns must respect
// the tolerances. It returns the largest ratio of a chord or turn to its
// tolerance, and fills the tangents at the new points.
func (t *tracer) checkStep(s, pred, corr []complex128, active []bool, tan []complex128, tanOK []bool, ntan []complex128, ntanOK []bool, km kMap, tn float64) (float64, bool) {
	n := len(s)
	ratio := 0.0
	// Pairwise separations, each pair once: both corrections must be
	// small against it.
	for i := range n {
		if !active[i] {
			continue
		}
		ei := corr[i] - pred[i]
		ei2 := real(ei)*real(ei) + imag(ei)*imag(ei)
		for j := i + 1; j < n; j++ {
			if !active[j] {
				continue
			}
			ej := corr[j] - pred[j]
			ej2 := real(ej)*real(ej) + imag(ej)*imag(ej)
			d := corr[i] - corr[j]
			d2 := real(d)*real(d) + imag(d)*imag(d)
			if d2 == 0 || ei2 > 0.0625*d2 || ej2 > 0.0625*d2 {
				// Unless both roots are within rounding noise of each
				// other (ill-conditioned cluster, where which is which is
				// not defined in double precision), reject.
				ki, _ := km(tn)
				noise := 10 * (t.rootNoise(corr[i], ki) + t.rootNoise(corr[j], ki))
				if !(d2 <= noise*noise && ei2 <= noise*noise && ej2 <= noise*noise) {
					return 0, false
				}
			}
		}
	}
	for i := range n {
		if !active[i] {
			continue
		}
		lim := t.chordLimit(s[i], corr[i])
		ch := cabs(corr[i] - s[i])
		ratio = math.Max(ratio, ch/lim)
		if ch > lim {
			return ratio, false
		}
		if tanOK[i] && ntanOK[i] && ch > 1e-3*lim && tan[i] != 0 && ntan[i] != 0 {
			a := math.Abs(cmplx.Phase(ntan[i] / tan[i]))
			if a > t.r.angleTolRad && (t.tangentNoisy(s[i], km, tn) || t.tangentNoisy(corr[i], km, tn)) {
				// The tangent −b/P′ is rounding noise here (P′ is
				// below the rounding error of its evaluation, as inside
				// an ill-conditioned cluster): its turn says nothing.
				continue
			}
			ratio = math.Max(ratio, a/t.r.angleTolRad)
			if a > t.r.angleTolRad {
				return ratio, false
			}
		}
	}
	return ratio, true
}

// rootNoise estimates how far a computed root s of a + k·b can be from
// the exact one because of rounding in the coefficients: the first-order
// bound n·u·M/|P′| and the bound √(2n·u·M/|P″|) that holds near a double
// root (Wilkinson 1963, Rounding Errors in Algebraic Processes, ch. 2),
// with M the magnitude of the terms of a + k·b at s.
func (t *tracer) rootNoise(s complex128, k float64) float64 {
	p := t.p
	u := float64(p.order+1) * 0x1p-53
	m := p.magnitude(s, k)
	_, d1 := p.eval(s, k)
	d2 := p.ad.Derivative().EvalComplex(s) + complex(k, 0)*p.bd.Derivative().EvalComplex(s)
	e := math.Inf(1)
	if d1 != 0 {
		e = u * m / cabs(d1)
	}
	if d2 != 0 {
		e = math.Min(e, math.Sqrt(2*u*m/cabs(d2)))
	}
	return e
}

// muOf returns the least common multiple of the cluster multiplicities
// (capped at 12, then their maximum).
func muOf(mult []int) int {
	l := 1
	mx := 1
	for _, m := range mult {
		mx = max(mx, m)
		l = lcm(l, m)
	}
	if l > 12 {
		return mx
	}
	return l
}

func lcm(a, b int) int {
	g, x := a, b
	for x != 0 {
		g, x = x, g%x
	}
	return a / g * b
}

// traceHalfEach is traceHalf by per-branch continuation (contEach); it
// returns errFast when that is inconclusive.
func (t *tracer) traceHalfEach(nd node, kEnd float64) ([][]Point, []complex128, error) {
	mu := muOf(nd.mult)
	km := powerMap(nd.k, kEnd-nd.k, mu)
	runs, err := t.contEach(km, 1, nd.slots, nd.clus, nd.mult, mu, nil, t.waypoints(powerInv(nd.k, kEnd-nd.k, mu), 1))
	if err != nil {
		return nil, nil, err
	}
	paths := make([][]Point, len(runs))
	fin := make([]complex128, len(runs))
	for i, r := range runs {
		paths[i], fin[i] = r.path, r.fin
		if n := len(r.path); n > 0 {
			paths[i][n-1].Value = kEnd
		}
	}
	return paths, fin, nil
}

// traceHalf traces from a regular node to the value kEnd (the middle of
// the piece), leaving the node's clusters along their Puiseux directions.
func (t *tracer) traceHalf(nd node, kEnd float64) ([][]Point, []complex128, error) {
	mu := muOf(nd.mult)
	km := powerMap(nd.k, kEnd-nd.k, mu)
	paths, fin, err := t.cont(km, 1, nd.slots, nd.clus, nd.mult, mu, nil, t.waypoints(powerInv(nd.k, kEnd-nd.k, mu), 1))
	if errors.Is(err, ErrTraceFailed) && mu > 1 {
		// The local expansion did not lead away from the cluster: in
		// double precision the coefficients of a + k·b only determine
		// these roots to about √ε·cond, and they are distinct there.
		// Start from the roots the root finder gives at this value.
		raw, rerr := fastRoots(t.p.charPoly(nd.k))
		t.stats.RootSolves++
		if rerr == nil && len(raw) == len(nd.slots) {
			perm, _ := matchSets(nd.slots, raw)
			start := make([]complex128, len(raw))
			for i, j := range perm {
				start[i] = raw[j]
			}
			paths, fin, err = t.cont(powerMap(nd.k, kEnd-nd.k, 1), 1, start, nil, nil, 1, nil, t.waypoints(powerInv(nd.k, kEnd-nd.k, 1), 1))
			if err == nil {
				t.notes = append(t.notes, fmt.Sprintf("the roots near %s = %.6g are ill-conditioned (clustered roots of a + k·b); the trace leaves them from the computed roots, not from the exact multiple root", t.p.variable, nd.k))
			}
		}
	}
	if err != nil {
		return paths, fin, err
	}
	// The last point is at exactly kEnd.
	for i := range paths {
		if n := len(paths[i]); n > 0 {
			paths[i][n-1].Value = kEnd
		}
	}
	return paths, fin, nil
}

// traceToEnd traces from a regular node towards an end node (k = ±∞ or the
// degree-drop value): each root stops at its limit (a finite root of the
// end node, appended exactly) or when it leaves the extent disc. It
// returns the paths indexed by the start slot and, for each, the slot of
// the end node it reaches. Each root is first followed on its own
// (contEach); when that is inconclusive the piece is traced in lockstep.
func (t *tracer) traceToEnd(nd node, end node) ([][]Point, []int, error) {
	saved := t.traced
	paths, to, err := t.traceToEndMode(nd, end, true)
	if !errors.Is(err, errFast) {
		return paths, to, err
	}
	t.traced = saved
	t.stats.Retraced++
	return t.traceToEndMode(nd, end, false)
}

// traceToEndMode is traceToEnd by per-branch continuation (fast) or in
// lockstep.
func (t *tracer) traceToEndMode(nd node, end node, fast bool) ([][]Point, []int, error) {
	n := len(nd.slots)
	mu := muOf(nd.mult)
	if mu != 1 {
		return nil, nil, fmt.Errorf("%w: multiple root at the buffer value %v", ErrTraceFailed, nd.k)
	}
	km := expMap(nd.k, end.k)
	to := make([]int, n)
	for i := range to {
		to[i] = -1
	}
	taken := make([]bool, len(end.slots))
	eps := 1e-4 * t.chordAbs
	stop := func(i int, s complex128, k float64) bool {
		if cabs(s-t.centre) > t.extent {
			for j, z := range end.slots {
				if !taken[j] && cmplx.IsInf(z) {
					taken[j] = true
					to[i] = j
					return true
				}
			}
			return false
		}
		for j, z := range end.slots {
			if !taken[j] && !cmplx.IsInf(z) && cabs(s-z) <= eps*math.Max(1, cabs(z)/t.scale) {
				taken[j] = true
				to[i] = j
				return true
			}
		}
		return false
	}
	// The end of the parameter: k overflow towards ±∞, or k − e below
	// the resolution of e.
	var uMax float64
	if math.IsInf(end.k, 0) {
		uMax = math.Log(1e250 / math.Abs(nd.k))
	} else {
		uMax = math.Log(math.Abs(nd.k-end.k) / (1e-15 * math.Max(1, math.Abs(end.k))))
	}
	ways := t.waypoints(expInv(nd.k, end.k), uMax)
	var paths [][]Point
	var fin []complex128
	var err error
	if fast {
		runs, err := t.contEach(km, uMax, nd.slots, nil, nil, 1, stop, ways)
		if err != nil {
			return nil, nil, err
		}
		paths = make([][]Point, n)
		for i, r := range runs {
			if !r.stopped {
				return nil, nil, errFast
			}
			for j := i + 1; j < n; j++ {
				if r.exit && runs[j].exit && cabs(r.fin-runs[j].fin) <= math.Max(r.lastCh, runs[j].lastCh) {
					// Two roots leave the disc within one step of each
					// other: possibly one path followed twice.
					return nil, nil, errFast
				}
			}
			paths[i] = r.path
		}
	} else {
		paths, fin, err = t.cont(km, uMax, nd.slots, nil, nil, 1, stop, ways)
	}
	if errors.Is(err, ErrTraceFailed) {
		// Near a multiple limit point (a multiple zero) the converging
		// roots are only known to about ε^(1/ν), and the continuation can
		// stall before reaching the stop radius. Accept when every
		// unfinished root is already close to a free limit point.
		free := slices.Clone(taken)
		close := true
		for i := range n {
			if to[i] >= 0 {
				continue
			}
			j := nearestSlot(end.slots, free, fin[i])
			if j < 0 || cabs(fin[i]-end.slots[j]) > 1e-2*t.scale {
				close = false
				break
			}
			free[j] = true
		}
		if close {
			err = nil
		}
	}
	// Roots still unfinished at the end of the parameter: nearest free
	// limit, else infinity.
	for i := range n {
		if to[i] >= 0 {
			continue
		}
		j := nearestSlot(end.slots, taken, fin[i])
		if j < 0 {
			for jj, z := range end.slots {
				if !taken[jj] && cmplx.IsInf(z) {
					j = jj
					break
				}
			}
		}
		if j >= 0 {
			taken[j] = true
			to[i] = j
		}
	}
	for i := range n {
		if to[i] >= 0 && !cmplx.IsInf(end.slots[to[i]]) {
			paths[i] = append(paths[i], Point{Value: end.k, S: end.slots[to[i]]})
		}
	}
	return paths, to, err
}

// chordLimit returns the largest accepted chord of a step from s to c:
// ChordTolerance × the view's half-diagonal within chordHoldRadius
// half-diagonals of the view's centre (the whole view and a margin
// around it), growing as the fifth power of the distance beyond. Far from the
// view a branch is nearly straight and off the plot, and a limit that
// grows with the distance keeps the number of steps there bounded
// (∫ dx/x⁵ converges) instead of growing with the logarithm of the range
// end: at n = 2 it took ≈ 1550 steps per branch to match a 2000-gain grid's
// chord, most of them outside the view.
func (t *tracer) chordLimit(s, c complex128) float64 {
	return t.chordLimitAt(math.Min(cabs(s-t.centre), cabs(c-t.centre)))
}

// chordLimitAt is chordLimit for a step whose nearer end is at the
// distance d from the view's centre.
func (t *tracer) chordLimitAt(d float64) float64 {
	x := d / (chordHoldRadius * t.scale)
	if x <= 1 {
		return t.chordAbs
	}
	return t.chordAbs * x * x * x * x * x
}

// chordHoldRadius is the radius, in half-diagonals of the view, of the
// disc about the view's centre within which the chord limit is held.
const chordHoldRadius = 1.25

// tangentNoisy reports whether the derivative P′ = a′ + k·b′ at x is not
// known to 10 % in double precision: its value is below ten times the
// rounding bound 2n·u·(Σ|i·aᵢ||x|^(i−1) + |k|·Σ|i·bᵢ||x|^(i−1)) of its
// evaluation (Higham 2002, Accuracy and Stability of Numerical
// Algorithms, 2nd ed., §5.1), so the tangent direction is noise.
func (t *tracer) tangentNoisy(x complex128, km kMap, tt float64) bool {
	p := t.p
	k, _ := km(tt)
	_, df := p.eval(x, k)
	ax := cabs(x)
	m := absEval(p.ad, ax) + math.Abs(k)*absEval(p.bd, ax)
	return cabs(df) <= 10*2*float64(p.order)*0x1p-53*m
}

// maxReseeds bounds the restarts from computed roots in one cont call
// (each adds a point per root, so the point limit bounds them too).
const maxReseeds = 64

// reseed handles a continuation that is stuck (the step size underflowed)
// because some roots are ill-conditioned: inside a tight cluster of roots
// of a high-order a + k·b, double precision fixes the roots only to a
// fraction of their spacing, and Newton's method from a predicted point
// lands anywhere in the cluster. Branch identity is then decided on the
// full root set rather than root by root: it computes every root of
// a + k·b afresh (poly's root finder) at t = tc + dt, pairs them with the
// current positions by the nearest-set matching (matchSets) after
// polishing them (polish). It accepts when every active root moved at
// most its chord limit and its relative residual is at most 1e-10 (the
// documented 1e-9 with a margin of 10); otherwise dt is
// divided by 4 (from dt0, capped at 1e-3·max(1, tEnd)). Below a step of
// 1e-15·max(1, tc) the movement is rounding noise of the cluster and the
// pairing is accepted as it is if the residuals are met (reseed fails
// otherwise). It adds the new points, records a note
// when note is set, and returns the dt taken; it reports false when the
// roots cannot be computed or some position is not finite.
func (t *tracer) reseed(km kMap, tc, tEnd, dt0 float64, note bool, s []complex128, active []bool, paths [][]Point, tan []complex128, tanOK []bool, acc []complex128) (float64, bool) {
	for _, x := range s {
		if cmplx.IsInf(x) || cmplx.IsNaN(x) {
			return 0, false
		}
	}
	dt := math.Min(math.Min(dt0, 1e-3*math.Max(1, tEnd)), tEnd-tc)
	if !(dt > 0) {
		return 0, false
	}
	var raw []complex128
	var perm []int
	var kn float64
	for {
		kn, _ = km(tc + dt)
		var err error
		raw, err = fastRoots(t.p.charPoly(kn))
		t.stats.RootSolves++
		if err != nil || len(raw) != len(s) {
			return 0, false
		}
		t.polish(raw, kn)
		perm, _ = matchSets(s, raw)
		within, exact := true, true
		for i := range s {
			if !active[i] {
				continue
			}
			x := raw[perm[i]]
			within = within && cabs(x-s[i]) <= t.chordLimit(s[i], x)
			exact = exact && t.relResidual(x, kn) <= 1e-10
		}
		if within && exact {
			break
		}
		if dt < 1e-15*math.Max(1, tc) {
			if !exact {
				// Not even the computed roots meet the residual of a
				// traced point: report the underflow rather than add
				// points that are not on the locus.
				return 0, false
			}
			break
		}
		dt /= 4
	}
	tn := tc + dt
	for i := range s {
		s[i] = raw[perm[i]]
		if active[i] {
			paths[i] = append(paths[i], Point{Value: kn, S: s[i]})
			t.traced++
			tan[i], tanOK[i] = t.tangent(s[i], km, tn)
			acc[i] = 0
		}
	}
	if note {
		t.notes = append(t.notes, fmt.Sprintf("the roots near %s = %.6g are too ill-conditioned to follow by continuation in double precision; the trace continues from the roots computed at that value", t.p.variable, kn))
	}
	return dt, true
}

// polish refines the computed roots raw of a + k·b by Newton's method
// (newtonCoeffs) so that their residual meets the one of a traced point;
// a refined root replaces the computed one only when its relative
// residual is smaller and it moved by less than a quarter of the distance
// to the nearest other computed root (so no root is captured by a
// neighbour; Kantorovich, as in checkStep).
func (t *tracer) polish(raw []complex128, k float64) {
	coef := t.charCoeffs(k)
	for i, x := range raw {
		c, _, _, good := t.newtonCoeffs(x, k, coef)
		if !good || cmplx.IsNaN(c) || cmplx.IsInf(c) {
			continue
		}
		sep := math.Inf(1)
		for j, y := range raw {
			if j != i {
				sep = math.Min(sep, cabs(x-y))
			}
		}
		if cabs(c-x) < 0.25*sep && t.relResidual(c, k) < t.relResidual(x, k) {
			raw[i] = c
		}
	}
}

// relResidual returns |a(s) + k·b(s)| relative to the magnitude of its
// terms at s.
func (t *tracer) relResidual(s complex128, k float64) float64 {
	f, _ := t.p.eval(s, k)
	return cabs(f) / t.p.magnitude(s, k)
}

// findMirrors sets mirror[i] to the index j of an active root with
// s[j] = conj(s[i]) exactly, Im s[j] > 0, for every active root i in the
// lower half plane (−1 otherwise, and for every root when off is true:
// the first step out of a cluster follows Puiseux directions per member).
// Each upper root mirrors at most one lower root.
func findMirrors(s []complex128, active []bool, mirror []int, off bool) {
	for i := range mirror {
		mirror[i] = -1
	}
	if off {
		return
	}
	for i, x := range s {
		if !active[i] || imag(x) >= 0 {
			continue
		}
		c := cmplx.Conj(x)
		for j, y := range s {
			if active[j] && y == c && !slices.Contains(mirror, j) {
				mirror[i] = j
				break
			}
		}
	}
}
