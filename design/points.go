package design

import (
	"math"

	"gonum.org/v1/gonum/mat"

	"github.com/loopwise/loopwise/internal/statespace"
	"github.com/loopwise/loopwise/tf"
)

// closedLoop is the closed loop at one value of the variable with what the
// direct step-metric constructions of jump.go need, computed once per value
// and cached: the final value, the half period π/ω_d of the least damped
// oscillating pole pair and the realisation of package response
// (statespace.FromTransferFunction, the scaled controllable companion
// form), from which the unit-step response y and its derivative y′ (the
// impulse response) are evaluated exactly, as response.Step and
// response.Impulse evaluate them, without realising the loop and finding
// its poles again for every time: on a grid (grid) and between its points
// (between).
type closedLoop struct {
	cl          tf.TF
	final, half float64
	m           statespace.Model
	// decay is −max Re p over the closed-loop poles p (positive: stable);
	// NaN when the poles were not computed (a half period from a hint).
	decay float64
	// The transition of the last grid step (Φ(h), Γ(h) for h = zohStep),
	// kept for the next grid with the same step.
	zohStep  float64
	zohPhi   *mat.Dense
	zohGamma []float64
}

// closedAt returns the closed loop at x (cached), and false when it has no
// finite non-zero final value or no oscillating pole pair. Inside a
// bracket (see hintedCrossing) the half period is the smaller of those at
// the bracket's ends instead of being computed from the poles at x.
func (p *problem) closedAt(x float64) (*closedLoop, bool) {
	if c, ok := p.closed[x]; ok {
		return c, c != nil
	}
	c := p.newClosedLoop(x)
	p.closed[x] = c
	return c, c != nil
}

func (p *problem) newClosedLoop(x float64) *closedLoop {
	l, err := p.v.LoopAt(x)
	if err != nil {
		return nil
	}
	cl, err := l.ClosedLoop()
	if err != nil || cl.IsDiscrete() || cl.DelaySec() != 0 || !cl.IsProper() {
		return nil
	}
	final, err := cl.StaticGain()
	if err != nil || final == 0 || math.IsNaN(final) || math.IsInf(final, 0) {
		return nil
	}
	half, decay := p.halfHint, math.NaN()
	if !(half > 0) {
		poles, err := cl.Poles()
		if err != nil {
			return nil
		}
		best, top := math.Inf(-1), math.Inf(-1)
		for _, q := range poles {
			top = math.Max(top, real(q))
			if imag(q) > 0 && real(q) > best {
				best, half = real(q), math.Pi/imag(q)
			}
		}
		decay = -top
		if !(half > 0) {
			return nil
		}
	}
	m, err := statespace.FromTransferFunction(cl.Num().Coeffs(), cl.Den().Coeffs())
	if err != nil || m.Order() == 0 {
		return nil
	}
	return &closedLoop{cl: cl, final: final, half: half, m: m, decay: decay}
}

// samples are y and y′ on the grid t_k = k·h, k = 0…n, with the states
// of the step (x) and of the impulse response (w) at every point, n
// values each, from which values between grid points are computed.
type samples struct {
	t, y, dy []float64
	x, w     []float64
	n        int
}

// grid returns y and y′ on the grid k·h, k = 0…n, from one zero-order-hold
// transition Φ(h), Γ(h): the step state advances as x ← Φ·x + Γ from rest,
// the impulse state as w ← Φ·w from B (the recursions of response.Step and
// response.Impulse, sharing one matrix exponential). False when the
// transition cannot be computed or a value is not finite.
func (c *closedLoop) grid(h float64, n int) (samples, bool) {
	if n < 1 {
		return samples{}, false
	}
	if h != c.zohStep || c.zohPhi == nil {
		phi, gamma, err := c.m.ZeroOrderHold(h)
		if err != nil {
			return samples{}, false
		}
		c.zohStep, c.zohPhi, c.zohGamma = h, phi, gamma
	}
	phiM, gamma := c.zohPhi, c.zohGamma
	N := c.m.Order()
	phi := phiM.RawMatrix()
	s := samples{t: make([]float64, n+1), y: make([]float64, n+1), dy: make([]float64, n+1),
		x: make([]float64, (n+1)*N), w: make([]float64, (n+1)*N), n: N}
	copy(s.w, c.m.B)
	C := c.m.C
	for k := 0; k <= n; k++ {
		x, w := s.x[k*N:(k+1)*N], s.w[k*N:(k+1)*N]
		s.t[k] = float64(k) * h
		y, d := c.m.D, 0.0
		for i := 0; i < N; i++ {
			y += C[i] * x[i]
			d += C[i] * w[i]
		}
		if math.IsNaN(y) || math.IsInf(y, 0) || math.IsNaN(d) || math.IsInf(d, 0) {
			return samples{}, false
		}
		s.y[k], s.dy[k] = y, d
		if k == n {
			break
		}
		nx, nw := s.x[(k+1)*N:(k+2)*N], s.w[(k+1)*N:(k+2)*N]
		for i := 0; i < N; i++ {
			nx[i], nw[i] = rowTimes(phi.Data[i*phi.Stride:i*phi.Stride+N], x, w, gamma[i])
		}
	}
	return s, true
}

// rowTimes returns g + row·x and row·w: one row of Φ·x + Γ and of Φ·w.
func rowTimes(row, x, w []float64, g float64) (sx, sw float64) {
	sx = g
	for j, v := range row {
		sx += v * x[j]
		sw += v * w[j]
	}
	return sx, sw
}

// between returns y(t) and y′(t) for t in [t_k, t_{k+1}] from the states
// at t_k and one zero-order-hold transition over τ = t − t_k:
// y = C·(Φ(τ)·x_k + Γ(τ)) + D and y′ = C·Φ(τ)·w_k. The short transition
// (at most one grid step) keeps ‖A·τ‖ small, which makes the matrix
// exponential cheaper and more accurate than one from t = 0. NaN when the
// transition cannot be computed.
func (c *closedLoop) between(g samples, k int, t float64) (y, dy float64) {
	y, dy, _ = c.values(g, k, t, false)
	return y, dy
}

// between2 is between with the second derivative y″ = C·A·Φ(τ)·w_k too.
func (c *closedLoop) between2(g samples, k int, t float64) (y, dy, ddy float64) {
	return c.values(g, k, t, true)
}

func (c *closedLoop) values(g samples, k int, t float64, second bool) (y, dy, ddy float64) {
	tau := t - g.t[k]
	if !(tau >= 0) {
		return math.NaN(), math.NaN(), math.NaN()
	}
	N := g.n
	x, w := g.x[k*N:(k+1)*N], g.w[k*N:(k+1)*N]
	pw := make([]float64, N)
	if tau == 0 {
		y, dy = g.y[k], g.dy[k]
		copy(pw, w)
	} else {
		phi, gamma, err := c.m.ZeroOrderHold(tau)
		if err != nil {
			return math.NaN(), math.NaN(), math.NaN()
		}
		raw := phi.RawMatrix()
		y = c.m.D
		for i := 0; i < N; i++ {
			sx, sw := rowTimes(raw.Data[i*raw.Stride:i*raw.Stride+N], x, w, gamma[i])
			y += c.m.C[i] * sx
			dy += c.m.C[i] * sw
			pw[i] = sw
		}
	}
	if !second {
		return y, dy, 0
	}
	for i := 0; i < N; i++ {
		s := 0.0
		for j := 0; j < N; j++ {
			s += c.m.A.At(i, j) * pw[j]
		}
		ddy += c.m.C[i] * s
	}
	return y, dy, ddy
}

// newtonRoot returns the root of f in [a, b], where fa = f(a) and fb = f(b)
// have opposite signs, by Newton's method safeguarded by bisection (the
// "rtsafe" scheme of Press, Teukolsky, Vetterling & Flannery, Numerical
// Recipes, 3rd ed., 2007, Sec. 9.4, from memory): f and f′ come from one
// evaluation; a Newton step that would leave the bracket, or that does not
// shrink the step fast enough, is replaced by bisection, so the bracket
// always holds the root. It starts from the secant point of the bracket
// and stops when a step is at most relTol·|x| (Newton converges
// quadratically near a simple root, so the last iterate is then accurate
// to about that step squared), after at most 100 evaluations.
func newtonRoot(fdf func(float64) (float64, float64), a, b, fa, fb, relTol float64) float64 {
	if fa == 0 {
		return a
	}
	if fb == 0 {
		return b
	}
	lo, hi := a, b
	if fa > 0 {
		lo, hi = b, a
	}
	x := a - fa*(b-a)/(fb-fa)
	if !(x > math.Min(a, b) && x < math.Max(a, b)) {
		x = 0.5 * (a + b)
	}
	dxOld := math.Abs(b - a)
	dx := dxOld
	f, df := fdf(x)
	for range 100 {
		if math.IsNaN(f) || math.IsNaN(df) {
			return math.NaN()
		}
		if f == 0 {
			return x
		}
		if f < 0 {
			lo = x
		} else {
			hi = x
		}
		if ((x-hi)*df-f)*((x-lo)*df-f) > 0 || math.Abs(2*f) > math.Abs(dxOld*df) {
			dxOld, dx = dx, 0.5*(hi-lo)
			x = lo + dx
		} else {
			dxOld, dx = dx, f/df
			x -= dx
		}
		if math.Abs(dx) <= relTol*math.Abs(x)+1e-300 {
			return x
		}
		f, df = fdf(x)
	}
	return x
}

// hintedCrossing is crossing (Brent's method on g between xp and xf) with
// the grids of every value inside the bracket spaced by the half period at
// its ends: the closed loops at xp and xf are found first (with their
// poles); when both have an oscillating pair whose half periods agree to
// 25 %, the smaller is used for every value tried inside, which saves a
// pole computation per value and keeps the grid (so the computed function)
// the same across the bracket. Otherwise every value gets its own.
func (p *problem) hintedCrossing(g func(float64) (float64, bool), xp, xf, relTol float64) (float64, bool) {
	cp, okp := p.closedAt(xp)
	cf, okf := p.closedAt(xf)
	if okp && okf && math.Abs(cp.half-cf.half) <= 0.25*math.Max(cp.half, cf.half) {
		p.halfHint = math.Min(cp.half, cf.half)
		defer func() { p.halfHint = 0 }()
	}
	return crossing(g, xp, xf, relTol)
}

// extremumValue returns the value of y at its extremum in the grid cell
// [t_k, t_{k+1}], where y′ changes sign, with one exact evaluation in
// most cells: the extremum is first located on the cubic Hermite
// interpolant of y′ from y′ and y″ = C·A·w at the cell's ends (error
// about (ω·h)⁴/384 of the amplitude of y′ for a mode of frequency ω, so
// 1e-4 of the cell for the grids here, h ≤ π/(8ω)); y, y′ and y″ are
// evaluated exactly there (between2) and the value at the extremum is that
// of the quadratic model, y − y′²/(2y″), whose error is of the third order
// in the Newton step −y′/y″ (below 1e-13 of the amplitude for a step of
// 1e-3 of the cell). When that step is larger or leaves the cell, the
// extremum is located by safeguarded Newton iteration on the exact y′ to
// extremumTol and y evaluated there. NaN when an evaluation fails.
func (c *closedLoop) extremumValue(g samples, k int) float64 {
	t0, t1 := g.t[k], g.t[k+1]
	h := t1 - t0
	d0, d1 := g.dy[k], g.dy[k+1]
	e0, e1 := c.second(g, k), c.second(g, k+1)
	herm := func(t float64) (float64, float64) {
		s := (t - t0) / h
		s2, s3 := s*s, s*s*s
		v := (2*s3-3*s2+1)*d0 + (s3-2*s2+s)*h*e0 + (-2*s3+3*s2)*d1 + (s3-s2)*h*e1
		dv := ((6*s2-6*s)*d0 + (3*s2-4*s+1)*h*e0 + (-6*s2+6*s)*d1 + (3*s2-2*s)*h*e1) / h
		return v, dv
	}
	ta := newtonRoot(herm, t0, t1, d0, d1, 1e-12)
	if y, dy, ddy := c.between2(g, k, ta); !math.IsNaN(ta) && ddy != 0 {
		step := -dy / ddy
		if math.Abs(step) <= 1e-3*h && ta+step >= t0 && ta+step <= t1 {
			return y + 0.5*dy*step
		}
	}
	te := newtonRoot(func(t float64) (float64, float64) { _, d, dd := c.between2(g, k, t); return d, dd }, t0, t1, d0, d1, extremumTol)
	y, _ := c.between(g, k, te)
	return y
}

// second returns y″ = C·A·w_k at the grid point k.
func (c *closedLoop) second(g samples, k int) float64 {
	N := g.n
	w := g.w[k*N : (k+1)*N]
	out := 0.0
	for i := 0; i < N; i++ {
		s := 0.0
		for j := 0; j < N; j++ {
			s += c.m.A.At(i, j) * w[j]
		}
		out += c.m.C[i] * s
	}
	return out
}
