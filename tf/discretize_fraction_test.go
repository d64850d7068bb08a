package tf

import (
	"math"
	"testing"
)

// filterSamples runs the difference equation of the discrete g on u
// (zero initial state): den(z)·Y = num(z)·U with the coefficients highest
// power first, so that y[k] depends on u[k − (deg den − deg num)] and
// earlier.
func filterSamples(g TF, u []float64) []float64 {
	a, b := g.Den().Coeffs(), g.Num().Coeffs()
	n, m := len(a)-1, len(b)-1
	y := make([]float64, len(u))
	for k := range u {
		// a0·y[k] + a1·y[k−1] + … = b0·u[k−(n−m)] + b1·u[k−(n−m)−1] + …
		s := 0.0
		for i, bi := range b {
			if j := k - (n - m) - i; j >= 0 {
				s += bi * u[j]
			}
		}
		for i := 1; i <= n; i++ {
			if j := k - i; j >= 0 {
				s -= a[i] * y[j]
			}
		}
		y[k] = s / a[0]
	}
	return y
}

// TestHoldFractionalDelayClosedForm checks both holds with a dead time that
// is not a whole number of sample periods against the continuous response
// in closed form. A hold equivalent is exact for the inputs its hold
// reconstructs exactly: steps for the zero-order hold, ramps for the
// triangle (first-order) hold, whose piecewise-linear interpolation of the
// samples kT is the ramp itself. For G = a/(s + a) with dead time τ the
// continuous responses are, for t ≥ τ (closed form, by hand):
//
//	step: y(t) = 1 − e^(−a(t−τ)),   ramp: y(t) = (t − τ) − (1 − e^(−a(t−τ)))/a,
//
// and 0 before τ. The samples must agree to rounding (1e-12 of the
// largest value over 60 samples).
func TestHoldFractionalDelayClosedForm(t *testing.T) {
	const a, T = 3.0, 0.1
	for _, tau := range []float64{0.01, 0.137, 0.25, 0.0999} {
		g, err := MustNew([]float64{a}, []float64{1, a}).WithDelay(tau)
		if err != nil {
			t.Fatal(err)
		}
		for _, tc := range []struct {
			method DiscretizeMethod
			input  func(t float64) float64
			output func(t float64) float64
		}{
			{ZeroOrderHold, func(float64) float64 { return 1 }, func(t float64) float64 { return 1 - math.Exp(-a*t) }},
			{FirstOrderHold, func(t float64) float64 { return t }, func(t float64) float64 { return t - (1-math.Exp(-a*t))/a }},
		} {
			gd, err := g.Discretize(T, tc.method, nil)
			if err != nil {
				t.Fatalf("%v τ = %v: %v", tc.method, tau, err)
			}
			const n = 60
			u := make([]float64, n)
			for k := range u {
				u[k] = tc.input(float64(k) * T)
			}
			y := filterSamples(gd, u)
			worst, scale := 0.0, 0.0
			for k, yk := range y {
				tk := float64(k) * T
				want := 0.0
				if tk > tau {
					want = tc.output(tk - tau)
				}
				worst = math.Max(worst, math.Abs(yk-want))
				scale = math.Max(scale, math.Abs(want))
			}
			t.Logf("%v τ = %v: largest sample error %.2g of %.3g", tc.method, tau, worst, scale)
			if worst > 1e-12*scale {
				t.Errorf("%v τ = %v (%.3g periods): largest sample error %.3g against the closed form (scale %.3g)", tc.method, tau, tau/T, worst, scale)
			}
		}
	}
}
