package closedloop

import (
	"fmt"
	"math"
	"math/cmplx"
	"sync"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// Loop describes the standard feedback loop
//
//	u = k·C·(F·r − (H·y + n)),   y = G·(u + d) + dₒ
//
// with controller C, plant G, sensor H in the feedback path, loop gain k and
// an optional prefilter (reference weighting) F, which makes the
// controller two-degree-of-freedom. The loop transfer function is
// L = k·C·G·H. All parts must share one sample period (0 = continuous).
type Loop struct {
	// Plant is G. Required (a zero plant opens the loop).
	Plant tf.TF
	// Controller is C. Required.
	Controller tf.TF
	// Sensor is H, in the feedback path. The zero value means H = 1 (a
	// zero sensor would open the loop).
	Sensor tf.TF
	// Prefilter is F, applied to the reference only. The zero value means
	// F = 1 (one degree of freedom).
	Prefilter tf.TF
	// Gain is k. If zero, defaults to 1; it must be finite.
	Gain float64
}

// Input names an input of the loop.
type Input int

// The inputs of the standard loop.
const (
	// Reference is r.
	Reference Input = iota
	// LoadDisturbance is d, added to the control signal at the plant input.
	LoadDisturbance
	// OutputDisturbance is dₒ, added to the plant output.
	OutputDisturbance
	// Noise is n, added to the measured signal H·y.
	Noise
	numInputs
)

// Output names an output of the loop.
type Output int

// The outputs of the standard loop.
const (
	// ProcessOutput is y.
	ProcessOutput Output = iota
	// Error is the tracking error e = r − y.
	Error
	// Control is the control signal u, the plant input before the load
	// disturbance is added.
	Control
	numOutputs
)

// String returns the input's name in words.
func (i Input) String() string {
	switch i {
	case Reference:
		return "reference"
	case LoadDisturbance:
		return "load disturbance"
	case OutputDisturbance:
		return "output disturbance"
	case Noise:
		return "measurement noise"
	}
	return fmt.Sprintf("Input(%d)", int(i))
}

// String returns the output's name in words.
func (o Output) String() string {
	switch o {
	case ProcessOutput:
		return "output"
	case Error:
		return "error"
	case Control:
		return "control signal"
	}
	return fmt.Sprintf("Output(%d)", int(o))
}

// Function is one closed-loop transfer function, in minimal form.
type Function struct {
	// From and To name the input and output.
	From Input
	To   Output
	// TF is the minimal transfer function: common pole–zero pairs
	// cancelled as by tf.Minimal. With dead time inside a continuous loop it
	// is rational with the dead time replaced by its Padé approximant of
	// order Settings.PadeOrder (see Functions.DelayApproximated); a dead time
	// of the prefilter outside the loop is kept exactly.
	TF tf.TF
	// Cancelled lists the pole–zero pairs removed to reach TF, each once.
	Cancelled []complex128
	// HiddenModes lists those cancelled values that lie in the closed right
	// half plane (continuous, Re ≥ 0 within rounding) or on or outside the
	// unit circle (discrete): modes of the loop that TF does not show.
	HiddenModes []complex128
	// InternallyStable repeats Functions.InternallyStable so that a
	// function handed on alone still carries the verdict on the whole loop.
	InternallyStable bool
}

// Functions holds every closed-loop transfer function of a loop.
type Functions struct {
	loop     Loop
	exact    parts // the parts with their exact dead times
	approx   parts // the parts with dead time approximated (continuous) or as powers of z
	fns      [numInputs][numOutputs]Function
	charPoly poly.Poly
	// delayNegligible: the loop's continuous dead time is negligible
	// (negligibleDelay), and the time metrics use the rational functions.
	delayNegligible bool
	// rightmost is the exact rightmost closed-loop root of a continuous
	// loop with dead time, found once (delayed.go).
	rightmostOnce sync.Once
	rightmost     complex128
	rightmostErr  error

	// ClosedLoopPoles are the roots of the characteristic polynomial
	// D_C·D_G·D_H + k·N_C·N_G·N_H of the loop (no cancellation), and the
	// poles of the prefilter.
	ClosedLoopPoles []complex128
	// UnstablePoles are those ClosedLoopPoles with Re ≥ 0 (continuous) or
	// |z| ≥ 1 (discrete); the loop is internally stable when there are
	// none. With StabilityExact, they are instead the exact roots of the
	// delayed loop's quasi-polynomial with Re s ≥ 0 (and unstable
	// prefilter poles).
	UnstablePoles []complex128
	// HiddenModes are the unstable poles that some closed-loop function
	// cancels (the union over all functions, each value once).
	HiddenModes []complex128
	// InternallyStable reports whether every closed-loop pole is stable
	// (Desoer & Chan, "The feedback interconnection of lumped linear
	// time-invariant systems", J. Franklin Inst. 300, 1975: the loop is
	// internally stable iff all the input–output maps are, which for
	// coprime-free polynomial data is the characteristic polynomial above).
	InternallyStable bool
	// StabilityExact reports whether InternallyStable and UnstablePoles of
	// a continuous loop with dead time were decided on the exact
	// quasi-polynomial D_C·D_G·D_H + k·N_C·N_G·N_H·e^(−sτ) (its rightmost
	// root, counted by the argument principle, or stability for every
	// dead time) rather than on the Padé polynomial P. False for loops
	// without dead time (P is exact), for biproper loops with dead time
	// (neutral type) and when no proof was found.
	StabilityExact bool
	// DelayApproximated reports whether the rational TF of the functions
	// carries a Padé approximation of a continuous dead time inside the
	// loop. Frequency-domain results stay exact (see FrequencyResponse), and
	// so do the time metrics (StepDeviation, ControlEffort, ErrorIntegrals,
	// StepResponse: exact delayed response); the H2 norms of NoiseGains use
	// the approximation.
	DelayApproximated bool
	// SampleTimeSec is the common sample period (0 = continuous).
	SampleTimeSec float64
}

type parts struct {
	c, g, h, f tf.TF
	k          float64
}

// Settings controls Of and Analyze. A nil *Settings means all defaults.
type Settings struct {
	// PadeOrder is the order of the Padé approximant that replaces a
	// continuous dead time inside the loop for the rational closed-loop
	// functions (Function.TF, the closed-loop poles, the H2 norms), 1 to
	// tf.MaxPadeOrder; the time metrics use the exact delayed response. If
	// zero, defaults to 8.
	PadeOrder int
	// MinimalTol is the relative cancellation tolerance passed to
	// tf.Minimal. If zero, defaults to tf.DefaultMinimalTol.
	MinimalTol float64
	// RecoveryBandFraction is the half-width of the recovery band after a
	// load-disturbance step, as a fraction of the peak deviation, in
	// (0, 1). If zero, defaults to 0.02 (2 %, common practice, as the
	// settling band of a reference step).
	RecoveryBandFraction float64
}

func (set *Settings) resolve() (pade int, tol, band float64, err error) {
	pade, tol, band = 8, 0, 0.02
	if set == nil {
		return pade, tol, band, nil
	}
	if set.PadeOrder != 0 {
		pade = set.PadeOrder
	}
	if pade < 1 || pade > tf.MaxPadeOrder {
		return 0, 0, 0, fmt.Errorf("%w: PadeOrder %d, want 1 to %d", ErrSettings, pade, tf.MaxPadeOrder)
	}
	if math.IsNaN(set.MinimalTol) || math.IsInf(set.MinimalTol, 0) || set.MinimalTol < 0 {
		return 0, 0, 0, fmt.Errorf("%w: MinimalTol %v, want a finite value ≥ 0", ErrSettings, set.MinimalTol)
	}
	tol = set.MinimalTol
	if set.RecoveryBandFraction != 0 {
		band = set.RecoveryBandFraction
	}
	if !(band > 0 && band < 1) {
		return 0, 0, 0, fmt.Errorf("%w: RecoveryBandFraction %v, want a value in (0, 1)", ErrSettings, band)
	}
	return pade, tol, band, nil
}

// isUnitTF reports whether g is the zero value standing for "not given".
func unset(g tf.TF) bool { return g.IsZero() && g.DelaySec() == 0 }

func (l Loop) resolve() (parts, error) {
	if unset(l.Plant) {
		return parts{}, fmt.Errorf("%w: the plant is missing or zero", ErrLoop)
	}
	if unset(l.Controller) || l.Controller.IsZero() {
		return parts{}, fmt.Errorf("%w: the controller is missing or zero", ErrLoop)
	}
	k := l.Gain
	if math.IsNaN(k) || math.IsInf(k, 0) {
		return parts{}, fmt.Errorf("%w: gain %v is not finite", ErrLoop, k)
	}
	if k == 0 {
		k = 1
	}
	ts := l.Plant.SampleTimeSec()
	one, _ := tf.NewDiscrete([]float64{1}, []float64{1}, ts)
	p := parts{c: l.Controller, g: l.Plant, h: l.Sensor, f: l.Prefilter, k: k}
	if unset(p.h) {
		p.h = one
	}
	if unset(p.f) {
		p.f = one
	}
	if p.g.IsZero() {
		return parts{}, fmt.Errorf("%w: the plant is zero", ErrLoop)
	}
	if p.h.IsZero() {
		return parts{}, fmt.Errorf("%w: the sensor is zero (the loop is open)", ErrLoop)
	}
	for _, q := range []struct {
		name string
		g    tf.TF
	}{{"controller", p.c}, {"sensor", p.h}, {"prefilter", p.f}} {
		if q.g.SampleTimeSec() != ts {
			return parts{}, fmt.Errorf("%w: the %s has sample period %v s, the plant %v s", ErrLoop, q.name, q.g.SampleTimeSec(), ts)
		}
	}
	return p, nil
}

// Of forms every closed-loop transfer function of the loop once, from the
// numerator and denominator polynomials of its parts (never by chaining
// series and feedback connections, whose orders grow), and cancels common
// factors of each exactly as tf.Minimal does, recording what was cancelled.
// With C = N_C/D_C, G = N_G/D_G, H = N_H/D_H, F = N_F/D_F and the
// characteristic polynomial P = D_C·D_G·D_H + k·N_C·N_G·N_H:
//
//	input → y:   r: k·N_C·N_G·N_F·D_H/(D_F·P)   d: N_G·D_C·D_H/P   dₒ: D_C·D_G·D_H/P   n: −k·N_C·N_G·D_H/P
//	input → u:   r: k·N_C·N_F·D_G·D_H/(D_F·P)   d: −k·N_C·N_G·N_H/P   dₒ: −k·N_C·N_H·D_G/P   n: −k·N_C·D_G·D_H/P
//	input → e:   r: 1 − (r → y)   d, dₒ, n: −(→ y)
//
// so that r → e is the sensitivity S = 1/(1 + L) for H = F = 1, dₒ → y is
// S, d → y is G·S, n → u is −k·C·S and d → u is −T = −L/(1 + L).
//
// Internal stability is decided on P itself, before any cancellation: a
// pole of P in the closed right half plane (|z| ≥ 1) that a function
// cancels is listed in that function's HiddenModes, the loop is reported as
// internally unstable in every function, and never silently.
//
// Dead time: in a discrete loop a dead time is a whole number of samples
// and becomes exact poles at z = 0. In a continuous loop the rational
// functions carry a Padé approximant of Settings.PadeOrder for the dead
// time of C, G and H (DelayApproximated is set); the dead time of F is kept
// exactly as the functions' own dead time. Frequency-domain quantities
// (FrequencyResponse, peaks) are evaluated with the exact dead time.
//
// Errors: ErrLoop for a missing or zero part, mixed sample periods or a
// non-finite gain; ErrSettings; ErrImproper when L is improper;
// ErrNumerical when the roots of P cannot be found.
func Of(l Loop, set *Settings) (*Functions, error) {
	pade, tol, _, err := set.resolve()
	if err != nil {
		return nil, err
	}
	ex, err := l.resolve()
	if err != nil {
		return nil, err
	}
	ts := ex.g.SampleTimeSec()
	ap := ex
	delayed := false
	for _, q := range []*tf.TF{&ap.c, &ap.g, &ap.h} {
		if q.DelaySec() != 0 {
			if ts == 0 {
				delayed = true
			}
			if *q, err = q.Pade(pade); err != nil {
				return nil, fmt.Errorf("%w: dead time: %v", ErrLoop, err)
			}
		}
	}
	fDelay := 0.0
	if ap.f.DelaySec() != 0 {
		if ts == 0 {
			fDelay = ap.f.DelaySec()
			ap.f = ap.f.WithoutDelay()
		} else if ap.f, err = ap.f.Pade(pade); err != nil {
			return nil, fmt.Errorf("%w: prefilter dead time: %v", ErrLoop, err)
		}
	}
	if ap.c.RelativeDegree()+ap.g.RelativeDegree()+ap.h.RelativeDegree() < 0 {
		return nil, fmt.Errorf("%w: the loop transfer function k·C·G·H is improper (relative degree %d)", ErrImproper,
			ap.c.RelativeDegree()+ap.g.RelativeDegree()+ap.h.RelativeDegree())
	}
	nc, dc := ap.c.Num().Scale(ap.k), ap.c.Den()
	ng, dg := ap.g.Num(), ap.g.Den()
	nh, dh := ap.h.Num(), ap.h.Den()
	nf, df := ap.f.Num(), ap.f.Den()
	P := dc.Mul(dg).Mul(dh).Add(nc.Mul(ng).Mul(nh))
	if P.IsZero() || !P.IsFinite() {
		return nil, fmt.Errorf("%w: the characteristic polynomial 1 + L is identically zero or overflows", ErrLoop)
	}
	fs := &Functions{loop: l, exact: ex, approx: ap, charPoly: P, DelayApproximated: delayed, SampleTimeSec: ts}
	if ts == 0 {
		fs.delayNegligible = negligibleDelay(ex, ex.c.DelaySec()+ex.g.DelaySec()+ex.h.DelaySec())
	}
	poles, err := P.Roots()
	if err != nil {
		return nil, fmt.Errorf("%w: closed-loop poles: %v", ErrNumerical, err)
	}
	fpoles, err := df.Roots()
	if err != nil {
		return nil, fmt.Errorf("%w: prefilter poles: %v", ErrNumerical, err)
	}
	fs.ClosedLoopPoles = append(poles, fpoles...)
	poly.SortRoots(fs.ClosedLoopPoles)
	for _, p := range fs.ClosedLoopPoles {
		if unstable(p, ts) {
			fs.UnstablePoles = append(fs.UnstablePoles, p)
		}
	}
	fs.InternallyStable = len(fs.UnstablePoles) == 0
	dfP := df.Mul(P)
	yr := nc.Mul(ng).Mul(nf).Mul(dh)
	num := [numInputs][numOutputs]poly.Poly{
		Reference:         {yr, dfP.Sub(yr), nc.Mul(nf).Mul(dg).Mul(dh)},
		LoadDisturbance:   {ng.Mul(dc).Mul(dh), ng.Mul(dc).Mul(dh).Neg(), nc.Mul(ng).Mul(nh).Neg()},
		OutputDisturbance: {dc.Mul(dg).Mul(dh), dc.Mul(dg).Mul(dh).Neg(), nc.Mul(nh).Mul(dg).Neg()},
		Noise:             {nc.Mul(ng).Mul(dh).Neg(), nc.Mul(ng).Mul(dh), nc.Mul(dg).Mul(dh).Neg()},
	}
	seen := map[complex128]bool{}
	for in := range numInputs {
		den := P
		delay := 0.0
		if in == Reference {
			den, delay = dfP, fDelay
		}
		for out := range numOutputs {
			g, err := tf.FromPolys(num[in][out], den, ts)
			if err != nil {
				return nil, fmt.Errorf("%w: %v → %v: %v", ErrLoop, in, out, err)
			}
			if in == Reference && out == Error && delay != 0 {
				// e = r − F·T·r: the difference of a delayed and an
				// undelayed term is not rational; approximate F's delay.
				fa, err := ex.f.Pade(pade)
				if err != nil {
					return nil, fmt.Errorf("%w: prefilter dead time: %v", ErrLoop, err)
				}
				yrA, err := tf.FromPolys(yr.Mul(fa.Num()), P.Mul(fa.Den()), ts)
				if err != nil {
					return nil, fmt.Errorf("%w: %v → %v: %v", ErrLoop, in, out, err)
				}
				one, _ := tf.NewDiscrete([]float64{1}, []float64{1}, ts)
				if g, err = one.Parallel(yrA.Neg()); err != nil {
					return nil, fmt.Errorf("%w: %v → %v: %v", ErrLoop, in, out, err)
				}
				fs.DelayApproximated = true
			} else if delay != 0 {
				g, _ = g.WithDelay(delay)
			}
			m, cancelled, err := g.Minimal(tol)
			if err != nil {
				return nil, fmt.Errorf("%w: %v → %v: %v", ErrNumerical, in, out, err)
			}
			fn := Function{From: in, To: out, TF: m, Cancelled: cancelled}
			for _, c := range cancelled {
				if unstable(c, ts) {
					fn.HiddenModes = append(fn.HiddenModes, c)
					key := complex(roundTo(real(c)), roundTo(imag(c)))
					if !seen[key] {
						seen[key] = true
						fs.HiddenModes = append(fs.HiddenModes, c)
					}
				}
			}
			fs.fns[in][out] = fn
		}
	}
	if fs.loopDelay() > 0 && fs.exactStability(fpoles) {
		fs.StabilityExact = true
		if fs.InternallyStable {
			// An unstable mode a function cancels is a root of the
			// quasi-polynomial as well; with none in the right half
			// plane there is nothing hidden (the Padé roots said so
			// wrongly only when they disagree).
			fs.HiddenModes = nil
			for in := range numInputs {
				for out := range numOutputs {
					fs.fns[in][out].HiddenModes = nil
				}
			}
		}
	}
	for in := range numInputs {
		for out := range numOutputs {
			fs.fns[in][out].InternallyStable = fs.InternallyStable
		}
	}
	return fs, nil
}

func roundTo(v float64) float64 { return math.Round(v*1e6) / 1e6 }

// axisTol is the relative distance from the stability boundary within
// which a pole counts as on it (and so as not asymptotically stable): a
// cancelled integrator computed as −1e-17 is an integrator.
const axisTol = 1e-9

// unstable reports whether p lies in the closed right half plane
// (continuous) or on or outside the unit circle (discrete), within axisTol.
func unstable(p complex128, ts float64) bool {
	if ts > 0 {
		return cmplx.Abs(p) >= 1-axisTol
	}
	return real(p) >= -axisTol*math.Max(1, cmplx.Abs(p))
}

// Function returns the closed-loop function from input to output.
func (fs *Functions) Function(from Input, to Output) Function {
	return fs.fns[from][to]
}

// Sensitivity returns S = 1/(1 + L), the function from output disturbance
// to output.
func (fs *Functions) Sensitivity() Function { return fs.fns[OutputDisturbance][ProcessOutput] }

// Complementary returns T = L/(1 + L) as a function: the negative of load
// disturbance → control (equal to reference → output when H = F = 1).
func (fs *Functions) Complementary() Function {
	f := fs.fns[LoadDisturbance][Control]
	f.TF = f.TF.Neg()
	return f
}

// CharacteristicPolynomial returns D_C·D_G·D_H + k·N_C·N_G·N_H, with dead
// time replaced as for the rational functions.
func (fs *Functions) CharacteristicPolynomial() poly.Poly { return fs.charPoly }

// LoopTransferFunction returns L = k·C·G·H with its exact dead time.
func (fs *Functions) LoopTransferFunction() (tf.TF, error) {
	p := fs.exact
	l, err := p.c.Scale(p.k)
	if err != nil {
		return tf.TF{}, err
	}
	if l, err = l.Series(p.g); err != nil {
		return tf.TF{}, err
	}
	return l.Series(p.h)
}

// FrequencyResponse returns the value of the function from input to output
// at ω rad/s (continuous: s = jω; discrete: z = e^(jωT), 0 ≤ ω ≤ π/T),
// evaluated from the parts with their exact dead times. At a closed-loop
// pole on the axis it is complex infinity.
func (fs *Functions) FrequencyResponse(from Input, to Output, omegaRadPerSec float64) complex128 {
	x := complex(0, omegaRadPerSec)
	if fs.SampleTimeSec > 0 {
		x = cmplx.Rect(1, omegaRadPerSec*fs.SampleTimeSec)
	}
	return fs.exact.eval(from, to, x)
}

// eval returns the function at the point x (s or z) from the exact parts.
// It works with the parts' numerators, denominators and dead-time factors
// separately (the formulas of Of, with e^(−x·τ) on each part), so that a
// pole of a part on the axis (an integrator at ω = 0) gives the finite
// limit of the closed loop instead of ∞/∞.
func (p parts) eval(from Input, to Output, x complex128) complex128 {
	delay := func(g tf.TF) complex128 {
		if g.DelaySec() == 0 {
			return 1
		}
		if g.IsDiscrete() {
			return cmplx.Pow(x, complex(-g.DelaySec()/g.SampleTimeSec(), 0))
		}
		return cmplx.Exp(-x * complex(g.DelaySec(), 0))
	}
	k := complex(p.k, 0)
	nc, dc, ec := p.c.Num().EvalComplex(x)*k, p.c.Den().EvalComplex(x), delay(p.c)
	ng, dg, eg := p.g.Num().EvalComplex(x), p.g.Den().EvalComplex(x), delay(p.g)
	nh, dh, eh := p.h.Num().EvalComplex(x), p.h.Den().EvalComplex(x), delay(p.h)
	P := dc*dg*dh + nc*ng*nh*ec*eg*eh
	var y, u complex128
	switch from {
	case Reference:
		nf, df, ef := p.f.Num().EvalComplex(x), p.f.Den().EvalComplex(x), delay(p.f)
		y, u = nc*ng*nf*dh*ec*eg*ef/(df*P), nc*nf*dg*dh*ec*ef/(df*P)
		if to == Error {
			return 1 - y
		}
	case LoadDisturbance:
		y, u = ng*dc*dh*eg/P, -nc*ng*nh*ec*eg*eh/P
	case OutputDisturbance:
		y, u = dc*dg*dh/P, -nc*nh*dg*ec*eh/P
	case Noise:
		y, u = -nc*ng*dh*ec*eg/P, -nc*dg*dh*ec/P
	}
	switch to {
	case ProcessOutput:
		return y
	case Error:
		return -y
	}
	return u
}

// String lists the functions and the verdict on internal stability.
func (fs *Functions) String() string {
	s := "internally stable"
	if !fs.InternallyStable {
		s = fmt.Sprintf("INTERNALLY UNSTABLE: closed-loop poles %v", fs.UnstablePoles)
		if len(fs.HiddenModes) > 0 {
			s += fmt.Sprintf(", hidden by pole–zero cancellation: %v", fs.HiddenModes)
		}
	}
	for in := range numInputs {
		for out := range numOutputs {
			f := fs.fns[in][out]
			s += fmt.Sprintf("\n%v → %v: %v", in, out, f.TF)
			if len(f.HiddenModes) > 0 {
				s += fmt.Sprintf(" (hides unstable modes %v)", f.HiddenModes)
			}
		}
	}
	return s
}
