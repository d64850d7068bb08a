package locus

import (
	"errors"
	"fmt"
	"math"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// Parametric is a parameter locus: the characteristic polynomial of a loop
// that depends on the parameter Name is A(s) + p·B(s), and Loop = B/A is
// the equivalent "open loop" to pass to Analyze, Trace and the queries
// (with Settings.Variable = Name).
type Parametric struct {
	// Name is the parameter.
	Name string
	// A and B are the polynomials of A + p·B = 0 (characteristic
	// polynomial D + N of the loop at p = 0, and its slope in p).
	A, B poly.Poly
	// Loop is B/A, with the sample period of the loop.
	Loop tf.TF
	// Notes records approximations (dead time) and normalisations.
	Notes []string
}

// parameterProbes are the parameter values at which the loop is evaluated:
// three to fit A + p·B and one to verify. The second set is used when the
// loop is not defined at p = 0.
var parameterProbes = [][4]float64{{0, 1, 2, 0.5}, {1, 2, 3, 1.5}}

// FromParameter derives a(s) and b(s) with the characteristic equation
// a + p·b = 0 from a function that returns the loop (negative unity
// feedback) for a value of the parameter name. The closed-loop
// characteristic polynomial D_p + N_p is formed at three values of p, the
// affine fit A + p·B is taken from them and verified at a fourth value
// (relative agreement 1e-9 of the coefficients). When the function scales
// numerator and denominator by a factor that varies with p, the fit is
// retried with the denominator made monic, then with the characteristic
// polynomial made monic. Dead time is replaced by a Padé approximation of
// order 6 (a note says so). It returns ErrNotAffine, naming the parameter,
// when no fit holds; ErrZeroNumerator when p does not enter the
// characteristic polynomial; and the function's own error, wrapped, when it
// fails at every probe set.
func FromParameter(name string, loopAt func(p float64) (tf.TF, error)) (Parametric, error) {
	if loopAt == nil {
		return Parametric{}, fmt.Errorf("%w: no loop function given for parameter %q", ErrInvalidSettings, name)
	}
	if name == "" {
		name = "p"
	}
	probes, loops, err := probeLoops(name, loopAt)
	if err != nil {
		return Parametric{}, err
	}
	return fitAffine(name, probes, loops)
}

// probeLoops evaluates loopAt at the first set of parameterProbes where it
// is defined at every value; otherwise it returns the last error, naming
// the parameter and the value.
func probeLoops(name string, loopAt func(p float64) (tf.TF, error)) (probes [4]float64, loops [4]tf.TF, err error) {
	for _, probes = range parameterProbes {
		ok := true
		for i, v := range probes {
			l, e := loopAt(v)
			if e != nil {
				err = fmt.Errorf("locus: loop at %s = %v: %w", name, v, e)
				ok = false
				break
			}
			loops[i] = l
		}
		if ok {
			return probes, loops, nil
		}
	}
	return probes, loops, err
}

func fitAffine(name string, probes [4]float64, loops [4]tf.TF) (Parametric, error) {
	ts := loops[0].SampleTimeSec()
	var notes []string
	for i, l := range loops {
		if l.SampleTimeSec() != ts {
			return Parametric{}, fmt.Errorf("%w: the sample period of the loop changes with %s (%v s at %s = %v, %v s at %s = %v)", ErrNotAffine, name, ts, name, probes[0], l.SampleTimeSec(), name, probes[i])
		}
		if l.DelaySec() != loops[0].DelaySec() {
			return Parametric{}, fmt.Errorf("%w: the dead time of the loop changes with %s", ErrNotAffine, name)
		}
	}
	delay := loops[0].DelaySec()
	type normal int
	const (
		raw normal = iota
		monicDen
		monicChar
	)
	char := func(l tf.TF, how normal) (poly.Poly, error) {
		if delay != 0 {
			var err error
			if l, err = l.Pade(6); err != nil {
				if errors.Is(err, tf.ErrFractionalDelay) {
					return poly.Poly{}, fmt.Errorf("%w: %w", ErrUnsupported, err)
				}
				return poly.Poly{}, err
			}
		}
		num, den := l.Num(), l.Den()
		if how == monicDen {
			num, den = num.Scale(1/den.Lead()), den.Scale(1/den.Lead())
		}
		c := den.Add(num)
		if how == monicChar {
			if c.IsZero() {
				return c, fmt.Errorf("%w: characteristic polynomial vanishes", ErrDegenerate)
			}
			c = c.Scale(1 / c.Lead())
		}
		if !c.IsFinite() {
			return c, fmt.Errorf("%w: characteristic polynomial overflows", ErrNotFinite)
		}
		return c, nil
	}
	var worst float64
	for _, how := range []normal{raw, monicDen, monicChar} {
		var c [4]poly.Poly
		bad := false
		for i, l := range loops {
			v, err := char(l, how)
			if err != nil {
				if errors.Is(err, ErrUnsupported) {
					return Parametric{}, err
				}
				bad = true
				break
			}
			c[i] = v
		}
		if bad {
			continue
		}
		p0, p1 := probes[0], probes[1]
		B := c[1].Sub(c[0]).Scale(1 / (p1 - p0))
		A := c[0].Sub(B.Scale(p0))
		ok := true
		for i := 2; i < 4; i++ {
			pred := A.Add(B.Scale(probes[i]))
			sc := math.Max(c[i].NormInf(), math.Max(A.NormInf(), math.Abs(probes[i])*B.NormInf()))
			d := pred.Sub(c[i]).NormInf() / sc
			if !(d <= 1e-9) {
				ok = false
				if how == raw {
					worst = d
				}
				break
			}
		}
		if !ok {
			continue
		}
		// Clean coefficients that are zero up to rounding of the fit.
		A, B = cleanPoly(A), cleanPoly(B)
		if B.IsZero() {
			return Parametric{}, fmt.Errorf("%w: the characteristic polynomial does not depend on %s", ErrZeroNumerator, name)
		}
		if A.IsZero() {
			return Parametric{}, fmt.Errorf("%w: the characteristic polynomial vanishes at %s = 0 for every s", ErrDegenerate, name)
		}
		loop, err := tf.FromPolys(B, A, ts)
		if err != nil {
			return Parametric{}, err
		}
		if delay != 0 {
			notes = append(notes, fmt.Sprintf("dead time of %v s replaced by a Padé approximation of order 6 before forming the characteristic polynomial", delay))
		}
		if how == monicDen {
			notes = append(notes, "numerator and denominator of the loop were scaled to a monic denominator at each value of "+name)
		}
		if how == monicChar {
			notes = append(notes, "the characteristic polynomial was scaled to be monic at each value of "+name)
		}
		return Parametric{Name: name, A: A, B: B, Loop: loop, Notes: notes}, nil
	}
	return Parametric{}, fmt.Errorf("%w: parameter %q: the characteristic polynomial D + N is not of the form a(s) + %s·b(s) (relative misfit %.3g at %s = %v)", ErrNotAffine, name, name, worst, name, probes[2])
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
	r, _ := poly.FromAscending(c)
	return r
}

// FromText is FromParameter for a loop written as text with the parameter
// name in it, for example a compensator "(1+Td*s)/(1+0.2s)" with name
// "Td", multiplied in series by the given transfer functions (a plant, a
// sensor). The text is parsed in the domain of the first series element
// (continuous time if none is given).
func FromText(name, text string, series ...tf.TF) (Parametric, error) {
	ts := 0.0
	if len(series) > 0 {
		ts = series[0].SampleTimeSec()
	}
	return FromParameter(name, func(p float64) (tf.TF, error) {
		l, err := tf.ParseWith(text, &tf.ParseSettings{SampleTimeSec: ts, Params: map[string]float64{name: p}})
		if err != nil {
			return tf.TF{}, err
		}
		for _, g := range series {
			if l, err = l.Series(g); err != nil {
				return tf.TF{}, err
			}
		}
		return l, nil
	})
}
