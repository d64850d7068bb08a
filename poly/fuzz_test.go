package poly

import (
	"math"
	"math/big"
	"math/cmplx"
	"testing"
)

// fuzzCoeffs turns fuzz arguments into ascending coefficients, rejecting
// values the root finder is not meant for in a fuzz run: non-finite, or
// magnitudes outside [1e-100, 1e100] (whose products can overflow in the
// backward-error check; such inputs are covered by the scaling tests).
func fuzzCoeffs(vals ...float64) ([]float64, bool) {
	for _, v := range vals {
		if math.IsNaN(v) || math.IsInf(v, 0) || v != 0 && (math.Abs(v) < 1e-100 || math.Abs(v) > 1e100) {
			return nil, false
		}
	}
	return vals, true
}

// FuzzRoots checks Roots against properties a slow reference can confirm:
// as many roots as the degree; exactly real or exact conjugate pairs in
// sorted order; and a small normwise backward error (the monic polynomial
// rebuilt from the roots in math/big against the original; bound 1e-12,
// far above the few-u values seen on random input but far below the
// errors of a wrong root). Run:
//
//	go test -run '^$' -fuzz FuzzRoots -fuzztime 60s ./poly/
func FuzzRoots(f *testing.F) {
	f.Add(1.0, 5.0, 9.0, 7.0, 2.0, 0.0, 0.0)     // (x+1)³(x+2)·x²
	f.Add(1.0, -6.0, 11.0, -6.0, 0.0, 0.0, 1.0)  // near-multiple mix
	f.Add(1.0, 0.0, 2.0, 0.0, 1.0, 0.0, 0.0)     // (x²+1)²·x²
	f.Add(1e-8, 1.0, 1e8, -3.0, 0.5, 2.0, -1e-3) // wide scales
	f.Add(0.0, 0.0, 0.0, 0.0, 0.0, 1.0, -0.1)    // linear
	f.Fuzz(func(t *testing.T, a6, a5, a4, a3, a2, a1, a0 float64) {
		c, ok := fuzzCoeffs(a0, a1, a2, a3, a4, a5, a6)
		if !ok {
			return
		}
		p, err := FromAscending(c)
		if err != nil || p.Degree() < 1 {
			return
		}
		rs, err := p.Roots()
		if err != nil {
			t.Fatalf("%v: %v", p, err)
		}
		if len(rs) != p.Degree() {
			t.Fatalf("%v: %d roots for degree %d", p, len(rs), p.Degree())
		}
		checkRootStructure(t, p.String(), rs)
		for _, r := range rs {
			if cmplx.IsNaN(r) || cmplx.IsInf(r) {
				t.Fatalf("%v: root %v", p, r)
			}
		}
		eta, err := p.RootsBackwardError(rs)
		if err != nil {
			t.Fatalf("%v: %v", p, err)
		}
		if eta > 1e-12 {
			t.Fatalf("%v: roots %v, backward error %g", p, rs, eta)
		}
	})
}

// FuzzMul checks Mul against the naive convolution computed exactly in
// math/big: each product coefficient is within γₖ·Σ|aᵢ||bⱼ| of the exact
// value (k = number of terms; Higham 2002, eq. 3.5 for inner products).
func FuzzMul(f *testing.F) {
	f.Add(1.0, 2.0, 3.0, 4.0, -1.0, 0.5, 1e-8, 7.0)
	f.Fuzz(func(t *testing.T, a0, a1, a2, a3, b0, b1, b2, b3 float64) {
		a, ok1 := fuzzCoeffs(a0, a1, a2, a3)
		b, ok2 := fuzzCoeffs(b0, b1, b2, b3)
		if !ok1 || !ok2 {
			return
		}
		p, _ := FromAscending(a)
		q, _ := FromAscending(b)
		got := p.Mul(q)
		for k := 0; k <= 6; k++ {
			exact := new(big.Float).SetPrec(2200)
			bound := 0.0
			terms := 0
			for i := 0; i <= k; i++ {
				if i > 3 || k-i > 3 {
					continue
				}
				t := new(big.Float).SetPrec(2200).SetFloat64(a[i])
				t.Mul(t, new(big.Float).SetFloat64(b[k-i]))
				exact.Add(exact, t)
				bound += math.Abs(a[i] * b[k-i])
				terms++
			}
			e, _ := exact.Float64()
			if d := math.Abs(got.Coef(k) - e); d > gamma(terms)*bound*(1+1e-15) {
				t.Fatalf("coefficient %d of %v · %v: %v, exact %v", k, p, q, got.Coef(k), e)
			}
		}
	})
}

// FuzzEval checks Horner's scheme against the sum of powers: the plain
// value within Higham's bound γ₂ₙ·p̃(|x|) of the exact value, the
// compensated value within its own stated bound, the exact value taken
// from math/big.
func FuzzEval(f *testing.F) {
	f.Add(1.0, -6.0, 11.0, -6.0, 1.0001)
	f.Add(0.0, 1e-300, 2.0, -3.0, 1e10)
	f.Fuzz(func(t *testing.T, a3, a2, a1, a0, x float64) {
		c, ok := fuzzCoeffs(a0, a1, a2, a3, x)
		if !ok {
			return
		}
		c = c[:4]
		p, _ := FromAscending(c)
		n := len(c) - 1
		// Exact Σ aᵢ·xⁱ by powers.
		exact := new(big.Float).SetPrec(2200)
		pow := new(big.Float).SetPrec(2200).SetFloat64(1)
		xb := new(big.Float).SetPrec(2200).SetFloat64(x)
		for i := 0; i <= n; i++ {
			t := new(big.Float).SetPrec(2200).SetFloat64(c[i])
			t.Mul(t, pow)
			exact.Add(exact, t)
			pow.Mul(pow, xb)
		}
		e, _ := exact.Float64()
		pt := absPoly(c, math.Abs(x))
		if math.IsInf(pt, 0) || math.IsInf(e, 0) {
			return
		}
		if d := math.Abs(p.Eval(x) - e); d > gamma(2*n)*pt+unitRoundoff*math.Abs(e) {
			t.Fatalf("Horner %v at %v = %v, exact %v", p, x, p.Eval(x), e)
		}
		v, bound := p.EvalCompensated(x)
		if d := math.Abs(v - e); d > bound+unitRoundoff*math.Abs(e) {
			t.Fatalf("compensated %v at %v = %v ± %v, exact %v", p, x, v, bound, e)
		}
	})
}

// FuzzRootsOfProducts stresses cluster recognition: p = (x − a)^i ·
// (x² − 2bx + b² + c²)^j · (x − d)^k built by Mul (so the coefficients carry
// rounding errors), with the structural checks of FuzzRoots, multiplicities
// adding up to the degree, and a normwise backward error of at most 1e-10.
// The bound is looser than FuzzRoots' 1e-12 because each recognised
// multiple root is fitted on its own (the root of p⁽ᵐ⁻¹⁾ near its cluster):
// with inexact coefficients and several clusters close together the set
// is not fitted jointly (Zeng's Gauss–Newton on the pejorative manifold
// would), and fuzzing found backward errors up to 2.6e-12, for
// (x−475)⁴(x²−10x+29)³(x−6)³ with coefficients above 2⁵³.
func FuzzRootsOfProducts(f *testing.F) {
	f.Add(-1.0, 0.5, 2.0, -1.0, uint8(3), uint8(2), uint8(1))
	f.Add(0.1, -0.7, 0.01, 0.1000001, uint8(2), uint8(1), uint8(2))
	f.Fuzz(func(t *testing.T, a, b, c, d float64, i, j, k uint8) {
		for _, v := range []float64{a, b, c, d} {
			if math.IsNaN(v) || math.Abs(v) > 1e6 || v != 0 && math.Abs(v) < 1e-6 {
				return
			}
		}
		i, j, k = i%5, j%4, k%5
		p := MustNew(1, -a).Pow(int(i)).
			Mul(MustNew(1, -2*b, b*b+c*c).Pow(int(j))).
			Mul(MustNew(1, -d).Pow(int(k)))
		if p.Degree() < 1 || !p.IsFinite() {
			return
		}
		rs, err := p.RootsWithMultiplicity()
		if err != nil {
			t.Fatalf("%v: %v", p, err)
		}
		flat := flatten(rs)
		if len(flat) != p.Degree() {
			t.Fatalf("%v: multiplicities of %v add up to %d, want %d", p, rs, len(flat), p.Degree())
		}
		checkRootStructure(t, p.String(), flat)
		eta, err := p.RootsBackwardError(flat)
		if err != nil || eta > 1e-10 {
			t.Fatalf("%v: roots %v, backward error %g, %v", p, rs, eta, err)
		}
	})
}
