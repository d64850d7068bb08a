// Package quasipoly finds the roots of the retarded quasi-polynomial
//
//	f(s) = D(s) + K·N(s)·e^(−s·τ),   deg N < deg D,
//
// the characteristic function of a rational loop K·N/D with dead time τ
// under negative feedback. It is shared by the analysis packages (locus
// lists the roots, response decides stability and the time scale) and is
// not part of the public API; it imports only the standard library and
// gonum.
//
// # Method
//
// Candidates come from a spectral discretisation of the infinitesimal
// generator of the delay equation (Breda, Maset & Vermiglio 2005): the
// state is the n-vector of the companion realisation of D plus the history
// of the single delayed signal w = N(d/dt)y over [−τ, 0], collocated at N
// Chebyshev points. Its eigenvalues (gonum mat.Eigen) approximate the
// rightmost roots with spectral accuracy. Each candidate is then polished
// by Newton's method on the exact f. Completeness is checked by the
// argument principle: the number of roots with Re s > σ₀ is the winding
// number of f around the rectangle [σ₀, R]×[−R, R], where R is a proved
// bound on |s| for every root with Re s ≥ σ₀ (the positive root of
// |d_n|r^n − Σ|d_i|r^i − |K|e^(−σ₀τ)Σ|n_i|r^i). The winding number is
// summed over steps short enough that |f(s) − f(a)| < |f(a)| on each step
// (a bound on |f′| from the absolute coefficients), so each argument
// increment is the principal value of arg f(b)/f(a) and no turn is missed.
//
// # Exponential polynomials
//
// ExpPoly.Roots finds every real root of a real exponential polynomial
// Re or Im of Σ C_k(x)·e^(μ_k·x) on a finite interval (the crossing
// frequencies and real break points of a loop with dead time in an affine
// parameter), each in a certified bracket: subdivision with the exclusion
// and monotonicity tests of interval root isolation, from bounds of |f′|
// and |f″| on each piece, then Brent's method. A double root that cannot
// be bracketed is an error (ErrTangent), never a silent miss.
//
// References:
//   - D. Breda, S. Maset and R. Vermiglio, "Pseudospectral differencing
//     methods for characteristic roots of delay differential equations",
//     SIAM J. Sci. Comput. 27(2), 482–495, 2005.
//   - L. N. Trefethen, Spectral Methods in MATLAB, SIAM 2000, ch. 6
//     (Chebyshev differentiation matrix).
//   - P. Henrici, Applied and Computational Complex Analysis, vol. 1,
//     Wiley 1974, §4.6 (argument principle).
package quasipoly

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// Errors returned by this package; callers wrap them in their own
// sentinels.
var (
	// ErrNeutral reports deg N ≥ deg D (a neutral equation).
	ErrNeutral = errors.New("quasipoly: deg N ≥ deg D (neutral type)")
	// ErrOnContour reports a root on (or within rounding of) the counting
	// contour.
	ErrOnContour = errors.New("quasipoly: a root lies on the counting contour")
	// ErrTooMany reports a region holding more roots than allowed.
	ErrTooMany = errors.New("quasipoly: too many roots in the region")
	// ErrBudget reports a count that needs more steps than allowed.
	ErrBudget = errors.New("quasipoly: counting budget exceeded")
	// ErrNotFound reports roots counted in the region but not found.
	ErrNotFound = errors.New("quasipoly: roots counted but not found")
)

// Q is D(s) + K·N(s)·e^(−s·Tau). D and N hold coefficients highest power
// first; D's leading coefficient must be nonzero and deg N < deg D.
type Q struct {
	D, N []float64
	K    float64
	Tau  float64
}

// Eval returns f(s) and f′(s).
func (q Q) Eval(s complex128) (f, df complex128) {
	d, dd := horner(q.D, s)
	if q.K == 0 || len(q.N) == 0 {
		return d, dd
	}
	n, dn := horner(q.N, s)
	e := cmplx.Exp(-s*complex(q.Tau, 0)) * complex(q.K, 0)
	return d + n*e, dd + (dn-complex(q.Tau, 0)*n)*e
}

func horner(c []float64, s complex128) (v, d complex128) {
	for _, a := range c {
		d = d*s + v
		v = v*s + complex(a, 0)
	}
	return v, d
}

// absPoly returns Σ|c_i| r^i and Σ i|c_i| r^(i−1).
func absPoly(c []float64, r float64) (v, d float64) {
	for _, a := range c {
		d = d*r + v
		v = v*r + math.Abs(a)
	}
	return v, d
}

// trim removes leading zeros.
func trim(c []float64) []float64 {
	for len(c) > 0 && c[0] == 0 {
		c = c[1:]
	}
	return c
}

// Check validates q: finite values, D of degree ≥ 1 with deg N < deg D,
// τ ≥ 0.
func (q Q) Check() error {
	q.D, q.N = trim(q.D), trim(q.N)
	if len(q.D) == 0 {
		return errors.New("quasipoly: D is zero")
	}
	for _, v := range append(append([]float64{q.K, q.Tau}, q.D...), q.N...) {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return errors.New("quasipoly: value is NaN or infinite")
		}
	}
	if q.Tau < 0 {
		return errors.New("quasipoly: negative delay")
	}
	if q.K != 0 && len(q.N) >= len(q.D) {
		return ErrNeutral
	}
	return nil
}

// Radius returns R such that every root with Re s ≥ sigma0 has |s| < R:
// 1.01 times the positive root of
// |d_n| r^n − Σ_{i<n}|d_i| r^i − |K|·e^(−σ₀τ)·Σ|n_i| r^i.
func (q Q) Radius(sigma0 float64) float64 {
	d := trim(q.D)
	n := len(d) - 1
	lead := math.Abs(d[0])
	c := math.Abs(q.K) * math.Exp(-sigma0*q.Tau)
	g := func(r float64) float64 {
		low, _ := absPoly(d[1:], r)
		nv, _ := absPoly(q.N, r)
		return lead*math.Pow(r, float64(n)) - low - c*nv
	}
	return 1.01*PositiveRoot(g) + 1e-300
}

// PositiveRoot returns a point r > 0 within 1e-12 relative above the
// largest positive root of g, for g ≤ 0 on [0, root] and g > 0 beyond it
// (a leading power that dominates the rest, as in Cauchy's bound): g(r) >
// 0. It doubles from 1 to find g > 0, then bisects.
func PositiveRoot(g func(float64) float64) float64 {
	hi := 1.0
	for g(hi) <= 0 && hi < 1e300 {
		hi *= 2
	}
	lo := 0.0
	for range 200 {
		mid := 0.5 * (lo + hi)
		if mid == lo || mid == hi {
			break
		}
		if g(mid) > 0 {
			hi = mid
		} else {
			lo = mid
		}
		if hi-lo <= 1e-12*hi {
			break
		}
	}
	return hi
}

// derivBound bounds |f′| on the segment [a, b].
func (q Q) derivBound(a, b complex128) float64 {
	r := math.Max(cmplx.Abs(a), cmplx.Abs(b))
	_, dd := absPoly(q.D, r)
	if q.K == 0 {
		return dd
	}
	nv, nd := absPoly(q.N, r)
	e := math.Abs(q.K) * math.Exp(-math.Min(real(a), real(b))*q.Tau)
	return dd + e*(nd+q.Tau*nv)
}

// maxContourSteps bounds the steps of one winding-number computation
// (about 10 ms each 100 000). A dead time very long against the loop's
// time scale (τ·R in the hundreds of thousands) exceeds it.
const maxContourSteps = 200_000

// winding returns the change of arg f along the polygon through pts
// (closed), divided by 2π and rounded.
func (q Q) winding(pts []complex128) (int, error) {
	total := 0.0
	steps := 0
	for i := range pts {
		a, b := pts[i], pts[(i+1)%len(pts)]
		fa, _ := q.Eval(a)
		length := cmplx.Abs(b - a)
		dir := (b - a) / complex(length, 0)
		pos := 0.0
		h := length
		for pos < length {
			h = math.Min(2*h, length-pos)
			s := a + dir*complex(pos, 0)
			af := cmplx.Abs(fa)
			if af == 0 || math.IsNaN(af) {
				return 0, fmt.Errorf("%w: f(%v) = %v", ErrOnContour, s, fa)
			}
			for {
				m := q.derivBound(s, s+dir*complex(h, 0))
				if m*h < 0.9*af {
					break
				}
				h = 0.8 * af / m
				if h <= 1e-15*math.Max(1, cmplx.Abs(s)) {
					return 0, fmt.Errorf("%w: |f| = %.3g near s = %v", ErrOnContour, af, s)
				}
			}
			pos += h
			if pos > length {
				pos = length
			}
			nf, _ := q.Eval(a + dir*complex(pos, 0))
			total += cmplx.Phase(nf / fa)
			fa = nf
			if steps++; steps > maxContourSteps {
				return 0, fmt.Errorf("%w: the argument principle needs more than %d steps (dead time %g s against roots up to |s| = %g)", ErrBudget, maxContourSteps, q.Tau, cmplx.Abs(b))
			}
		}
	}
	w := total / (2 * math.Pi)
	return int(math.Round(w)), nil
}

// Count returns the number of roots with Re s > sigma0 (by the argument
// principle on [σ₀, R]×[−R, R]) and the radius R used.
func (q Q) Count(sigma0 float64) (int, float64, error) {
	R := q.Radius(sigma0)
	if sigma0 >= R {
		return 0, R, nil
	}
	// Each contour step covers at most about 1/τ of the axis where
	// e^(−sτ) turns: refuse counts that cannot finish within the budget.
	if R*q.Tau > maxContourSteps/4 || R > 1e150 {
		return 0, R, fmt.Errorf("%w: the roots with Re s > %g reach |s| = %.3g, which with a dead time of %g s is too many turns of e^(−sτ) to count", ErrBudget, sigma0, R, q.Tau)
	}
	pts := []complex128{complex(sigma0, -R), complex(R, -R), complex(R, R), complex(sigma0, R)}
	c, err := q.winding(pts)
	return c, R, err
}

// chebD returns the Chebyshev points x_j = cos(jπ/N) and the
// differentiation matrix on them (Trefethen 2000, cheb.m).
func chebD(N int) ([]float64, [][]float64) {
	x := make([]float64, N+1)
	for j := range x {
		x[j] = math.Cos(math.Pi * float64(j) / float64(N))
	}
	c := func(i int) float64 {
		v := 1.0
		if i == 0 || i == N {
			v = 2
		}
		if i%2 == 1 {
			v = -v
		}
		return v
	}
	D := make([][]float64, N+1)
	for i := range D {
		D[i] = make([]float64, N+1)
		sum := 0.0
		for j := range D[i] {
			if i != j {
				D[i][j] = c(i) / c(j) / (x[i] - x[j])
				sum += D[i][j]
			}
		}
		D[i][i] = -sum // negative sum trick: rows sum to zero exactly
	}
	return x, D
}

// Candidates returns the eigenvalues of the generator discretised at N
// Chebyshev points.
func (q Q) Candidates(N int) ([]complex128, error) {
	d := trim(q.D)
	n := len(d) - 1
	nn := make([]float64, n) // K·N/d_n, ascending powers
	for i, v := range trim(q.N) {
		p := len(trim(q.N)) - 1 - i
		nn[p] = q.K * v / d[0]
	}
	if q.K == 0 || q.Tau == 0 {
		// Rational: companion eigenvalues of D + K·N.
		m := mat.NewDense(n, n, nil)
		for i := 0; i+1 < n; i++ {
			m.Set(i, i+1, 1)
		}
		for i := range n {
			m.Set(n-1, i, m.At(n-1, i)-d[n-i]/d[0]-nn[i])
		}
		return eig(m)
	}
	_, Dm := chebD(N)
	size := n + N
	m := mat.NewDense(size, size, nil)
	for i := 0; i+1 < n; i++ {
		m.Set(i, i+1, 1)
	}
	for i := range n {
		m.Set(n-1, i, -d[n-i]/d[0])
	}
	m.Set(n-1, n+N-1, -1) // −w(t−τ) = −u_N
	sc := 2 / q.Tau
	for j := 1; j <= N; j++ {
		row := n + j - 1
		for i := range n {
			m.Set(row, i, sc*Dm[j][0]*nn[i]) // u_0 = Σ nn_i x_i
		}
		for i := 1; i <= N; i++ {
			m.Set(row, n+i-1, sc*Dm[j][i])
		}
	}
	return eig(m)
}

func eig(m *mat.Dense) ([]complex128, error) {
	var e mat.Eigen
	if !e.Factorize(m, mat.EigenNone) {
		return nil, errors.New("quasipoly: eigenvalue iteration did not converge")
	}
	return e.Values(nil), nil
}

// Polish refines s by Newton's method on f until the step is at most
// tol·max(|s|, scale); ok is false when it does not converge in 60 steps.
func (q Q) Polish(s complex128, tol, scale float64) (complex128, bool) {
	real0 := imag(s) == 0
	for range 60 {
		f, df := q.Eval(s)
		if df == 0 {
			return s, f == 0
		}
		step := f / df
		if real0 {
			step = complex(real(step), 0)
		}
		s -= step
		if math.IsNaN(real(s)) || math.IsNaN(imag(s)) || math.IsInf(real(s), 0) || math.IsInf(imag(s), 0) {
			return s, false
		}
		if cmplx.Abs(step) <= tol*math.Max(cmplx.Abs(s), scale) {
			// One more step to reach the rounding level.
			f, df = q.Eval(s)
			if df != 0 {
				st := f / df
				if real0 {
					st = complex(real(st), 0)
				}
				if cmplx.Abs(st) < cmplx.Abs(step) {
					s -= st
				}
			}
			return s, true
		}
	}
	return s, false
}

// Result is a verified set of roots.
type Result struct {
	// Roots are sorted by decreasing real part, upper half plane first
	// within a conjugate pair.
	Roots []complex128
	// Abscissa σ₀: Roots holds every root with Re s > σ₀.
	Abscissa float64
	// Radius bounds |s| of every root with Re s ≥ σ₀.
	Radius float64
	// Count is the argument-principle count in Re s > σ₀.
	Count int
	// Verified reports Count == len(Roots).
	Verified bool
	// Size is the number of Chebyshev points of the last discretisation.
	Size int
	// MaxResidual is max |f(s)|/(Σ|d_i||s|^i + |K|·|e^(−sτ)|·Σ|n_i||s|^i).
	MaxResidual float64
}

// scale returns a natural size of the roots (for absolute tolerances near
// s = 0).
func (q Q) scale() float64 {
	s := 1e-300
	if q.Tau > 0 {
		s = 1e-6 / q.Tau
	}
	return s
}

// polishAll polishes candidates, keeps the converged distinct ones (upper
// half plane and real), sorted by decreasing real part.
func (q Q) polishAll(cands []complex128, tol float64, keep func(complex128) bool) []complex128 {
	var out []complex128
	sc := q.scale()
	for _, c := range cands {
		if imag(c) < 0 {
			continue
		}
		if math.Abs(imag(c)) <= 1e-9*cmplx.Abs(c) {
			c = complex(real(c), 0)
		}
		r, ok := q.Polish(c, tol, sc)
		if !ok {
			// A complex candidate may belong to a real root: try the axis.
			if imag(c) != 0 && math.Abs(imag(c)) < 1e-3*cmplx.Abs(c) {
				r, ok = q.Polish(complex(real(c), 0), tol, sc)
			}
			if !ok {
				continue
			}
		}
		if imag(r) < 0 {
			r = cmplx.Conj(r)
		}
		if math.Abs(imag(r)) <= 1e-10*math.Max(cmplx.Abs(r), sc) {
			if rr, ok := q.Polish(complex(real(r), 0), tol, sc); ok {
				r = rr
			}
		}
		if !keep(r) {
			continue
		}
		dup := false
		for _, o := range out {
			if cmplx.Abs(o-r) <= 1e-8*math.Max(cmplx.Abs(r), sc) {
				dup = true
				break
			}
		}
		if !dup {
			out = append(out, r)
		}
	}
	sort.Slice(out, func(i, j int) bool {
		if real(out[i]) != real(out[j]) {
			return real(out[i]) > real(out[j])
		}
		return imag(out[i]) > imag(out[j])
	})
	return out
}

// countOf returns the number of roots in the list, conjugates included.
func countOf(upper []complex128) int {
	c := 0
	for _, r := range upper {
		if imag(r) == 0 {
			c++
		} else {
			c += 2
		}
	}
	return c
}

func withConjugates(upper []complex128) []complex128 {
	out := make([]complex128, 0, countOf(upper))
	for _, r := range upper {
		out = append(out, r)
		if imag(r) != 0 {
			out = append(out, cmplx.Conj(r))
		}
	}
	return out
}

func (q Q) residual(s complex128) float64 {
	f, _ := q.Eval(s)
	r := cmplx.Abs(s)
	dv, _ := absPoly(q.D, r)
	nv, _ := absPoly(q.N, r)
	den := dv + math.Abs(q.K)*math.Exp(-real(s)*q.Tau)*nv
	return cmplx.Abs(f) / den
}

// Settings of Above and Rightmost.
type Settings struct {
	// Tol is the relative Newton tolerance (1e-12 if zero).
	Tol float64
	// MaxRoots bounds the number of roots in a region (2000 if zero).
	MaxRoots int
	// MaxSize bounds the number of Chebyshev points (1500 if zero).
	MaxSize int
}

func (s *Settings) get() (tol float64, maxRoots, maxSize int) {
	tol, maxRoots, maxSize = 1e-12, 2000, 1500
	if s != nil {
		if s.Tol > 0 {
			tol = s.Tol
		}
		if s.MaxRoots > 0 {
			maxRoots = s.MaxRoots
		}
		if s.MaxSize > 0 {
			maxSize = s.MaxSize
		}
	}
	return
}

// startSize is the number of Chebyshev points that resolves roots up to
// modulus R: e^(λθ) on an interval of length τ needs about |λ|τ/2 points
// plus a margin for spectral convergence.
func startSize(R, tau float64, n int) int {
	N := int(math.Ceil(0.6*R*tau)) + 12 + n
	return N
}

// Above returns every root with Re s > sigma0.
func (q Q) Above(sigma0 float64, set *Settings) (Result, error) {
	q.D, q.N = trim(q.D), trim(q.N)
	if err := q.Check(); err != nil {
		return Result{}, err
	}
	tol, maxRoots, maxSize := set.get()
	count, R, err := q.Count(sigma0)
	if err != nil {
		return Result{}, err
	}
	res := Result{Abscissa: sigma0, Radius: R, Count: count}
	if count > maxRoots {
		return res, fmt.Errorf("%w: %d roots have Re s > %g (at most %d)", ErrTooMany, count, sigma0, maxRoots)
	}
	if count == 0 {
		res.Verified = true
		return res, nil
	}
	keep := func(s complex128) bool { return real(s) > sigma0 }
	N := startSize(R, q.Tau, len(q.D)-1)
	for {
		N = min(N, maxSize)
		cands, err := q.Candidates(N)
		if err != nil {
			return res, err
		}
		up := q.polishAll(cands, tol, keep)
		res.Size = N
		res.Roots = withConjugates(up)
		if len(res.Roots) == count || N >= maxSize || q.Tau == 0 || q.K == 0 {
			break
		}
		N *= 2
	}
	return q.finish(res)
}

func (q Q) finish(res Result) (Result, error) {
	for _, r := range res.Roots {
		res.MaxResidual = math.Max(res.MaxResidual, q.residual(r))
	}
	res.Verified = len(res.Roots) == res.Count
	if !res.Verified {
		return res, fmt.Errorf("%w: %d counted with Re s > %g, %d found", ErrNotFound, res.Count, res.Abscissa, len(res.Roots))
	}
	return res, nil
}

// Rightmost returns at least the m rightmost roots (a conjugate pair is
// never split) together with the abscissa σ₀ below which the next root
// lies; every root with Re s > σ₀ is in the result.
func (q Q) Rightmost(m int, set *Settings) (Result, error) {
	q.D, q.N = trim(q.D), trim(q.N)
	if err := q.Check(); err != nil {
		return Result{}, err
	}
	tol, maxRoots, maxSize := set.get()
	m = min(m, maxRoots)
	n := len(q.D) - 1
	N := max(20, int(math.Ceil(1.6*float64(m)))+12+n)
	all := func(complex128) bool { return true }
	for {
		N = min(N, maxSize)
		cands, err := q.Candidates(N)
		if err != nil {
			return Result{}, err
		}
		up := q.polishAll(cands, tol, all)
		full := withConjugates(up)
		// Pick σ₀ between the m-th root (pair kept) and the next one.
		k := 0
		for k < len(full) && k < m {
			k++
			if imag(full[k-1]) > 0 {
				k++ // its conjugate follows
			}
		}
		var sigma0 float64
		switch {
		case len(full) == 0:
			sigma0 = 0
		case k < len(full):
			sigma0 = 0.5 * (real(full[k-1]) + real(full[k]))
		default:
			sigma0 = real(full[len(full)-1]) - 1/math.Max(q.Tau, 1e-300)
		}
		if k < len(full) && real(full[k-1])-real(full[k]) <= 1e-9*math.Max(1, math.Abs(real(full[k]))) {
			// Two roots share the abscissa: take both.
			for k < len(full) && real(full[k-1])-real(full[k]) <= 1e-9*math.Max(1, math.Abs(real(full[k]))) {
				k++
			}
			if k < len(full) {
				sigma0 = 0.5 * (real(full[k-1]) + real(full[k]))
			}
		}
		if q.Tau == 0 || q.K == 0 {
			// A polynomial: all n roots are candidates, the count is n.
			res := Result{Abscissa: math.Inf(-1), Radius: math.Inf(1), Count: countOf(up), Roots: full}
			if k < len(full) {
				res.Abscissa = sigma0
				res.Count, res.Roots = k, full[:k]
			}
			if countOf(up) != n {
				res.Count = n
			}
			return q.finish(res)
		}
		count, R, err := q.Count(sigma0)
		res := Result{Abscissa: sigma0, Radius: R, Count: count, Size: N, Roots: full[:k]}
		if err == nil && (count == k || N >= maxSize || q.Tau == 0 || q.K == 0) {
			return q.finish(res)
		}
		if N >= maxSize || errors.Is(err, ErrBudget) {
			// A larger discretisation only widens the region to count, so
			// a count over budget stays over budget: stop here.
			if err != nil {
				return res, err
			}
			return q.finish(res)
		}
		N *= 2
	}
}
