package design

import (
	"errors"
	"fmt"
	"math"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// Variable is a loop that depends on one design variable v through a
// numerator and a denominator affine in v:
//
//	L_v = (N₀ + v·N₁)/(D₀ + v·D₁) · e^(−s·τ)
//
// the loop gain (Gain: N₀ = 0, D₁ = 0) or a parameter of a compensator or
// plant (Parameter, ParameterText). The closed-loop characteristic
// polynomial D_v + N_v is then affine in v, as package locus requires. Make
// it with Gain, Parameter or ParameterText; a Variable is an immutable value.
type Variable struct {
	name       string
	num0, num1 poly.Poly
	den0, den1 poly.Poly
	ts, delay  float64
	gain       bool
}

// Gain returns the loop gain k of the loop k·L as the design variable, named
// "gain": L_k = k·L. The loop must be a valid transfer function with a
// non-zero numerator.
func Gain(loop tf.TF) (Variable, error) {
	if loop.IsZero() {
		return Variable{}, fmt.Errorf("%w: the loop is zero, so the gain does not enter it", ErrInvalidInput)
	}
	return Variable{name: "gain", num1: loop.Num(), den0: loop.Den(), ts: loop.SampleTimeSec(), delay: loop.DelaySec(), gain: true}, nil
}

// Name returns the variable's name ("gain" or the parameter's name).
func (v Variable) Name() string { return v.name }

// IsGain reports whether the variable is the loop gain.
func (v Variable) IsGain() bool { return v.gain }

// SampleTimeSec returns the sample period of the loop (0: continuous time).
func (v Variable) SampleTimeSec() float64 { return v.ts }

// DelaySec returns the dead time of the loop in seconds.
func (v Variable) DelaySec() float64 { return v.delay }

// Polynomials returns N₀, N₁, D₀, D₁ of L_v = (N₀ + v·N₁)/(D₀ + v·D₁),
// coefficients in poly's convention.
func (v Variable) Polynomials() (num0, num1, den0, den1 poly.Poly) {
	return v.num0, v.num1, v.den0, v.den1
}

// LoopAt returns the loop L_x at the value x of the variable. It returns an
// error when x is not finite or the denominator vanishes there.
func (v Variable) LoopAt(x float64) (tf.TF, error) {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return tf.TF{}, fmt.Errorf("%w: %s = %v is not a finite value", ErrInvalidInput, v.name, x)
	}
	n := v.num0.Add(v.num1.Scale(x))
	d := v.den0.Add(v.den1.Scale(x))
	l, err := tf.FromPolys(n, d, v.ts)
	if err != nil {
		return tf.TF{}, fmt.Errorf("design: loop at %s = %v: %w", v.name, x, err)
	}
	if v.delay > 0 {
		return l.WithDelay(v.delay)
	}
	return l, nil
}

// characteristic returns a, b with D_v + N_v = a + v·b (dead time left out).
func (v Variable) characteristic() (a, b poly.Poly) {
	return v.den0.Add(v.num0), v.den1.Add(v.num1)
}

// probes are the values at which a loop function is evaluated: two to fit
// the affine dependence and two to verify it; the second set is used when
// the loop is not defined at 0.
var probes = [][4]float64{{0, 1, 2, 0.5}, {1, 2, 3, 1.5}}

// fitTolerance is the relative misfit of the coefficients above which a
// dependence is declared not affine: the fit is exact up to the rounding of
// the coefficients (a few ulps), so 1e-9 leaves ample room for it while no
// genuinely non-affine dependence of moderate size passes.
const fitTolerance = 1e-9

// Parameter returns the parameter name as the design variable of the loop
// that loopAt returns for each value. Numerator and denominator are fitted
// as affine functions of the parameter from the loops at two values and the
// fit is verified at two more (relative misfit at most 1e-9 of the
// coefficients); when the function scales numerator and denominator by a
// factor that varies with the parameter, the fit is retried with the
// denominator made monic. It returns ErrNotAffine, naming the parameter,
// when no fit holds, and ErrInvalidInput when the parameter does not enter
// the loop or the loop's sample period or dead time depends on it.
func Parameter(name string, loopAt func(x float64) (tf.TF, error)) (Variable, error) {
	if loopAt == nil {
		return Variable{}, fmt.Errorf("%w: no loop function given for parameter %q", ErrInvalidInput, name)
	}
	if name == "" {
		return Variable{}, fmt.Errorf("%w: the parameter has no name", ErrInvalidInput)
	}
	var lastErr error
	for _, pr := range probes {
		var loops [4]tf.TF
		ok := true
		for i, x := range pr {
			l, err := loopAt(x)
			if err != nil {
				lastErr = fmt.Errorf("design: loop at %s = %v: %w", name, x, err)
				ok = false
				break
			}
			loops[i] = l
		}
		if ok {
			return fitVariable(name, pr, loops)
		}
	}
	return Variable{}, lastErr
}

// ParameterText is Parameter for a loop written as text with the parameter
// in it ("(Kp*s + 2)/s"), parsed by tf.ParseWith and multiplied in series by
// the given transfer functions. The text is parsed in the domain of the first
// series element (continuous time if none is given).
func ParameterText(name, text string, series ...tf.TF) (Variable, error) {
	ts := 0.0
	if len(series) > 0 {
		ts = series[0].SampleTimeSec()
	}
	return Parameter(name, func(x float64) (tf.TF, error) {
		return parseSeries(text, ts, map[string]float64{name: x}, series)
	})
}

func parseSeries(text string, ts float64, params map[string]float64, series []tf.TF) (tf.TF, error) {
	l, err := tf.ParseWith(text, &tf.ParseSettings{SampleTimeSec: ts, Params: params})
	if err != nil {
		return tf.TF{}, err
	}
	for _, g := range series {
		if l, err = l.Series(g); err != nil {
			return tf.TF{}, err
		}
	}
	return l, nil
}

func fitVariable(name string, pr [4]float64, loops [4]tf.TF) (Variable, error) {
	ts, delay := loops[0].SampleTimeSec(), loops[0].DelaySec()
	for i, l := range loops {
		if l.SampleTimeSec() != ts {
			return Variable{}, fmt.Errorf("%w: the sample period of the loop changes with %s (%v s at %s = %v, %v s at %s = %v)", ErrInvalidInput, name, ts, name, pr[0], l.SampleTimeSec(), name, pr[i])
		}
		if l.DelaySec() != delay {
			return Variable{}, fmt.Errorf("%w: the dead time of the loop changes with %s", ErrInvalidInput, name)
		}
	}
	worst := 0.0
	for _, monic := range []bool{false, true} {
		var n, d [4]poly.Poly
		for i, l := range loops {
			n[i], d[i] = l.Num(), l.Den()
			if monic {
				n[i], d[i] = n[i].Scale(1/d[i].Lead()), d[i].Scale(1/d[i].Lead())
			}
		}
		n0, n1, e1 := fitAffine(pr, n)
		d0, d1, e2 := fitAffine(pr, d)
		e := math.Max(e1, e2)
		if !monic {
			worst = e
		}
		if !(e <= fitTolerance) {
			continue
		}
		v := Variable{name: name, num0: n0, num1: n1, den0: d0, den1: d1, ts: ts, delay: delay}
		if n1.IsZero() && d1.IsZero() {
			return Variable{}, fmt.Errorf("%w: the loop does not depend on %s", ErrInvalidInput, name)
		}
		return v, nil
	}
	return Variable{}, fmt.Errorf("%w: parameter %q: the loop's numerator and denominator are not of the form N₀ + %s·N₁, D₀ + %s·D₁ (relative misfit %.3g)", ErrNotAffine, name, name, name, worst)
}

// fitAffine fits c(x) = c0 + x·c1 through the values at pr[0], pr[1] and
// returns the largest relative misfit at pr[2], pr[3].
func fitAffine(pr [4]float64, c [4]poly.Poly) (c0, c1 poly.Poly, misfit float64) {
	c1 = c[1].Sub(c[0]).Scale(1 / (pr[1] - pr[0]))
	c0 = c[0].Sub(c1.Scale(pr[0]))
	for i := 2; i < 4; i++ {
		pred := c0.Add(c1.Scale(pr[i]))
		sc := math.Max(c[i].NormInf(), math.Max(c0.NormInf(), math.Abs(pr[i])*c1.NormInf()))
		if sc == 0 {
			continue
		}
		misfit = math.Max(misfit, pred.Sub(c[i]).NormInf()/sc)
		if math.IsNaN(pred.Sub(c[i]).NormInf()) {
			misfit = math.Inf(1)
		}
	}
	return cleanPoly(c0), cleanPoly(c1), misfit
}

// cleanPoly sets to zero the coefficients below 1e-13 of the largest one,
// which the difference of two evaluations leaves where the exact value is 0.
func cleanPoly(q poly.Poly) poly.Poly {
	c := q.Ascending()
	m := q.NormInf()
	for i, v := range c {
		if math.Abs(v) <= 1e-13*m {
			c[i] = 0
		}
	}
	r, err := poly.FromAscending(c)
	if err != nil {
		return q
	}
	return r
}

var _ = errors.Is

// polyPair is a polynomial of the characteristic equation.
type polyPair = poly.Poly

var onePoly = poly.Constant(1)
