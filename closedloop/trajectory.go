package closedloop

import (
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"github.com/loopwise/loopwise/internal/rootfind"
	"github.com/loopwise/loopwise/internal/statespace"
	"github.com/loopwise/loopwise/tf"
	"gonum.org/v1/gonum/mat"
)

// A trajectory is the exact unit-step response y of a stable, proper
// rational function from rest, with its first and second running
// integrals. In continuous time the augmented state z = (x, ∫y, ∫∫y, 1)
// obeys z′ = M·z with
//
//	M = [[A, 0, 0, B], [C, 0, 0, D], [0, 1, 0, 0], [0, 0, 0, 0]],
//
// so z(t + τ) = e^(M·τ)·z(t) (one matrix exponential, gonum's Padé
// scaling-and-squaring, Higham 2005) gives y, y′ = C·(A·x + B) and both
// integrals exactly at any time: the times of extrema, zero crossings and
// band crossings are located by Brent's method between the samples of a
// grid that only brackets them. In discrete time the response is the
// sample sequence, read as the held (piecewise constant) signal.
type trajectory struct {
	discrete bool
	ts       float64
	delay    float64 // continuous output delay, seconds (prefilter)
	m        statespace.Model
	n        int
	aug      *mat.Dense // M
	ca       []float64
	cb       float64
	sigma    float64 // slowest decay rate, 1/s
	final    float64
	pts      []tpoint // grid samples and extrema, ascending in time
	h        float64
	states   [][]float64 // augmented state at grid sample k
}

type tpoint struct {
	t, y float64
	k    int // grid interval the point lies in (its left sample)
}

const (
	// decayTimeConstants sets the horizon: the slowest mode has decayed to
	// e^(−30) ≈ 1e-13 of its size, so the tail beyond is below rounding.
	decayTimeConstants = 30
	// peakTimeConstants is the horizon for peaks and band crossings, as in
	// package response: e^(−10) ≈ 4.5e-5 of the slowest mode remains, so
	// no later extremum can matter against a peak of the response.
	peakTimeConstants = 10
	minIntervals      = 400
	perFastest        = 0.25 // ≥ 25 samples per period of the fastest mode, ≥ 12 between extrema
	maxIntervals      = 12000
	// noiseFloor is the relative size below which the response or its
	// derivative is rounding noise of the realisation (about 1e-13 for
	// the orders of interest); crossings below it are not located, and the
	// error bounds of the integrals cover what they could add.
	noiseFloor = 1e-11
)

// newTrajectory computes the samples of the step response of g (stable,
// proper; the caller checks) and locates its extrema. forIntegrals
// extends the horizon from peakTimeConstants to decayTimeConstants of the
// slowest mode, which the integral criteria need and the peak does not.
func newTrajectory(g tf.TF, forIntegrals bool) (*trajectory, error) {
	if !g.IsProper() {
		return nil, fmt.Errorf("%w: %v (a step input gives an impulse)", ErrImproper, g)
	}
	m, err := statespace.FromTransferFunction(g.Num().Coeffs(), g.Den().Coeffs())
	if err != nil {
		return nil, fmt.Errorf("%w: realisation of %v: %v", ErrNumerical, g, err)
	}
	tr := &trajectory{discrete: g.IsDiscrete(), ts: g.SampleTimeSec(), delay: g.DelaySec(), m: m, n: m.Order()}
	if tr.discrete {
		tr.delay = 0 // discrete dead time was turned into poles at z = 0
	}
	final, err := g.StaticGain()
	if err != nil {
		return nil, fmt.Errorf("%w: %v", ErrInternallyUnstable, err)
	}
	tr.final = final
	poles, err := g.Poles()
	if err != nil {
		return nil, fmt.Errorf("%w: poles of %v: %v", ErrNumerical, g, err)
	}
	sigma, fastest := math.Inf(1), 0.0
	for _, p := range poles {
		if tr.discrete {
			if p == 0 {
				continue
			}
			p = cmplx.Log(p) / complex(tr.ts, 0)
		}
		if -real(p) <= 0 {
			return nil, fmt.Errorf("%w: pole %v of %v", ErrInternallyUnstable, p, g)
		}
		sigma = math.Min(sigma, -real(p))
		fastest = math.Max(fastest, cmplx.Abs(p))
	}
	if math.IsInf(sigma, 1) { // static gain or deadbeat
		sigma = 1
		if tr.discrete {
			sigma = 1 / (float64(tr.n+1) * tr.ts)
		}
	}
	tr.sigma = sigma
	H := peakTimeConstants / sigma
	if forIntegrals {
		H = decayTimeConstants / sigma
	}
	if tr.discrete {
		return tr, tr.sampleDiscrete(H)
	}
	return tr, tr.sampleContinuous(H, fastest)
}

func (tr *trajectory) sampleDiscrete(H float64) error {
	N := int(math.Ceil(H / tr.ts))
	N = max(N, 2*tr.n+4)
	if N > 10*maxIntervals {
		return fmt.Errorf("%w: %d samples needed", ErrNotSettled, N)
	}
	n, m := tr.n, tr.m
	x := make([]float64, n)
	nx := make([]float64, n)
	tr.pts = make([]tpoint, N+1)
	for k := 0; k <= N; k++ {
		y := m.D
		for i := range n {
			y += m.C[i] * x[i]
		}
		tr.pts[k] = tpoint{t: float64(k) * tr.ts, y: y, k: k}
		for i := range n {
			v := m.B[i]
			for j := range n {
				v += m.A.At(i, j) * x[j]
			}
			nx[i] = v
		}
		x, nx = nx, x
	}
	return nil
}

func (tr *trajectory) sampleContinuous(H, fastest float64) error {
	n, m := tr.n, tr.m
	if n == 0 {
		tr.pts = []tpoint{{0, m.D, 0}, {H, m.D, 0}}
		return nil
	}
	sz := n + 3
	M := mat.NewDense(sz, sz, nil)
	for i := range n {
		for j := range n {
			M.Set(i, j, m.A.At(i, j))
		}
		M.Set(i, sz-1, m.B[i])
		M.Set(n, i, m.C[i])
	}
	M.Set(n, sz-1, m.D)
	M.Set(n+1, n, 1)
	tr.aug = M
	tr.ca = make([]float64, n)
	for j := range n {
		for i := range n {
			tr.ca[j] += m.C[i] * m.A.At(i, j)
		}
		tr.cb += m.C[j] * m.B[j]
	}
	h := H / minIntervals
	if fastest > 0 {
		h = math.Min(h, perFastest/fastest)
	}
	h = math.Max(h, H/maxIntervals)
	N := int(math.Ceil(H/h - 1e-9))
	tr.h = h
	phi := tr.expm(h)
	tr.states = make([][]float64, N+1)
	flat := make([]float64, (N+1)*sz)
	raw := phi.RawMatrix()
	for k := range tr.states {
		tr.states[k] = flat[k*sz : (k+1)*sz : (k+1)*sz]
	}
	tr.states[0][sz-1] = 1
	for k := 1; k <= N; k++ {
		prev, next := tr.states[k-1], tr.states[k]
		for i := range sz {
			row := raw.Data[i*raw.Stride : i*raw.Stride+sz]
			s := 0.0
			for j, x := range prev {
				s += row[j] * x
			}
			next[i] = s
		}
	}
	tr.pts = make([]tpoint, 0, N+16)
	ds := make([]float64, N+1)
	dmax := 0.0
	for k := range ds {
		ds[k] = tr.deriv(tr.states[k])
		dmax = math.Max(dmax, math.Abs(ds[k]))
	}
	// Sign changes of y′ where |y′| stays below noiseFloor·max|y′| on both
	// sides are rounding in the settled tail, not extrema worth locating.
	floor := noiseFloor * dmax
	for k := 0; k <= N; k++ {
		tr.pts = append(tr.pts, tpoint{float64(k) * h, tr.value(tr.states[k]), k})
		if k == N {
			break
		}
		dPrev, d := ds[k], ds[k+1]
		if dPrev*d < 0 && math.Max(math.Abs(dPrev), math.Abs(d)) > floor {
			t := tr.solve(float64(k)*h, float64(k+1)*h, func(t float64) float64 { return tr.deriv(tr.at(t)) })
			tr.pts = append(tr.pts, tpoint{t, tr.value(tr.at(t)), k})
		}
	}
	sort.SliceStable(tr.pts, func(i, j int) bool { return tr.pts[i].t < tr.pts[j].t })
	return nil
}

func (tr *trajectory) expm(t float64) *mat.Dense {
	var a, e mat.Dense
	a.Scale(t, tr.aug)
	e.Exp(&a)
	return &e
}

func mulVec(a *mat.Dense, v []float64) []float64 {
	raw := a.RawMatrix()
	out := make([]float64, raw.Rows)
	for i := range raw.Rows {
		row := raw.Data[i*raw.Stride : i*raw.Stride+raw.Cols]
		s := 0.0
		for j, x := range v {
			s += row[j] * x
		}
		out[i] = s
	}
	return out
}

// at returns the augmented state at time t (no dead time), exact.
func (tr *trajectory) at(t float64) []float64 {
	k := min(max(int(math.Floor(t/tr.h)), 0), len(tr.states)-1)
	tau := t - float64(k)*tr.h
	if tau == 0 {
		return tr.states[k]
	}
	return mulVec(tr.expm(tau), tr.states[k])
}

func (tr *trajectory) value(z []float64) float64 {
	y := tr.m.D * z[len(z)-1]
	for i := range tr.n {
		y += tr.m.C[i] * z[i]
	}
	return y
}

func (tr *trajectory) deriv(z []float64) float64 {
	d := tr.cb
	for i := range tr.n {
		d += tr.ca[i] * z[i]
	}
	return d
}

// solve returns the root of f in [a, b] (a sign change) by Brent's method
// to 4 ulps.
func (tr *trajectory) solve(a, b float64, f func(float64) float64) float64 {
	return rootfind.Brent(f, a, b, f(a), f(b), 4*0x1p-52)
}

// yAt returns y at time t (dead time excluded) in continuous time.
func (tr *trajectory) yAt(t float64) float64 { return tr.value(tr.at(t)) }

// peak returns the value of y of largest magnitude and its time (dead time
// included). For a continuous response the largest |y| lies at t = 0+, at
// an extremum or at the end of the horizon, all of which are points.
//
// When no value exceeds the final value in magnitude (to 1e-12 relative)
// the response creeps towards it: the supremum is the final value,
// approached as t → ∞, and (FinalValue, +Inf) is returned.
func (tr *trajectory) peak() (value, timeSec float64) {
	value, timeSec = peakOf(tr.pts, tr.final)
	return value, timeSec + tr.delay
}

// peakOf returns the value of largest magnitude among pts and its time,
// or (final, +Inf) when none exceeds the final value in magnitude (to
// 1e-12 relative): the supremum is then approached as t → ∞.
func peakOf(pts []tpoint, final float64) (value, timeSec float64) {
	best := pts[0]
	for _, p := range pts[1:] {
		if math.Abs(p.y) > math.Abs(best.y)*(1+1e-13) {
			best = p
		}
	}
	if final != 0 && math.Abs(best.y) <= math.Abs(final)*(1+1e-12) {
		return final, math.Inf(1)
	}
	return best.y, best.t
}

// lastOutside returns the index of the last point of pts farther than
// level from final, −1 if none.
func lastOutside(pts []tpoint, final, level float64) int {
	last := -1
	for i, p := range pts {
		if math.Abs(p.y-final) > level {
			last = i
		}
	}
	return last
}

// lastExit returns the last time |y − final| equals level (dead time
// included); 0 if it never exceeds it. Discrete: the first sample after
// the last one outside (the held output enters the band for good).
func (tr *trajectory) lastExit(level float64) float64 {
	last := lastOutside(tr.pts, tr.final, level)
	switch {
	case last < 0:
		return 0
	case last == len(tr.pts)-1:
		return math.Inf(1)
	case tr.discrete:
		return tr.pts[last+1].t
	}
	a, b := tr.pts[last], tr.pts[last+1]
	target := tr.final + level
	if a.y < tr.final {
		target = tr.final - level
	}
	t := tr.solve(a.t, b.t, func(t float64) float64 { return tr.yAt(t) - target })
	return t + tr.delay
}

// integrals returns ∫|y|, ∫y², ∫t·|y| over [0, ∞) (dead time included,
// continuous) and an estimate of the error of the first and third. It
// needs final = 0 (otherwise the integrals are +Inf). ∫y² is left to the
// caller (Lyapunov); here only IAE and ITAE.
//
// Continuous: between consecutive zero crossings of y (located by Brent)
// y keeps its sign, and ∫|y| = |ΔY₁|, ∫t·|y| = |Δ(t·Y₁ − Y₂)| with the
// running integrals Y₁ = ∫y, Y₂ = ∫Y₁ carried exactly in the augmented
// state. The tail beyond the horizon H is added exactly as
// ∫_H^∞ y = −C·A⁻¹·ξ and ∫_H^∞ t·y = C·(A⁻² − H·A⁻¹)·ξ with
// ξ = x(H) − x(∞), x(∞) = −A⁻¹·B, assuming that y keeps its sign there;
// the error bound is that tail's magnitude twice (a sign change in the
// tail changes the sum by at most that), plus the rounding of the sums
// (1e-13 relative).
//
// Discrete: the held output's integrals T·Σ|y[k]| and Σ|y[k]|·T²·(k + ½),
// with the geometric tail |y[N]|·T/(1 − ρ) as the bound, ρ = e^(−σT).
func (tr *trajectory) integrals() (iae, itae, iaeBound, itaeBound float64, err error) {
	if tr.final != 0 && math.Abs(tr.final) > 1e-12*tr.scale() {
		return math.Inf(1), math.Inf(1), 0, 0, nil
	}
	if tr.discrete {
		T := tr.ts
		for k, p := range tr.pts {
			iae += T * math.Abs(p.y)
			itae += math.Abs(p.y) * T * T * (float64(k) + 0.5)
		}
		last := tr.pts[len(tr.pts)-1]
		rho := math.Exp(-tr.sigma * T)
		iaeBound = math.Abs(last.y)*T/(1-rho) + 1e-13*iae
		itaeBound = math.Abs(last.y)*T*(last.t+T/(1-rho))/(1-rho) + 1e-13*itae
		return iae, itae, iaeBound, itaeBound, nil
	}
	if tr.n == 0 {
		return 0, 0, 0, 0, nil
	}
	n := tr.n
	// Zero crossings.
	sc := tr.scale()
	cross := []float64{0}
	for i := 1; i < len(tr.pts); i++ {
		a, b := tr.pts[i-1], tr.pts[i]
		if a.y*b.y < 0 && math.Max(math.Abs(a.y), math.Abs(b.y)) > 1e-3*noiseFloor*sc {
			cross = append(cross, tr.solve(a.t, b.t, tr.yAt))
		} else if b.y == 0 && i < len(tr.pts)-1 {
			cross = append(cross, b.t)
		}
	}
	H := tr.pts[len(tr.pts)-1].t
	cross = append(cross, H)
	Y1 := func(z []float64) float64 { return z[n] }
	Y2 := func(z []float64) float64 { return z[n+1] }
	prev, tp := tr.at(0), 0.0
	for _, t := range cross[1:] {
		z := tr.at(t)
		iae += math.Abs(Y1(z) - Y1(prev))
		itae += math.Abs(t*Y1(z) - Y2(z) - (tp*Y1(prev) - Y2(prev)))
		prev, tp = z, t
	}
	// Exact tails.
	A := mat.NewDense(n, n, nil)
	for i := range n {
		for j := range n {
			A.Set(i, j, tr.m.A.At(i, j))
		}
	}
	var lu mat.LU
	lu.Factorize(A)
	xinf := mat.NewVecDense(n, nil)
	if err := lu.SolveVecTo(xinf, false, mat.NewVecDense(n, append([]float64(nil), tr.m.B...))); err != nil {
		return 0, 0, 0, 0, fmt.Errorf("%w: steady state: %v", ErrNumerical, err)
	}
	xi := mat.NewVecDense(n, nil)
	zH := tr.at(H)
	for i := range n {
		xi.SetVec(i, zH[i]+xinf.AtVec(i)) // x(H) − (−A⁻¹B)
	}
	a1 := mat.NewVecDense(n, nil) // A⁻¹ξ
	if err := lu.SolveVecTo(a1, false, xi); err != nil {
		return 0, 0, 0, 0, fmt.Errorf("%w: tail: %v", ErrNumerical, err)
	}
	a2 := mat.NewVecDense(n, nil) // A⁻²ξ
	if err := lu.SolveVecTo(a2, false, a1); err != nil {
		return 0, 0, 0, 0, fmt.Errorf("%w: tail: %v", ErrNumerical, err)
	}
	c := mat.NewVecDense(n, append([]float64(nil), tr.m.C...))
	tail1 := -mat.Dot(c, a1)
	tail2 := mat.Dot(c, a2) - H*mat.Dot(c, a1)
	iae += math.Abs(tail1)
	itae += math.Abs(tail2)
	iaeBound = 2*math.Abs(tail1) + 1e-13*iae
	itaeBound = 2*math.Abs(tail2) + 1e-13*itae
	if tr.delay > 0 {
		// y is shifted by the dead time τ: ∫t·|y(t−τ)| = ITAE₀ + τ·IAE₀.
		itae += tr.delay * iae
		itaeBound += tr.delay * iaeBound
	}
	return iae, itae, iaeBound, itaeBound, nil
}

// scale returns the largest |y| seen, at least 1e-300.
func (tr *trajectory) scale() float64 {
	s := 1e-300
	for _, p := range tr.pts {
		s = math.Max(s, math.Abs(p.y))
	}
	return s
}
