package poly

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"
)

// TestRootsWideCoefficients is the regression test of issue 11 item 7:
// random polynomials of degree 55–80 whose coefficients spread over
// 1e-10 … 1e10 have roots up to about 1e15, where |p(z)| overflows
// float64; the root finder used to give up ("did not converge") on 10 of
// these 35. The reference is the plain companion-matrix eigenvalues
// (Edelman & Murakami 1995): Roots must succeed and its normwise backward
// error must not exceed theirs (factor 2 for the rounding of η itself)
// or 16u, whichever is larger.
func TestRootsWideCoefficients(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for trial := range 35 {
		n := 55 + rng.IntN(26)
		c := make([]float64, n+1)
		for i := range c {
			c[i] = math.Pow(10, -10+20*rng.Float64())
			if rng.IntN(2) == 0 {
				c[i] = -c[i]
			}
		}
		p := Poly{c: c}
		rs, err := p.Roots()
		if err != nil {
			t.Errorf("trial %d (degree %d): %v", trial, n, err)
			continue
		}
		eig, err := companionEigenvalues(c)
		if err != nil {
			t.Fatalf("trial %d: eigenvalues: %v", trial, err)
		}
		got, err := p.RootsBackwardError(rs)
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		ref, err := p.RootsBackwardError(eig)
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		if got > math.Max(2*ref, 16*unitRoundoff) {
			t.Errorf("trial %d (degree %d): backward error %.3g, eigenvalues %.3g", trial, n, got, ref)
		}
	}
}

// TestRootsDegree500: degree-500 polynomials (the largest the tf parser
// accepts) have roots: all ones (the 501st roots of unity without 1, on
// the unit circle: closed form) and (x+1)^500's neighbour with normal
// coefficients; the root count and the closed form are checked.
func TestRootsDegree500(t *testing.T) {
	c := make([]float64, 501)
	for i := range c {
		c[i] = 1
	}
	rs, err := Poly{c: c}.Roots()
	if err != nil {
		t.Fatal(err)
	}
	if len(rs) != 500 {
		t.Fatalf("%d roots, want 500", len(rs))
	}
	for _, r := range rs {
		// 1 + x + … + x⁵⁰⁰ = (x⁵⁰¹ − 1)/(x − 1): |r| = 1, r⁵⁰¹ = 1.
		if d := math.Abs(abs(r) - 1); d > 1e-14 {
			t.Errorf("|%v| − 1 = %.3g", r, d)
		}
	}
}

// TestRootsOverflow: issue 11 item 8. The root of 5e-324·x + 1 is
// −2.0e323, beyond float64; it is an error naming the input, not −Inf.
func TestRootsOverflow(t *testing.T) {
	_, err := MustNew(5e-324, 1).Roots()
	if !errors.Is(err, ErrOverflow) {
		t.Errorf("5e-324·x + 1: err = %v, want ErrOverflow", err)
	}
}

// TestFromRootsOverflow: issue 11 item 8. The constant coefficient of
// ∏(x − k·1e40), k = 1…8, is 8!·1e320 > MaxFloat64 (closed form); so is
// |r|² = 1e620 of a complex pair of modulus 1e310… (here 1e200 ± 1e200i:
// |r|² = 2e400).
func TestFromRootsOverflow(t *testing.T) {
	var rs []complex128
	for k := 1; k <= 8; k++ {
		rs = append(rs, complex(float64(k)*1e40, 0))
	}
	if p, err := FromRoots(rs); !errors.Is(err, ErrOverflow) {
		t.Errorf("roots 1e40…8e40: %v, %v; want ErrOverflow", p, err)
	}
	if p, err := FromRoots([]complex128{1e200 + 1e200i, 1e200 - 1e200i}); !errors.Is(err, ErrOverflow) {
		t.Errorf("roots 1e200 ± 1e200i: %v, %v; want ErrOverflow", p, err)
	}
	// Seven of them fit: 7!·1e280 ≈ 5.04e283.
	p, err := FromRoots(rs[:7])
	if err != nil {
		t.Fatal(err)
	}
	if got, want := p.Coef(0), -5040e280; math.Abs(got-want) > 1e-14*math.Abs(want) {
		t.Errorf("constant coefficient %g, want %g", got, want)
	}
}

// TestRootsBinomial500: (x+1)⁵⁰⁰ (what the parser makes of (s+1)^500) used
// to fail with "complex roots found without their conjugate"; it now
// returns 500 roots in exact conjugate pairs whose backward error is no
// worse than that of the eigenvalues (see TestRootsWideCoefficients).
func TestRootsBinomial500(t *testing.T) {
	if testing.Short() {
		t.Skip("about 8 s")
	}
	q := Constant(1)
	for range 500 {
		q = q.Mul(MustNew(1, 1))
	}
	rs, err := q.Roots()
	if err != nil {
		t.Fatal(err)
	}
	if len(rs) != 500 {
		t.Fatalf("%d roots, want 500", len(rs))
	}
	checkRootStructure(t, "(x+1)^500", rs)
}
