package tf

import (
	"errors"
	"math"
	"testing"

	"github.com/loopwise/loopwise/internal/testutil"
)

func TestMinimal(t *testing.T) {
	tests := []struct {
		name      string
		g         string
		tol       float64
		want      string
		cancelled []complex128
	}{
		// Hand factorisations: each common factor is visible in the text.
		{"real pair", "(s+1)(s+2)/((s+1)(s+3))", 0, "(s+2)/(s+3)", []complex128{-1}},
		{"gain kept", "4(s+1)(s+2)/(2(s+1)(s+3)(s+5))", 0, "2(s+2)/((s+3)(s+5))", []complex128{-1}},
		{"complex pair", "(s^2+2s+5)(s+4)/((s^2+2s+5)(s+1)^2)", 0, "(s+4)/(s+1)^2", []complex128{complex(-1, -2), complex(-1, 2)}},
		{"origin", "s(s+3)/(s^2(s+2))", 0, "(s+3)/(s(s+2))", []complex128{0}},
		{"nothing", "(s+2)/(s^2+s+1)", 0, "(s+2)/(s^2+s+1)", nil},
		{"near pair within tol", "(s+1.0000001)/((s+1)(s+2))", 1e-6, "1/(s+2)", []complex128{-1.00000005}},
		{"near pair outside tol", "(s+1.0000001)/((s+1)(s+2))", 1e-9, "(s+1.0000001)/((s+1)(s+2))", nil},
		{"everything", "(s+1)(s+2)/((s+2)(s+1))", 0, "1", []complex128{-2, -1}},
	}
	for _, test := range tests {
		t.Run(test.name, func(t *testing.T) {
			g := MustParse(test.g)
			got, c, err := g.Minimal(test.tol)
			if err != nil {
				t.Fatal(err)
			}
			want := MustParse(test.want)
			// 1e-12: rebuilding from roots found to ~1e-15 relative.
			if !got.EqualApprox(want, 1e-12) {
				t.Errorf("got %v, want %v", got, want)
			}
			dist, ok := testutil.MatchMultiset(c, test.cancelled)
			if !ok {
				t.Fatalf("cancelled %v, want %v", c, test.cancelled)
			}
			for i, d := range dist {
				if d > 1e-7 {
					t.Errorf("cancelled value %v off by %v", test.cancelled[i], d)
				}
			}
			// The cancelled form has the same frequency response away
			// from the cancelled points.
			for _, w := range []float64{0.3, 3} {
				a, _ := g.FrequencyResponse(w)
				b, _ := got.FrequencyResponse(w)
				if !testutil.CloseComplex(b, a, 1e-6, 0) {
					t.Errorf("response at %v changed: %v → %v", w, a, b)
				}
			}
		})
	}
}

func TestMinimalKeepsDelayAndPeriod(t *testing.T) {
	g, _ := NewDiscrete([]float64{1, -0.5}, []float64{1, -1.5, 0.5}, 0.1) // (z−0.5)/((z−1)(z−0.5))
	g, _ = g.WithDelay(0.2)
	m, c, err := g.Minimal(0)
	if err != nil {
		t.Fatal(err)
	}
	if m.SampleTimeSec() != 0.1 || m.DelaySec() != 0.2 || len(c) != 1 || math.Abs(real(c[0])-0.5) > 1e-14 {
		t.Errorf("got %v (T = %v, τ = %v), cancelled %v", m, m.SampleTimeSec(), m.DelaySec(), c)
	}
	z, _, err := TF{}.Minimal(0)
	if err != nil || !z.IsZero() {
		t.Errorf("zero value: %v, %v", z, err)
	}
	for _, tol := range []float64{-1, math.NaN(), math.Inf(1)} {
		if _, _, err := g.Minimal(tol); !errors.Is(err, ErrTolerance) {
			t.Errorf("tol %v: got %v", tol, err)
		}
	}
}

func TestNormalized(t *testing.T) {
	g := MustParse("(4s+2)/(2s^2+6s+4)")
	n := g.Normalized()
	if n.Den().Lead() != 1 || !n.EqualApprox(MustParse("(2s+1)/(s^2+3s+2)"), 1e-15) {
		t.Errorf("got %v", n)
	}
	if v, w := n.Eval(0.7i), g.Eval(0.7i); !testutil.CloseComplex(v, w, 1e-15, 0) {
		t.Errorf("value changed: %v vs %v", v, w)
	}
}
