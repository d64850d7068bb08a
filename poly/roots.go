package poly

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"gonum.org/v1/gonum/mat"
)

// Root is a root of a polynomial with its multiplicity.
type Root struct {
	// Value is the root (the centre of the cluster for a multiple root).
	Value complex128
	// Multiplicity is how many times the root is repeated (≥ 1).
	Multiplicity int
}

// Roots returns the roots of p repeated by multiplicity, in the
// deterministic order of SortRoots (ascending real part, then imaginary
// part). Real roots have an imaginary part of exactly zero, complex roots
// come in exact conjugate pairs, and a multiple root is repeated with
// exactly the same value. See RootsWithSettings for the method and its
// accuracy.
//
// It returns ErrZeroPolynomial for the zero polynomial, ErrNotFinite when a
// coefficient is not finite and ErrNoConvergence if the eigenvalue solver
// fails. A non-zero constant has no roots (an empty slice).
func (p Poly) Roots() ([]complex128, error) {
	rs, err := p.RootsWithMultiplicity()
	if err != nil {
		return nil, err
	}
	var out []complex128
	for _, r := range rs {
		for range r.Multiplicity {
			out = append(out, r.Value)
		}
	}
	return out, nil
}

// RootsWithMultiplicity returns the distinct roots of p with their
// multiplicities, in the order of SortRootSet; the multiplicities add up to
// the degree. It is RootsWithSettings(nil).
func (p Poly) RootsWithMultiplicity() ([]Root, error) {
	return p.RootsWithSettings(nil)
}

// RootSettings tunes RootsWithSettings. A nil *RootSettings and the zero
// value mean the defaults.
type RootSettings struct {
	// ClusterTolerance is the componentwise relative backward error up to
	// which a cluster of computed roots is reported as one multiple root:
	// the cluster is merged into an m-fold root c only if some polynomial
	// with coefficients aᵢ(1+tᵢ), |tᵢ| ≤ ClusterTolerance, has c as an
	// m-fold root (see the comment at the top of cluster.go). Valid range:
	// negative (recognition off: every root is reported with multiplicity
	// 1, except an exactly double root of a quadratic and exact zero roots)
	// or [0, 1e-3]. If zero, defaults to 8u = 8·2⁻⁵³ ≈ 8.9e-16.
	ClusterTolerance float64
}

func (s *RootSettings) validate() error {
	if s == nil {
		return nil
	}
	if math.IsNaN(s.ClusterTolerance) || s.ClusterTolerance > 1e-3 {
		return fmt.Errorf("%w: RootSettings.ClusterTolerance is %v, want a negative number (off) or at most 1e-3", ErrBadTolerance, s.ClusterTolerance)
	}
	return nil
}

func (s *RootSettings) clusterTolerance() float64 {
	switch {
	case s == nil || s.ClusterTolerance == 0:
		return defaultClusterTolerance
	case s.ClusterTolerance < 0:
		return 0
	}
	return s.ClusterTolerance
}

// RootsWithSettings returns the distinct roots of p with their
// multiplicities, in the order of SortRootSet, under the settings s (nil
// means the defaults).
//
// Method (the package documentation and the comments of refine.go and
// cluster.go give the details and references). Trailing zero coefficients
// give exact zero roots. Degree 1 and 2 use closed forms (the quadratic
// one free of cancellation, with Kahan's fused multiply–add discriminant).
// From degree 3 on, the starting values are the eigenvalues of the
// balanced companion matrix (gonum's mat.Eigen; backward stable in the
// coefficients by Edelman & Murakami 1995), after an exact power-of-two
// scaling of the variable. They are refined all together by the
// Ehrlich–Aberth iteration (Aberth 1973) whose p and p′ are evaluated by
// the compensated Horner scheme (Graillat, Langlois & Louvet 2005), as if
// in twice the working precision; a simple root whose residual remains too
// noisy (uncertainty above 8 ulps) gets further Newton steps with the
// residual evaluated in math/big at 256 bits. Isolated clusters are then
// tested for being a multiple root (Kahan 1972, Zeng 2004): an accepted
// m-fold root is reported once, at the simple root of p⁽ᵐ⁻¹⁾ near the
// cluster, with multiplicity m, provided a polynomial within a
// componentwise relative distance of s.ClusterTolerance (default 8u) has
// that m-fold root and the whole root set stays consistent. Finally roots
// within their uncertainty of the real axis are made exactly real and the
// others exact conjugate pairs.
//
// Accuracy. A simple root r is found to within about an ulp plus
// cond·u², where cond·u = u·p̃(|r|)/|p′(r)| is its first-order sensitivity
// to relative coefficient changes of u: that is, to the accuracy the
// double-precision coefficients allow, not the far lower accuracy of the
// eigenvalues (Wilkinson's degree-20 polynomial: 3.6e-3 relative from the
// eigenvalues alone, every root correct to the last bit after refinement).
// A recognised multiple root is exact to a few ulps when it is exact in
// the coefficients. The normwise backward error of the root set
// (RootsBackwardError) is at most 13u (6.5ε) on seeded random polynomials
// up to degree 50, the floor set by rounding the roots to float64.
//
// Special cases are:
//
//	p constant (non-zero)   no roots (empty result)
//	p zero                  ErrZeroPolynomial
//	a coefficient NaN/Inf   ErrNotFinite
//	a root beyond ±MaxFloat64  ErrOverflow (5e-324·x + 1, say)
//	(x−r)ᵐ exact in binary  one Root{r, m}
//
// It returns ErrBadTolerance for invalid settings and ErrNoConvergence if
// the eigenvalue solver fails or, as a safety net never triggered in the
// tests and fuzzing, if some approximation is not a root of a nearby
// polynomial after the iteration.
func (p Poly) RootsWithSettings(s *RootSettings) ([]Root, error) {
	if err := s.validate(); err != nil {
		return nil, err
	}
	if p.IsZero() {
		return nil, fmt.Errorf("%w: every number is a root", ErrZeroPolynomial)
	}
	if !p.IsFinite() {
		return nil, fmt.Errorf("%w: cannot find roots", ErrNotFinite)
	}
	// Exact zero roots from trailing zero coefficients.
	k := 0
	for p.c[k] == 0 {
		k++
	}
	roots := []Root{}
	if k > 0 {
		roots = append(roots, Root{Value: 0, Multiplicity: k})
	}
	if len(p.c)-k > 1 {
		rest, err := rootsNonZero(p.c[k:], s)
		if err != nil {
			return nil, err
		}
		for _, r := range rest {
			if cmplxNotFinite(r.Value) {
				return nil, fmt.Errorf("%w: a root of the degree-%d polynomial (coefficients %g … %g) is beyond ±%g", ErrOverflow, p.Degree(), p.c[len(p.c)-1], p.c[k], math.MaxFloat64)
			}
		}
		roots = append(roots, rest...)
	}
	SortRootSet(roots)
	return roots, nil
}

// quadraticRoots solves a·x² + b·x + c = 0 (a, c ≠ 0) by the cancellation-
// free formula (Press et al., Numerical Recipes, 3rd ed., §5.6):
// q = −(b + sign(b)·√(b² − 4ac))/2, x₁ = q/a, x₂ = c/q. The discriminant
// is evaluated with a fused multiply–add to keep the sign of nearly-double
// roots correct.
func quadraticRoots(a, b, c float64) []Root {
	// Scale to avoid overflow in b² − 4ac.
	s := math.Max(math.Max(math.Abs(a), math.Abs(b)), math.Abs(c))
	a, b, c = a/s, b/s, c/s
	disc := discriminant(a, b, c)
	if disc == 0 {
		return []Root{{Value: complex(-b/(2*a), 0), Multiplicity: 2}}
	}
	if disc > 0 {
		sq := math.Sqrt(disc)
		q := -0.5 * (b + math.Copysign(sq, b))
		return []Root{{Value: complex(q/a, 0), Multiplicity: 1}, {Value: complex(c/q, 0), Multiplicity: 1}}
	}
	re := -b / (2 * a)
	im := math.Sqrt(-disc) / (2 * math.Abs(a))
	return []Root{{Value: complex(re, im), Multiplicity: 1}, {Value: complex(re, -im), Multiplicity: 1}}
}

// discriminant returns b² − 4ac with Kahan's fused multiply–add trick,
// accurate to a few ulps even under cancellation (Kahan 2004, "On the cost
// of floating-point computation without extra-precise arithmetic").
func discriminant(a, b, c float64) float64 {
	w := 4 * a * c
	e := math.FMA(-4*a, c, w) // rounding error of w
	f := math.FMA(b, b, -w)
	return f + e
}

// companionEigenvalues returns the eigenvalues of the companion matrix of
// q (degree ≥ 3, q(0) ≠ 0) computed by gonum's mat.Eigen, whose LAPACK-style
// Dgeev balances the matrix (Parlett & Reinsch 1969) before the QR algorithm.
func companionEigenvalues(c []float64) ([]complex128, error) {
	n := len(c) - 1
	lead := c[n]
	a := mat.NewDense(n, n, nil)
	for j := 0; j < n; j++ {
		a.Set(0, j, -c[n-1-j]/lead)
	}
	for i := 1; i < n; i++ {
		a.Set(i, i-1, 1)
	}
	var eig mat.Eigen
	if ok := eig.Factorize(a, mat.EigenNone); !ok {
		return nil, fmt.Errorf("%w: eigenvalues of the degree-%d companion matrix", ErrNoConvergence, n)
	}
	return eig.Values(nil), nil
}

// SortRoots sorts roots in place by ascending real part, then ascending
// imaginary part: the deterministic order returned by Roots.
func SortRoots(r []complex128) {
	slices.SortStableFunc(r, compareComplex)
}

func compareComplex(a, b complex128) int {
	if c := cmp.Compare(real(a), real(b)); c != 0 {
		return c
	}
	return cmp.Compare(imag(a), imag(b))
}

// SortRootSet sorts a root set in place in the order of SortRoots.
func SortRootSet(r []Root) {
	slices.SortStableFunc(r, func(a, b Root) int { return compareComplex(a.Value, b.Value) })
}
