package tf

import (
	"fmt"
	"math"

	"github.com/loopwise/loopwise/poly"
)

// sameDomain returns the common sample period of g and h, or
// ErrDomainMismatch.
func sameDomain(g, h TF) (float64, error) {
	if g.ts != h.ts {
		return 0, fmt.Errorf("%w: sample periods %v s and %v s", ErrDomainMismatch, g.ts, h.ts)
	}
	return g.ts, nil
}

// Series returns g·h (g and h in cascade). Dead times add. It returns
// ErrDomainMismatch when g and h differ in sample period and ErrNotFinite
// when the coefficients overflow (as do all the operations of this file).
func (g TF) Series(h TF) (TF, error) {
	ts, err := sameDomain(g, h)
	if err != nil {
		return TF{}, err
	}
	return checked("series connection", g.num.Mul(h.num), g.Den().Mul(h.Den()), g.delay+h.delay, ts)
}

// Parallel returns g + h. The dead times must be equal (then they are
// factored out); otherwise it returns ErrDelayInLoop.
func (g TF) Parallel(h TF) (TF, error) {
	ts, err := sameDomain(g, h)
	if err != nil {
		return TF{}, err
	}
	if g.delay != h.delay && !g.IsZero() && !h.IsZero() {
		return TF{}, fmt.Errorf("%w: sum of terms with dead times %v s and %v s", ErrDelayInLoop, g.delay, h.delay)
	}
	// A zero term carries no dead time into the sum.
	delay := g.delay
	if g.IsZero() {
		delay = h.delay
	}
	gd, hd := g.Den(), h.Den()
	if gd.Equal(hd) {
		return checked("parallel connection", g.num.Add(h.num), gd, delay, ts)
	}
	return checked("parallel connection", g.num.Mul(hd).Add(h.num.Mul(gd)), gd.Mul(hd), delay, ts)
}

// Scale returns k·g. It returns ErrNotFinite for a NaN or infinite k, or
// when the product overflows.
func (g TF) Scale(k float64) (TF, error) {
	if math.IsNaN(k) || math.IsInf(k, 0) {
		return TF{}, fmt.Errorf("%w: gain %v", ErrNotFinite, k)
	}
	return checked("scaled transfer function", g.num.Scale(k), g.Den(), g.delay, g.ts)
}

// Neg returns −g.
func (g TF) Neg() TF {
	g.num = g.num.Neg()
	g.den = g.Den()
	return g
}

// Inverse returns 1/g. It returns ErrZeroTransferFunction for g = 0 and
// ErrDelayInLoop when g has dead time (its inverse would be a prediction).
func (g TF) Inverse() (TF, error) {
	if g.IsZero() {
		return TF{}, fmt.Errorf("%w: it has no inverse", ErrZeroTransferFunction)
	}
	if g.delay != 0 {
		return TF{}, fmt.Errorf("%w: the inverse of dead time %v s is a time advance", ErrDelayInLoop, g.delay)
	}
	return TF{num: g.Den(), den: g.num, ts: g.ts}, nil
}

// Feedback returns the closed loop of g in the forward path and h in the
// feedback path with negative feedback: g/(1 + g·h). Dead time inside the
// loop makes the closed loop non-rational, so it returns ErrDelayInLoop when
// g or h has dead time; approximate it with Pade first. It returns
// ErrDomainMismatch for different sample periods.
func Feedback(g, h TF) (TF, error) { return feedback(g, h, 1) }

// PositiveFeedback returns g/(1 − g·h).
func PositiveFeedback(g, h TF) (TF, error) { return feedback(g, h, -1) }

func feedback(g, h TF, sign float64) (TF, error) {
	ts, err := sameDomain(g, h)
	if err != nil {
		return TF{}, err
	}
	if g.delay+h.delay != 0 {
		return TF{}, fmt.Errorf("%w: the loop has %v s of dead time; replace it by a Padé approximation (Pade) first", ErrDelayInLoop, g.delay+h.delay)
	}
	// g/(1 ± gh) = Ng·Dh / (Dg·Dh ± Ng·Nh)
	gd, hd := g.Den(), h.Den()
	num := g.num.Mul(hd)
	den := gd.Mul(hd).Add(g.num.Mul(h.num).Scale(sign))
	if den.IsZero() {
		return TF{}, fmt.Errorf("%w: 1 %s g·h is identically zero", ErrZeroDenominator, map[bool]string{true: "+", false: "−"}[sign > 0])
	}
	return checked("feedback loop", num, den, 0, ts)
}

// ClosedLoop returns the complementary sensitivity T = L/(1 + L) of the
// unity negative-feedback loop with loop transfer function L: the transfer
// function from reference to output.
func (l TF) ClosedLoop() (TF, error) { return Feedback(l, one(l.ts)) }

// Sensitivity returns S = 1/(1 + L), the transfer function from reference to
// error (and from output disturbance to output) of the unity loop.
func (l TF) Sensitivity() (TF, error) {
	if l.delay != 0 {
		return TF{}, fmt.Errorf("%w: the loop has %v s of dead time; replace it by a Padé approximation (Pade) first", ErrDelayInLoop, l.delay)
	}
	ld := l.Den()
	den := ld.Add(l.num)
	if den.IsZero() {
		return TF{}, fmt.Errorf("%w: 1 + L is identically zero", ErrZeroDenominator)
	}
	return checked("sensitivity", ld, den, 0, l.ts)
}

// CharacteristicPolynomial returns D + N of the unity negative-feedback loop
// L = N/D, whose roots are the closed-loop poles (dead time ignored).
func (l TF) CharacteristicPolynomial() poly.Poly { return l.Den().Add(l.num) }

// checked returns num/den·e^(−s·delay) after checking that the arithmetic
// that produced it did not overflow: ErrNotFinite names the operation.
func checked(what string, num, den poly.Poly, delay, ts float64) (TF, error) {
	if !num.IsFinite() || !den.IsFinite() || math.IsInf(delay, 0) || math.IsNaN(delay) {
		return TF{}, fmt.Errorf("%w: the coefficients or dead time of the %s overflow float64", ErrNotFinite, what)
	}
	if den.IsZero() {
		return TF{}, fmt.Errorf("%w: the denominator of the %s underflows to zero", ErrZeroDenominator, what)
	}
	return TF{num: num, den: den, delay: delay, ts: ts}, nil
}

func one(ts float64) TF { return TF{num: poly.Constant(1), den: poly.Constant(1), ts: ts} }
