package main

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Hand derivation.
//
// Stability (Routh–Hurwitz): the characteristic polynomial of the PI loop
// is s(s + 2)(s + 50) + 400(Kp·s + Ki) = s³ + 52s² + (100 + 400Kp)s +
// 400Ki. A cubic s³ + a₂s² + a₁s + a₀ is Hurwitz exactly when a₂, a₁, a₀ > 0
// and a₂a₁ > a₀, so the loop is stable for Kp > −1/4 and
// 0 < Ki < 13(1 + 4Kp).
//
// On the line Ki = 2Kp the PI zero cancels the pole at −2 and
// L(s) = 400Kp/(s(s + 50)); the closed-loop pair solves s² + 50s + 400Kp:
//
//	ζ = 50/(2·√(400Kp)) = 1.25/√Kp ≥ 0.7   ⇔  Kp ≤ (1.25/0.7)²,
//	PM = 90° − atan(ωc/50) ≥ 60°            ⇔  ωc ≤ 50·tan 30°,
//	  with ωc·√(ωc² + 2500) = 400Kp, i.e. Kp ≤ 2500·(2/3)/400 = 25/6.
//
// So the damping ratio binds: KpMax = (1.25/0.7)² = 3.188; the chosen
// Kp = 0.8·KpMax = 2.551, ζ = 1.25/√Kp = 0.7826, and the overshoot of the
// second-order pair is 100·exp(−πζ/√(1 − ζ²)) = 1.93 % (the cancelled pole
// contributes nothing to the step response).
func TestHandDerivation(t *testing.T) {
	c, err := analyse()
	if err != nil {
		t.Fatal(err)
	}
	kpMax := math.Pow(1.25/0.7, 2)
	if math.Abs(c.KpMax-kpMax) > 1e-9*kpMax {
		t.Errorf("KpMax = %.15g, want %.15g", c.KpMax, kpMax)
	}
	pm := c.Line.Requirements[1].Intervals
	if len(pm) != 1 || math.Abs(pm[0].Hi-25.0/6) > 1e-9*25/6 {
		t.Errorf("phase-margin set %v, want up to 25/6", pm)
	}
	if math.Abs(c.Kp-0.8*kpMax) > 1e-9 || math.Abs(c.Ki-2*c.Kp) > 1e-12 {
		t.Errorf("gains %v, %v", c.Kp, c.Ki)
	}
	zeta := 1.25 / math.Sqrt(c.Kp)
	os := 100 * math.Exp(-math.Pi*zeta/math.Sqrt(1-zeta*zeta))
	for _, r := range c.Check.Results {
		switch r.Requirement.Key() {
		case "min_damping_ratio":
			if math.Abs(r.Value-zeta) > 1e-9 {
				t.Errorf("damping ratio %v, want %v", r.Value, zeta)
			}
		case "max_overshoot_pct":
			if math.Abs(r.Value-os) > 1e-6*os {
				t.Errorf("overshoot %v %%, want %v %%", r.Value, os)
			}
		}
	}
	if !c.Check.Passed() {
		t.Errorf("check failed:\n%s", c.Check)
	}
	// The stable region of the plane against Routh–Hurwitz: every vertex of
	// the stable polygon on Ki = 13(1 + 4Kp), Ki = 0, Kp = −1/4 or the
	// rectangle's edge.
	stable := 0
	for _, r := range c.Plane.Regions {
		if r.UnstableRoots != 0 {
			continue
		}
		stable++
		for _, p := range r.Polygon {
			kp, ki := p[0], p[1]
			ok := math.Abs(ki-13*(1+4*kp)) <= 1e-9*math.Max(1, ki) || math.Abs(ki) <= 1e-12 ||
				math.Abs(kp+0.25) <= 1e-12 || ki == c.Plane.YRange.Max || ki == c.Plane.YRange.Min ||
				kp == c.Plane.XRange.Min || kp == c.Plane.XRange.Max
			if !ok {
				t.Errorf("stable vertex (%.12g, %.12g) is not on the Routh–Hurwitz boundary", kp, ki)
			}
		}
	}
	if stable != 1 {
		t.Errorf("%d stable regions, want 1", stable)
	}
}

func TestRun(t *testing.T) {
	var buf bytes.Buffer
	dir := t.TempDir()
	if err := run(&buf, dir); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"Kp = 2.551, Ki = 5.102", "both hold up to Kp = 3.18878", "pass: The step-response overshoot is 1.926 %"} {
		if !strings.Contains(buf.String(), want) {
			t.Errorf("output lacks %q:\n%s", want, buf.String())
		}
	}
	for _, f := range []string{"parameter-plane.png", "parameter-plane.svg", "design-axis.png", "design-axis.svg"} {
		if _, err := os.Stat(filepath.Join(dir, f)); err != nil {
			t.Error(err)
		}
	}
}
