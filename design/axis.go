package design

import (
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/poly"
)

// This file holds the algebra on the stability boundary. A real polynomial
// P evaluated on the imaginary axis, P(jν), is a pair of real polynomials in
// ν (its real and imaginary parts); in discrete time the unit circle is first
// mapped to the imaginary axis by the bilinear substitution
// z = (1 + w)/(1 − w), w = jν, ν = tan(ωT/2), which is exact (every
// polynomial is multiplied by the same power of (1 − w), so ratios are
// unchanged). Equations such as "L_v(jω) = e^(jθ)" become U(jν) + v·W(jν) = 0
// with U, W complex combinations of N₀, N₁, D₀, D₁; v is real exactly when
// Im(U·conj W) = 0, a real polynomial in ν whose positive roots are the
// candidate frequencies.

// frame holds the four polynomials of a Variable on the boundary variable:
// in s for continuous time, in w after the bilinear map for discrete time.
type frame struct {
	n0, n1, d0, d1 poly.Poly
	ts             float64
}

func newFrame(v Variable) frame {
	f := frame{n0: v.num0, n1: v.num1, d0: v.den0, d1: v.den1, ts: v.ts}
	if v.ts > 0 {
		n := max(f.n0.Degree(), f.n1.Degree(), f.d0.Degree(), f.d1.Degree(), 0)
		f.n0, f.n1 = f.n0.CircleToAxis(n), f.n1.CircleToAxis(n)
		f.d0, f.d1 = f.d0.CircleToAxis(n), f.d1.CircleToAxis(n)
	}
	return f
}

// omega returns the frequency in rad/s of the boundary variable ν.
func (f frame) omega(nu float64) float64 {
	if f.ts > 0 {
		return 2 * math.Atan(nu) / f.ts
	}
	return nu
}

// term is c·p, a complex multiple of a real polynomial.
type term struct {
	c complex128
	p poly.Poly
}

// expr is a complex combination Σ cᵢ·pᵢ of real polynomials.
type expr []term

// at returns the expression and its derivative with respect to ν at s = jν.
func (e expr) at(nu float64) (val, deriv complex128) {
	for _, t := range e {
		v, d := t.p.EvalWithDerivative(complex(0, nu))
		val += t.c * v
		deriv += t.c * complex(0, 1) * d
	}
	return val, deriv
}

// cpoly is a complex-valued polynomial in real ν: re + j·im.
type cpoly struct{ re, im poly.Poly }

// onAxis returns p(jν) as a cpoly.
func onAxis(p poly.Poly) cpoly {
	c := p.Ascending()
	re := make([]float64, len(c))
	im := make([]float64, len(c))
	for k, v := range c {
		switch k % 4 {
		case 0:
			re[k] = v
		case 1:
			im[k] = v
		case 2:
			re[k] = -v
		case 3:
			im[k] = -v
		}
	}
	r, _ := poly.FromAscending(re)
	i, _ := poly.FromAscending(im)
	return cpoly{r, i}
}

// axis returns the expression on the axis as a cpoly.
func (e expr) axis() cpoly {
	var out cpoly
	for _, t := range e {
		a := onAxis(t.p)
		cr, ci := real(t.c), imag(t.c)
		out.re = out.re.Add(a.re.Scale(cr)).Sub(a.im.Scale(ci))
		out.im = out.im.Add(a.im.Scale(cr)).Add(a.re.Scale(ci))
	}
	return out
}

// imConj returns Im(a·conj b); reConj returns Re(a·conj b).
func imConj(a, b cpoly) poly.Poly { return a.im.Mul(b.re).Sub(a.re.Mul(b.im)) }
func reConj(a, b cpoly) poly.Poly { return a.re.Mul(b.re).Add(a.im.Mul(b.im)) }

// abs2 returns |a|².
func abs2(a cpoly) poly.Poly { return a.re.Mul(a.re).Add(a.im.Mul(a.im)) }

// positiveRoots returns the real roots of p in (0, ∞), ascending, by
// poly.RealRootsIn (continued-fraction isolation with a rounding-error
// bound, then Brent's method on p: no complex roots are computed, which
// for the resultants here of degree 20–40 is about three orders of
// magnitude cheaper than the companion eigenvalues). A root that rounding
// has split into a complex pair (a double root: a degenerate tangency)
// is not returned.
func positiveRoots(p poly.Poly) []float64 {
	if p.Degree() < 1 {
		return nil
	}
	rs, err := poly.RealRootsIn(p, 0, math.Inf(1))
	if err != nil {
		return nil
	}
	out := make([]float64, 0, len(rs))
	for _, r := range rs {
		out = append(out, r.Value)
	}
	return out
}

// evenToSquare returns q with p(ν) = q(ν²) for an even polynomial p (odd
// coefficients, which are rounding, are dropped).
func evenToSquare(p poly.Poly) poly.Poly {
	c := p.Ascending()
	out := make([]float64, (len(c)+1)/2)
	for k := 0; k < len(c); k += 2 {
		out[k/2] = c[k]
	}
	q, _ := poly.FromAscending(out)
	return q
}

// oddToSquare returns q with p(ν) = ν·q(ν²) for an odd polynomial p.
func oddToSquare(p poly.Poly) poly.Poly {
	c := p.Ascending()
	out := make([]float64, len(c)/2+1)
	for k := 1; k < len(c); k += 2 {
		out[k/2] = c[k]
	}
	q, _ := poly.FromAscending(out)
	return q
}

// point is a solution (ν, v) of a boundary equation.
type point struct{ nu, v float64 }

// solveTarget returns every (ν > 0, v) with U(jν) + v·W(jν) = 0: the
// positive roots of Im(U·conj W), polished by Newton's method on that
// function evaluated directly from the polynomials, with
// v = −Re(U·conj W)/|W|².
func solveTarget(u, w expr) []point {
	ua, wa := u.axis(), w.axis()
	r := imConj(ua, wa)
	var out []point
	for _, nu := range positiveRoots(r) {
		nu = polishTarget(u, w, nu)
		uv, _ := u.at(nu)
		wv, _ := w.at(nu)
		den := real(wv)*real(wv) + imag(wv)*imag(wv)
		if den == 0 {
			continue
		}
		v := -real(uv*cmplx.Conj(wv)) / den
		if math.IsNaN(v) || math.IsInf(v, 0) {
			continue
		}
		out = append(out, point{nu, v})
	}
	return out
}

// polishTarget refines a root of Im(U·conj W) by Newton's method.
func polishTarget(u, w expr, nu float64) float64 {
	f := func(x float64) (float64, float64) {
		uv, ud := u.at(x)
		wv, wd := w.at(x)
		return imag(uv * cmplx.Conj(wv)), imag(ud*cmplx.Conj(wv) + uv*cmplx.Conj(wd))
	}
	best := nu
	fb, _ := f(nu)
	x := nu
	for range 8 {
		fx, dx := f(x)
		if dx == 0 || math.IsNaN(dx) {
			break
		}
		nx := x - fx/dx
		if !(nx > 0) || math.Abs(nx-x) > 0.5*x {
			break
		}
		x = nx
		if fv, _ := f(x); math.Abs(fv) <= math.Abs(fb) {
			best, fb = x, fv
		}
		if math.Abs(nx-x) <= 1e-15*x {
			break
		}
	}
	return best
}

// quadratic is F(u, v) = f0(u) + v·f1(u) + v²·f2(u) with real polynomials in
// u = ν² (the squared magnitudes of affine expressions are of this form).
type quadratic struct{ f0, f1, f2 poly.Poly }

func (q quadratic) eval(u, v float64) (f, fu, fv, fuu, fuv float64) {
	a0, d0 := q.f0.EvalWithDerivative(complex(u, 0))
	a1, d1 := q.f1.EvalWithDerivative(complex(u, 0))
	a2, d2 := q.f2.EvalWithDerivative(complex(u, 0))
	e0 := real(q.f0.Derivative().Derivative().EvalComplex(complex(u, 0)))
	e1 := real(q.f1.Derivative().Derivative().EvalComplex(complex(u, 0)))
	e2 := real(q.f2.Derivative().Derivative().EvalComplex(complex(u, 0)))
	f = real(a0) + v*real(a1) + v*v*real(a2)
	fu = real(d0) + v*real(d1) + v*v*real(d2)
	fv = real(a1) + 2*v*real(a2)
	fuu = e0 + v*e1 + v*v*e2
	fuv = real(d1) + 2*v*real(d2)
	return
}

// normSq returns |X + v·Y|² as a quadratic in v with coefficients even
// polynomials in ν, converted to u = ν².
func normSq(x, y cpoly) quadratic {
	return quadratic{
		f0: evenToSquare(abs2(x)),
		f1: evenToSquare(reConj(x, y).Scale(2)),
		f2: evenToSquare(abs2(y)),
	}
}

func (q quadratic) sub(r quadratic, c float64) quadratic {
	return quadratic{q.f0.Sub(r.f0.Scale(c)), q.f1.Sub(r.f1.Scale(c)), q.f2.Sub(r.f2.Scale(c))}
}

// solveTangency returns every (u > 0, v) at which F(·, v) has a double root
// in u: F = 0 and ∂F/∂u = 0. The u are the positive real roots of the
// resultant in v of F and ∂F/∂u (for quadratics a₂v² + a₁v + a₀ and
// b₂v² + b₁v + b₀ it is (a₂b₀ − a₀b₂)² − (a₂b₁ − a₁b₂)(a₁b₀ − a₀b₁); the
// Wronskian a₁b₀ − a₀b₁ when F is linear in v), v the common root, and each
// pair is polished by Newton's method on the two real equations.
func solveTangency(q quadratic) []point {
	a0, a1, a2 := q.f0, q.f1, q.f2
	b0, b1, b2 := a0.Derivative(), a1.Derivative(), a2.Derivative()
	var res poly.Poly
	linear := a2.IsZero()
	if linear {
		res = a1.Mul(b0).Sub(a0.Mul(b1))
	} else {
		x := a2.Mul(b0).Sub(a0.Mul(b2))
		res = x.Mul(x).Sub(a2.Mul(b1).Sub(a1.Mul(b2)).Mul(a1.Mul(b0).Sub(a0.Mul(b1))))
	}
	var out []point
	for _, u := range positiveRoots(res) {
		var vs []float64
		c0, c1, c2 := a0.Eval(u), a1.Eval(u), a2.Eval(u)
		vs = quadRoots(c2, c1, c0)
		best, bestR := math.NaN(), math.Inf(1)
		for _, v := range vs {
			_, fu, _, _, _ := q.eval(u, v)
			if r := math.Abs(fu); r < bestR {
				best, bestR = v, r
			}
		}
		if math.IsNaN(best) {
			continue
		}
		uu, vv := polishTangency(q, u, best)
		out = append(out, point{math.Sqrt(uu), vv})
	}
	return out
}

// polishTangency runs Newton's method on (F, ∂F/∂u) = 0 in (u, v).
func polishTangency(q quadratic, u, v float64) (float64, float64) {
	for range 12 {
		f, fu, fv, fuu, fuv := q.eval(u, v)
		// Jacobian [[fu, fv], [fuu, fuv]].
		det := fu*fuv - fv*fuu
		if det == 0 || math.IsNaN(det) {
			break
		}
		du := (f*fuv - fv*fu) / det
		dv := (fu*fu - f*fuu) / det
		nu, nv := u-du, v-dv
		if !(nu > 0) || math.IsNaN(nv) {
			break
		}
		u, v = nu, nv
		if math.Abs(du) <= 1e-15*u && math.Abs(dv) <= 1e-15*math.Max(1, math.Abs(v)) {
			break
		}
	}
	return u, v
}

// quadRoots returns the real roots of a·x² + b·x + c (a linear or constant
// equation when a = 0), computed without cancellation.
func quadRoots(a, b, c float64) []float64 {
	if a == 0 {
		if b == 0 {
			return nil
		}
		return []float64{-c / b}
	}
	d := b*b - 4*a*c
	if d < 0 {
		if d > -1e-12*b*b {
			return []float64{-b / (2 * a)}
		}
		return nil
	}
	q := -0.5 * (b + math.Copysign(math.Sqrt(d), b))
	if q == 0 {
		return []float64{0}
	}
	return []float64{q / a, c / q}
}
