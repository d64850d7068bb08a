package rootfind

import "math"

// GoldenMax returns the maximiser of f on [a, b] and its value by
// golden-section search (J. Kiefer, "Sequential minimax search for a
// maximum", Proc. AMS 4, 1953): at most maxIter steps, stopping when the
// bracket is narrower than relWidth·(|a| + |b|). It returns the best point
// evaluated.
func GoldenMax(f func(float64) float64, a, b float64, maxIter int, relWidth float64) (x, fx float64) {
	const r = 0.6180339887498949
	c := b - r*(b-a)
	d := a + r*(b-a)
	fc, fd := f(c), f(d)
	for range maxIter {
		if math.Abs(b-a) <= relWidth*math.Max(math.Abs(a)+math.Abs(b), 1e-300) {
			break
		}
		if fc > fd {
			b, d, fd = d, c, fc
			c = b - r*(b-a)
			fc = f(c)
		} else {
			a, c, fc = c, d, fd
			d = a + r*(b-a)
			fd = f(d)
		}
	}
	if fc > fd {
		return c, fc
	}
	return d, fd
}
