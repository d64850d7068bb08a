package poly

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Poly is a real polynomial c₀ + c₁x + … + cₙxⁿ with float64 coefficients.
// The zero value is the zero polynomial. Poly values are immutable.
type Poly struct {
	// c holds the coefficients by ascending power, trimmed so that the last
	// element (the leading coefficient) is non-zero; nil for the zero
	// polynomial.
	c []float64
}

// New returns the polynomial whose coefficients are given highest power
// first, as written on paper: New(1, 3, 2) is x² + 3x + 2.
// Leading zeros are dropped; New(0) is the zero polynomial.
// It returns ErrEmpty when no coefficient is given and ErrNotFinite when a
// coefficient is NaN or infinite.
func New(coeffs ...float64) (Poly, error) {
	if len(coeffs) == 0 {
		return Poly{}, ErrEmpty
	}
	n := len(coeffs)
	c := make([]float64, n)
	for i, v := range coeffs {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Poly{}, fmt.Errorf("%w: coefficient %d of %d (highest power first) is %v", ErrNotFinite, i+1, n, v)
		}
		c[n-1-i] = v
	}
	return Poly{c: trim(c)}, nil
}

// MustNew is like New but panics on error. It is meant for constants in
// tests and examples.
func MustNew(coeffs ...float64) Poly {
	p, err := New(coeffs...)
	if err != nil {
		panic(err)
	}
	return p
}

// FromAscending returns the polynomial c[0] + c[1]x + … + c[n]xⁿ (lowest
// power first). It is the counterpart of Ascending; New is the usual
// constructor. It returns ErrNotFinite for NaN or infinite coefficients; an
// empty slice gives the zero polynomial.
func FromAscending(c []float64) (Poly, error) {
	out := make([]float64, len(c))
	for i, v := range c {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Poly{}, fmt.Errorf("%w: coefficient of x^%d is %v", ErrNotFinite, i, v)
		}
		out[i] = v
	}
	return Poly{c: trim(out)}, nil
}

// Constant returns the constant polynomial v. A NaN or infinite v gives a
// polynomial for which IsFinite reports false.
func Constant(v float64) Poly {
	return Poly{c: trim([]float64{v})}
}

// X returns the polynomial x.
func X() Poly { return Poly{c: []float64{0, 1}} }

// FromRoots returns the monic polynomial ∏(x − rᵢ). Complex roots must come
// in conjugate pairs (matched within 1e-12 relative); each pair is multiplied
// in as the real quadratic x² − 2Re(r)x + |r|², so the coefficients are real
// by construction. It returns ErrNotFinite for NaN or infinite roots,
// ErrOverflow (naming the roots) when a coefficient of the product exceeds
// the float64 range, and an error when a complex root has no conjugate
// partner.
func FromRoots(roots []complex128) (Poly, error) {
	used := make([]bool, len(roots))
	p := Constant(1)
	for i, r := range roots {
		if used[i] {
			continue
		}
		if cmplxNotFinite(r) {
			return Poly{}, fmt.Errorf("%w: root %d is %v", ErrNotFinite, i, r)
		}
		used[i] = true
		if imag(r) == 0 {
			p = p.Mul(Poly{c: []float64{-real(r), 1}})
			if !p.IsFinite() {
				return Poly{}, fmt.Errorf("%w: the product of the factors of roots 0…%d has a coefficient beyond ±%g (largest root modulus %g)", ErrOverflow, i, math.MaxFloat64, maxModulus(roots))
			}
			continue
		}
		j := conjugatePartner(roots, used, r)
		if j < 0 {
			return Poly{}, fmt.Errorf("poly: root %d (%v) has no complex conjugate partner; real coefficients need conjugate pairs", i, r)
		}
		used[j] = true
		re, im := real(r), imag(r)
		q := []float64{re*re + im*im, -2 * re, 1}
		if math.IsInf(q[0], 0) || math.IsInf(q[1], 0) {
			return Poly{}, fmt.Errorf("%w: the quadratic factor of roots %d and %d (%v) has a coefficient beyond ±%g", ErrOverflow, i, j, r, math.MaxFloat64)
		}
		p = p.Mul(Poly{c: trim(q)})
		if !p.IsFinite() {
			return Poly{}, fmt.Errorf("%w: the product of the factors of roots 0…%d has a coefficient beyond ±%g (largest root modulus %g)", ErrOverflow, i, math.MaxFloat64, maxModulus(roots))
		}
	}
	return p, nil
}

// maxModulus returns the largest |r| of the roots.
func maxModulus(roots []complex128) float64 {
	m := 0.0
	for _, r := range roots {
		m = math.Max(m, abs(r))
	}
	return m
}

func conjugatePartner(roots []complex128, used []bool, r complex128) int {
	best, bestDist := -1, math.Inf(1)
	for j, s := range roots {
		if used[j] {
			continue
		}
		d := abs(s - complex(real(r), -imag(r)))
		if d < bestDist {
			best, bestDist = j, d
		}
	}
	if best >= 0 && bestDist <= 1e-12*abs(r) {
		return best
	}
	return -1
}

func cmplxNotFinite(z complex128) bool {
	return math.IsNaN(real(z)) || math.IsNaN(imag(z)) || math.IsInf(real(z), 0) || math.IsInf(imag(z), 0)
}

func abs(z complex128) float64 { return math.Hypot(real(z), imag(z)) }

// trim drops zero leading coefficients (at the end of the ascending slice).
func trim(c []float64) []float64 {
	n := len(c)
	for n > 0 && c[n-1] == 0 {
		n--
	}
	if n == 0 {
		return nil
	}
	return c[:n:n]
}

// Degree returns the degree of p; the zero polynomial has degree −1.
func (p Poly) Degree() int { return len(p.c) - 1 }

// IsZero reports whether p is the zero polynomial.
func (p Poly) IsZero() bool { return len(p.c) == 0 }

// IsFinite reports whether every coefficient of p is finite. It is false
// only when arithmetic overflowed.
func (p Poly) IsFinite() bool {
	for _, v := range p.c {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return true
}

// Lead returns the leading coefficient (0 for the zero polynomial).
func (p Poly) Lead() float64 {
	if len(p.c) == 0 {
		return 0
	}
	return p.c[len(p.c)-1]
}

// Coef returns the coefficient of xⁱ (0 when i is negative or above the
// degree).
func (p Poly) Coef(i int) float64 {
	if i < 0 || i >= len(p.c) {
		return 0
	}
	return p.c[i]
}

// Coeffs returns the coefficients highest power first, as New takes them.
// The zero polynomial gives [0].
func (p Poly) Coeffs() []float64 {
	if len(p.c) == 0 {
		return []float64{0}
	}
	out := make([]float64, len(p.c))
	for i, v := range p.c {
		out[len(p.c)-1-i] = v
	}
	return out
}

// Ascending returns the coefficients lowest power first (c[i] multiplies
// xⁱ); nil for the zero polynomial.
func (p Poly) Ascending() []float64 {
	if len(p.c) == 0 {
		return nil
	}
	return append([]float64(nil), p.c...)
}

// Norm1 returns the sum of the absolute values of the coefficients.
func (p Poly) Norm1() float64 {
	s := 0.0
	for _, v := range p.c {
		s += math.Abs(v)
	}
	return s
}

// NormInf returns the largest absolute value of a coefficient.
func (p Poly) NormInf() float64 {
	m := 0.0
	for _, v := range p.c {
		m = math.Max(m, math.Abs(v))
	}
	return m
}

// Add returns p + q.
func (p Poly) Add(q Poly) Poly {
	n := max(len(p.c), len(q.c))
	c := make([]float64, n)
	for i := range c {
		c[i] = p.Coef(i) + q.Coef(i)
	}
	return Poly{c: trim(c)}
}

// Sub returns p − q (one subtraction per coefficient, the same values as
// p.Add(q.Neg()) without the intermediate polynomial).
func (p Poly) Sub(q Poly) Poly {
	n := max(len(p.c), len(q.c))
	c := make([]float64, n)
	for i := range c {
		c[i] = p.Coef(i) - q.Coef(i)
	}
	return Poly{c: trim(c)}
}

// Neg returns −p.
func (p Poly) Neg() Poly { return p.Scale(-1) }

// Scale returns a·p.
func (p Poly) Scale(a float64) Poly {
	c := make([]float64, len(p.c))
	for i, v := range p.c {
		c[i] = a * v
	}
	return Poly{c: trim(c)}
}

// Mul returns the product p·q (plain convolution).
func (p Poly) Mul(q Poly) Poly {
	if p.IsZero() || q.IsZero() {
		return Poly{}
	}
	c := make([]float64, len(p.c)+len(q.c)-1)
	for i, a := range p.c {
		for j, b := range q.c {
			c[i+j] += a * b
		}
	}
	return Poly{c: trim(c)}
}

// Pow returns pⁿ for n ≥ 0 (p⁰ = 1). It panics if n is negative.
func (p Poly) Pow(n int) Poly {
	if n < 0 {
		panic("poly: negative exponent")
	}
	r := Constant(1)
	b := p
	for n > 0 {
		if n&1 == 1 {
			r = r.Mul(b)
		}
		n >>= 1
		if n > 0 {
			b = b.Mul(b)
		}
	}
	return r
}

// ShiftUp returns xᵏ·p for k ≥ 0. It panics if k is negative.
func (p Poly) ShiftUp(k int) Poly {
	if k < 0 {
		panic("poly: negative shift")
	}
	if p.IsZero() {
		return p
	}
	c := make([]float64, len(p.c)+k)
	copy(c[k:], p.c)
	return Poly{c: c}
}

// DivMod returns the quotient and remainder of p divided by d, so that
// p = quo·d + rem with deg rem < deg d (long division). It returns
// ErrZeroPolynomial when d is zero and ErrNotFinite when an input is not
// finite.
func (p Poly) DivMod(d Poly) (quo, rem Poly, err error) {
	if d.IsZero() {
		return Poly{}, Poly{}, fmt.Errorf("%w: division by the zero polynomial", ErrZeroPolynomial)
	}
	if !p.IsFinite() || !d.IsFinite() {
		return Poly{}, Poly{}, fmt.Errorf("%w: DivMod operand", ErrNotFinite)
	}
	if p.Degree() < d.Degree() {
		return Poly{}, p, nil
	}
	r := append([]float64(nil), p.c...)
	nd := len(d.c) - 1
	q := make([]float64, len(p.c)-nd)
	lead := d.c[nd]
	for k := len(q) - 1; k >= 0; k-- {
		f := r[k+nd] / lead
		q[k] = f
		r[k+nd] = 0
		for j := 0; j < nd; j++ {
			r[k+j] -= f * d.c[j]
		}
	}
	return Poly{c: trim(q)}, Poly{c: trim(r[:nd])}, nil
}

// Derivative returns dp/dx.
func (p Poly) Derivative() Poly {
	if len(p.c) <= 1 {
		return Poly{}
	}
	c := make([]float64, len(p.c)-1)
	for i := 1; i < len(p.c); i++ {
		c[i-1] = float64(i) * p.c[i]
	}
	return Poly{c: trim(c)}
}

// DerivativeN returns the n-th derivative of p (p itself for n = 0). It
// panics if n is negative.
func (p Poly) DerivativeN(n int) Poly {
	if n < 0 {
		panic("poly: negative derivative order")
	}
	for ; n > 0; n-- {
		p = p.Derivative()
	}
	return p
}

// Compose returns p(q(x)), evaluated by Horner's scheme in polynomials.
// With q = a·x it rescales the variable; Packages above use it for the
// bilinear substitution after clearing denominators.
func (p Poly) Compose(q Poly) Poly {
	r := Poly{}
	for i := len(p.c) - 1; i >= 0; i-- {
		r = r.Mul(q).Add(Constant(p.c[i]))
	}
	return r
}

// ScaleVariable returns p(a·x), coefficient i multiplied by aⁱ exactly up to
// rounding of the powers.
func (p Poly) ScaleVariable(a float64) Poly {
	c := make([]float64, len(p.c))
	f := 1.0
	for i, v := range p.c {
		c[i] = v * f
		f *= a
	}
	return Poly{c: trim(c)}
}

// Reverse returns xⁿ·p(1/x) for n = Degree(): the coefficients in reverse
// order. Trailing zero coefficients of p become leading zeros and are
// dropped, so the degree can fall.
func (p Poly) Reverse() Poly {
	c := make([]float64, len(p.c))
	for i, v := range p.c {
		c[len(p.c)-1-i] = v
	}
	return Poly{c: trim(c)}
}

// Monic returns p divided by its leading coefficient. It returns
// ErrZeroPolynomial for the zero polynomial.
func (p Poly) Monic() (Poly, error) {
	if p.IsZero() {
		return Poly{}, fmt.Errorf("%w: it has no monic form", ErrZeroPolynomial)
	}
	if !p.IsFinite() {
		return Poly{}, fmt.Errorf("%w: Monic operand", ErrNotFinite)
	}
	m := p.Scale(1 / p.Lead())
	m.c[len(m.c)-1] = 1
	return m, nil
}

// Equal reports whether p and q have exactly the same coefficients.
func (p Poly) Equal(q Poly) bool {
	if len(p.c) != len(q.c) {
		return false
	}
	for i := range p.c {
		if p.c[i] != q.c[i] {
			return false
		}
	}
	return true
}

// EqualApprox reports whether p and q agree coefficient-wise within the
// relative tolerance tol, measured against the larger of the two infinity
// norms: |pᵢ − qᵢ| ≤ tol·max(‖p‖∞, ‖q‖∞) for every i. Two zero polynomials
// are equal; degrees may differ when the extra coefficients are within
// tolerance.
func (p Poly) EqualApprox(q Poly, tol float64) bool {
	scale := math.Max(p.NormInf(), q.NormInf())
	n := max(len(p.c), len(q.c))
	for i := 0; i < n; i++ {
		if math.Abs(p.Coef(i)-q.Coef(i)) > tol*scale {
			return false
		}
	}
	return true
}

// String returns p in the text form the tf parser reads, with variable x:
// "2*x^2 - 3*x + 1". The zero polynomial prints as "0".
func (p Poly) String() string { return p.Format("x") }

// Format returns p as text in the variable v, highest power first, numbers
// in the shortest form that parses back to the same float64
// ("2.5*s^2 + s - 1e-06").
func (p Poly) Format(v string) string {
	if p.IsZero() {
		return "0"
	}
	var b strings.Builder
	first := true
	for i := len(p.c) - 1; i >= 0; i-- {
		a := p.c[i]
		if a == 0 {
			continue
		}
		neg := a < 0
		switch {
		case first && neg:
			b.WriteString("-")
		case !first && neg:
			b.WriteString(" - ")
		case !first:
			b.WriteString(" + ")
		}
		first = false
		m := math.Abs(a)
		num := strconv.FormatFloat(m, 'g', -1, 64)
		switch {
		case i == 0:
			b.WriteString(num)
		case m == 1:
			b.WriteString(v)
		default:
			b.WriteString(num + "*" + v)
		}
		if i > 1 {
			b.WriteString("^" + strconv.Itoa(i))
		}
	}
	return b.String()
}
