package quasipoly

import (
	"errors"
	"math"
	"testing"
)

// TestExpPolyRoots: f(x) = Im(x·e^(jx)) − x/2 = x(sin x − 1/2) has the
// roots 0, π/6 + 2πm and 5π/6 + 2πm (closed form); every one in [0, 40]
// must be found, to 1e-14 relative (Brent's method to rounding on a
// well-conditioned simple root).
func TestExpPolyRoots(t *testing.T) {
	f := ExpPoly{Imag: true, Terms: []ExpTerm{
		{C: []complex128{1, 0}, Mu: 1i},
		{C: []complex128{-0.5i, 0}},
	}}
	got, err := f.Roots(0, 40, 1e-12)
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{0}
	for m := 0; m < 7; m++ {
		for _, x := range []float64{math.Pi/6 + 2*math.Pi*float64(m), 5*math.Pi/6 + 2*math.Pi*float64(m)} {
			if x <= 40 {
				want = append(want, x)
			}
		}
	}
	if len(got) != len(want) {
		t.Fatalf("roots %v, want %v", got, want)
	}
	for i := range want {
		if math.Abs(got[i]-want[i]) > 1e-14*math.Max(1, want[i]) {
			t.Errorf("root %d = %.17g, want %.17g", i, got[i], want[i])
		}
	}
}

// TestExpPolyRealExp: f(x) = x − 2 + e^(−x) has the two real roots
// x = 2 + W(−e^(−2)) on the branches W₀ and W₋₁ of Lambert's W (closed
// form: w = x − 2 solves w·e^w = −e^(−2)); values from mpmath.lambertw at
// 30 digits (python3 -c "import mpmath as mp; mp.mp.dps=30;
// print(2+mp.lambertw(-mp.e**-2,-1), 2+mp.lambertw(-mp.e**-2,0))").
// Tolerance 1e-14: simple roots polished to rounding.
func TestExpPolyRealExp(t *testing.T) {
	f := ExpPoly{Terms: []ExpTerm{{C: []complex128{1, -2}}, {C: []complex128{1}, Mu: -1}}}
	got, err := f.Roots(-3, 5, 1e-12)
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{-1.14619322062058258523706102852, 1.84140566043696063784660465801}
	if len(got) != 2 {
		t.Fatalf("roots %v, want %v", got, want)
	}
	for i := range want {
		if math.Abs(got[i]-want[i]) > 1e-14*math.Abs(want[i]) {
			t.Errorf("root %d = %.17g, want %.17g", i, got[i], want[i])
		}
	}
}

// TestExpPolyTangent: x² has a double root at 0 that no sign change
// brackets: ErrTangent, not a silent miss or a duplicate.
func TestExpPolyTangent(t *testing.T) {
	f := ExpPoly{Terms: []ExpTerm{{C: []complex128{1, 0, 0}}}}
	if _, err := f.Roots(-1, 1.3, 1e-10); !errors.Is(err, ErrTangent) {
		t.Errorf("error %v, want ErrTangent", err)
	}
	if _, err := f.Roots(0, math.Inf(1), 1e-10); err == nil {
		t.Error("infinite interval accepted")
	}
}

// TestExpPolyRootsAfterZero: roots in (0, hi] past a multiple root at 0.
// x³(x − 1) has the triple root 0 and the root 1; sin x − x (order 3 at 0)
// has no root in (0, ∞) (closed forms). The first needs the Taylor gap,
// since Roots alone cannot isolate a triple root (ErrTangent).
func TestExpPolyRootsAfterZero(t *testing.T) {
	f := ExpPoly{Terms: []ExpTerm{{C: []complex128{1, -1, 0, 0, 0}}}}
	if _, err := f.Roots(0, 3, 1e-12); !errors.Is(err, ErrTangent) {
		t.Errorf("Roots on a triple root: %v, want ErrTangent", err)
	}
	got, err := f.RootsAfterZero(3, 1e-12)
	if err != nil || len(got) != 1 || math.Abs(got[0]-1) > 1e-15 {
		t.Errorf("x³(x − 1): roots %v, %v; want [1]", got, err)
	}
	g := ExpPoly{Imag: true, Terms: []ExpTerm{{C: []complex128{1}, Mu: 1i}, {C: []complex128{-1i, 0}}}}
	got, err = g.RootsAfterZero(30, 1e-12)
	if err != nil || len(got) != 0 {
		t.Errorf("sin x − x: roots %v, %v; want none", got, err)
	}
}
