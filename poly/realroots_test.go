package poly

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestRealRootsInKnown checks RealRootsIn on polynomials built from known
// roots (the expected values are the roots themselves, exact in binary or
// closed forms such as ±√2): simple roots to 4 ulps, an exact double root
// with its multiplicity (from the eigenvalue fallback with cluster
// recognition), roots at the interval ends excluded, and every kind of
// interval.
func TestRealRootsInKnown(t *testing.T) {
	inf := math.Inf(1)
	tests := []struct {
		name   string
		p      Poly
		lo, hi float64
		want   []RealRoot
	}{
		{"x²−2 on (0,∞)", MustNew(1, 0, -2), 0, inf, []RealRoot{{math.Sqrt2, 1}}},
		{"x²−2 on (−∞,∞)", MustNew(1, 0, -2), -inf, inf, []RealRoot{{-math.Sqrt2, 1}, {math.Sqrt2, 1}}},
		{"x²−2 on (−∞,0)", MustNew(1, 0, -2), -inf, 0, []RealRoot{{-math.Sqrt2, 1}}},
		{"x²+1 has none", MustNew(1, 0, 1), -inf, inf, nil},
		{"(x−1)(x−2)(x−3) on (1.5, 2.5)", mustRoots(1, 2, 3), 1.5, 2.5, []RealRoot{{2, 1}}},
		{"ends excluded", mustRoots(1, 2, 3), 1, 3, []RealRoot{{2, 1}}},
		{"spread 1e-6 … 1e6", mustRoots(1e-6, 1e-3, 1, 1e3, 1e6, -5), 0, inf, []RealRoot{{1e-6, 1}, {1e-3, 1}, {1, 1}, {1e3, 1}, {1e6, 1}}},
		{"x·(x−0.5)", mustRoots(0, 0.5), -inf, inf, []RealRoot{{0, 1}, {0.5, 1}}},
		{"x³·(x+4)", mustRoots(0, 0, 0, -4), -inf, inf, []RealRoot{{-4, 1}, {0, 3}}},
		{"double root (x−1)²(x−3)", mustRoots(1, 1, 3), 0, inf, []RealRoot{{1, 2}, {3, 1}}},
		{"constant", Constant(5), -inf, inf, nil},
		{"Wilkinson 10 on (4.5, 7.5)", mustRoots(1, 2, 3, 4, 5, 6, 7, 8, 9, 10), 4.5, 7.5, []RealRoot{{5, 1}, {6, 1}, {7, 1}}},
	}
	for _, test := range tests {
		t.Run(test.name, func(t *testing.T) {
			got, err := RealRootsIn(test.p, test.lo, test.hi)
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != len(test.want) {
				t.Fatalf("roots %v, want %v", got, test.want)
			}
			for i, w := range test.want {
				// Simple roots: a few ulps. The double root comes from the
				// cluster centre, good to the cluster tolerance (8u) of
				// the coefficients' backward error: about √(8u) relative.
				tol := 4 * 0x1p-52 * math.Max(math.Abs(w.Value), 1e-300)
				if w.Multiplicity > 1 {
					tol = 1e-7
				}
				if got[i].Multiplicity != w.Multiplicity || math.Abs(got[i].Value-w.Value) > tol {
					t.Errorf("root %d = %+v, want %+v (tolerance %g)", i, got[i], w, tol)
				}
			}
		})
	}
}

func mustRoots(rs ...float64) Poly {
	c := make([]complex128, len(rs))
	for i, r := range rs {
		c[i] = complex(r, 0)
	}
	p, err := FromRoots(c)
	if err != nil {
		panic(err)
	}
	return p
}

// TestRealRootsInBadInput checks the errors.
func TestRealRootsInBadInput(t *testing.T) {
	p := MustNew(1, -1)
	for _, c := range []struct {
		name   string
		p      Poly
		lo, hi float64
		want   error
	}{
		{"zero polynomial", Poly{}, 0, 1, ErrZeroPolynomial},
		{"empty interval", p, 1, 1, ErrBadTolerance},
		{"reversed interval", p, 2, 1, ErrBadTolerance},
		{"NaN bound", p, math.NaN(), 1, ErrBadTolerance},
	} {
		if _, err := RealRootsIn(c.p, c.lo, c.hi); !errors.Is(err, c.want) {
			t.Errorf("%s: error %v, want %v", c.name, err, c.want)
		}
	}
	if _, err := RealRootsInWithSettings(p, 0, 1, &RealRootSettings{CandidateImagTolerance: -1}); !errors.Is(err, ErrBadTolerance) {
		t.Errorf("negative CandidateImagTolerance: error %v, want ErrBadTolerance", err)
	}
	if _, err := RealRootsInWithSettings(p, 0, 1, &RealRootSettings{MaxRoots: -1}); !errors.Is(err, ErrBadTolerance) {
		t.Errorf("MaxRoots −1: error %v, want ErrBadTolerance", err)
	}
	if _, err := RealRootsInWithSettings(p, 0, 1, &RealRootSettings{RelTolerance: 0.1}); !errors.Is(err, ErrBadTolerance) {
		t.Errorf("RelTolerance 0.1: error %v, want ErrBadTolerance", err)
	}
	// A coarse tolerance still brackets the root to that width.
	rs, err := RealRootsInWithSettings(MustNew(1, 0, -2), 0, 2, &RealRootSettings{RelTolerance: 1e-6})
	if err != nil || len(rs) != 1 || math.Abs(rs[0].Value-math.Sqrt2) > 2e-6*math.Sqrt2 {
		t.Errorf("√2 to 1e-6: %v, %v", rs, err)
	}
}

// TestRealRootsInRandom checks RealRootsIn on random polynomials of degree
// 2–60 built from known roots (fixed seed): real roots log-uniform in
// magnitude over [1e-2, 1e2] with random signs, at least 1 % apart, and
// complex pairs; the expected roots are the constructed ones, found to
// 1e-9 relative (the conditioning of roots of expanded products of this
// spread; the double coefficients are not the exact product).
func TestRealRootsInRandom(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 8))
	for trial := range 200 {
		n := 2 + r.IntN(59)
		var rs []complex128
		var want []float64
		for len(rs) < n {
			mag := math.Pow(10, -2+4*r.Float64())
			if n-len(rs) >= 2 && r.IntN(2) == 0 {
				re := -mag * (r.Float64() - 0.3)
				rs = append(rs, complex(re, mag), complex(re, -mag))
				continue
			}
			if r.IntN(2) == 0 {
				mag = -mag
			}
			near := false
			for _, w := range want {
				if math.Abs(w-mag) < 0.01*math.Abs(mag) {
					near = true
				}
			}
			if near {
				continue
			}
			rs = append(rs, complex(mag, 0))
			want = append(want, mag)
		}
		p, err := FromRoots(rs)
		if err != nil {
			t.Fatal(err)
		}
		slices.Sort(want)
		got, err := RealRootsIn(p, math.Inf(-1), math.Inf(1))
		if err != nil {
			t.Fatal(err)
		}
		// The smallest two positive roots by the ordered search.
		var wantPos []float64
		for _, w := range want {
			if w > 0 && len(wantPos) < 2 {
				wantPos = append(wantPos, w)
			}
		}
		first, err := RealRootsInWithSettings(p, 0, math.Inf(1), &RealRootSettings{MaxRoots: 2})
		if err != nil {
			t.Fatal(err)
		}
		if len(first) != len(wantPos) {
			t.Errorf("trial %d: MaxRoots 2 gives %v, want %v", trial, first, wantPos)
		} else {
			for i, w := range wantPos {
				if math.Abs(first[i].Value-w) > 1e-9*w {
					t.Errorf("trial %d: MaxRoots 2 gives %v, want %v", trial, first, wantPos)
				}
			}
		}
		if len(got) != len(want) {
			t.Errorf("trial %d (degree %d): %d roots, want %d: %v vs %v", trial, n, len(got), len(want), got, want)
			continue
		}
		for i := range want {
			if math.Abs(got[i].Value-want[i]) > 1e-9*math.Abs(want[i]) {
				t.Errorf("trial %d (degree %d): root %v, want %v", trial, n, got[i].Value, want[i])
			}
		}
	}
}

// FuzzRealRootsIn compares RealRootsIn with the companion eigenvalues
// (Roots) on polynomials of degree ≤ 7: every returned root must be a sign
// change of p (or a point where p vanishes within its evaluation bound),
// and every real eigenvalue that is simple, well separated from the other
// roots and well conditioned must be returned, to 1e-8 relative.
func FuzzRealRootsIn(f *testing.F) {
	f.Add(1.0, 0.0, -2.0, 0.0, 0.0, 0.0, 0.0, 0.0)
	f.Add(1.0, -6.0, 11.0, -6.0, 0.0, 0.0, 0.0, 0.0)
	f.Add(1.0, 0.0, 0.0, 0.0, 0.0, 0.0, -1.0, 0.0)
	f.Add(1e-3, 2.0, -3e5, 1.0, 7.0, -2.0, 0.5, 1e4)
	f.Fuzz(func(t *testing.T, c0, c1, c2, c3, c4, c5, c6, c7 float64) {
		c, ok := fuzzCoeffs(c7, c6, c5, c4, c3, c2, c1, c0)
		if !ok {
			return
		}
		p, err := FromAscending(c)
		if err != nil || p.IsZero() || p.Degree() < 1 {
			return
		}
		got, err := RealRootsIn(p, math.Inf(-1), math.Inf(1))
		if err != nil {
			t.Fatalf("%v: %v", p, err)
		}
		for _, r := range got {
			if r.Multiplicity != 1 || r.Value == 0 {
				continue
			}
			x := r.Value
			a, b := x*(1-1e-9), x*(1+1e-9)
			va, ea := p.EvalCompensated(a)
			vb, eb := p.EvalCompensated(b)
			vx, ex := p.EvalCompensated(x)
			if (va > ea && vb > eb) || (va < -ea && vb < -eb) {
				if math.Abs(vx) > 64*ex {
					t.Fatalf("%v: %v is no root (p = %v, %v, %v around it)", p, x, va, vx, vb)
				}
			}
		}
		eig, err := p.RootsWithMultiplicity()
		if err != nil {
			return
		}
		for i, e := range eig {
			x := real(e.Value)
			if imag(e.Value) != 0 || e.Multiplicity != 1 || x == 0 {
				continue
			}
			sep := math.Inf(1)
			for j, o := range eig {
				if j != i {
					sep = math.Min(sep, math.Hypot(real(o.Value)-x, imag(o.Value)))
				}
			}
			if sep < 1e-3*math.Abs(x) {
				continue
			}
			// Well conditioned: p changes sign clearly 1e-6 around x.
			va, ea := p.EvalCompensated(x * (1 - 1e-6))
			vb, eb := p.EvalCompensated(x * (1 + 1e-6))
			if !((va > 8*ea && vb < -8*eb) || (va < -8*ea && vb > 8*eb)) {
				continue
			}
			found := false
			for _, r := range got {
				if math.Abs(r.Value-x) <= 1e-8*math.Abs(x) {
					found = true
				}
			}
			if !found {
				t.Fatalf("%v: eigenvalue root %v not found in %v", p, x, got)
			}
		}
	})
}

// ExampleRealRootsIn lists the real roots of (x² − 2)(x − 3)(x² + 1) in
// (0, ∞) without computing the complex ones.
func ExampleRealRootsIn() {
	p := MustNew(1, -3, -1, 3, -2, 6) // (x² − 2)(x − 3)(x² + 1)
	roots, err := RealRootsIn(p, 0, math.Inf(1))
	if err != nil {
		panic(err)
	}
	for _, r := range roots {
		fmt.Printf("%.12g (multiplicity %d)\n", r.Value, r.Multiplicity)
	}
	// Output:
	// 1.41421356237 (multiplicity 1)
	// 3 (multiplicity 1)
}
