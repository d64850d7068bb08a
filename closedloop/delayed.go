package closedloop

// Exact time responses of a continuous loop with dead time (issue 15,
// follow-up item 3): the step responses behind StepDeviation,
// ControlEffort and ErrorIntegrals are those of the delay equation itself,
// computed by response.ClosedLoopStep (the method of steps), not of a Padé
// approximation.
//
// Every closed-loop function of the standard loop with dead times τ_C, τ_G,
// τ_H in controller, plant and sensor (τ = τ_C + τ_G + τ_H the loop's) and
// τ_F in the prefilter is, with the rational parts C, G, H, F and
// L = k·C·G·H·e^(−sτ),
//
//	Φ·e^(−s·t₀)/(1 + L) = Φ·e^(−sτ)/(1 + L) · e^(s·δ),   δ = τ − t₀,
//
// for a rational Φ and the function's own dead time t₀:
//
//	load → output     Φ = G,            t₀ = τ_G
//	reference → u     Φ = k·C·F,        t₀ = τ_C + τ_F
//	load → u          Φ = −k·C·G·H,     t₀ = τ   (= −L/(1 + L))
//	reference → y     Φ = k·C·G·F,      t₀ = τ_C + τ_G + τ_F  (error: 1 − y)
//
// so that each response is y(t) = w(t + δ), w the response of
// Φ·e^(−sτ)/(1 + L) to a unit step (response.FilteredDisturbance), which is
// zero before τ. w is sampled on a grid that puts several samples in each
// collocation interval of ClosedLoopStep (whose ends include every break
// point t = τ, 2τ, … of the delay equation), and is evaluated between the
// samples by the degree-6 interpolant on the seven nearest samples of the
// same interval, where w is analytic: with h·ρ ≤ 1/32 (ρ the largest
// open-loop pole modulus, h the sample spacing) its error is about
// (h·ρ)⁷/7! ≈ 6e-15 of the response's size. Extrema, band crossings and
// zero crossings are then located by Brent's method on the interpolant (and
// on its derivative), and IAE, ITAE and ISE are 8-point Gauss–Legendre sums
// over every sample interval, split at the zero crossings.

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/internal/rootfind"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/response"
	"github.com/loopwise/loopwise/tf"
)

// delayedResponse is the exact step response of one closed-loop function of
// a continuous loop with dead time: y(t) = off + sgn·w(t + δ), t ≥ 0.
type delayedResponse struct {
	tau, delta  float64 // loop dead time; shift from y-time to w-time
	t0          float64 // the function's own dead time τ − δ
	off, sgn    float64 // y = off + sgn·w (the error: 1 − w)
	jump        float64 // w(τ+) = Φ(∞)
	step, hc    float64 // sample spacing and collocation interval of w
	per         int     // samples per collocation interval
	w           []float64
	final       float64
	sigma       float64 // decay rate of the rightmost closed-loop root, 1/s
	errEstimate float64 // ClosedLoopStep's interpolation estimate, relative to max |w|
	pts         []tpoint
	wmax        float64
}

// loopDelay returns the dead time of the continuous loop that the time
// metrics treat exactly: 0 in discrete time (there it is exact poles at
// z = 0) and 0 for a negligible dead time (see negligibleDelay), whose
// rational functions are exact to that level.
func (fs *Functions) loopDelay() float64 {
	if fs.SampleTimeSec > 0 || fs.delayNegligible {
		return 0
	}
	p := fs.exact
	return p.c.DelaySec() + p.g.DelaySec() + p.h.DelaySec()
}

// negligibleDelayTol is the size of τ·ρ (ρ the largest modulus of a pole
// or zero of the parts) below which a dead time is negligible: e^(−sτ)
// differs from its Padé approximant of order 1 by about (τρ)³/12 < 1e-25
// at the loop's own frequencies, far below rounding, while the exact
// method would need the root count of a quasi-polynomial at a time scale
// 1e8 times finer than the loop's.
const negligibleDelayTol = 1e-8

// negligibleDelay reports whether the continuous dead time tau of the
// loop p is negligible against its fastest pole or zero.
func negligibleDelay(p parts, tau float64) bool {
	if tau == 0 {
		return false
	}
	rho := 0.0
	for _, g := range []tf.TF{p.c, p.g, p.h} {
		for _, q := range []func() ([]complex128, error){g.WithoutDelay().Poles, g.WithoutDelay().Zeros} {
			rs, err := q()
			if err != nil {
				return false
			}
			for _, r := range rs {
				rho = math.Max(rho, math.Hypot(real(r), imag(r)))
			}
		}
	}
	if rho == 0 {
		rho = math.Abs(p.k) // a static loop: its only scale is the gain
	}
	return tau*rho < negligibleDelayTol
}

// samplesPerInterval is how many samples of w each collocation interval of
// ClosedLoopStep gets (reduced, down to minPerInterval, for long
// horizons); maxDelayedSamples bounds the samples of one response.
const (
	samplesPerInterval = 16
	minPerInterval     = 6
	maxDelayedSamples  = 2_000_000
	// delayedDecay sets the horizon 5τ + delayedDecay/σ: e^(−30) ≈ 1e-13
	// of the slowest mode remains, as decayTimeConstants for rational loops.
	delayedDecay = 30
)

// delayedStep returns the exact unit-step response of the function from →
// to of a continuous loop with dead time.
func (fs *Functions) delayedStep(from Input, to Output) (*delayedResponse, error) {
	p := fs.exact
	tc, tg, th, tfl := p.c.DelaySec(), p.g.DelaySec(), p.h.DelaySec(), p.f.DelaySec()
	tau := tc + tg + th
	c, g, f := p.c.WithoutDelay(), p.g.WithoutDelay(), p.f.WithoutDelay()
	kc, err := c.Scale(p.k)
	if err != nil {
		return nil, fmt.Errorf("%w: %v", ErrLoop, err)
	}
	series := func(parts ...tf.TF) (tf.TF, error) {
		out := parts[0]
		for _, q := range parts[1:] {
			var err error
			if out, err = out.Series(q); err != nil {
				return tf.TF{}, fmt.Errorf("%w: %v", ErrLoop, err)
			}
		}
		return out, nil
	}
	loop, err := fs.delayedLoop()
	if err != nil {
		return nil, err
	}
	d := &delayedResponse{tau: tau, off: 0, sgn: 1}
	var phi tf.TF
	switch {
	case from == LoadDisturbance && to == ProcessOutput:
		phi, d.t0 = g, tg
	case from == LoadDisturbance && to == Error:
		phi, d.t0, d.sgn = g, tg, -1
	case from == Reference && to == Control:
		if phi, err = series(kc, f); err != nil {
			return nil, err
		}
		d.t0 = tc + tfl
	case from == LoadDisturbance && to == Control:
		phi, d.t0 = loop.WithoutDelay().Neg(), tau
	case from == Reference && to == Error:
		if phi, err = series(kc, g, f); err != nil {
			return nil, err
		}
		d.t0, d.off, d.sgn = tc+tg+tfl, 1, -1
	case from == Reference && to == ProcessOutput:
		if phi, err = series(kc, g, f); err != nil {
			return nil, err
		}
		d.t0 = tc + tg + tfl
	default:
		return nil, fmt.Errorf("%w: %v → %v with dead time has no exact response here", ErrLoop, from, to)
	}
	if !phi.IsProper() {
		return nil, fmt.Errorf("%w: %v → %v: %v (a step input gives an impulse)", ErrImproper, from, to, phi)
	}
	d.delta = tau - d.t0
	if phi.IsStrictlyProper() {
		d.jump = 0
	} else {
		d.jump = phi.GainFactor()
	}
	// Exact stability and time scale: the rightmost root of the
	// quasi-polynomial (locus.DelayedRoots, with its count proof), found
	// once per Functions.
	fs.rightmostOnce.Do(func() { fs.rightmost, fs.rightmostErr = rightmostRoot(loop) })
	if fs.rightmostErr != nil {
		return nil, fs.rightmostErr
	}
	rm := fs.rightmost
	if real(rm) >= -axisTol*math.Max(1, math.Abs(imag(rm))) {
		return nil, fmt.Errorf("%w: with the exact dead time %v s the closed-loop root %v has Re s ≥ 0", ErrInternallyUnstable, tau, rm)
	}
	d.sigma = -real(rm)
	// The collocation interval of ClosedLoopStep, from a run over one
	// dead time.
	set := &response.ClosedLoopSettings{Input: response.FilteredDisturbance, Filter: phi, HorizonSec: tau, StepSec: tau}
	probe, err := response.ClosedLoopStep(loop, set)
	if err != nil {
		return nil, fmt.Errorf("%w: exact response of %v: %v", ErrNumerical, loop, err)
	}
	d.hc = probe.IntervalSec
	M := int(math.Round(tau / d.hc))
	H := math.Max(d.delta, 0) + 5*tau + delayedDecay/d.sigma // w-time
	intervals := int(math.Ceil(H/d.hc - 1e-9))
	d.per = samplesPerInterval
	for d.per > minPerInterval && intervals*d.per > maxDelayedSamples {
		d.per--
	}
	if intervals*d.per > maxDelayedSamples {
		return nil, fmt.Errorf("%w: %d collocation intervals of %v s over %v s", ErrNotSettled, intervals, d.hc, H)
	}
	d.step = d.hc / float64(d.per)
	set.HorizonSec, set.StepSec = float64(intervals)*d.hc, d.step
	r, err := response.ClosedLoopStep(loop, set)
	if err != nil {
		return nil, fmt.Errorf("%w: exact response of %v: %v", ErrNumerical, loop, err)
	}
	d.w = r.Output
	d.errEstimate = r.ErrorEstimate
	// w is zero before τ and jumps to Φ(∞) at τ; the grid puts τ on the
	// sample M·per (the collocation intervals are τ/M long). The sample
	// there is stored as the limit from the right.
	for k := 0; k < M*d.per && k < len(d.w); k++ {
		d.w[k] = 0
	}
	if M*d.per < len(d.w) {
		d.w[M*d.per] = d.jump
	}
	for _, v := range d.w {
		d.wmax = math.Max(d.wmax, math.Abs(v))
	}
	if d.final, err = fs.fns[from][to].TF.StaticGain(); err != nil {
		return nil, fmt.Errorf("%w: %v", ErrInternallyUnstable, err)
	}
	d.points(M)
	return d, nil
}

// delayedLoop returns the loop k·C·G·H·e^(−sτ) of a continuous loop with
// dead time as one transfer function (the plain product: no factor
// cancels, so a hidden mode stays a root of its quasi-polynomial).
// ErrImproper for a biproper loop, whose closed loop is of neutral type.
func (fs *Functions) delayedLoop() (tf.TF, error) {
	p := fs.exact
	tau := p.c.DelaySec() + p.g.DelaySec() + p.h.DelaySec()
	kc, err := p.c.WithoutDelay().Scale(p.k)
	if err != nil {
		return tf.TF{}, fmt.Errorf("%w: %v", ErrLoop, err)
	}
	lr, err := kc.Series(p.g.WithoutDelay())
	if err == nil {
		lr, err = lr.Series(p.h.WithoutDelay())
	}
	if err != nil {
		return tf.TF{}, fmt.Errorf("%w: %v", ErrLoop, err)
	}
	if !lr.IsStrictlyProper() {
		return tf.TF{}, fmt.Errorf("%w: the loop k·C·G·H = %v with dead time %v s is biproper: its closed loop is of neutral type, whose exact response is not computed here", ErrImproper, lr, tau)
	}
	loop, err := lr.WithDelay(tau)
	if err != nil {
		return tf.TF{}, fmt.Errorf("%w: %v", ErrLoop, err)
	}
	return loop, nil
}

// exactStability decides the internal stability of a continuous loop with
// dead time on its quasi-polynomial D_C·D_G·D_H + k·N_C·N_G·N_H·e^(−sτ)
// instead of the Padé polynomial: by the rightmost root with its count
// proof (locus.DelayedRoots, argument principle), or, when the roots
// cannot be counted (a dead time very long against the loop's dynamics),
// by delay-independent stability (locus.DelayedStableDelays: stable for
// every τ ≥ 0). fpoles are the prefilter's poles, which count as well.
// When neither decides (a biproper, neutral loop; no proof), the Padé
// verdict stays and exact is false.
func (fs *Functions) exactStability(fpoles []complex128) (exact bool) {
	loop, err := fs.delayedLoop()
	if err != nil {
		return false
	}
	fs.rightmostOnce.Do(func() { fs.rightmost, fs.rightmostErr = rightmostRoot(loop) })
	var bad []complex128
	switch {
	case fs.rightmostErr == nil && unstable(fs.rightmost, 0):
		rm := fs.rightmost
		rs, err := locus.DelayedRoots(loop, 1, &locus.DelaySettings{Region: locus.Above, MinRealPart: -axisTol * math.Max(1, cmplx.Abs(rm))})
		if err == nil && rs.CountVerified {
			for _, r := range rs.Roots {
				if unstable(r, 0) {
					bad = append(bad, r)
				}
			}
		}
		if len(bad) == 0 {
			bad = []complex128{rm}
			if imag(rm) != 0 {
				bad = append(bad, cmplx.Conj(rm))
			}
		}
	case fs.rightmostErr == nil:
	default:
		st, err := locus.DelayedStableDelays(loop, 1)
		if err != nil || !st.DelayIndependent {
			return false
		}
	}
	for _, p := range fpoles {
		if unstable(p, 0) {
			bad = append(bad, p)
		}
	}
	fs.UnstablePoles = bad
	fs.InternallyStable = len(bad) == 0
	return true
}

// rightmostRoot returns the rightmost closed-loop root of the loop with
// dead time, with the proof that none lies further right.
func rightmostRoot(loop tf.TF) (complex128, error) {
	roots, err := locus.DelayedRoots(loop, 1, &locus.DelaySettings{Count: 1})
	if err != nil && !errors.Is(err, locus.ErrTraceFailed) {
		return 0, fmt.Errorf("%w: closed-loop roots of %v: %v", ErrNumerical, loop, err)
	}
	if len(roots.Roots) == 0 || !roots.CountVerified {
		return 0, fmt.Errorf("%w: the rightmost closed-loop root of %v was not found with a proof", ErrNumerical, loop)
	}
	return roots.Roots[0], nil
}

// wAt returns w at w-time tw from the degree-6 interpolant of the seven
// nearest samples in tw's collocation interval, and its derivative.
func (d *delayedResponse) wAt(tw float64) (v, dv float64) {
	if tw < d.tau {
		return 0, 0
	}
	last := len(d.w) - 1
	j := int(math.Floor(tw / d.hc))
	j = min(max(j, 0), last/d.per-1)
	base := j * d.per
	u := tw/d.step - float64(base)
	s := min(max(int(math.Round(u))-3, 0), d.per-6)
	x := u - float64(s)
	return lagrange7(d.w[base+s:base+s+7], x)
}

// lagrange7 evaluates the interpolant through y at the nodes 0…6 at x,
// with its derivative (Lagrange form, products taken directly).
func lagrange7(y []float64, x float64) (v, dv float64) {
	for i := range 7 {
		li, dli := 1.0, 0.0
		for m := range 7 {
			if m == i {
				continue
			}
			den := float64(i - m)
			f := (x - float64(m)) / den
			dli = dli*f + li/den
			li *= f
		}
		v += y[i] * li
		dv += y[i] * dli
	}
	return v, dv
}

// yAt returns y at time t ≥ t0 (y = off before t0).
func (d *delayedResponse) yAt(t float64) float64 {
	w, _ := d.wAt(t + d.delta)
	return d.off + d.sgn*w
}

// points lists y at t = 0, just before and after t0, at every sample after
// τ (w-time) and at every extremum located on the interpolant.
func (d *delayedResponse) points(M int) {
	d.pts = []tpoint{{t: 0, y: d.off}}
	start := M * d.per
	if d.t0 > 0 {
		d.pts = append(d.pts, tpoint{t: d.t0, y: d.off, k: -1})
	}
	floor := 0.0
	ds := make([]float64, len(d.w))
	for k := start; k < len(d.w); k++ {
		_, ds[k] = d.wAt(float64(k)*d.step + 1e-9*d.step) // from the right at τ
		floor = math.Max(floor, math.Abs(ds[k]))
	}
	floor *= noiseFloor
	for k := start; k < len(d.w); k++ {
		tw := float64(k) * d.step
		d.pts = append(d.pts, tpoint{t: tw - d.delta, y: d.off + d.sgn*d.w[k], k: k})
		if k+1 < len(d.w) && ds[k]*ds[k+1] < 0 && math.Max(math.Abs(ds[k]), math.Abs(ds[k+1])) > floor {
			a, b := tw, float64(k+1)*d.step
			f := func(t float64) float64 { _, dv := d.wAt(t); return dv }
			fa, fb := f(a+1e-9*d.step), f(b-1e-9*d.step)
			if fa*fb < 0 {
				te := rootfind.Brent(f, a+1e-9*d.step, b-1e-9*d.step, fa, fb, 4*0x1p-52)
				v, _ := d.wAt(te)
				d.pts = append(d.pts, tpoint{t: te - d.delta, y: d.off + d.sgn*v, k: k})
			}
		}
	}
}

// peak returns the value of largest magnitude and its time, or (final,
// +Inf) for a response that creeps to its final value, as trajectory.peak.
func (d *delayedResponse) peak() (value, timeSec float64) { return peakOf(d.pts, d.final) }

// initial returns y just after the function's own dead time t0 (y(0+)
// when t0 = 0): the kick of the control signal when the step reaches it.
func (d *delayedResponse) initial() float64 { return d.off + d.sgn*d.jump }

// lastExit returns the last time |y − final| equals level; 0 if never
// outside, t0 when y jumps into the band there.
func (d *delayedResponse) lastExit(level float64) float64 {
	last := lastOutside(d.pts, d.final, level)
	switch {
	case last < 0:
		return 0
	case last == len(d.pts)-1:
		return math.Inf(1)
	}
	a, b := d.pts[last], d.pts[last+1]
	if a.k < 0 || (a.t < d.t0 && b.t >= d.t0) || (d.t0 == 0 && last == 0) {
		return d.t0 // the plateau before the dead time ends; y jumps into the band
	}
	target := d.final + level
	if a.y < d.final {
		target = d.final - level
	}
	f := func(t float64) float64 { return d.yAt(t) - target }
	return rootfind.Brent(f, a.t, b.t, f(a.t), f(b.t), 4*0x1p-52)
}

// gauss8 are the nodes and weights of 8-point Gauss–Legendre quadrature on
// [−1, 1] (exact for polynomials of degree 15; Abramowitz & Stegun 1964,
// table 25.4).
var gauss8 = [4][2]float64{
	{0.1834346424956498049394761, 0.3626837833783619829651504},
	{0.5255324099163289858177390, 0.3137066458778872873379622},
	{0.7966664774136267395915539, 0.2223810344533744705443560},
	{0.9602898564975362316835609, 0.1012285362903762591525314},
}

// integrals returns IAE, ITAE and ISE of y over [0, ∞) with bounds on the
// errors of the first two (ISE's error is of the same relative size as
// IAE's). +Inf with a residual offset.
func (d *delayedResponse) integrals() (iae, itae, ise, iaeBound, itaeBound float64) {
	scale := math.Max(d.wmax, math.Abs(d.off))
	if d.final != 0 && math.Abs(d.final) > 1e-12*scale {
		inf := math.Inf(1)
		return inf, inf, inf, 0, 0
	}
	// The plateau y = off on [0, t0).
	iae = math.Abs(d.off) * d.t0
	itae = math.Abs(d.off) * d.t0 * d.t0 / 2
	ise = d.off * d.off * d.t0
	add := func(a, b float64) { // y keeps its sign on [a, b]
		m, r := (a+b)/2, (b-a)/2
		for _, q := range gauss8 {
			for _, x := range []float64{m - r*q[0], m + r*q[0]} {
				y := d.yAt(x)
				iae += r * q[1] * math.Abs(y)
				itae += r * q[1] * x * math.Abs(y)
				ise += r * q[1] * y * y
			}
		}
	}
	start := int(math.Round(d.tau / d.step))
	for k := start; k+1 < len(d.w); k++ {
		a, b := float64(k)*d.step-d.delta, float64(k+1)*d.step-d.delta
		if b <= 0 {
			continue
		}
		a = math.Max(a, 0)
		ya, yb := d.yAt(a+1e-12*d.step), d.yAt(b)
		if ya*yb < 0 {
			f := func(t float64) float64 { return d.yAt(t) }
			z := rootfind.Brent(f, a+1e-12*d.step, b, ya, yb, 4*0x1p-52)
			add(a, z)
			add(z, b)
		} else {
			add(a, b)
		}
	}
	// Tail beyond the horizon: |y| ≤ |y(H)|·e^(−σ(t − H)) to leading
	// order; bounded, not added, with twice its size.
	H := float64(len(d.w)-1)*d.step - d.delta
	yH := math.Abs(d.yAt(H))
	tail1 := 2 * yH / d.sigma
	tail2 := 2 * yH * (H/d.sigma + 1/(d.sigma*d.sigma))
	// Interpolation: the error estimate of ClosedLoopStep (relative to
	// max |w|) plus 6e-15 for the degree-6 interpolant, over the horizon.
	interp := (d.errEstimate + 1e-14) * scale
	iaeBound = tail1 + interp*H + 1e-13*iae
	itaeBound = tail2 + interp*H*H/2 + 1e-13*itae
	return iae, itae, ise, iaeBound, itaeBound
}

// plotSamples is the number of intervals of StepResponse's grid for a loop
// with dead time.
const plotSamples = 1000

// StepResponse returns the unit-step response of the function from input
// to output on a grid for plotting: response.Step of Function.TF for a
// loop without continuous dead time; for one with dead time the exact
// delayed response (see the package documentation) sampled on plotSamples
// intervals over t₀ + 3τ + 10/σ (t₀ the function's own dead time, τ the
// loop's, σ the decay rate of the rightmost closed-loop root), with both
// sides of the jump at t₀ when there is one. Errors: as StepDeviation.
func (fs *Functions) StepResponse(from Input, to Output) (response.Response, error) {
	if err := fs.requireStable(); err != nil {
		return response.Response{}, err
	}
	if fs.loopDelay() == 0 {
		r, err := response.Step(fs.fns[from][to].TF, nil)
		if err != nil {
			return response.Response{}, fmt.Errorf("%w: %v → %v: %v", ErrNumerical, from, to, err)
		}
		return r, nil
	}
	d, err := fs.delayedStep(from, to)
	if err != nil {
		return response.Response{}, fmt.Errorf("%v → %v: %w", from, to, err)
	}
	end := float64(len(d.w)-1)*d.step - d.delta
	H := math.Min(end, d.t0+3*d.tau+10/d.sigma)
	h := H / plotSamples
	var r response.Response
	for k := 0; k <= plotSamples; k++ {
		t := float64(k) * h
		y := d.off
		if t >= d.t0 {
			if len(r.TimeSec) > 0 && r.TimeSec[len(r.TimeSec)-1] < d.t0 && d.jump != 0 {
				r.TimeSec, r.Output = append(r.TimeSec, d.t0, d.t0), append(r.Output, d.off, d.initial())
			}
			y = d.yAt(t)
		}
		r.TimeSec, r.Output = append(r.TimeSec, t), append(r.Output, y)
	}
	return r, nil
}
