package poly

import "math"

// Eval returns p(x) by Horner's scheme.
func (p Poly) Eval(x float64) float64 {
	s := 0.0
	for i := len(p.c) - 1; i >= 0; i-- {
		s = s*x + p.c[i]
	}
	return s
}

// EvalComplex returns p(z) by Horner's scheme in complex arithmetic.
func (p Poly) EvalComplex(z complex128) complex128 {
	var s complex128
	for i := len(p.c) - 1; i >= 0; i-- {
		s = s*z + complex(p.c[i], 0)
	}
	return s
}

// EvalWithDerivative returns p(z) and p′(z) in one Horner pass.
func (p Poly) EvalWithDerivative(z complex128) (value, deriv complex128) {
	for i := len(p.c) - 1; i >= 0; i-- {
		deriv = deriv*z + value
		value = value*z + complex(p.c[i], 0)
	}
	return value, deriv
}

// EvalWithBound returns p(z) by Horner's scheme together with a running
// bound on its rounding error: |computed − exact| ≤ errBound. The bound is
// the running error bound of Higham (2002, Accuracy and Stability of
// Numerical Algorithms, 2nd ed., Algorithm 5.1), adapted to complex
// arithmetic with the factor √2·γ₂ of a complex multiplication.
func (p Poly) EvalWithBound(z complex128) (value complex128, errBound float64) {
	const u = 0x1p-53
	az := abs(z)
	mu := 0.0
	var s complex128
	for i := len(p.c) - 1; i >= 0; i-- {
		s = s*z + complex(p.c[i], 0)
		mu = mu*az + abs(s)
	}
	// Each step commits at most one complex multiply (relative error
	// ≤ √2·γ₂) and one add (≤ u), folded into mu as in Higham's derivation.
	errBound = u * (2*mu - abs(s)) * (1 + 2*math.Sqrt2)
	if errBound < 0 {
		errBound = 0
	}
	return s, errBound
}
