package tf

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"strconv"
	"strings"

	"github.com/loopwise/loopwise/poly"
)

// TF is a transfer function N/D·e^(−s·DelaySec) in s (continuous time) or
// N/D·e^(−s·DelaySec) evaluated at s = ln(z)/T (discrete time, sample
// period T > 0). TF values are immutable; the zero value is 0/1.
type TF struct {
	num, den poly.Poly
	delay    float64 // seconds, ≥ 0
	ts       float64 // sample period in seconds; 0 = continuous
}

// New returns the continuous-time transfer function num/den, coefficients
// highest power first: New([]float64{1, 2}, []float64{1, 3, 2}) is
// (s + 2)/(s² + 3s + 2). It returns ErrEmpty for an empty list,
// ErrNotFinite for NaN or infinite coefficients and ErrZeroDenominator for
// an all-zero denominator.
func New(num, den []float64) (TF, error) {
	return NewDiscrete(num, den, 0)
}

// NewDiscrete returns num/den in z with sample period sampleTimeSec > 0
// (0 gives a continuous-time value in s), coefficients highest power first.
// Errors are those of New, and ErrSampleTime for a negative sample period.
func NewDiscrete(num, den []float64, sampleTimeSec float64) (TF, error) {
	n, err := poly.New(num...)
	if err != nil {
		return TF{}, wrapPolyErr("numerator", err)
	}
	d, err := poly.New(den...)
	if err != nil {
		return TF{}, wrapPolyErr("denominator", err)
	}
	return FromPolys(n, d, sampleTimeSec)
}

// MustNew is like New but panics on error; for constants in tests and
// examples.
func MustNew(num, den []float64) TF {
	g, err := New(num, den)
	if err != nil {
		panic(err)
	}
	return g
}

func wrapPolyErr(which string, err error) error {
	switch {
	case errors.Is(err, poly.ErrEmpty):
		return fmt.Errorf("%w: %s has no coefficients", ErrEmpty, which)
	case errors.Is(err, poly.ErrNotFinite):
		return fmt.Errorf("%w: %s: %v", ErrNotFinite, which, err)
	}
	return fmt.Errorf("tf: %s: %w", which, err)
}

// FromPolys returns num/den with the given sample period (0 = continuous).
// It returns ErrZeroDenominator when den is zero, ErrNotFinite when a
// coefficient is not finite and ErrSampleTime for a negative or non-finite
// sample period.
func FromPolys(num, den poly.Poly, sampleTimeSec float64) (TF, error) {
	if err := checkSampleTime(sampleTimeSec); err != nil {
		return TF{}, err
	}
	if !num.IsFinite() {
		return TF{}, fmt.Errorf("%w: numerator", ErrNotFinite)
	}
	if !den.IsFinite() {
		return TF{}, fmt.Errorf("%w: denominator", ErrNotFinite)
	}
	if den.IsZero() {
		return TF{}, fmt.Errorf("%w: the denominator polynomial is all zeros", ErrZeroDenominator)
	}
	return TF{num: num, den: den, ts: sampleTimeSec}, nil
}

func checkSampleTime(ts float64) error {
	if math.IsNaN(ts) || math.IsInf(ts, 0) {
		return fmt.Errorf("%w: sample period %v", ErrNotFinite, ts)
	}
	if ts < 0 {
		return fmt.Errorf("%w: sample period %v s is negative (use 0 for continuous time)", ErrSampleTime, ts)
	}
	return nil
}

// FromZerosPolesGain returns gain·∏(s − zᵢ)/∏(s − pⱼ) in continuous time.
// Complex zeros and poles must come in conjugate pairs. Errors: ErrNotFinite
// for a non-finite entry, and an error naming the zero or pole without a
// conjugate partner.
func FromZerosPolesGain(zeros, poles []complex128, gain float64) (TF, error) {
	if math.IsNaN(gain) || math.IsInf(gain, 0) {
		return TF{}, fmt.Errorf("%w: gain %v", ErrNotFinite, gain)
	}
	n, err := poly.FromRoots(zeros)
	if err != nil {
		return TF{}, fmt.Errorf("tf: zeros: %w", err)
	}
	d, err := poly.FromRoots(poles)
	if err != nil {
		return TF{}, fmt.Errorf("tf: poles: %w", err)
	}
	return FromPolys(n.Scale(gain), d, 0)
}

// Num returns the numerator polynomial.
func (g TF) Num() poly.Poly { return g.num }

// Den returns the denominator polynomial (1 for the zero value).
func (g TF) Den() poly.Poly {
	if g.den.IsZero() {
		return poly.Constant(1)
	}
	return g.den
}

// DelaySec returns the dead time in seconds.
func (g TF) DelaySec() float64 { return g.delay }

// SampleTimeSec returns the sample period in seconds (0 = continuous).
func (g TF) SampleTimeSec() float64 { return g.ts }

// IsDiscrete reports whether g is a discrete-time transfer function.
func (g TF) IsDiscrete() bool { return g.ts > 0 }

// IsZero reports whether the numerator is zero.
func (g TF) IsZero() bool { return g.num.IsZero() }

// Variable returns "s" for continuous and "z" for discrete time.
func (g TF) Variable() string {
	if g.IsDiscrete() {
		return "z"
	}
	return "s"
}

// WithDelay returns g with its dead time set to delaySec seconds (≥ 0).
func (g TF) WithDelay(delaySec float64) (TF, error) {
	if math.IsNaN(delaySec) || math.IsInf(delaySec, 0) {
		return TF{}, fmt.Errorf("%w: dead time %v", ErrNotFinite, delaySec)
	}
	if delaySec < 0 {
		return TF{}, fmt.Errorf("%w: got %v s", ErrNegativeDelay, delaySec)
	}
	g.den = g.Den()
	g.delay = delaySec
	return g, nil
}

// WithoutDelay returns the rational part of g (dead time removed).
func (g TF) WithoutDelay() TF {
	g.den = g.Den()
	g.delay = 0
	return g
}

// Poles returns the roots of the denominator, repeated by multiplicity, in
// the order of poly.SortRoots.
func (g TF) Poles() ([]complex128, error) { return g.Den().Roots() }

// Zeros returns the roots of the numerator, repeated by multiplicity (none
// for a constant or zero numerator).
func (g TF) Zeros() ([]complex128, error) {
	if g.num.IsZero() {
		return nil, nil
	}
	return g.num.Roots()
}

// GainFactor returns the ratio of the leading coefficients, lead(N)/lead(D):
// the k of the zeros–poles–gain form k·∏(s − zᵢ)/∏(s − pⱼ).
func (g TF) GainFactor() float64 { return g.num.Lead() / g.Den().Lead() }

// RelativeDegree returns deg D − deg N (negative for an improper transfer
// function; deg D + 1 for the zero transfer function by convention of the
// degree −1 of the zero polynomial).
func (g TF) RelativeDegree() int { return g.Den().Degree() - g.num.Degree() }

// IsProper reports whether deg N ≤ deg D.
func (g TF) IsProper() bool { return g.RelativeDegree() >= 0 }

// IsStrictlyProper reports whether deg N < deg D.
func (g TF) IsStrictlyProper() bool { return g.RelativeDegree() > 0 }

// StaticGain returns the zero-frequency gain: N(0)/D(0) in continuous time
// and N(1)/D(1) in discrete time (dead time does not change it). It returns
// ErrInfiniteGain when the denominator vanishes there and the numerator does
// not; when both vanish, the common factor is removed first. The zero
// transfer function has static gain 0.
func (g TF) StaticGain() (float64, error) {
	x := 0.0
	if g.IsDiscrete() {
		x = 1
	}
	n, d := g.num, g.Den()
	if n.IsZero() {
		return 0, nil
	}
	// Remove common roots at x by synthetic division (the remainder is
	// rounding noise when both vanish there).
	for n.VanishesAt(x) && d.VanishesAt(x) && n.Degree() > 0 && d.Degree() > 0 {
		root, _ := poly.New(1, -x)
		n, _, _ = n.DivMod(root)
		d, _, _ = d.DivMod(root)
	}
	if d.VanishesAt(x) {
		return math.Inf(1), fmt.Errorf("%w: the denominator vanishes at %s = %v", ErrInfiniteGain, g.Variable(), x)
	}
	return n.Eval(x) / d.Eval(x), nil
}

// Eval returns g at the complex point x (s or z), dead time included:
// N(x)/D(x)·e^(−x·DelaySec) in continuous time, and N(z)/D(z)·z^(−DelaySec/T)
// in discrete time. At a pole the result is complex infinity.
func (g TF) Eval(x complex128) complex128 {
	d := g.Den().EvalComplex(x)
	n := g.num.EvalComplex(x)
	var v complex128
	if d == 0 {
		if n == 0 {
			return cmplx.NaN()
		}
		return cmplx.Inf()
	}
	v = n / d
	if g.delay != 0 {
		if g.IsDiscrete() {
			v *= cmplx.Pow(x, complex(-g.delay/g.ts, 0))
		} else {
			v *= cmplx.Exp(-x * complex(g.delay, 0))
		}
	}
	return v
}

// FrequencyResponse returns G(jω) in continuous time, or G(e^(jωT)) in
// discrete time, at ω = omegaRadPerSec (dead time included exactly). For a
// discrete transfer function ω must lie in [0, π/T] (ErrAboveNyquist
// otherwise); ω must be finite (ErrNotFinite).
func (g TF) FrequencyResponse(omegaRadPerSec float64) (complex128, error) {
	w := omegaRadPerSec
	if math.IsNaN(w) || math.IsInf(w, 0) {
		return 0, fmt.Errorf("%w: frequency %v rad/s", ErrNotFinite, w)
	}
	if !g.IsDiscrete() {
		return g.Eval(complex(0, w)), nil
	}
	if nyq := math.Pi / g.ts; math.Abs(w) > nyq*(1+1e-12) {
		return 0, fmt.Errorf("%w: %v rad/s > π/T = %v rad/s", ErrAboveNyquist, w, nyq)
	}
	z := cmplx.Rect(1, w*g.ts)
	v := g.num.EvalComplex(z) / g.Den().EvalComplex(z)
	if g.delay != 0 {
		v *= cmplx.Rect(1, -w*g.delay)
	}
	return v, nil
}

// EqualApprox reports whether g and h describe the same transfer function
// within the relative tolerance tol: same sample period and dead time (to
// tol), and numerators and denominators equal within tol after both are
// scaled so that the denominator is monic. Common factors are not
// cancelled: (s+1)/(s+1) is not equal to 1.
func (g TF) EqualApprox(h TF, tol float64) bool {
	if math.Abs(g.ts-h.ts) > tol*math.Max(g.ts, h.ts) || math.Abs(g.delay-h.delay) > tol*math.Max(g.delay, h.delay) {
		return false
	}
	gd, hd := g.Den(), h.Den()
	gl, hl := gd.Lead(), hd.Lead()
	return g.num.Scale(1/gl).EqualApprox(h.num.Scale(1/hl), tol) && gd.Scale(1/gl).EqualApprox(hd.Scale(1/hl), tol)
}

// String returns g in the text form that Parse (or ParseDiscrete for a
// discrete value) reads back to an equal value:
// "(s + 2)/(s^2 + 3*s + 2)", with "*exp(-0.5*s)" appended for dead time.
func (g TF) String() string {
	v := g.Variable()
	var b strings.Builder
	b.WriteString("(" + g.num.Format(v) + ")")
	d := g.Den()
	if !(d.Degree() == 0 && d.Lead() == 1) {
		b.WriteString("/(" + d.Format(v) + ")")
	}
	if g.delay != 0 {
		// Dead time is written in seconds as exp(-T*s) in both domains.
		b.WriteString("*exp(-" + strconv.FormatFloat(g.delay, 'g', -1, 64) + "*s)")
	}
	return b.String()
}
