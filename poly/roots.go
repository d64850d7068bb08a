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
// deterministic order of SortRoots. Real roots have an imaginary part of
// exactly zero and complex roots come in exact conjugate pairs.
// It returns ErrZeroPolynomial for the zero polynomial and ErrNotFinite when
// a coefficient is not finite. A constant has no roots.
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
// multiplicities, in the order of SortRoots.
func (p Poly) RootsWithMultiplicity() ([]Root, error) {
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
	q := Poly{c: p.c[k:]}
	var roots []Root
	if k > 0 {
		roots = append(roots, Root{Value: 0, Multiplicity: k})
	}
	rest, err := rootsNonZero(q)
	if err != nil {
		return nil, err
	}
	roots = append(roots, rest...)
	SortRootSet(roots)
	return roots, nil
}

// rootsNonZero finds the roots of q, whose constant term is non-zero.
func rootsNonZero(q Poly) ([]Root, error) {
	switch q.Degree() {
	case 0:
		return nil, nil
	case 1:
		return []Root{{Value: complex(-q.c[0]/q.c[1], 0), Multiplicity: 1}}, nil
	case 2:
		return quadraticRoots(q.c[2], q.c[1], q.c[0]), nil
	}
	vals, err := companionEigenvalues(q)
	if err != nil {
		return nil, err
	}
	return refine(q, vals), nil
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
func companionEigenvalues(q Poly) ([]complex128, error) {
	n := q.Degree()
	lead := q.c[n]
	a := mat.NewDense(n, n, nil)
	for j := 0; j < n; j++ {
		a.Set(0, j, -q.c[n-1-j]/lead)
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

// refine polishes eigenvalue estimates with Newton's method on q and makes
// real roots exactly real and complex roots exact conjugate pairs.
func refine(q Poly, vals []complex128) []Root {
	out := make([]Root, 0, len(vals))
	for _, v := range vals {
		out = append(out, Root{Value: newtonPolish(q, v), Multiplicity: 1})
	}
	return pairConjugates(out)
}

// newtonPolish takes up to 8 Newton steps from z, stopping when a step does
// not reduce the residual.
func newtonPolish(q Poly, z complex128) complex128 {
	f, d := q.EvalWithDerivative(z)
	for range 8 {
		if d == 0 {
			break
		}
		zn := z - f/d
		fn, dn := q.EvalWithDerivative(zn)
		if abs(fn) >= abs(f) {
			break
		}
		z, f, d = zn, fn, dn
	}
	return z
}

// pairConjugates snaps roots with a tiny imaginary part to the real axis and
// replaces each upper-half-plane root and its partner by an exact pair.
func pairConjugates(rs []Root) []Root {
	for i := range rs {
		v := rs[i].Value
		if math.Abs(imag(v)) <= 64*0x1p-53*math.Abs(real(v)) {
			rs[i].Value = complex(real(v), 0)
		}
	}
	used := make([]bool, len(rs))
	for i := range rs {
		if used[i] || imag(rs[i].Value) <= 0 {
			continue
		}
		used[i] = true
		best, bd := -1, math.Inf(1)
		for j := range rs {
			if used[j] || imag(rs[j].Value) >= 0 {
				continue
			}
			if d := abs(rs[j].Value - complex(real(rs[i].Value), -imag(rs[i].Value))); d < bd {
				best, bd = j, d
			}
		}
		if best >= 0 {
			used[best] = true
			v := rs[i].Value
			m := (real(v) + real(rs[best].Value)) / 2
			im := (imag(v) - imag(rs[best].Value)) / 2
			rs[i].Value = complex(m, im)
			rs[best].Value = complex(m, -im)
		}
	}
	return rs
}

// SortRoots sorts roots in place by ascending real part, then ascending
// imaginary part: the deterministic order returned by Roots.
func SortRoots(r []complex128) {
	slices.SortStableFunc(r, func(a, b complex128) int {
		if c := cmp.Compare(real(a), real(b)); c != 0 {
			return c
		}
		return cmp.Compare(imag(a), imag(b))
	})
}

// SortRootSet sorts a root set in place in the order of SortRoots.
func SortRootSet(r []Root) {
	slices.SortStableFunc(r, func(a, b Root) int {
		if c := cmp.Compare(real(a.Value), real(b.Value)); c != 0 {
			return c
		}
		return cmp.Compare(imag(a.Value), imag(b.Value))
	})
}
