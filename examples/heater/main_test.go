package main

import (
	"bytes"
	"math"
	"os"
	"strings"
	"testing"
)

// Hand derivation. With Ti equal to the lag, the PI zero cancels the
// plant pole and the loop is L(s) = k·e^(−θs)/s with
// k = Kc·2.5/90 = 1/(λ + θ) = 1/42 rad/s and θ = 12 s. Then
//
//	|L(jω)| = k/ω            → gain crossover ωc = k = 1/42 rad/s,
//	∠L(jω) = −π/2 − θω       → phase margin π/2 − θk rad = 90° − (12/42)·180°/π,
//	delay margin = (π/2 − θk)/k = 21π − 12 s,
//	phase crossover θω = π/2 → ω180 = π/24 rad/s, gain margin ω180/k = 7π/4.
//
// Padé: e^(−θs) ≈ D(−θs)/D(θs) with D₁(u) = 1 + u/2,
// D₂(u) = 1 + u/2 + u²/12, D₃(u) = 1 + u/2 + u²/10 + u³/120 (Padé 1892;
// coefficients of the diagonal approximants from memory, re-derived as
// (2n−i)!·n!/((2n)!·i!·(n−i)!)). The approximation is all-pass, so on the
// stability limit |L| = 1 gives k'·θ = v with v = ωθ, and ∠L = −π needs
// arg D(jv) = π/4, that is Re D(jv) = Im D(jv):
//
//	order 1: 1 = v/2                      → v = 2,
//	order 2: 1 − v²/12 = v/2              → v = √21 − 3,
//	order 3: 1 − v²/10 = v/2 − v³/120     → v³ − 12v² − 60v + 120 = 0 (root in (1, 2)).
//
// The limit factor on Kc is v/(kθ) = 3.5·v and the crossing is at v/θ.
// As the order grows, v → π/2, the exact value.
const (
	theta = 12.0
	kLoop = 1.0 / 42
)

func near(got, want, rel float64) bool { return math.Abs(got-want) <= rel*math.Abs(want) }

// bisect finds a root of f in [a, b] where f changes sign (used only to
// solve the hand-derived cubic above).
func bisect(f func(float64) float64, a, b float64) float64 {
	fa := f(a)
	for range 200 {
		m := (a + b) / 2
		if fm := f(m); (fm < 0) == (fa < 0) {
			a, fa = m, fm
		} else {
			b = m
		}
	}
	return (a + b) / 2
}

func TestMarginsAgainstClosedForm(t *testing.T) {
	d, err := analyse()
	if err != nil {
		t.Fatal(err)
	}
	// 1e-9 relative: the crossovers are simple roots of smooth functions
	// located by the library to near machine precision.
	const rel = 1e-9
	m := d.Margins
	checks := []struct {
		name      string
		got, want float64
	}{
		{"gain crossover (rad/s)", m.GainCrossoverRadPerSec, kLoop},
		{"phase margin (deg)", m.PhaseMarginDeg, 90 - theta*kLoop*180/math.Pi},
		{"delay margin (s)", m.DelayMarginSec, 21*math.Pi - 12},
		{"phase crossover (rad/s)", m.PhaseCrossoverRadPerSec, math.Pi / 24},
		{"gain margin", m.GainMargin, 7 * math.Pi / 4},
	}
	for _, c := range checks {
		if !near(c.got, c.want, rel) {
			t.Errorf("%s = %.15g, want %.15g", c.name, c.got, c.want)
		}
	}
}

func TestPadeLimitsAgainstHandDerivation(t *testing.T) {
	d, err := analyse()
	if err != nil {
		t.Fatal(err)
	}
	v3 := bisect(func(v float64) float64 { return v*v*v - 12*v*v - 60*v + 120 }, 1, 2)
	want := map[int]float64{1: 2, 2: math.Sqrt(21) - 3, 3: v3}
	for _, pl := range d.Pade {
		v := want[pl.Order]
		if !near(pl.LimitFactor, 3.5*v, 1e-9) {
			t.Errorf("order %d: limit factor %.15g, want %.15g", pl.Order, pl.LimitFactor, 3.5*v)
		}
		if !near(pl.LimitRadPerSec, v/theta, 1e-9) {
			t.Errorf("order %d: crossing %.15g rad/s, want %.15g", pl.Order, pl.LimitRadPerSec, v/theta)
		}
		if len(pl.AddedPoles) != pl.Order || len(pl.AddedZeros) != pl.Order {
			t.Errorf("order %d: %d poles and %d zeros added", pl.Order, len(pl.AddedPoles), len(pl.AddedZeros))
		}
		// The approximation is stable and all-pass: its zeros mirror its
		// poles in the imaginary axis.
		for _, p := range pl.AddedPoles {
			if real(p) >= 0 {
				t.Errorf("order %d: Padé pole %v not in the left half plane", pl.Order, p)
			}
		}
	}
	// Order 1: pole at −2/θ, zero at +2/θ.
	if p := d.Pade[0]; len(p.AddedPoles) == 1 && (!near(real(p.AddedPoles[0]), -2/theta, 1e-12) || !near(real(p.AddedZeros[0]), 2/theta, 1e-12)) {
		t.Errorf("order 1: pole %v, zero %v; want ∓%v", p.AddedPoles, p.AddedZeros, 2/theta)
	}
}

func TestRun(t *testing.T) {
	dir := t.TempDir()
	var out bytes.Buffer
	if err := run(&out, dir); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"delay margin 53.97 s", "phase margin 73.63°"} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("summary lacks %q:\n%s", want, out.String())
		}
	}
	entries, err := os.ReadDir(dir)
	if err != nil || len(entries) == 0 {
		t.Errorf("no plots written (%v)", err)
	}
}
