package quasipoly

// Real roots of a real exponential polynomial with certified brackets
// (issue 14: the crossing frequencies and break points of a loop with dead
// time in an affine parameter).

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"github.com/loopwise/loopwise/internal/rootfind"
)

// ErrTangent reports a root of an exponential polynomial that could not be
// isolated: a double root (or two roots closer than the resolution), where
// the function touches zero without a certified sign change.
var ErrTangent = errors.New("quasipoly: a double root (or two roots within rounding) could not be isolated")

// ExpTerm is C(x)·e^(Mu·x) for real x, C with complex coefficients, highest
// power first.
type ExpTerm struct {
	C  []complex128
	Mu complex128
}

// ExpPoly is the real function f(x) = Re Σ ExpTerm (or Im, when Imag is
// true) of a real variable x.
type ExpPoly struct {
	Terms []ExpTerm
	Imag  bool
}

func (e ExpPoly) part(z complex128) float64 {
	if e.Imag {
		return imag(z)
	}
	return real(z)
}

// Eval returns f(x) and f′(x).
func (e ExpPoly) Eval(x float64) (f, df float64) {
	var v, d complex128
	for _, t := range e.Terms {
		var c, cd complex128
		for _, a := range t.C {
			cd = cd*complex(x, 0) + c
			c = c*complex(x, 0) + a
		}
		ex := cmplx.Exp(t.Mu * complex(x, 0))
		v += c * ex
		d += (cd + t.Mu*c) * ex
	}
	return e.part(v), e.part(d)
}

// absDeriv returns a bound of |C^(i)(x)| for |x| ≤ r: Σ_j |c_j|·j!/(j−i)!·r^(j−i).
func absDeriv(c []complex128, i int, r float64) float64 {
	n := len(c) - 1
	s := 0.0
	for k, a := range c {
		j := n - k // power
		if j < i {
			continue
		}
		f := 1.0
		for m := 0; m < i; m++ {
			f *= float64(j - m)
		}
		s += cmplx.Abs(a) * f * math.Pow(r, float64(j-i))
	}
	return s
}

// Bound returns an upper bound of |f^(m)(x)| over lo ≤ x ≤ hi by
// Leibniz's rule on each term with absolute coefficients:
// Σ_k Σ_i C(m,i)·|Mu_k|^(m−i)·|C_k^(i)|(r)·max e^(Re Mu_k·x), r = max(|lo|, |hi|).
func (e ExpPoly) Bound(m int, lo, hi float64) float64 {
	r := math.Max(math.Abs(lo), math.Abs(hi))
	s := 0.0
	for _, t := range e.Terms {
		ex := math.Exp(math.Max(real(t.Mu)*lo, real(t.Mu)*hi))
		mu := cmplx.Abs(t.Mu)
		binom := 1.0
		for i := 0; i <= m; i++ {
			s += binom * math.Pow(mu, float64(m-i)) * absDeriv(t.C, i, r) * ex
			binom = binom * float64(m-i) / float64(i+1)
		}
	}
	return s
}

// derivAt0 returns f^(m)(0) and Σ of the absolute values of its terms
// (the scale of its rounding error).
func (e ExpPoly) derivAt0(m int) (v, scale float64) {
	var z complex128
	for _, t := range e.Terms {
		n := len(t.C) - 1
		binom := 1.0
		for i := 0; i <= m; i++ {
			if i <= n {
				// C^(i)(0) = i!·c_i, c_i the coefficient of x^i.
				f := 1.0
				for k := 2; k <= i; k++ {
					f *= float64(k)
				}
				w := complex(binom*f, 0) * cmplx.Pow(t.Mu, complex(float64(m-i), 0)) * t.C[n-i]
				if m == i {
					w = complex(binom*f, 0) * t.C[n-i]
				}
				z += w
				scale += cmplx.Abs(w)
			}
			binom = binom * float64(m-i) / float64(i+1)
		}
	}
	return e.part(z), scale
}

// RootsAfterZero returns the roots of f in (0, hi] when f(0) = 0: the
// order k of the root at 0 is the first derivative at 0 that is not zero
// within rounding (up to 12); near 0, f(x) = f^(k)(0)·x^k/k! + ρ with
// |ρ| ≤ sup|f^(k+1)|·x^(k+1)/(k+1)! (Taylor), so no root lies in (0, δ]
// when |f^(k)(0)| > δ·sup_[0,δ]|f^(k+1)|/(k+1); the rest, [δ, hi], goes
// to Roots.
func (e ExpPoly) RootsAfterZero(hi, minWidth float64) ([]float64, error) {
	k := -1
	for m := 1; m <= 12; m++ {
		v, sc := e.derivAt0(m)
		if math.Abs(v) > 1e-12*sc {
			k = m
			break
		}
	}
	if k < 0 {
		return nil, fmt.Errorf("%w: the first 12 derivatives vanish at 0", ErrTangent)
	}
	d, _ := e.derivAt0(k)
	delta := hi
	for range 200 {
		if math.Abs(d) > delta*e.Bound(k+1, 0, delta)/float64(k+1) {
			break
		}
		delta /= 2
	}
	if delta <= minWidth {
		return nil, fmt.Errorf("%w: a root of order %d at 0 leaves no certified gap", ErrTangent, k)
	}
	if delta >= hi {
		return nil, nil
	}
	return e.Roots(delta, hi, minWidth)
}

// maxRootIntervals bounds the intervals examined by Roots.
const maxRootIntervals = 4_000_000

// Roots returns every root of f in [lo, hi], ascending, each isolated in a
// certified bracket and polished by Brent's method to rounding level.
//
// Method: interval subdivision with derivative bounds (the exclusion and
// monotonicity tests of interval root isolation; R. E. Moore, "Interval
// Analysis", Prentice-Hall 1966, from memory). On [a, b] with centre c
// and half-width h, no root lies there when |f(c)| > h·sup|f′|; f is
// monotone there when |f′(c)| > h·sup|f″|, and then a root lies in [a, b]
// exactly when f changes sign (or vanishes at an end). Otherwise the
// interval is halved. An interval narrower than minWidth that passes
// neither test holds a double root or two roots within rounding:
// ErrTangent, naming it. The sup bounds are those of Bound.
func (e ExpPoly) Roots(lo, hi, minWidth float64) ([]float64, error) {
	if !(hi >= lo) || math.IsInf(lo, 0) || math.IsInf(hi, 0) {
		return nil, fmt.Errorf("quasipoly: root interval [%g, %g] is not finite", lo, hi)
	}
	type iv struct{ a, b float64 }
	stack := []iv{{lo, hi}}
	var out []float64
	n := 0
	for len(stack) > 0 {
		it := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if n++; n > maxRootIntervals {
			return out, fmt.Errorf("%w: isolating the roots of an exponential polynomial on [%g, %g] needs more than %d intervals", ErrBudget, lo, hi, maxRootIntervals)
		}
		a, b := it.a, it.b
		c, h := 0.5*(a+b), 0.5*(b-a)
		fc, dc := e.Eval(c)
		if math.IsNaN(fc) || math.IsInf(fc, 0) {
			return out, fmt.Errorf("quasipoly: the exponential polynomial is not finite at %g", c)
		}
		if math.Abs(fc) > h*e.Bound(1, a, b) {
			continue
		}
		if math.Abs(dc) > h*e.Bound(2, a, b) {
			fa, _ := e.Eval(a)
			fb, _ := e.Eval(b)
			switch {
			case fa == 0:
				out = append(out, a)
			case fb == 0:
				if b == hi {
					out = append(out, b)
				} // else the next interval records it at its left end
			case (fa < 0) != (fb < 0):
				g := func(x float64) float64 { v, _ := e.Eval(x); return v }
				out = append(out, rootfind.Brent(g, a, b, fa, fb, 1e-16))
			}
			continue
		}
		if b-a < minWidth {
			return out, fmt.Errorf("%w: near x = %.15g (|f| = %.3g)", ErrTangent, c, math.Abs(fc))
		}
		stack = append(stack, iv{c, b}, iv{a, c})
	}
	sort.Float64s(out)
	// A root exactly at an interior cut is recorded once, but guard against
	// a root found twice by neighbouring brackets.
	u := out[:0]
	for i, x := range out {
		if i == 0 || x != out[i-1] {
			u = append(u, x)
		}
	}
	return u, nil
}
