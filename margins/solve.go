package margins

import (
	"math"
	"slices"

	"github.com/loopwise/loopwise/internal/rootfind"
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
// candidateImagTol), ascending, by poly.RealRootsInWithSettings:
// real-root isolation by Descartes' rule of signs and continued fractions
// (Vincent–Collins–Akritas; Akritas & Strzeboński 2005) with a running
// rounding-error bound on every transformed coefficient, each isolated root
// found by Brent's method. It costs O(n²) per node of the search instead of
// the O(n³) of all complex roots, and falls back to the companion
// eigenvalues (cluster recognition off, near-real pairs kept as candidates)
// when the isolation cannot separate roots, such as a nearly double root at
// a tangency, which polishing then merges.
func positiveRoots(p poly.Poly) []float64 {
	return positiveRootsTo(p, 0)
}

// candidateRelTol is the relative accuracy of candidates that are polished
// afterwards on the directly evaluated loop (crossovers, bandwidth) or
// whose value is stationary there (peaks): Newton's method from 1e-9
// reaches full accuracy in one or two steps.
const candidateRelTol = 1e-9

// positiveCandidates is positiveRoots to the accuracy candidateRelTol.
func positiveCandidates(p poly.Poly) []float64 {
	return positiveRootsTo(p, candidateRelTol)
}

// positiveRootsTo is positiveRoots with the roots refined to the relative
// accuracy tol (0: full accuracy).
func positiveRootsTo(p poly.Poly, tol float64) []float64 {
	if p.Degree() < 1 {
		return nil
	}
	rs, err := poly.RealRootsInWithSettings(p, 0, math.Inf(1), &poly.RealRootSettings{CandidateImagTolerance: candidateImagTol, RelTolerance: tol})
	if err != nil {
		return nil
	}
	out := make([]float64, len(rs))
	for i, r := range rs {
		out[i] = r.Value
	}
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

// brent returns a root of f in [a, b] by Brent's method (Brent 1973),
// f(a) = fa and f(b) = fb of opposite signs; the bracket shrinks to about
// 4·u·|x| (u = 2⁻⁵³).
func brent(f func(float64) float64, a, b, fa, fb float64) float64 {
	return rootfind.Brent(f, a, b, fa, fb, 2*eps)
}

// goldenMax returns the maximiser of f on [a, b] by golden-section search
// (Kiefer 1953), to a relative width of about √eps: the abscissa of a
// smooth maximum cannot be located more finely in double precision.
func goldenMax(f func(float64) float64, a, b float64) (x, fx float64) {
	return rootfind.GoldenMax(f, a, b, 200, 1e-10)
}
