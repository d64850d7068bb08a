package design

import (
	"fmt"
	"math"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// Plane is a loop that depends on two design variables x and y through a
// numerator and a denominator affine in both,
//
//	L(x, y) = (N₀ + x·Nx + y·Ny)/(D₀ + x·Dx + y·Dy) · e^(−sτ),
//
// so that the closed-loop characteristic polynomial is a(s) + x·b(s) +
// y·c(s): PI gains Kp and Ki, PD gains, a lead filter's gain and zero, a gain
// and a plant parameter. Make it with NewPlane or PlaneFunc.
type Plane struct {
	x, y       string
	n0, nx, ny poly.Poly
	d0, dx, dy poly.Poly
	ts, delay  float64
}

// XName and YName return the names of the two variables.
func (p Plane) XName() string { return p.x }

// YName returns the name of the second variable.
func (p Plane) YName() string { return p.y }

// SampleTimeSec returns the sample period (0: continuous time).
func (p Plane) SampleTimeSec() float64 { return p.ts }

// LoopAt returns the loop at (x, y).
func (p Plane) LoopAt(x, y float64) (tf.TF, error) {
	return p.AtY(y).LoopAt(x)
}

// AtY returns the one-variable problem in x with y held at the given value.
func (p Plane) AtY(y float64) Variable {
	return Variable{name: p.x, num0: p.n0.Add(p.ny.Scale(y)), num1: p.nx, den0: p.d0.Add(p.dy.Scale(y)), den1: p.dx, ts: p.ts, delay: p.delay}
}

// AtX returns the one-variable problem in y with x held at the given value.
func (p Plane) AtX(x float64) Variable {
	return Variable{name: p.y, num0: p.n0.Add(p.nx.Scale(x)), num1: p.ny, den0: p.d0.Add(p.dx.Scale(x)), den1: p.dy, ts: p.ts, delay: p.delay}
}

// Characteristic returns a, b, c with the closed-loop characteristic
// polynomial a + x·b + y·c, dead time replaced by a Padé approximation of
// the given order (continuous time) or an exact power of z (discrete).
func (p Plane) Characteristic(padeOrder int) (a, b, c poly.Poly, err error) {
	v := Variable{name: p.x, num0: p.n0, num1: p.nx, den0: p.d0, den1: p.dx, ts: p.ts, delay: p.delay}
	a, b, err = v.rationalCharacteristic(padeOrder)
	if err != nil {
		return
	}
	w := Variable{name: p.y, num0: poly.Poly{}, num1: p.ny, den0: poly.Poly{}, den1: p.dy, ts: p.ts, delay: p.delay}
	_, c, err = w.rationalCharacteristic(padeOrder)
	return
}

// NewPlane returns the plane of the parameters x and y of a loop written as
// text with both names in it ("(Kp*s + Ki)/s"), parsed by tf.ParseWith with
// ParseSettings.Params and multiplied in series by the given transfer
// functions (parsed in the domain of the first one). See PlaneFunc.
func NewPlane(x, y, text string, series ...tf.TF) (Plane, error) {
	ts := 0.0
	if len(series) > 0 {
		ts = series[0].SampleTimeSec()
	}
	return PlaneFunc(x, y, func(xv, yv float64) (tf.TF, error) {
		return parseSeries(text, ts, map[string]float64{x: xv, y: yv}, series)
	})
}

// planeProbes are the (x, y) pairs at which the loop is evaluated: three to
// fit the affine dependence, then one each to verify affinity in x, in y,
// and the absence of a product x·y. The second set is used when the loop is
// not defined at the origin.
var planeProbes = [][6][2]float64{
	{{0, 0}, {1, 0}, {0, 1}, {2, 0}, {0, 2}, {1, 1}},
	{{1, 1}, {2, 1}, {1, 2}, {3, 1}, {1, 3}, {2, 2}},
}

// PlaneFunc returns the plane of x and y for the loop that loopAt returns.
// Numerator and denominator are fitted as affine functions of (x, y) from
// three evaluations and verified at three more, (2, 0), (0, 2) and (1, 1)
// relative to the first probe (relative misfit at most 1e-9 of the
// coefficients); the fit is retried with the denominator made monic. It
// returns ErrNotAffine naming the parameters and the kind of dependence (a
// product x·y, or a non-affine dependence on one of them), and
// ErrInvalidInput for equal or empty names or when the sample period or
// dead time depends on them.
func PlaneFunc(x, y string, loopAt func(x, y float64) (tf.TF, error)) (Plane, error) {
	if loopAt == nil || x == "" || y == "" || x == y {
		return Plane{}, fmt.Errorf("%w: a plane needs a loop function and two different parameter names (got %q, %q)", ErrInvalidInput, x, y)
	}
	var lastErr error
	for _, pr := range planeProbes {
		var loops [6]tf.TF
		ok := true
		for i, q := range pr {
			l, err := loopAt(q[0], q[1])
			if err != nil {
				lastErr = fmt.Errorf("design: loop at %s = %v, %s = %v: %w", x, q[0], y, q[1], err)
				ok = false
				break
			}
			loops[i] = l
		}
		if ok {
			return fitPlane(x, y, pr, loops)
		}
	}
	return Plane{}, lastErr
}

func fitPlane(x, y string, pr [6][2]float64, loops [6]tf.TF) (Plane, error) {
	ts, delay := loops[0].SampleTimeSec(), loops[0].DelaySec()
	for _, l := range loops {
		if l.SampleTimeSec() != ts || l.DelaySec() != delay {
			return Plane{}, fmt.Errorf("%w: the sample period or dead time of the loop changes with %s or %s", ErrInvalidInput, x, y)
		}
	}
	var worst [3]float64
	for _, monic := range []bool{false, true} {
		var n, d [6]poly.Poly
		for i, l := range loops {
			n[i], d[i] = l.Num(), l.Den()
			if monic {
				n[i], d[i] = n[i].Scale(1/d[i].Lead()), d[i].Scale(1/d[i].Lead())
			}
		}
		fit := func(c [6]poly.Poly) (c0, cx, cy poly.Poly, mis [3]float64) {
			cx = c[1].Sub(c[0])
			cy = c[2].Sub(c[0])
			c0 = c[0].Sub(cx.Scale(pr[0][0])).Sub(cy.Scale(pr[0][1]))
			for k := 3; k < 6; k++ {
				pred := c0.Add(cx.Scale(pr[k][0])).Add(cy.Scale(pr[k][1]))
				sc := math.Max(c[k].NormInf(), math.Max(c0.NormInf(), math.Max(cx.NormInf(), cy.NormInf())))
				m := pred.Sub(c[k]).NormInf() / sc
				if math.IsNaN(m) {
					m = math.Inf(1)
				}
				mis[k-3] = m
			}
			return cleanPoly(c0), cleanPoly(cx), cleanPoly(cy), mis
		}
		n0, nx, ny, mn := fit(n)
		d0, dx, dy, md := fit(d)
		ok := true
		for k := range 3 {
			m := math.Max(mn[k], md[k])
			if !monic {
				worst[k] = m
			}
			if !(m <= fitTolerance) {
				ok = false
			}
		}
		if !ok {
			continue
		}
		if nx.IsZero() && dx.IsZero() {
			return Plane{}, fmt.Errorf("%w: the loop does not depend on %s", ErrInvalidInput, x)
		}
		if ny.IsZero() && dy.IsZero() {
			return Plane{}, fmt.Errorf("%w: the loop does not depend on %s", ErrInvalidInput, y)
		}
		return Plane{x: x, y: y, n0: n0, nx: nx, ny: ny, d0: d0, dx: dx, dy: dy, ts: ts, delay: delay}, nil
	}
	switch {
	case !(worst[0] <= fitTolerance):
		return Plane{}, fmt.Errorf("%w: the loop does not depend affinely on %s (relative misfit %.3g)", ErrNotAffine, x, worst[0])
	case !(worst[1] <= fitTolerance):
		return Plane{}, fmt.Errorf("%w: the loop does not depend affinely on %s (relative misfit %.3g)", ErrNotAffine, y, worst[1])
	}
	return Plane{}, fmt.Errorf("%w: %s and %s enter the loop with a product %s·%s (bilinear dependence; relative misfit %.3g)", ErrNotAffine, x, y, x, y, worst[2])
}
