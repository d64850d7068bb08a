package main

import (
	"bytes"
	"math"
	"os"
	"strings"
	"testing"
)

// Hand derivation (Routh–Hurwitz, Routh 1877; the quartic conditions are
// the Hurwitz determinants, Hurwitz 1895).
//
// L(s) = Kc·19.62·(s/15 + 1)/((s² − 900)(s/150 + 1)(s/300 + 1))
//
//	= K'·(s + 15)/((s² − 900)(s + 150)(s + 300)),  K' = 19.62·150·300/15·Kc = 58860·Kc.
//
// Characteristic polynomial: (s² − 900)(s² + 450s + 45000) + K'(s + 15)
//
//	= s⁴ + 450s³ + 44100s² + (K' − 405000)s + (15K' − 40 500 000).
//
// With a3 = 450, a2 = 44100, a1 = K' − 405000, a0 = 15K' − 40.5e6 the quartic
// is stable iff all aᵢ > 0, a3·a2 − a1 > 0 and a1(a3·a2 − a1) − a3²·a0 > 0.
// The last one is (K' − 405000)(20 250 000 − K') − 202500(15K' − 40.5e6)
// = −K'² + 17 617 500·K' (the constant terms cancel exactly), so it holds for
// 0 < K' < 17 617 500. With a0 > 0 (K' > 2 700 000, which is "DC loop gain
// above one": 19.62·Kc/900 > 1) the window is
// 2 700 000/58860 < Kc < 17 617 500/58860.
// At the upper end the s¹ row vanishes and the s² row gives the crossing
// ω² = a1/a3 = (17 617 500 − 405 000)/450 = 38250; the lower end is the
// crossing at ω = 0 (a real pole through the origin).
var (
	kcLow            = 2_700_000.0 / 58860
	kcHigh           = 17_617_500.0 / 58860
	upperCrossingRad = math.Sqrt(38250)
)

func near(got, want, rel float64) bool { return math.Abs(got-want) <= rel*math.Abs(want) }

func TestWindowAgainstRouth(t *testing.T) {
	d, err := analyse()
	if err != nil {
		t.Fatal(err)
	}
	// 1e-9 relative: the window ends are simple roots of the degree-one and
	// degree-two conditions above; double precision gives about 1e-13.
	const rel = 1e-9
	if !near(d.Lo, kcLow, rel) || !near(d.Hi, kcHigh, rel) {
		t.Errorf("stable window = (%v, %v) A/m, want (%v, %v)", d.Lo, d.Hi, kcLow, kcHigh)
	}
	found := false
	for _, c := range d.Locus.AxisCrossings {
		if near(c.Value, kcHigh, rel) {
			found = true
			if !near(c.FrequencyRadPerSec, upperCrossingRad, rel) {
				t.Errorf("crossing at Kc = %v: %v rad/s, want %v", c.Value, c.FrequencyRadPerSec, upperCrossingRad)
			}
		}
	}
	if !found {
		t.Errorf("no axis crossing at Kc = %v in %+v", kcHigh, d.Locus.AxisCrossings)
	}
	// Margins at the geometric middle: both are √ of the window ratio.
	ratio := math.Sqrt(kcHigh / kcLow)
	if !near(d.Margins.GainMargin, ratio, 1e-8) {
		t.Errorf("upper gain margin = %v, want %v", d.Margins.GainMargin, ratio)
	}
	if !near(d.Margins.LowerGainMargin, 1/ratio, 1e-8) {
		t.Errorf("lower gain margin = %v, want %v", d.Margins.LowerGainMargin, 1/ratio)
	}
	// Static gain of the closed loop: L(0) = −19.62·Kc/900, T(0) = L(0)/(1 + L(0)).
	l0 := -19.62 * d.Kc / 900
	if !near(d.Step.FinalValue, l0/(1+l0), 1e-10) {
		t.Errorf("final value = %v, want %v", d.Step.FinalValue, l0/(1+l0))
	}
	// The table: 30 and 320 A/m lie outside the window, the others inside.
	for i, k := range sweepGains {
		stable := true
		for _, z := range d.Sweep[i] {
			if real(z) >= 0 {
				stable = false
			}
		}
		if want := k > kcLow && k < kcHigh; stable != want {
			t.Errorf("Kc = %v: stable = %v, want %v", k, stable, want)
		}
	}
}

func TestRun(t *testing.T) {
	dir := t.TempDir()
	var out bytes.Buffer
	if err := run(&out, dir); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"45.87 < Kc < 299.3 A/m", "lower gain margin 0.3915", "UNSTABLE"} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("summary lacks %q:\n%s", want, out.String())
		}
	}
	entries, err := os.ReadDir(dir)
	if err != nil || len(entries) == 0 {
		t.Errorf("no plots written (%v)", err)
	}
}
