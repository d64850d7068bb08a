package margins

import (
	"math"
	"slices"

	"github.com/loopwise/loopwise/poly"
)

const (
	// eps is the machine epsilon of float64.
	eps = 0x1p-52
	// candidateImagTol accepts a computed root x of a polynomial in x = v²
	// as real when |Im x| ≤ candidateImagTol·|x|. It is loose on purpose:
	// a nearly double real root may come out of the eigenvalue solver as a
	// complex pair; every candidate is then polished by Newton's method on
	// the directly evaluated loop and kept only if the polished point
	// satisfies the crossover condition.
	candidateImagTol = 1e-5
	// dedupeRel merges crossovers closer than dedupeRel·ω (relative).
	dedupeRel = 1e-9
)

// positiveRoots returns the real roots x > 0 of p, as candidates (see
// candidateImagTol), ascending. The variable is scaled first so that the
// geometric mean of the root moduli is 1, which balances the coefficients
// before the eigenvalue solve.
func positiveRoots(p poly.Poly) []float64 {
	if p.Degree() < 1 {
		return nil
	}
	c := p.Ascending()
	k := 0
	for c[k] == 0 {
		k++
	}
	q, _ := poly.FromAscending(c[k:])
	n := q.Degree()
	if n < 1 {
		return nil
	}
	sigma := math.Pow(math.Abs(q.Coef(0)/q.Lead()), 1/float64(n))
	if !(sigma > 0) || math.IsInf(sigma, 0) {
		sigma = 1
	}
	qs := q.ScaleVariable(sigma)
	rs, err := qs.Roots()
	if err != nil {
		return nil
	}
	var out []float64
	for _, r := range rs {
		if real(r) > 0 && math.Abs(imag(r)) <= candidateImagTol*real(r) {
			out = append(out, real(r)*sigma)
		}
	}
	slices.Sort(out)
	return out
}

// sortUnique sorts xs and merges values within rel·|x| of each other.
func sortUnique(xs []float64, rel float64) []float64 {
	slices.Sort(xs)
	out := xs[:0]
	for _, x := range xs {
		if len(out) > 0 && math.Abs(x-out[len(out)-1]) <= rel*math.Abs(x) {
			continue
		}
		out = append(out, x)
	}
	return out
}

// newton polishes a root of f near x by Newton's method, keeping x inside
// (lo, hi). f returns the value and the derivative. It stops when the step
// is below a few ulps, and returns ok = false when the iteration leaves the
// interval, stalls on a zero derivative, or moves more than half of x.
func newton(f func(float64) (float64, float64), x, lo, hi float64) (float64, bool) {
	x0 := x
	for range 40 {
		v, d := f(x)
		if v == 0 {
			return x, true
		}
		if d == 0 || math.IsNaN(d) || math.IsNaN(v) {
			return x, false
		}
		step := v / d
		xn := x - step
		if !(xn > lo && xn < hi) || math.Abs(xn-x0) > 0.5*math.Abs(x0) {
			return x, false
		}
		x = xn
		if math.Abs(step) <= 4*eps*math.Abs(x) {
			return x, true
		}
	}
	return x, true
}

// brent returns a root of f in [a, b], where f(a) and f(b) have opposite
// signs (or one is zero), by Brent's method (Brent 1973, Algorithms for
// Minimization without Derivatives, ch. 4: inverse quadratic
// interpolation safeguarded by bisection). The bracket shrinks to about
// 4·eps·|x|; convergence is guaranteed.
func brent(f func(float64) float64, a, b, fa, fb float64) float64 {
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
		tol := 2*eps*math.Abs(b) + 1e-300
		m := 0.5 * (c - b)
		if math.Abs(m) <= tol || fb == 0 {
			return b
		}
		if math.Abs(e) >= tol && math.Abs(fa) > math.Abs(fb) {
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

// goldenMax returns the maximiser of f on [a, b] by golden-section search
// (Kiefer 1953), to a relative width of about √eps: the abscissa of a
// smooth maximum cannot be located more finely in double precision.
func goldenMax(f func(float64) float64, a, b float64) (x, fx float64) {
	const r = 0.6180339887498949
	c := b - r*(b-a)
	d := a + r*(b-a)
	fc, fd := f(c), f(d)
	for range 200 {
		if math.Abs(b-a) <= 1e-10*math.Max(math.Abs(a)+math.Abs(b), 1e-300) {
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
