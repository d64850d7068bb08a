package poly

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

// exactEval returns p(z) evaluated in math/big at 1024 bits and rounded
// to complex128 once: its error, about 2⁻¹⁰²⁰·p̃(|z|), is far below the
// u²·p̃(|z|) ≈ 2⁻¹⁰⁶·p̃(|z|) resolution of the compensated scheme.
func exactEval(c []float64, z complex128) complex128 {
	nf := func() *big.Float { return new(big.Float).SetPrec(1024) }
	zr, zi := nf().SetFloat64(real(z)), nf().SetFloat64(imag(z))
	sr, si := nf(), nf()
	t1, t2, t3, t4 := nf(), nf(), nf(), nf()
	for i := len(c) - 1; i >= 0; i-- {
		t1.Mul(sr, zr)
		t2.Mul(si, zi)
		t3.Mul(sr, zi)
		t4.Mul(si, zr)
		sr.Sub(t1, t2)
		sr.Add(sr, t2.SetFloat64(c[i]))
		si.Add(t3, t4)
	}
	r, _ := sr.Float64()
	i, _ := si.Float64()
	return complex(r, i)
}

// wilkinsonPoly is ∏(x − k), k = 1..n, with coefficients computed in double.
func wilkinsonPoly(n int) Poly {
	rs := make([]complex128, n)
	for k := range rs {
		rs[k] = complex(float64(k+1), 0)
	}
	p, _ := FromRoots(rs)
	return p
}

// TestEvalCompensatedBound: near the roots of Wilkinson's polynomial (where
// plain Horner loses every digit) the compensated value is within its
// stated bound of the exact value, and that bound is near u·|p(x)| +
// u²·p̃(|x|) (Graillat, Langlois & Louvet 2005, Theorem 3.2 with γ₂ₙ²). The
// exact value comes from math/big.
func TestEvalCompensatedBound(t *testing.T) {
	p := wilkinsonPoly(20)
	rng := rand.New(rand.NewPCG(1, 1))
	plainWorse := 0
	for range 400 {
		x := 1 + 19*rng.Float64()
		exact := real(exactEval(p.c, complex(x, 0)))
		got, bound := p.EvalCompensated(x)
		if err := math.Abs(got - exact); err > bound {
			t.Fatalf("x = %v: error %g exceeds bound %g", x, err, bound)
		}
		// The bound is the a-posteriori form of u|p| + γ²p̃; check it is
		// not vacuous: at most 2γ₄ₙ₊₂·γ₂ₙ·p̃ above u|p|.
		pt := absPoly(p.c, x)
		if bound > unitRoundoff*math.Abs(got)+2*gamma(4*20+2)*gamma(2*20)*pt*1.01 {
			t.Fatalf("x = %v: bound %g larger than the a-priori bound", x, bound)
		}
		// Plain Horner's error bound (Higham 2002, eq. 5.3) is γ₂ₙ·p̃.
		if math.Abs(p.Eval(x)-exact) > 1e6*math.Abs(got-exact)+1e-300 {
			plainWorse++
		}
	}
	if plainWorse < 200 {
		t.Errorf("compensated Horner beat plain Horner by 1e6 only %d times in 400", plainWorse)
	}
}

// TestEvalComplexCompensatedBound: the same for complex arguments, on
// random polynomials of degree 30 near their roots and far from them.
func TestEvalComplexCompensatedBound(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for range 20 {
		p := randomPoly(rng, 30)
		rs, err := p.Roots()
		if err != nil {
			t.Fatal(err)
		}
		for _, r := range rs {
			for _, z := range []complex128{r, r * complex(1+1e-9, 1e-9), r * 1.5} {
				exact := exactEval(p.c, z)
				got, bound := p.EvalComplexCompensated(z)
				if err := abs(got - exact); err > bound {
					t.Fatalf("z = %v: error %g exceeds bound %g", z, err, bound)
				}
				v, b := p.EvalWithBound(z)
				if err := abs(v - exact); err > b {
					t.Fatalf("EvalWithBound at z = %v: error %g exceeds bound %g", z, err, b)
				}
			}
		}
	}
}

// TestEvalClosedForms checks the evaluators on values known in closed form.
func TestEvalClosedForms(t *testing.T) {
	p := MustNew(1, 0, 1) // x² + 1
	// p(i) = 0 exactly; p(2) = 5; p′(i) = 2i.
	if v := p.EvalComplex(1i); v != 0 {
		t.Errorf("p(i) = %v, want 0", v)
	}
	if v, d := p.EvalWithDerivative(1i); v != 0 || d != 2i {
		t.Errorf("p(i), p′(i) = %v, %v, want 0, 2i", v, d)
	}
	if v := p.Eval(2); v != 5 {
		t.Errorf("p(2) = %v, want 5", v)
	}
	if v, b := p.EvalComplexCompensated(1i); v != 0 || b != 0 {
		t.Errorf("compensated p(i) = %v ± %v, want exactly 0", v, b)
	}
	// (x − 1)⁵ at x = 1 + 2⁻¹⁰ is 2⁻⁵⁰ exactly; expanded, plain Horner
	// cancels badly but the compensated scheme is exact here.
	q := MustNew(1, -1).Pow(5)
	x := 1 + 0x1p-10
	if v, _ := q.EvalCompensated(x); v != 0x1p-50 {
		t.Errorf("(x−1)⁵ at 1+2⁻¹⁰ = %v, want 2⁻⁵⁰", v)
	}
}
