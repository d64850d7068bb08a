package poly

import (
	"fmt"
	"math"
)

// CommonRoots returns the roots that p and q share within the relative
// tolerance tol, repeated by their common multiplicity: a root r of p and a
// root s of q are matched when |r − s| ≤ tol·max(1, |r|). Each root of q is
// matched at most once, nearest first. Complex roots are returned in exact
// conjugate pairs (the average of the matched pair), so FromRoots of the
// result is real.
//
// It returns ErrZeroPolynomial when p or q is zero, ErrBadTolerance for a
// negative or NaN tol and ErrNotFinite for non-finite coefficients.
func CommonRoots(p, q Poly, tol float64) ([]complex128, error) {
	if !(tol >= 0) || math.IsInf(tol, 0) {
		return nil, fmt.Errorf("%w: got %v", ErrBadTolerance, tol)
	}
	if p.IsZero() || q.IsZero() {
		return nil, fmt.Errorf("%w: common roots with the zero polynomial are undefined", ErrZeroPolynomial)
	}
	pr, err := p.Roots()
	if err != nil {
		return nil, err
	}
	qr, err := q.Roots()
	if err != nil {
		return nil, err
	}
	used := make([]bool, len(qr))
	var common []complex128
	for _, r := range pr {
		if imag(r) < 0 {
			continue // handled with its conjugate
		}
		best, bd := -1, math.Inf(1)
		for j, s := range qr {
			if used[j] {
				continue
			}
			if d := abs(r - s); d < bd {
				best, bd = j, d
			}
		}
		if best < 0 || bd > tol*math.Max(1, abs(r)) {
			continue
		}
		used[best] = true
		m := (r + qr[best]) / 2
		if imag(r) == 0 {
			common = append(common, complex(real(m), 0))
			continue
		}
		// Mark the conjugate partner of qr[best] as used as well.
		c := complex(real(qr[best]), -imag(qr[best]))
		for j, s := range qr {
			if !used[j] && s == c {
				used[j] = true
				break
			}
		}
		common = append(common, m, complex(real(m), -imag(m)))
	}
	SortRoots(common)
	return common, nil
}

// GCD returns the monic approximate greatest common divisor of p and q: the
// product of (x − r) over their common roots within tol (see CommonRoots).
// Working from roots rather than from a Euclidean remainder sequence keeps
// the result well defined for inexact coefficients (Euclid's algorithm is
// unstable in floating point; see Zeng 2004 for the approximate-GCD
// problem). The GCD of coprime polynomials is 1.
func GCD(p, q Poly, tol float64) (Poly, error) {
	common, err := CommonRoots(p, q, tol)
	if err != nil {
		return Poly{}, err
	}
	return FromRoots(common)
}
