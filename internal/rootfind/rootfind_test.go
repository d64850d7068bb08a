package rootfind

import (
	"math"
	"testing"
)

// TestBrent checks roots known in closed form: √2 of x² − 2, the Dottie
// number of cos x − x (0.7390851332151607, the fixed point of cosine), a
// root at zero, a triple root (where interpolation is slow and bisection
// must take over), and a step function (a sign change without a root).
func TestBrent(t *testing.T) {
	const rel = 0x1p-51
	tests := []struct {
		name string
		f    func(float64) float64
		a, b float64
		want float64
		tol  float64 // accepted |x − want|, from relTol and the root's conditioning
	}{
		{"sqrt2", func(x float64) float64 { return x*x - 2 }, 0, 2, math.Sqrt2, 4 * rel * math.Sqrt2},
		{"dottie", func(x float64) float64 { return math.Cos(x) - x }, 0, 1, 0.7390851332151607, 4 * rel},
		{"zero", func(x float64) float64 { return math.Sin(x) }, -1, 0.5, 0, 1e-300},
		// (x − 1)³: f is below eps for |x − 1| < 6e-6, so any point there
		// is a root to working precision.
		{"triple", func(x float64) float64 { return (x - 1) * (x - 1) * (x - 1) }, 0, 3, 1, 1e-5},
		{"step", func(x float64) float64 {
			if x < 0.3 {
				return -1
			}
			return 1
		}, 0, 1, 0.3, 4 * rel},
	}
	for _, test := range tests {
		got := Brent(test.f, test.a, test.b, test.f(test.a), test.f(test.b), rel)
		if math.Abs(got-test.want) > test.tol {
			t.Errorf("%s: got %.17g, want %.17g", test.name, got, test.want)
		}
	}
}
