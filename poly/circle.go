package poly

import "math"

// VanishesAt reports whether p(x) is zero within the rounding of p's
// coefficients: exactly at x = 0 (p(0) is the constant coefficient),
// elsewhere when the compensated value satisfies
//
//	|p(x)| ≤ 8·(n+1)·u·Σ|cᵢ|·|x|ⁱ,  u = 2⁻⁵³,
//
// a few units in the last place per coefficient: the size of the error
// made when coefficients are formed by expanding products of factors (a
// pole at z = 1 written as (z − 1)(z − 0.368) expands to coefficients
// whose sum is about 1e-16, not 0). The evaluation itself is compensated
// (Graillat, Langlois & Louvet 2005), so its own error is far below this.
// The zero polynomial vanishes everywhere.
func (p Poly) VanishesAt(x float64) bool {
	if p.IsZero() {
		return true
	}
	if x == 0 {
		return p.c[0] == 0
	}
	v, _ := p.EvalCompensated(x)
	n := p.Degree()
	return math.Abs(v) <= 8*float64(n+1)*0x1p-53*absPoly(p.c, math.Abs(x))
}

// CircleToAxis returns (1 − w)ⁿ·p((1 + w)/(1 − w)) for n ≥ Degree(), the
// image of p under the bilinear (Möbius) map z = (1 + w)/(1 − w), which
// takes the unit circle |z| = 1 to the imaginary axis of w (z = e^(jθ) ↔
// w = j·tan(θ/2)), the inside of the circle to the left half plane, z = 1
// to w = 0 and z = −1 to w = ∞. A root of p at z = 1 (or −1) within the
// rounding of its coefficients (VanishesAt) is kept exactly: the constant
// coefficient of the image is then exactly 0 (respectively the coefficient
// of wⁿ, so the degree drops), so that a discrete integrator maps to an
// exact pole at w = 0. The binomial products are exact integers for
// n ≤ 50; the remaining error is one rounding per coefficient sum.
//
// CircleToAxis panics if n < Degree().
func (p Poly) CircleToAxis(n int) Poly {
	if n < p.Degree() {
		panic("poly: CircleToAxis order below the degree")
	}
	plus := Poly{c: []float64{1, 1}}   // 1 + w
	minus := Poly{c: []float64{1, -1}} // 1 − w
	out := Poly{}
	for k, a := range p.c {
		if a == 0 {
			continue
		}
		out = out.Add(plus.Pow(k).Mul(minus.Pow(n - k)).Scale(a))
	}
	if out.IsZero() {
		return out
	}
	c := make([]float64, n+1)
	copy(c, out.c)
	if p.VanishesAt(1) {
		c[0] = 0 // w = 0 is the image of z = 1
	}
	if p.VanishesAt(-1) {
		c[n] = 0 // w = ∞ is the image of z = −1
	}
	return Poly{c: trim(c)}
}
