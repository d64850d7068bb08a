package poly

import (
	"fmt"
	"math"
	"math/big"
)

// RootsBackwardError returns the normwise backward error of a computed root
// set (repeated by multiplicity, as Roots returns it) as the roots of p:
//
//	η = ‖q̂ − q‖₂ / ‖q‖₂,   q = p/aₙ (monic),   q̂ = ∏ᵢ (x − rᵢ),
//
// where the norm is the 2-norm of the coefficient vector (real and
// imaginary parts; q̂ is real when the roots come in exact conjugate
// pairs). The products and the division are carried out in math/big at 256
// bits, so η measures the roots, not the rebuilding: η is the relative size
// of the smallest change of the monic coefficients of which the given
// values are the exact roots, in the sense of Edelman & Murakami (1995,
// §2). A root set exact to the last bit of every root still has η of order
// u = 2⁻⁵³ because the roots are rounded to float64.
//
// It returns ErrZeroPolynomial for the zero polynomial, ErrNotFinite for a
// non-finite coefficient or root and ErrRootCount when the number of roots
// differs from the degree.
func (p Poly) RootsBackwardError(roots []complex128) (float64, error) {
	if p.IsZero() {
		return 0, fmt.Errorf("%w: backward error of roots", ErrZeroPolynomial)
	}
	if !p.IsFinite() {
		return 0, fmt.Errorf("%w: backward error of roots", ErrNotFinite)
	}
	n := p.Degree()
	if len(roots) != n {
		return 0, fmt.Errorf("%w: %d roots given for a polynomial of degree %d", ErrRootCount, len(roots), n)
	}
	for i, r := range roots {
		if cmplxNotFinite(r) {
			return 0, fmt.Errorf("%w: root %d is %v", ErrNotFinite, i, r)
		}
	}
	eta := backwardError(p.c, roots)
	if math.IsNaN(eta) {
		return 0, fmt.Errorf("%w: backward error is NaN", ErrNotFinite)
	}
	return eta, nil
}

// backwardError computes η of RootsBackwardError for ascending
// coefficients c (len(roots) = len(c) − 1) in math/big at bigPrecision
// bits.
func backwardError(c []float64, roots []complex128) float64 {
	return backwardErrorPrec(c, roots, bigPrecision)
}

// backwardErrorPrec is backwardError at prec bits. Rebuilding ∏(x − rᵢ)
// at prec bits adds a relative error of about n·2⁻ᵖʳᵉᶜ·∏(1+|rᵢ|)/‖q‖.
func backwardErrorPrec(c []float64, roots []complex128, prec uint) float64 {
	n := len(c) - 1
	nf := func() *big.Float { return new(big.Float).SetPrec(prec) }
	// q̂ by ascending powers, real and imaginary parts.
	re := make([]*big.Float, n+1)
	im := make([]*big.Float, n+1)
	for i := range re {
		re[i], im[i] = nf(), nf()
	}
	re[0].SetFloat64(1)
	t1, t2, tr, ti := nf(), nf(), nf(), nf()
	rr, ri := nf(), nf()
	for k, r := range roots {
		rr.SetFloat64(real(r))
		ri.SetFloat64(imag(r))
		// Multiply by (x − r) in place, highest power first:
		// new[i] = old[i−1] − r·old[i].
		for i := k + 1; i >= 0; i-- {
			if i <= k {
				tr.Mul(rr, re[i])
				t1.Mul(ri, im[i])
				tr.Sub(tr, t1)
				ti.Mul(rr, im[i])
				t2.Mul(ri, re[i])
				ti.Add(ti, t2)
			} else {
				tr.SetFloat64(0)
				ti.SetFloat64(0)
			}
			if i > 0 {
				re[i].Sub(re[i-1], tr)
				im[i].Sub(im[i-1], ti)
			} else {
				re[i].Neg(tr)
				im[i].Neg(ti)
			}
		}
	}
	lead := nf().SetFloat64(c[n])
	num, den := nf(), nf()
	q, d := nf(), nf()
	for i := 0; i <= n; i++ {
		q.SetFloat64(c[i])
		q.Quo(q, lead)
		d.Sub(re[i], q)
		d.Mul(d, d)
		num.Add(num, d)
		d.Mul(im[i], im[i])
		num.Add(num, d)
		q.Mul(q, q)
		den.Add(den, q)
	}
	num.Sqrt(num)
	den.Sqrt(den)
	num.Quo(num, den)
	eta, _ := num.Float64()
	return eta
}
