// Package rootfind holds the bracketing root finder shared by the analysis
// packages (margins locates crossovers with it, response the times of its
// step metrics). It is not part of the public API.
package rootfind

import "math"

// Brent returns a root of f in [a, b], where fa = f(a) and fb = f(b) have
// opposite signs (or one is zero), by Brent's method: inverse quadratic
// interpolation safeguarded by bisection, so that convergence is
// guaranteed and superlinear near a simple root (R. P. Brent, Algorithms
// for Minimization without Derivatives, Prentice-Hall 1973, ch. 4). The
// bracket is shrunk until it is at most relTol·|x| wide (plus 1e-300, so
// that a root at 0 terminates), or for at most 200 iterations.
//
// Brent does not check the signs of fa and fb: with a bracket that does
// not change sign it returns a point of [a, b] that need not be a root.
func Brent(f func(float64) float64, a, b, fa, fb, relTol float64) float64 {
	if fa == 0 {
		return a
	}
	if fb == 0 {
		return b
	}
	c, fc := a, fa
	d := b - a
	e := d
	for range 200 {
		if (fb > 0) == (fc > 0) {
			c, fc = a, fa
			d = b - a
			e = d
		}
		if math.Abs(fc) < math.Abs(fb) {
			a, b, c = b, c, b
			fa, fb, fc = fb, fc, fb
		}
		tol := relTol*math.Abs(b) + 1e-300
		m := 0.5 * (c - b)
		if math.Abs(m) <= tol || fb == 0 {
			return b
		}
		if math.Abs(e) >= tol && math.Abs(fa) > math.Abs(fb) {
			// Inverse quadratic (or secant) interpolation.
			var p, q float64
			s := fb / fa
			if a == c {
				p = 2 * m * s
				q = 1 - s
			} else {
				qq := fa / fc
				r := fb / fc
				p = s * (2*m*qq*(qq-r) - (b-a)*(r-1))
				q = (qq - 1) * (r - 1) * (s - 1)
			}
			if p > 0 {
				q = -q
			} else {
				p = -p
			}
			if 2*p < math.Min(3*m*q-math.Abs(tol*q), math.Abs(e*q)) {
				e = d
				d = p / q
			} else {
				d = m
				e = m
			}
		} else {
			d = m
			e = m
		}
		a, fa = b, fb
		if math.Abs(d) > tol {
			b += d
		} else {
			b += math.Copysign(tol, m)
		}
		fb = f(b)
	}
	return b
}
