package main

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/robust"
)

// Hand derivation. With C = (0.4 + 0.3s)/(1 + 0.01s) and G = 9g/(s²(ms + 1))
// the closed-loop characteristic polynomial is
//
//	0.01m s⁴ + (m + 0.01) s³ + s² + 2.7g s + 3.6g.
//
// Routh–Hurwitz for a quartic a4 s⁴ + a3 s³ + a2 s² + a1 s + a0 with positive
// coefficients (Routh 1877): stable iff a3·a2 > a4·a1 and
// a3·a2·a1 > a4·a1² + a3²·a0. With a2 = 1 the second condition gives the
// largest stable gain factor
//
//	g* = (m + 0.01)(2.7 − 3.6(m + 0.01)) / (0.0729 m),
//
// smallest at m = 0.08: g* = 0.09·2.376/0.005832 = 36.666… (at m = 0.05 it
// is 40.89), and the first condition holds there (g < 0.09/0.00216 = 41.7).
func routhStable(g, m float64) bool {
	a4, a3, a2, a1, a0 := 0.01*m, m+0.01, 1.0, 2.7*g, 3.6*g
	return a4 > 0 && a3 > 0 && a1 > 0 && a0 > 0 && a3*a2 > a4*a1 && a3*a2*a1 > a4*a1*a1+a3*a3*a0
}

func gStar(m float64) float64 { return (m + 0.01) * (2.7 - 3.6*(m+0.01)) / (0.0729 * m) }

func TestCornersByRouth(t *testing.T) {
	for _, g := range []float64{0.8, 1.2} {
		for _, m := range []float64{0.05, 0.08} {
			if !routhStable(g, m) {
				t.Fatalf("corner g = %g, m = %g unstable by Routh", g, m)
			}
		}
	}
	s, err := analyse()
	if err != nil {
		t.Fatal(err)
	}
	if s.Stability.Verdict != robust.StableForBox {
		t.Fatalf("verdict %v", s.Stability.Verdict)
	}
	if math.Abs(gStar(0.08)-36.66666666666) > 1e-9 {
		t.Fatalf("g* = %.12g", gStar(0.08))
	}
	// Each worst value is the margin the loop has at its point, and each
	// bound is on the safe side of it.
	for _, c := range s.Worst[:2] {
		g, _ := s.Loop.At(c.At)
		m, err := margins.Compute(g, nil)
		if err != nil {
			t.Fatal(err)
		}
		v := map[robust.Quantity]float64{robust.PhaseMargin: m.PhaseMarginDeg, robust.GainMargin: m.GainMarginDB}[c.Quantity]
		if math.Abs(v-c.Value) > 1e-9*math.Abs(v) || c.Bound > c.Value {
			t.Errorf("%v: %v (bound %v), margins say %v", c.Quantity, c.Value, c.Bound, v)
		}
	}
}

// The proof agrees with Routh's boundary g* = 36.67 (at m = 0.08) when the
// gain range is widened past it: stable up to 36, unstable to 37.5, with a
// counterexample that Routh calls unstable.
func TestGainBoundaryByRouth(t *testing.T) {
	for _, test := range []struct {
		gmax float64
		want robust.Verdict
	}{{36, robust.StableForBox}, {37.5, robust.UnstableAtPoint}} {
		p := append([]robust.Param(nil), params...)
		p[0].Max = test.gmax
		l, err := robust.NewLoop(robust.Description{Expressions: []string{plantText, controllerText}, Params: p})
		if err != nil {
			t.Fatal(err)
		}
		r, err := robust.Stability(l, nil)
		if err != nil {
			t.Fatal(err)
		}
		if r.Verdict != test.want {
			t.Fatalf("g ≤ %g: %v", test.gmax, r.Verdict)
		}
		if ce := r.Counterexample; ce != nil {
			if routhStable(ce.Values[0], ce.Values[1]) || ce.Values[0] <= gStar(ce.Values[1]) {
				t.Fatalf("counterexample %v is stable by Routh (g* = %v)", ce.Values, gStar(ce.Values[1]))
			}
		}
	}
}

func TestProgramOutput(t *testing.T) {
	var out bytes.Buffer
	if err := run(&out, ""); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"Verdict: stable for the whole box", "phase margin at least 45°                met for the whole box", "95 % interval"} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("output lacks %q:\n%s", want, out.String())
		}
	}
}
