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

// EvalCompensated returns p(x) computed by the compensated Horner scheme of
// Graillat, Langlois & Louvet (2005, "Compensated Horner scheme", Research
// Report RR2005-04, Université de Perpignan; also Langlois & Louvet 2007,
// ARITH-18), together with a bound on its error: |value − p(x)| ≤ errBound.
//
// The rounding errors of every product and sum of Horner's scheme are
// captured exactly by error-free transformations (TwoProd with a fused
// multiply–add, TwoSum) and summed by a second Horner pass, so the result
// is as accurate as if Horner's scheme ran in twice the working precision
// and then rounded once:
//
//	|value − p(x)| ≤ u·|p(x)| + γ²₂ₙ·p̃(|x|),  p̃(t) = Σ|aᵢ|tⁱ,  u = 2⁻⁵³,
//
// where γₖ = ku/(1 − ku). The returned errBound is the a-posteriori form of
// this bound (Langlois & Louvet 2007, Theorem 3) with a safety factor 2:
// u·|value| + 2γ₄ₙ₊₂·ê + 2u²|value|, ê being the Horner sum of the moduli of
// the captured errors. Underflow is not accounted for.
func (p Poly) EvalCompensated(x float64) (value, errBound float64) {
	return compHorner(p.c, x)
}

// EvalComplexCompensated returns p(z) computed by the compensated Horner
// scheme in complex arithmetic, with an error bound |value − p(z)| ≤
// errBound. The complex product is split error-free into six real error
// terms (Graillat & Ménissier-Morain 2012, "Accurate summation, dot product
// and polynomial evaluation in complex floating point arithmetic",
// Information and Computation 216), so the result is as accurate as complex
// Horner in twice the working precision: about u·|p(z)| + γ²·p̃(|z|). The
// bound is u·|value| + 2γ₈ₙ₊₄·ê + 2u²|value| with ê as in EvalCompensated.
// For real z it equals EvalCompensated.
func (p Poly) EvalComplexCompensated(z complex128) (value complex128, errBound float64) {
	if imag(z) == 0 {
		v, e := compHorner(p.c, real(z))
		return complex(v, 0), e
	}
	return compHornerComplex(p.c, z)
}

// compHorner is the compensated Horner scheme on ascending coefficients.
func compHorner(c []float64, x float64) (value, errBound float64) {
	n := len(c) - 1
	if n < 0 {
		return 0, 0
	}
	s := c[n]
	var corr, ebar float64
	ax := math.Abs(x)
	for i := n - 1; i >= 0; i-- {
		pr, pi := twoProd(s, x)
		var sigma float64
		s, sigma = twoSum(pr, c[i])
		corr = corr*x + (pi + sigma)
		ebar = ebar*ax + (math.Abs(pi) + math.Abs(sigma))
	}
	value = s + corr
	av := math.Abs(value)
	errBound = unitRoundoff*av + 2*gamma(4*n+2)*ebar + 2*unitRoundoff*unitRoundoff*av
	return value, errBound
}

// compHornerComplex is compHorner for a complex argument.
func compHornerComplex(c []float64, z complex128) (value complex128, errBound float64) {
	n := len(c) - 1
	if n < 0 {
		return 0, 0
	}
	zr, zi := real(z), imag(z)
	az := abs(z)
	sr, si := c[n], 0.0
	var cr, ci, ebar float64
	for i := n - 1; i >= 0; i-- {
		// (sr + i·si)(zr + i·zi), each partial product error-free.
		h1, e1 := twoProd(sr, zr)
		h2, e2 := twoProd(si, zi)
		h3, e4 := twoProd(sr, zi)
		h4, e5 := twoProd(si, zr)
		pr, e3 := twoSum(h1, -h2)
		pim, e6 := twoSum(h3, h4)
		var sigma float64
		sr, sigma = twoSum(pr, c[i])
		si = pim
		er := e1 - e2 + e3 + sigma
		ei := e4 + e5 + e6
		// corr = corr·z + err in ordinary complex arithmetic.
		cr, ci = cr*zr-ci*zi+er, cr*zi+ci*zr+ei
		ebar = ebar*az + (math.Abs(e1) + math.Abs(e2) + math.Abs(e3) + math.Abs(sigma) +
			math.Abs(e4) + math.Abs(e5) + math.Abs(e6))
	}
	value = complex(sr+cr, si+ci)
	av := abs(value)
	errBound = unitRoundoff*av + 2*gamma(8*n+4)*ebar + 2*unitRoundoff*unitRoundoff*av
	return value, errBound
}

// absPoly returns p̃(t) = Σ|aᵢ|tⁱ for t ≥ 0 (the condition-number
// denominator of Horner's scheme), rounded upward by a factor 1+γ₂ₙ.
func absPoly(c []float64, t float64) float64 {
	s := 0.0
	for i := len(c) - 1; i >= 0; i-- {
		s = s*t + math.Abs(c[i])
	}
	return s * (1 + gamma(2*len(c)))
}
