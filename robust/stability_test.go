package robust

import (
	"errors"
	"math"
	"math/cmplx"
	"testing"

	"github.com/loopwise/loopwise/poly"
)

// denseUnstable samples a grid of k points per parameter and returns the
// first unstable point (nil if none): the independent check of every
// "stable for the whole box" verdict.
func denseUnstable(t *testing.T, l *Loop, k int) []float64 {
	t.Helper()
	n := len(l.mid)
	total := 1
	for range n {
		total *= k
	}
	for g := range total {
		p := make([]float64, n)
		r := g
		for i := range n {
			p[i] = -1 + 2*float64(r%k)/float64(k-1)
			r /= k
		}
		ok, _, err := l.pointStability(p)
		if err != nil {
			t.Fatal(err)
		}
		if !ok {
			return l.valuesOf(p)
		}
	}
	return nil
}

// checkVerdict runs Stability and compares with want; a stable verdict is
// checked by dense sampling, a counterexample by its roots.
func checkVerdict(t *testing.T, l *Loop, want Verdict, set *Settings) StabilityResult {
	t.Helper()
	r, err := Stability(l, set)
	if err != nil {
		t.Fatal(err)
	}
	if r.Verdict != want {
		t.Fatalf("verdict %v (%s, %s), want %v", r.Verdict, r.Method, r.Reason, want)
	}
	switch r.Verdict {
	case StableForBox:
		budget := 20000.0
		if l.Class() == WithDelay {
			budget = 400 // each point is a Nyquist count with dead time
		}
		if p := denseUnstable(t, l, max(3, int(math.Pow(budget, 1/float64(len(l.mid)))))); p != nil {
			t.Fatalf("proven stable, but unstable at %v", p)
		}
	case UnstableAtPoint:
		ce := r.Counterexample
		g, err := l.At(ce.Values)
		if err != nil {
			t.Fatal(err)
		}
		for i, v := range ce.Values {
			if p := l.desc.Params[i]; v < p.Min || v > p.Max {
				t.Fatalf("counterexample %v outside the box", ce.Values)
			}
		}
		if tau := g.DelaySec(); tau > 0 {
			// Exact roots of D(s) + N(s)·e^(−sτ) in the closed right half
			// plane, each verified by its residual (polished to 1e-12).
			if len(ce.UnstableRoots) == 0 {
				t.Fatalf("counterexample %v: no unstable roots listed", ce.Values)
			}
			for _, z := range ce.UnstableRoots {
				d, n := g.Den().EvalComplex(z), g.Num().EvalComplex(z)*cmplx.Exp(-z*complex(tau, 0))
				if r := cmplx.Abs(d+n) / (cmplx.Abs(d) + cmplx.Abs(n)); real(z) < -1e-12*cmplx.Abs(z) || r > 1e-11 {
					t.Fatalf("counterexample %v: listed root %v (relative residual %.3g)", ce.Values, z, r)
				}
			}
		} else {
			roots, _ := g.CharacteristicPolynomial().Roots()
			bad := 0
			for _, z := range roots {
				if (l.ts == 0 && real(z) >= 0) || (l.ts > 0 && math.Hypot(real(z), imag(z)) >= 1) {
					bad++
				}
			}
			if bad == 0 || bad != len(ce.UnstableRoots) {
				t.Fatalf("counterexample %v: %d unstable roots, reported %v", ce.Values, bad, ce.UnstableRoots)
			}
		}
	}
	return r
}

func mustLoop(t *testing.T, d Description) *Loop {
	t.Helper()
	l, err := NewLoop(d)
	if err != nil {
		t.Fatal(err)
	}
	return l
}

// The cubic interval family s³ + a s² + b s + c with a, b, c > 0 is stable
// iff a_min·b_min > c_max: Routh–Hurwitz (a·b > c) in closed form, and for
// degree 3 a single Kharitonov polynomial decides (Anderson, Jury & Mansour
// 1987, IEEE Trans. Automatic Control 32(1); from memory). The verdict is
// compared with that closed form and with the four Kharitonov polynomials'
// roots computed independently by poly.Roots.
func TestKharitonovCubicFamily(t *testing.T) {
	tests := []struct {
		name       string
		cmax       float64
		wantStable bool
	}{
		{"stable a_min·b_min = 2 > 1.9", 1.9, true},
		{"stable close to the edge, 1.99", 1.99, true},
		{"unstable 2.1 > 2", 2.1, false},
	}
	for _, test := range tests {
		t.Run(test.name, func(t *testing.T) {
			l := mustLoop(t, Description{Expressions: []string{"c/(s^3 + a*s^2 + b*s)"},
				Params: []Param{{Name: "a", Min: 2, Max: 3}, {Name: "b", Min: 1, Max: 2}, {Name: "c", Min: 1, Max: test.cmax}}})
			if l.Class() != Interval {
				t.Fatalf("class %v, want interval", l.Class())
			}
			if closed := 2*1 > test.cmax; closed != test.wantStable {
				t.Fatal("test table disagrees with the closed form")
			}
			want := UnstableAtPoint
			if test.wantStable {
				want = StableForBox
			}
			r := checkVerdict(t, l, want, nil)
			// Four Kharitonov polynomials by roots.
			lo := []float64{1, 1, 2, 1}
			hi := []float64{test.cmax, 2, 3, 1}
			allStable := true
			for q := range 4 {
				c := make([]float64, 4)
				for k := range c {
					c[k] = lo[k]
					if kharitonovPattern[q][k%4] {
						c[k] = hi[k]
					}
				}
				p, _ := poly.FromAscending(c)
				roots, _ := p.Roots()
				for _, z := range roots {
					if real(z) >= 0 {
						allStable = false
					}
				}
			}
			if allStable != test.wantStable {
				t.Fatalf("Kharitonov polynomials by roots: stable %v", allStable)
			}
			if test.wantStable && r.Method == "" {
				t.Fatal("no method named")
			}
		})
	}
}

// The proof engine (zero exclusion with interval arithmetic) must agree with
// Kharitonov's theorem on the same families.
func TestZeroExclusionAgreesWithKharitonov(t *testing.T) {
	for _, cmax := range []float64{1.9, 1.99, 2.1} {
		l := mustLoop(t, Description{Expressions: []string{"c/(s^3 + a*s^2 + b*s)"},
			Params: []Param{{Name: "a", Min: 2, Max: 3}, {Name: "b", Min: 1, Max: 2}, {Name: "c", Min: 1, Max: cmax}}})
		l.class = Polynomial
		want := StableForBox
		if cmax > 2 {
			want = UnstableAtPoint
		}
		checkVerdict(t, l, want, &Settings{Probes: 1, Seed: 5})
	}
}

// Second-order family s² + (a − 1)s + k: Routh–Hurwitz for degree 2 says
// stable iff a > 1 and k > 0 (closed form).
func TestSecondOrderRouth(t *testing.T) {
	for _, test := range []struct {
		amin float64
		want Verdict
	}{{1.2, StableForBox}, {1.001, StableForBox}, {0.9, UnstableAtPoint}} {
		l := mustLoop(t, Description{Expressions: []string{"k/(s*(s + a - 1))"},
			Params: []Param{{Name: "a", Min: test.amin, Max: 2}, {Name: "k", Min: 0.5, Max: 4}}})
		checkVerdict(t, l, test.want, nil)
	}
}

// An affine family (p appears in two coefficients): s³ + (2 + p)s² +
// (1 + q)s + (p + q + c0). Routh–Hurwitz for the cubic: stable iff
// (2 + p)(1 + q) > p + q + c0 over the box (closed form; the product is
// smallest at p = q = min when the bracket terms are positive).
func TestEdgeTheoremAffine(t *testing.T) {
	for _, test := range []struct {
		c0   float64
		want Verdict
	}{{1.5, StableForBox}, {1.95, StableForBox}, {2.05, UnstableAtPoint}} {
		l := mustLoop(t, Description{Expressions: []string{"(q*s + p + q + " + ftoa(test.c0) + ")/(s^3 + (2 + p)*s^2 + s)"},
			Params: []Param{{Name: "p", Min: 0, Max: 1}, {Name: "q", Min: 0, Max: 1}}})
		if l.Class() != Affine {
			t.Fatalf("class %v, want affine", l.Class())
		}
		// closed form at p = q = 0: 2·1 > c0
		if (2 > test.c0) != (test.want == StableForBox) {
			t.Fatal("table disagrees with the closed form")
		}
		r := checkVerdict(t, l, test.want, &Settings{Probes: 1})
		if test.want == StableForBox && r.Method[:4] != "edge" {
			t.Fatalf("method %q", r.Method)
		}
	}
}

// K e^{−sT}/(s + 1) with K = 2: the closed loop is stable iff T < T* with
// ω* = √(K² − 1) = √3 and T* = (π − atan ω*)/ω* = 2π/(3√3) ≈ 1.2092 s
// (closed form from |L(jω)| = 1 and ∠L = −π).
func TestDelayFamily(t *testing.T) {
	for _, test := range []struct {
		tmax float64
		want Verdict
	}{{1.1, StableForBox}, {1.3, UnstableAtPoint}} {
		l := mustLoop(t, Description{Expressions: []string{"2*k*exp(-T*s)/(s+1)"},
			Params: []Param{{Name: "k", Min: 0.8, Max: 1}, {Name: "T", Min: 0.1, Max: test.tmax}}})
		if l.Class() != WithDelay {
			t.Fatalf("class %v", l.Class())
		}
		checkVerdict(t, l, test.want, nil)
	}
}

// Discrete: k·0.5/(z − 0.5) has the closed-loop pole 0.5 − 0.5k, inside the
// unit circle iff −1 < k < 3 (closed form).
func TestDiscreteFamily(t *testing.T) {
	for _, test := range []struct {
		kmax float64
		want Verdict
	}{{2.9, StableForBox}, {3.1, UnstableAtPoint}} {
		l := mustLoop(t, Description{Expressions: []string{"k*0.5/(z-0.5)"}, SampleTimeSec: 0.1,
			Params: []Param{{Name: "k", Min: 0.5, Max: test.kmax}}})
		checkVerdict(t, l, test.want, &Settings{Probes: 1})
	}
}

// An instability only inside the box, found by the subdivision (probes off).
func TestInteriorInstability(t *testing.T) {
	l := mustLoop(t, Description{Expressions: []string{"1/(s^2 + ((q-0.37)^2 - 0.0001)*s + 1)"},
		Params: []Param{{Name: "q", Min: -1, Max: 1}}})
	checkVerdict(t, l, UnstableAtPoint, &Settings{Probes: 1, Seed: 99})
	l = mustLoop(t, Description{Expressions: []string{"1/(s^2 + ((q-0.37)^2 + 0.0001)*s + 1)"},
		Params: []Param{{Name: "q", Min: -1, Max: 1}}})
	checkVerdict(t, l, StableForBox, &Settings{Probes: 1, Seed: 99})
}

// A marginal family (a pole pair on the axis at one parameter value) can be
// neither proven nor refuted: the answer must be Undecided with boxes, not
// a guess.
func TestMarginalIsUndecided(t *testing.T) {
	l := mustLoop(t, Description{Expressions: []string{"1/(s^2 + (q-0.37)^2*s + 1)"},
		Params: []Param{{Name: "q", Min: -1, Max: 1}}})
	r, err := Stability(l, &Settings{MaxCells: 3000})
	if err != nil {
		t.Fatal(err)
	}
	if r.Verdict != Undecided || len(r.UnprovenBoxes) == 0 {
		t.Fatalf("verdict %v with %d boxes", r.Verdict, len(r.UnprovenBoxes))
	}
	for _, b := range r.UnprovenBoxes {
		if b.Min[0] > 0.38 || b.Max[0] < 0.36 {
			t.Fatalf("unproven box %v is not near q = 0.37", b)
		}
	}
}

func TestDegreeDrop(t *testing.T) {
	// m crosses 0: the cubic term changes sign, a root passes through
	// infinity to the right half plane.
	l := mustLoop(t, Description{Expressions: []string{"9*g/(s^2 (m s + 1))", "(0.4 + 0.3*s)"},
		Params: []Param{{Name: "g", Min: 0.8, Max: 1.2}, {Name: "m", Min: -0.02, Max: 0.08}}})
	r, err := Stability(l, nil)
	if err != nil {
		t.Fatal(err)
	}
	if r.Verdict != UnstableAtPoint {
		t.Fatalf("verdict %v (%s)", r.Verdict, r.Reason)
	}
}

func TestBadInput(t *testing.T) {
	tests := []struct {
		name string
		d    Description
		want error
	}{
		{"reversed", Description{Expressions: []string{"k/(s+1)"}, Params: []Param{{Name: "k", Min: 2, Max: 1}}}, ErrParam},
		{"NaN", Description{Expressions: []string{"k/(s+1)"}, Params: []Param{{Name: "k", Min: math.NaN(), Max: 1}}}, ErrParam},
		{"unused", Description{Expressions: []string{"k/(s+1)"}, Params: []Param{{Name: "k", Min: 1, Max: 2}, {Name: "x", Min: 1, Max: 2}}}, ErrParam},
		{"undeclared", Description{Expressions: []string{"k/(s+y)"}, Params: []Param{{Name: "k", Min: 1, Max: 2}}}, ErrExpression},
		{"not polynomial", Description{Expressions: []string{"k*exp(-1/m*s)/(s+1)"}, Params: []Param{{Name: "k", Min: 1, Max: 2}, {Name: "m", Min: 1, Max: 2}}}, ErrExpression},
		{"empty", Description{}, ErrExpression},
		{"twice", Description{Expressions: []string{"k/(s+1)"}, Params: []Param{{Name: "k", Min: 1, Max: 2}, {Name: "k", Min: 1, Max: 2}}}, ErrParam},
	}
	for _, test := range tests {
		t.Run(test.name, func(t *testing.T) {
			_, err := NewLoop(test.d)
			if !errors.Is(err, test.want) {
				t.Fatalf("error %v, want %v", err, test.want)
			}
		})
	}
}

func TestHurwitzExact(t *testing.T) {
	tests := []struct {
		asc  []float64
		want bool
	}{
		{[]float64{1, 1}, true},
		{[]float64{1, 3, 3, 1}, true},        // (s+1)³
		{[]float64{2, 1, 2, 1}, false},       // a2·a1 = a0: roots on the axis
		{[]float64{1.9, 1, 2, 1}, true},      // a2·a1 > a0
		{[]float64{0, 1, 1}, false},          // root at 0
		{[]float64{1, -1, 1}, false},         // RHP pair
		{[]float64{24, 50, 35, 10, 1}, true}, // (s+1)(s+2)(s+3)(s+4)
		{[]float64{1, 0, 1}, false},          // ±j
		{[]float64{-1, -1}, true},            // −(s + 1)
	}
	for _, test := range tests {
		if got := HurwitzExact(test.asc); got != test.want {
			t.Errorf("HurwitzExact(%v) = %v", test.asc, got)
		}
	}
}

// Multilinear and polynomial families with a closed-form answer: the loops
// k/(s(s + a)(s + b)) and k/(s(s + a)²) have the characteristic polynomials
// s³ + (a + b)s² + ab·s + k and s³ + 2a·s² + a²·s + k; Routh–Hurwitz for the
// cubic says stable iff (a + b)·ab > k, resp. 2a³ > k. With a, b ∈ [1, 2]
// the smallest left side is 2 (at a = b = 1), so the box is stable iff
// k_max < 2.
func TestMultilinearAndPolynomialRouth(t *testing.T) {
	for _, test := range []struct {
		text  string
		class Class
	}{{"k/(s*(s+a)*(s+b))", Multilinear}, {"k/(s*(s+a)^2)", Polynomial}} {
		for _, kmax := range []float64{1.9, 2.1} {
			params := []Param{{Name: "a", Min: 1, Max: 2}, {Name: "k", Min: 0.5, Max: kmax}}
			if test.class == Multilinear {
				params = append(params, Param{Name: "b", Min: 1, Max: 2})
			}
			l := mustLoop(t, Description{Expressions: []string{test.text}, Params: params})
			if l.Class() != test.class {
				t.Fatalf("%s: class %v, want %v", test.text, l.Class(), test.class)
			}
			want := StableForBox
			if kmax > 2 {
				want = UnstableAtPoint
			}
			checkVerdict(t, l, want, &Settings{Probes: 1, Seed: 3})
		}
	}
}
