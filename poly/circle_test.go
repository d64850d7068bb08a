package poly

import (
	"math"
	"testing"
)

// TestCircleToAxis checks the map against its definition at sample points
// and the exact treatment of roots at z = ±1.
func TestCircleToAxis(t *testing.T) {
	// (z − 1)(z − 0.6): the expanded coefficients 1, −1.6, 0.6 sum to
	// rounding noise, yet the image must have w = 0 as an exact root.
	p := MustNew(1, -1.6, 0.6) // (z − 1)(z − 0.6); p(1) = −1.1e-16 in float64
	if p.Eval(1) == 0 {
		t.Fatal("the test needs coefficients whose sum is not exactly 0")
	}
	w := p.CircleToAxis(2)
	if w.Coef(0) != 0 {
		t.Errorf("image of a root at z = 1 has constant coefficient %g, want exactly 0", w.Coef(0))
	}
	// Definition: (1 − w)²·p((1 + w)/(1 − w)) at w = 0.3 and w = −2.
	for _, x := range []float64{0.3, -2} {
		z := (1 + x) / (1 - x)
		want := (1 - x) * (1 - x) * p.Eval(z)
		if got := w.Eval(x); math.Abs(got-want) > 1e-14*math.Max(1, math.Abs(want)) {
			t.Errorf("image at w = %g: %g, want %g", x, got, want)
		}
	}
	// A root at z = −1 lowers the degree of the image: (z + 1)(z − 0.5)
	// maps to a polynomial of degree 1.
	q := MustNew(1, 0.5, -0.5)
	if d := q.CircleToAxis(2).Degree(); d != 1 {
		t.Errorf("image of a root at z = −1 has degree %d, want 1", d)
	}
	// Unit-circle points map to the imaginary axis: p(e^{jθ}) = 0 for the
	// roots e^{±jπ/3} of z² − z + 1 ↔ w = ±j·tan(π/6).
	r := MustNew(1, -1, 1).CircleToAxis(2)
	v := math.Tan(math.Pi / 6)
	if got := r.EvalComplex(complex(0, v)); math.Hypot(real(got), imag(got)) > 1e-15 {
		t.Errorf("image of z² − z + 1 at w = j·tan(π/6) is %v, want 0", got)
	}
}

func TestVanishesAt(t *testing.T) {
	for _, test := range []struct {
		p    Poly
		x    float64
		want bool
	}{
		{MustNew(1, -1.6, 0.6), 1, true},   // (z − 1)(z − 0.6), inexact coefficients
		{MustNew(1, -1.6, 0.6), 0.6, true}, // the other root
		{MustNew(1, -1.6, 0.61), 1, false}, // 0.01 away from a root
		{MustNew(1, 0, 0), 0, true},        // exact at 0
		{MustNew(1, 0, 1e-300), 0, false},  // not zero at 0, however small
		{MustNew(1, -1, 1e-13), 1, false},  // residual 1e-13 ≈ 900 u·‖p‖₁/2, far above the 24 u·‖p‖₁ bound
		{MustNew(1, -1, 1e-15), 1, true},   // residual 1e-15 ≈ 9 u·‖p‖₁/2: within the bound, rounding-sized
	} {
		if got := test.p.VanishesAt(test.x); got != test.want {
			t.Errorf("%v at %g: %v, want %v", test.p, test.x, got, test.want)
		}
	}
}
