package poly

import (
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestConstructors: coefficient order, trimming, zero polynomial, errors.
func TestConstructors(t *testing.T) {
	p := MustNew(0, 0, 1, 3, 2) // leading zeros dropped: x² + 3x + 2
	if p.Degree() != 2 || p.Lead() != 1 || p.Coef(0) != 2 || p.Coef(1) != 3 || p.Coef(7) != 0 || p.Coef(-1) != 0 {
		t.Errorf("New(0,0,1,3,2) = %v (degree %d)", p, p.Degree())
	}
	if got := p.Coeffs(); !slices.Equal(got, []float64{1, 3, 2}) {
		t.Errorf("Coeffs = %v", got)
	}
	if got := p.Ascending(); !slices.Equal(got, []float64{2, 3, 1}) {
		t.Errorf("Ascending = %v", got)
	}
	q, err := FromAscending([]float64{2, 3, 1, 0})
	if err != nil || !q.Equal(p) {
		t.Errorf("FromAscending = %v, %v", q, err)
	}
	var zero Poly
	if !zero.IsZero() || zero.Degree() != -1 || !MustNew(0).IsZero() || !slices.Equal(zero.Coeffs(), []float64{0}) || zero.Ascending() != nil {
		t.Errorf("zero polynomial misbehaves")
	}
	if _, err := New(); !errors.Is(err, ErrEmpty) {
		t.Errorf("New() error %v", err)
	}
	if _, err := New(1, math.NaN()); !errors.Is(err, ErrNotFinite) {
		t.Errorf("New(1, NaN) error %v", err)
	}
	if _, err := FromAscending([]float64{math.Inf(1)}); !errors.Is(err, ErrNotFinite) {
		t.Errorf("FromAscending(Inf) error %v", err)
	}
	if Constant(math.NaN()).IsFinite() {
		t.Error("Constant(NaN) reports finite")
	}
	// Inputs are copied.
	in := []float64{1, 2, 3}
	r := MustNew(in...)
	in[0] = 99
	if r.Lead() != 1 {
		t.Error("New kept a reference to its input")
	}
	out := r.Coeffs()
	out[0] = 42
	if r.Lead() != 1 {
		t.Error("Coeffs returned internal storage")
	}
}

// TestArithmeticClosedForms: results derived by hand.
func TestArithmeticClosedForms(t *testing.T) {
	x := X()
	one := Constant(1)
	tests := []struct {
		name string
		got  Poly
		want []float64 // highest power first
	}{
		{"(x+1)(x−1)", x.Add(one).Mul(x.Sub(one)), []float64{1, 0, -1}},
		{"(x+1)^5 binomial", x.Add(one).Pow(5), []float64{1, 5, 10, 10, 5, 1}},
		{"p^0", x.Pow(0), []float64{1}},
		{"−(x²+1)", MustNew(1, 0, 1).Neg(), []float64{-1, 0, -1}},
		{"3·(x+2)", MustNew(1, 2).Scale(3), []float64{3, 6}},
		{"0·p is zero", MustNew(1, 2).Scale(0), []float64{0}},
		{"p − p is zero", MustNew(1, 2).Sub(MustNew(1, 2)), []float64{0}},
		{"x²·(x+1)", MustNew(1, 1).ShiftUp(2), []float64{1, 1, 0, 0}},
		{"d/dx x³+2x", MustNew(1, 0, 2, 0).Derivative(), []float64{3, 0, 2}},
		{"d²/dx² x⁴", MustNew(1, 0, 0, 0, 0).DerivativeN(2), []float64{12, 0, 0}},
		{"d/dx constant", Constant(5).Derivative(), []float64{0}},
		// (2x+1)² + 1 = 4x² + 4x + 2.
		{"(x²+1)∘(2x+1)", MustNew(1, 0, 1).Compose(MustNew(2, 1)), []float64{4, 4, 2}},
		// p(2x) for p = x² + x + 1: 4x² + 2x + 1.
		{"ScaleVariable(2)", MustNew(1, 1, 1).ScaleVariable(2), []float64{4, 2, 1}},
		{"Reverse of x³+2x²", MustNew(1, 2, 0, 0).Reverse(), []float64{2, 1}},
		{"Monic of 2x+4", mustMonic(MustNew(2, 4)), []float64{1, 2}},
	}
	for _, test := range tests {
		if got := test.got.Coeffs(); !slices.Equal(got, test.want) {
			t.Errorf("%s = %v, want %v", test.name, got, test.want)
		}
	}
}

func mustMonic(p Poly) Poly {
	m, err := p.Monic()
	if err != nil {
		panic(err)
	}
	return m
}

// TestDivMod: x³ − 1 = (x − 1)(x² + x + 1) exactly, and the identity
// p = q·d + r on seeded random polynomials within the rounding of long
// division (relative 1e-12 of ‖p‖∞ + ‖q‖∞‖d‖∞; the divisors are monic-ish
// with a leading coefficient ≥ 0.5, so no growth beyond a few digits).
func TestDivMod(t *testing.T) {
	q, r, err := MustNew(1, 0, 0, -1).DivMod(MustNew(1, -1))
	if err != nil || !slices.Equal(q.Coeffs(), []float64{1, 1, 1}) || !r.IsZero() {
		t.Errorf("(x³−1)/(x−1) = %v rem %v, %v", q, r, err)
	}
	if _, _, err := X().DivMod(Poly{}); !errors.Is(err, ErrZeroPolynomial) {
		t.Errorf("division by zero: %v", err)
	}
	rng := rand.New(rand.NewPCG(1, 1))
	for range 200 {
		p := randomPoly(rng, 1+rng.IntN(12))
		d := randomPoly(rng, rng.IntN(6))
		if math.Abs(d.Lead()) < 0.5 {
			continue
		}
		q, r, err := p.DivMod(d)
		if err != nil {
			t.Fatal(err)
		}
		if r.Degree() >= d.Degree() && !r.IsZero() {
			t.Fatalf("remainder degree %d ≥ divisor degree %d", r.Degree(), d.Degree())
		}
		back := q.Mul(d).Add(r)
		scale := p.NormInf() + q.NormInf()*d.NormInf()
		if back.Sub(p).NormInf() > 1e-12*scale {
			t.Fatalf("p = %v, d = %v: q·d + r − p = %v", p, d, back.Sub(p))
		}
	}
}

// TestComposeMatchesEvaluation: p(q(x)) evaluated at points equals
// p evaluated at q(x) (within 1e-12 relative: a few dozen roundings).
func TestComposeMatchesEvaluation(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	for range 50 {
		p := randomPoly(rng, rng.IntN(6))
		q := randomPoly(rng, rng.IntN(4))
		pq := p.Compose(q)
		for range 5 {
			x := 2*rng.Float64() - 1
			want := p.Eval(q.Eval(x))
			if got := pq.Eval(x); math.Abs(got-want) > 1e-12*(1+math.Abs(want))*pq.Norm1() {
				t.Fatalf("p∘q at %v = %v, want %v", x, got, want)
			}
		}
	}
}

// TestEqualApproxAndFormat: tolerance semantics and the text form.
func TestEqualApproxAndFormat(t *testing.T) {
	p := MustNew(1, 2, 3)
	if !p.EqualApprox(MustNew(1, 2, 3+2e-12), 1e-12) {
		t.Error("EqualApprox rejects a change of 2e-12 against norm 3 at tol 1e-12")
	}
	if p.EqualApprox(MustNew(1, 2, 3+4e-12), 1e-12) {
		t.Error("EqualApprox accepts a change of 4e-12 against norm 3 at tol 1e-12")
	}
	for _, test := range []struct {
		p    Poly
		v    string
		want string
	}{
		{MustNew(2.5, 1, -1e-6), "s", "2.5*s^2 + s - 1e-06"},
		{MustNew(-1, 0, 0), "x", "-x^2"},
		{Poly{}, "x", "0"},
		{MustNew(1, -3), "z", "z - 3"},
	} {
		if got := test.p.Format(test.v); got != test.want {
			t.Errorf("Format = %q, want %q", got, test.want)
		}
	}
	if got := MustNew(1, 0).String(); got != "x" {
		t.Errorf("String = %q", got)
	}
}

// TestFromRoots: conjugate pairs give real coefficients exactly; the
// product of the roots found again is the original (round trip).
func TestFromRoots(t *testing.T) {
	// (x − (1+2i))(x − (1−2i))(x + 3) = (x² − 2x + 5)(x + 3)
	// = x³ + x² − x + 15.
	p, err := FromRoots([]complex128{complex(1, 2), -3, complex(1, -2)})
	if err != nil || !slices.Equal(p.Coeffs(), []float64{1, 1, -1, 15}) {
		t.Errorf("FromRoots = %v, %v", p, err)
	}
	if _, err := FromRoots([]complex128{complex(1, 2)}); err == nil {
		t.Error("FromRoots accepted a complex root without its conjugate")
	}
	if _, err := FromRoots([]complex128{complex(math.NaN(), 0)}); !errors.Is(err, ErrNotFinite) {
		t.Errorf("FromRoots(NaN): %v", err)
	}
	rs, err := p.Roots()
	if err != nil {
		t.Fatal(err)
	}
	back, err := FromRoots(rs)
	if err != nil || !back.EqualApprox(p, 4*unitRoundoff) {
		t.Errorf("round trip: %v, %v", back, err)
	}
}

// TestGCD: common pole–zero pairs. p = (x+1)(x+2)(x²+2x+5), q =
// (x+2)(x²+2x+5)(x+7): the GCD is (x+2)(x²+2x+5) = x³ + 4x² + 9x + 10.
// The roots are found to a few ulps, so a tolerance of 1e-9 matches them;
// with a shifted zero at −2.001 the pair is not cancelled.
func TestGCD(t *testing.T) {
	a := MustNew(1, 2).Mul(MustNew(1, 2, 5))
	p := MustNew(1, 1).Mul(a)
	q := a.Mul(MustNew(1, 7))
	g, err := GCD(p, q, 1e-9)
	if err != nil {
		t.Fatal(err)
	}
	if !g.EqualApprox(MustNew(1, 4, 9, 10), 1e-12) {
		t.Errorf("GCD = %v, want x^3 + 4*x^2 + 9*x + 10", g)
	}
	g, err = GCD(p, MustNew(1, 2.001), 1e-9)
	if err != nil || g.Degree() != 0 {
		t.Errorf("GCD with a root 1e-3 away = %v, %v; want 1", g, err)
	}
	if _, err := GCD(p, q, -1); !errors.Is(err, ErrBadTolerance) {
		t.Errorf("negative tolerance: %v", err)
	}
	if _, err := CommonRoots(p, Poly{}, 1e-9); !errors.Is(err, ErrZeroPolynomial) {
		t.Errorf("zero polynomial: %v", err)
	}
	// Multiple roots cancel by their common multiplicity: (x+1)³ and
	// (x+1)²(x−4) share (x+1)².
	c, err := CommonRoots(MustNew(1, 1).Pow(3), MustNew(1, 1).Pow(2).Mul(MustNew(1, -4)), 1e-9)
	if err != nil || !slices.Equal(c, []complex128{-1, -1}) {
		t.Errorf("CommonRoots of (x+1)³, (x+1)²(x−4) = %v, %v", c, err)
	}
}
