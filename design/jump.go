package design

import (
	"math"

	"github.com/loopwise/loopwise/internal/rootfind"
	"github.com/loopwise/loopwise/spec"
)

// This file locates the ends of the settling-time set without bisecting
// on the step metrics. The settling time T_s is the last time |y − y_∞|
// equals the band b·|y_∞|, so T_s ≤ T exactly when
//
//	B(x) = max over t ≥ T of |y_x(t) − y_∞(x)|/|y_∞(x)| ≤ b,
//
// and B is a continuous function of the variable x, also where T_s jumps
// (where a local extremum of y after T touches the band: T_s moves from
// an earlier crossing to one after that extremum). The maximum is taken
// at t = T or at an extremum of y in the next two periods of the least
// damped oscillating pole pair (the step response decays after T; a
// later extremum exceeding the earlier ones would need a slower
// oscillation than that pair). y and y′ = impulse response come from one
// zero-order-hold recursion of the closed loop (points.go) on a grid through T with eight
// points per half period, which brackets the extrema; the two largest are
// located by Brent's method on y′ and their deviation evaluated exactly
// (from the grid state and one short transition: exact values of the continuous response). The end
// is the root of B − b by Brent's method (Brent 1973), then confirmed by
// the step metrics themselves (spec.CheckWith, response.StepMetrics) on
// both sides at jumpConfirm relative: the requirement holds on one side
// and fails on the other, so the end lies within that distance whatever
// the accuracy of B. A jump (the maximum at an extremum) is returned as
// located. Where the maximum is at t = T the settling time is continuous
// and equals T at the root: it is accepted when the step metrics there
// equal T to directResolved, else polished on the step metrics from the
// confirmed narrow bracket (refine). When any step fails — no oscillating pole pair, B − b of one
// sign at both ends, no confirmation — the caller bisects as before.

// jumpConfirm is the relative distance from the root of B − b at which the
// step metrics confirm it (inside the 1e-5 to which bisection locates a
// jump, and far above the accuracy of B, whose values are exact to about
// 1e-12 relative).
const jumpConfirm = 1e-6

// extremumTol is the relative accuracy to which the time of an extremum
// is located: y is flat there, so an error δ in time changes the value by
// about (ω·t·δ)²/2 of the amplitude, far below rounding for δ = 1e-9.
const extremumTol = 1e-9

// settlingBand is the half-width of the settling band that spec uses
// (response.StepMetrics' default, 2 %).
const settlingBand = 0.02

// bandExcess returns B(x) − b for the time limit T and whether the
// maximum is at an extremum after T (a jump of the settling time) rather
// than at T.
func (p *problem) bandExcess(x, T float64) (excess float64, atExtremum, ok bool) {
	c, ok := p.closedAt(x)
	if !ok {
		return 0, false, false
	}
	m := math.Ceil(T / (c.half / 8))
	n := int(m) + 33 // two periods beyond T
	g, ok := c.grid(T/m, n)
	if !ok {
		return 0, false, false
	}
	dev := func(y float64) float64 { return math.Abs(y-c.final) / math.Abs(c.final) }
	anyExtremum := func(d0, d1 float64) bool { return (d0 > 0) != (d1 > 0) }
	best, atExtremum, ok := gridPeak(c, g, int(m), n, dev, anyExtremum, dev(g.y[int(m)]))
	return best - settlingBand, atExtremum, ok
}

// gridPeak returns the largest of edge and val(y) at the extrema of y
// between the grid points lo and hi that isExtremum accepts (from the
// signs of y′ at two neighbouring points), and whether it is at an
// extremum. The two largest on the grid are located by Brent's method on
// y′ and evaluated exactly.
func gridPeak(c *closedLoop, g samples, lo, hi int, val func(float64) float64, isExtremum func(d0, d1 float64) bool, edge float64) (best float64, atExtremum, ok bool) {
	best = edge
	top := [2]int{-1, -1}
	topVal := [2]float64{math.Inf(-1), math.Inf(-1)}
	for i := lo; i < hi && i+1 < len(g.y); i++ {
		if !isExtremum(g.dy[i], g.dy[i+1]) {
			continue
		}
		v := math.Max(val(g.y[i]), val(g.y[i+1]))
		switch {
		case v > topVal[0]:
			top[1], topVal[1] = top[0], topVal[0]
			top[0], topVal[0] = i, v
		case v > topVal[1]:
			top[1], topVal[1] = i, v
		}
	}
	for k, i := range top {
		// The grid value of an extremum is within 1 − cos(π/16) ≈ 2 % of
		// its amplitude: the second needs locating only when it is close.
		if i < 0 || k == 1 && topVal[1] < topVal[0]-0.05*math.Abs(topVal[0]) {
			continue
		}
		y := c.extremumValue(g, i)
		if math.IsNaN(y) {
			return 0, false, false
		}
		if v := val(y); v > best {
			best, atExtremum = v, true
		}
	}
	return best, atExtremum, true
}

// windowEnd returns the end of the settling-time set between xp (the
// requirement met) and xf (not met) and what binds there, located on B
// (see the file comment), and false when it cannot be located that way.
func (p *problem) windowEnd(req spec.Requirements, i int, f func(float64) float64, xp, xf float64) (float64, string, bool) {
	if p.v.ts > 0 || p.v.delay > 0 {
		return 0, "", false
	}
	var excess func(x, T float64) (float64, bool, bool)
	switch req[i].Key() {
	case keySettling:
		excess = p.bandExcess
	case keyRiseTime:
		excess = p.riseExcess
	default:
		return 0, "", false
	}
	T := req[i].Limit()
	if !(T > 0) {
		return 0, "", false
	}
	x, ok := p.hintedCrossing(func(x float64) (float64, bool) {
		e, _, ok := excess(x, T)
		return e, ok
	}, xp, xf, 1e-11)
	if !ok {
		return 0, "", false
	}
	_, jump, ok := excess(x, T)
	if !ok {
		return 0, "", false
	}
	if !jump {
		// The maximum is at T: the settling time equals T there, which
		// the step metrics confirm to directResolved in one evaluation.
		if s := f(x); math.Abs(s) <= directResolved {
			return x, p.boundLabel(req, i, x), true
		}
	}
	d := jumpConfirm * math.Max(math.Abs(x), 1e-300)
	in, out := x-d, x+d
	if xp > xf {
		in, out = x+d, x-d
	}
	if (in-xp)*(in-xf) > 0 || (out-xp)*(out-xf) > 0 {
		return 0, "", false
	}
	fin, fout := f(in), f(out)
	if !(fin >= 0) || !(fout < 0) {
		return 0, "", false
	}
	if jump {
		return x, jumpLabel(req[i]), true
	}
	e := p.refine(f, in, out, fin, fout)
	return e, p.boundLabel(req, i, e), true
}

// The overshoot and the rise time are located the same way: the metric is
// computed from exact values of the response at located times (the peak
// as the largest extremum of y on a grid of eight points per half period
// over four periods, refined by Brent's method on y′; the rise as the
// first crossings of 10 % and 90 % of the final value on that grid,
// refined by Brent's method on y), its root found by Brent's method, and
// the result accepted only if the step metrics there (spec.CheckWith,
// response.StepMetrics) equal the limit to 1e-10 relative; otherwise the
// caller brackets on the step metrics as before.

// directResolved is the relative difference between the step metrics and
// the limit below which a directly computed end is accepted: well inside
// the 1e-9 to which every end is polished.
const directResolved = 1e-10

// gridAt returns the closed loop at x with its unit-step response and the
// derivative on the grid of eight points per half period of the least
// damped oscillating pair over eight half periods.
func (p *problem) gridAt(x float64) (*closedLoop, samples, bool) {
	c, ok := p.closedAt(x)
	if !ok {
		return nil, samples{}, false
	}
	g, ok := c.grid(c.half/8, 64)
	return c, g, ok
}

// overshootAt returns the overshoot in per cent of the final value.
func (p *problem) overshootAt(x float64) (float64, bool) {
	c, g, ok := p.gridAt(x)
	if !ok {
		return 0, false
	}
	final := c.final
	best, at := math.Inf(-1), -1
	for i := 0; i+1 < len(g.y); i++ {
		if g.dy[i]*final > 0 && g.dy[i+1]*final <= 0 {
			if v := math.Max(g.y[i], g.y[i+1]) / final; v > best {
				best, at = v, i
			}
		}
	}
	if at < 0 {
		return 0, false
	}
	y := c.extremumValue(g, at)
	y /= final
	if math.IsNaN(y) {
		return 0, false
	}
	return math.Max(0, 100*(y-1)), true
}

// riseExcess returns 0.9 − M(x), M the largest value of y/y_∞ up to
// t₁₀ + T (t₁₀ the first time y reaches 10 % of y_∞, T the limit on the
// rise time): the rise time is at most T exactly when y reaches 90 % by
// then, M ≥ 0.9. M is continuous in x; it is taken at t₁₀ + T (the rise
// time is continuous there) or at a local maximum of y (the rise time
// jumps when that maximum touches 90 %), which the second result says.
func (p *problem) riseExcess(x, T float64) (excess float64, atExtremum, ok bool) {
	c, g, ok := p.gridAt(x)
	if !ok {
		return 0, false, false
	}
	final := c.final
	var t10 float64
	found := false
	for i := 1; i < len(g.y); i++ {
		if g.y[i]/final >= 0.1 {
			f := func(t float64) (float64, float64) { y, d := c.between(g, i-1, t); return y/final - 0.1, d / final }
			t10 = newtonRoot(f, g.t[i-1], g.t[i], g.y[i-1]/final-0.1, g.y[i]/final-0.1, 1e-13)
			found = true
			break
		}
	}
	if !found {
		return 0, false, false
	}
	w := t10 + T
	m := math.Ceil(w / (c.half / 8))
	wg, ok := c.grid(w/m, int(m))
	if !ok {
		return 0, false, false
	}
	n := len(wg.y) - 1
	val := func(y float64) float64 { return y / final }
	isMax := func(d0, d1 float64) bool { return d0/final > 0 && d1/final <= 0 }
	mx, at, ok := gridPeak(c, wg, 0, n, val, isMax, val(wg.y[n]))
	return 0.9 - mx, at, ok
}

// directEnd returns the end of the set of a maximum on the overshoot
// between xp (met) and xf (not met), computed directly and confirmed by
// the step metrics, and false when it cannot be.
func (p *problem) directEnd(req spec.Requirements, i int, f func(float64) float64, xp, xf float64) (float64, string, bool) {
	if p.v.ts > 0 || p.v.delay > 0 {
		return 0, "", false
	}
	var metric func(float64) (float64, bool)
	switch req[i].Key() {
	case keyOvershoot:
		metric = p.overshootAt
	default:
		return 0, "", false
	}
	lim := req[i].Limit()
	x, ok := p.hintedCrossing(func(x float64) (float64, bool) {
		v, ok := metric(x)
		return (v - lim) / math.Max(math.Abs(lim), 1e-300), ok
	}, xp, xf, 1e-13)
	if !ok {
		return 0, "", false
	}
	if s := f(x); !(math.Abs(s) <= directResolved) {
		return 0, "", false
	}
	return x, p.boundLabel(req, i, x), true
}

// crossing returns the root of g between xp (g < 0) and xf (g > 0) by
// Brent's method to relTol relative, and false when g cannot be computed
// somewhere on the way or has not those signs.
func crossing(g func(float64) (float64, bool), xp, xf, relTol float64) (float64, bool) {
	failed := false
	h := func(x float64) float64 {
		v, ok := g(x)
		if !ok {
			failed = true
			return 0
		}
		return v
	}
	gp, gf := h(xp), h(xf)
	if failed || !(gp < 0) || !(gf > 0) {
		return 0, false
	}
	x := rootfind.Brent(h, xp, xf, gp, gf, relTol)
	return x, !failed
}
