package response

import (
	"fmt"
	"math"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// SteadyStateErrors are the error constants and steady-state errors of the
// unity negative-feedback loop with loop transfer function L, for unit
// step, ramp and parabola references (e = r − y as t → ∞).
type SteadyStateErrors struct {
	// SystemType is the number of poles of L at s = 0 (z = 1 in discrete
	// time) net of zeros there; negative when L has more zeros than poles
	// there.
	SystemType int
	// PositionConstant Kp = lim L, VelocityConstant Kv = lim s·L (1/s) and
	// AccelerationConstant Ka = lim s²·L (1/s²), as s → 0. ±Inf where the
	// limit is infinite. Discrete time: Kp = lim L(z), Kv = lim (z−1)·L(z)/T,
	// Ka = lim (z−1)²·L(z)/T² as z → 1 (Franklin, Powell & Workman, Digital
	// Control of Dynamic Systems, 3rd ed., Sec. 7.2, from memory), so that
	// errors are in the units of the continuous-time ones.
	PositionConstant, VelocityConstant, AccelerationConstant float64
	// StepError = 1/(1 + Kp), RampError = 1/Kv and ParabolaError = 1/Ka:
	// steady-state errors for a unit step, a unit ramp r = t and a parabola
	// r = t²/2. +Inf where the error grows without bound, 0 where it
	// vanishes.
	StepError, RampError, ParabolaError float64
}

// discreteUnitRootTol is the relative tolerance (to the 1-norm of the
// coefficients) below which p(1) counts as zero when counting roots at
// z = 1: discretised integrators carry coefficients rounded to doubles.
const discreteUnitRootTol = 1e-12

// SteadyState returns the error constants and steady-state errors of the
// unity negative-feedback loop with loop transfer function loop
// (Ogata, Modern Control Engineering, 5th ed., Sec. 5-8, definitions from
// memory). They are meaningful only for a stable closed loop, which is
// checked: the roots of den + num (den·z^d + num with a dead time of d
// samples in discrete time) must lie in Re < 0 (|z| < 1); otherwise
// ErrUnstable.
//
// Poles and zeros at s = 0 are counted exactly from trailing zero
// coefficients; at z = 1 by synthetic division while |p(1)| ≤ 1e-12·‖p‖₁.
// The limits are then exact ratios of the reduced polynomials at the point.
// Dead time does not change the limits, but a continuous loop with dead
// time has no rational closed loop, so its stability is not decided here:
// ErrDelay (check it with the margins package, then call SteadyState on
// loop.WithoutDelay()).
func SteadyState(loop tf.TF) (SteadyStateErrors, error) {
	num, den := loop.Num(), loop.Den()
	if num.IsZero() {
		return SteadyStateErrors{}, fmt.Errorf("%w: the loop transfer function is zero; there is no feedback", ErrSettings)
	}
	if loop.DelaySec() > 0 && !loop.IsDiscrete() {
		return SteadyStateErrors{}, fmt.Errorf("%w: closed-loop stability of %v with %v s of dead time is not decided here; check it with margins, then use loop.WithoutDelay()", ErrDelay, loop, loop.DelaySec())
	}
	char := den.Add(num)
	ts := loop.SampleTimeSec()
	if loop.IsDiscrete() && loop.DelaySec() > 0 {
		q := loop.DelaySec() / ts
		d := math.Round(q)
		if math.Abs(q-d) > delaySampleTol*math.Max(1, q) {
			return SteadyStateErrors{}, fmt.Errorf("%w: discrete dead time %v s is not a whole number of sample periods (%v s)", ErrDelay, loop.DelaySec(), ts)
		}
		char = den.ShiftUp(int(d)).Add(num)
	}
	if char.Degree() < 1 && char.IsZero() {
		return SteadyStateErrors{}, fmt.Errorf("%w: the characteristic polynomial of %v is zero", ErrUnstable, loop)
	}
	if char.Degree() >= 1 {
		roots, err := char.Roots()
		if err != nil {
			return SteadyStateErrors{}, fmt.Errorf("%w: closed-loop poles of %v: %v", ErrNotFinite, loop, err)
		}
		for _, r := range roots {
			if (loop.IsDiscrete() && math.Hypot(real(r), imag(r)) >= 1) || (!loop.IsDiscrete() && real(r) >= 0) {
				return SteadyStateErrors{}, fmt.Errorf("%w: closed loop of %v has the pole %s; steady-state errors need a stable closed loop", ErrUnstable, loop, formatComplex(r))
			}
		}
	}
	x := 0.0
	if loop.IsDiscrete() {
		x = 1
	}
	n, kn := deflate(num, x)
	d, kd := deflate(den, x)
	typ := kd - kn
	// Reduced limit g = lim (s^type)·L = n(x)/d(x); finite and nonzero.
	g := n.Eval(x) / d.Eval(x)
	scale := 1.0
	if loop.IsDiscrete() {
		scale = ts
	}
	limit := func(k int) float64 {
		// lim s^k·L = g·s^(k−type)
		switch {
		case k == typ:
			return g / math.Pow(scale, float64(k))
		case k < typ:
			return math.Copysign(math.Inf(1), g)
		default:
			return 0
		}
	}
	e := SteadyStateErrors{SystemType: typ}
	e.PositionConstant = limit(0)
	e.VelocityConstant = limit(1)
	e.AccelerationConstant = limit(2)
	e.StepError = 1 / (1 + e.PositionConstant)
	e.RampError = inverse(e.VelocityConstant)
	e.ParabolaError = inverse(e.AccelerationConstant)
	return e, nil
}

// inverse returns 1/k with 1/0 = +Inf and 1/±Inf = 0.
func inverse(k float64) float64 {
	if k == 0 {
		return math.Inf(1)
	}
	return 1 / k
}

// deflate removes the roots of p at x (0 exactly; 1 within
// discreteUnitRootTol) and returns the quotient and their number.
func deflate(p poly.Poly, x float64) (poly.Poly, int) {
	k := 0
	for p.Degree() >= 1 {
		v := p.Eval(x)
		if x == 0 {
			if v != 0 {
				break
			}
		} else if math.Abs(v) > discreteUnitRootTol*p.Norm1() {
			break
		}
		root, _ := poly.New(1, -x)
		q, _, err := p.DivMod(root)
		if err != nil {
			break
		}
		p = q
		k++
	}
	return p, k
}

// String formats the constants and errors in words.
func (e SteadyStateErrors) String() string {
	return fmt.Sprintf("system type %d, position constant %.6g, velocity constant %.6g 1/s, acceleration constant %.6g 1/s², errors: step %.6g, ramp %.6g, parabola %.6g",
		e.SystemType, e.PositionConstant, e.VelocityConstant, e.AccelerationConstant, e.StepError, e.RampError, e.ParabolaError)
}
