package locus

import (
	"encoding/json"
	"errors"
	"math"
	"math/cmplx"
	"os"
	"strconv"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

type delayRootCase struct {
	Name     string      `json:"name"`
	Den      []float64   `json:"den"`
	Num      []float64   `json:"num"`
	Gain     float64     `json:"gain"`
	DelaySec float64     `json:"delaySec"`
	Abscissa *float64    `json:"abscissa"`
	Count    int         `json:"count"`
	Roots    [][2]string `json:"roots"`
}

func loadDelayRootCases(t *testing.T) []delayRootCase {
	t.Helper()
	b, err := os.ReadFile("testdata/delay_roots.json")
	if err != nil {
		t.Fatal(err)
	}
	var f struct{ Cases []delayRootCase }
	if err := json.Unmarshal(b, &f); err != nil {
		t.Fatal(err)
	}
	if len(f.Cases) == 0 {
		t.Fatal("no cases in testdata/delay_roots.json")
	}
	return f.Cases
}

func parseRoot(t *testing.T, r [2]string) complex128 {
	re, err1 := strconv.ParseFloat(r[0], 64)
	im, err2 := strconv.ParseFloat(r[1], 64)
	if err1 != nil || err2 != nil {
		t.Fatalf("bad root %v", r)
	}
	return complex(re, im)
}

func delayedLoop(t testing.TB, num, den []float64, tau float64) tf.TF {
	g, err := tf.New(num, den)
	if err != nil {
		t.Fatal(err)
	}
	g, err = g.WithDelay(tau)
	if err != nil {
		t.Fatal(err)
	}
	return g
}

// TestDelayedRootsGolden compares with 50-digit references
// (testdata/delay_roots.py: mpmath findroot from a grid of starts, counted
// by the argument principle; the Lambert-W case from the closed form of
// Asl & Ulsoy 2003). Tolerance 1e-12 relative to max(|s|, 1): the Newton
// tolerance, which the roots of these well-separated simple roots meet.
func TestDelayedRootsGolden(t *testing.T) {
	for _, c := range loadDelayRootCases(t) {
		t.Run(c.Name, func(t *testing.T) {
			loop := delayedLoop(t, c.Num, c.Den, c.DelaySec)
			set := &DelaySettings{Region: Rightmost, Count: c.Count}
			if c.Abscissa != nil {
				set = &DelaySettings{Region: Above, MinRealPart: *c.Abscissa}
			}
			got, err := DelayedRoots(loop, c.Gain, set)
			if err != nil {
				t.Fatal(err)
			}
			if !got.CountVerified || got.Count != len(got.Roots) {
				t.Errorf("count %d, %d roots, verified %v", got.Count, len(got.Roots), got.CountVerified)
			}
			if len(got.Roots) != len(c.Roots) {
				t.Fatalf("%d roots, want %d: %v", len(got.Roots), len(c.Roots), got.Roots)
			}
			for i, r := range c.Roots {
				want := parseRoot(t, r)
				if d := cmplx.Abs(got.Roots[i] - want); d > 1e-12*math.Max(1, cmplx.Abs(want)) {
					t.Errorf("root %d = %v, want %v (|Δ| = %.2g)", i, got.Roots[i], want, d)
				}
			}
			if got.MaxRelResidual > 1e-14 {
				t.Errorf("residual %.3g", got.MaxRelResidual)
			}
		})
	}
}

// TestDelayedRootsHayes checks the stability boundary of ẋ = −a·x(t − τ):
// asymptotically stable exactly when aτ < π/2 (N. D. Hayes, "Roots of the
// transcendental equation associated with a certain difference-differential
// equation", J. London Math. Soc. 25, 226–232, 1950). At aτ = π/2 the
// rightmost pair is ±j·a exactly.
func TestDelayedRootsHayes(t *testing.T) {
	const a = 2.0
	for _, tc := range []struct {
		tau        float64
		wantStable bool
	}{
		{0.99 * math.Pi / (2 * a), true},
		{1.01 * math.Pi / (2 * a), false},
		{0.3, true},
		{3, false},
	} {
		loop := delayedLoop(t, []float64{1}, []float64{1, 0}, tc.tau)
		r, err := DelayedRoots(loop, a, &DelaySettings{Region: Above, MinRealPart: 0})
		if err != nil {
			t.Fatal(err)
		}
		if (r.Count == 0) != tc.wantStable {
			t.Errorf("aτ = %v: %d roots in Re s > 0, want stable %v", a*tc.tau, r.Count, tc.wantStable)
		}
	}
	loop := delayedLoop(t, []float64{1}, []float64{1, 0}, math.Pi/(2*a))
	r, err := DelayedRoots(loop, a, &DelaySettings{Count: 2})
	if err != nil {
		t.Fatal(err)
	}
	if d := cmplx.Abs(r.Roots[0] - complex(0, a)); d > 1e-13*a {
		t.Errorf("rightmost root at aτ = π/2: %v, want %vi", r.Roots[0], a)
	}
}

// TestDelayedRootsAgainstRational: without dead time the roots are those
// of D + k·N (poly), and a whole-sample discrete delay gives z^d·D + k·N.
func TestDelayedRootsAgainstRational(t *testing.T) {
	loop := tf.MustNew([]float64{1, 3}, []float64{1, 4, 6, 4})
	r, err := DelayedRoots(loop, 2, &DelaySettings{Count: 3})
	if err != nil {
		t.Fatal(err)
	}
	want, err := ClosedLoopPoles(loop, 2)
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Roots) != 3 {
		t.Fatalf("roots %v", r.Roots)
	}
	for _, w := range want {
		ok := false
		for _, g := range r.Roots {
			ok = ok || cmplx.Abs(g-w) < 1e-12*cmplx.Abs(w)
		}
		if !ok {
			t.Errorf("pole %v missing from %v", w, r.Roots)
		}
	}
	d, _ := tf.NewDiscrete([]float64{0.5}, []float64{1, -0.5}, 0.1)
	d, _ = d.WithDelay(0.2)
	dr, err := DelayedRoots(d, 1, &DelaySettings{Count: 3})
	if err != nil {
		t.Fatal(err)
	}
	// z^2(z − 0.5) + 0.5 = 0: check each root satisfies it.
	for _, z := range dr.Roots {
		if v := z*z*(z-0.5) + 0.5; cmplx.Abs(v) > 1e-14 {
			t.Errorf("root %v: residual %v", z, v)
		}
	}
	if len(dr.Roots) != 3 || !dr.CountVerified {
		t.Errorf("discrete roots %v", dr.Roots)
	}
	frac, _ := d.WithDelay(0.25)
	if _, err := DelayedRoots(frac, 1, nil); !errors.Is(err, ErrUnsupported) {
		t.Errorf("fractional delay: %v", err)
	}
}

func TestDelayedRootsBadInput(t *testing.T) {
	loop := delayedLoop(t, []float64{1}, []float64{1, 1}, 0.5)
	for _, tc := range []struct {
		name string
		gain float64
		set  *DelaySettings
		want error
	}{
		{"NaN gain", math.NaN(), nil, ErrNotFinite},
		{"negative count", 1, &DelaySettings{Count: -1}, ErrInvalidSettings},
		{"bad region", 1, &DelaySettings{Region: 7}, ErrInvalidSettings},
		{"bad tolerance", 1, &DelaySettings{Tolerance: 0.1}, ErrInvalidSettings},
		{"NaN abscissa", 1, &DelaySettings{Region: Above, MinRealPart: math.NaN()}, ErrNotFinite},
	} {
		if _, err := DelayedRoots(loop, tc.gain, tc.set); !errors.Is(err, tc.want) {
			t.Errorf("%s: %v, want %v", tc.name, err, tc.want)
		}
	}
	bip := delayedLoop(t, []float64{1, 2}, []float64{1, 1}, 0.5)
	if _, err := DelayedRoots(bip, 1, nil); !errors.Is(err, ErrUnsupported) {
		t.Errorf("biproper: %v", err)
	}
}
