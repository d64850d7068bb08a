package main

import (
	"bytes"
	"math"
	"math/cmplx"
	"os"
	"strings"
	"testing"
)

// Hand derivation. The characteristic polynomial is
// s(s + 2)(s + 20) + 400(1 + τs) = s³ + 22s² + (40 + 400τ)s + 400.
// A pole pair with damping ratio ζ = 0.6 and natural frequency ωn and a
// third pole at −r factor it as (s² + 2ζωn s + ωn²)(s + r), so
//
//	2ζωn + r = 22,   ωn²·r = 400,   ωn² + 2ζωn·r = 40 + 400τ.
//
// Eliminating r: ωn²(22 − 1.2ωn) = 400, that is 1.2ωn³ − 22ωn² + 400 = 0,
// which has the root ωn = 5 (1.2·125 − 22·25 + 400 = 0). Dividing it out
// leaves 1.2ωn² − 16ωn − 80 = 0, ωn = (16 + √640)/2.4 (the other root is
// negative). For ωn = 5: r = 16, the pair is −3 ± 4j and
// τ = (25 + 6·16 − 40)/400 = 81/400 s; the pair is dominant (−3 > −16).
// For the second root r = 22 − 1.2ωn ≈ 1.35: the real pole is slower than
// the pair, which is therefore not dominant.
var (
	tauChosen = 81.0 / 400
	wnOther   = (16 + math.Sqrt(640)) / 2.4
	rOther    = 22 - 1.2*wnOther
	tauOther  = (wnOther*wnOther + 1.2*wnOther*rOther - 40) / 400
)

func near(got, want, rel float64) bool { return math.Abs(got-want) <= rel*math.Abs(want) }

func TestCandidatesAgainstHandDerivation(t *testing.T) {
	d, err := sweep()
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Candidates) != 2 {
		t.Fatalf("%d candidates, want 2: %+v", len(d.Candidates), d.Candidates)
	}
	// 1e-9 relative: simple roots of low-degree polynomials with exact
	// integer coefficients.
	c0, c1 := d.Candidates[0], d.Candidates[1]
	if !near(c0.TauSec, tauChosen, 1e-9) || cmplx.Abs(c0.Pair-complex(-3, 4)) > 1e-9 {
		t.Errorf("first candidate τ = %.15g s, pair %v; want %.15g s, −3 + 4j", c0.TauSec, c0.Pair, tauChosen)
	}
	if !near(c1.TauSec, tauOther, 1e-9) || !near(cmplx.Abs(c1.Pair), wnOther, 1e-9) {
		t.Errorf("second candidate τ = %.15g s, |pair| = %.15g; want %.15g s, %.15g", c1.TauSec, cmplx.Abs(c1.Pair), tauOther, wnOther)
	}
	// Torque disturbance: y/d = G/(1 + C·G) → 1/C(0) = 1/10 rad per V as
	// s → 0, because G has a pole at the origin.
	for _, c := range d.Candidates {
		if !near(c.Disturbance.FinalValue, 0.1, 1e-12) {
			t.Errorf("τ = %v: disturbance final value %v rad, want 0.1", c.TauSec, c.Disturbance.FinalValue)
		}
	}
	if d.Chosen != 0 || !c0.Dominant || c1.Dominant {
		t.Errorf("chosen %d (dominant %v, %v), want the first (dominant) one", d.Chosen, c0.Dominant, c1.Dominant)
	}
}

// The closed-form unit step response of 400(1 + τs)/((s − p1)(s − p2)(s − p3)):
// y(t) = 1 + Σ 400(1 + τpᵢ)e^{pᵢt}/(pᵢ·Π_{j≠i}(pᵢ − pⱼ)) (residues of T(s)/s).
func TestStepAgainstPartialFractions(t *testing.T) {
	d, err := sweep()
	if err != nil {
		t.Fatal(err)
	}
	p := []complex128{complex(-3, 4), complex(-3, -4), -16}
	y := func(tt float64) float64 {
		v := complex(1, 0)
		for i := range p {
			den := p[i]
			for j := range p {
				if j != i {
					den *= p[i] - p[j]
				}
			}
			v += 400 * (1 + complex(tauChosen, 0)*p[i]) / den * cmplx.Exp(p[i]*complex(tt, 0))
		}
		return real(v)
	}
	// Sampling every 10 µs: the sampled maximum is within y''·dt²/8 ≈ 1e-9
	// of the true peak.
	peak := 0.0
	for k := 0; k <= 300000; k++ {
		peak = math.Max(peak, y(float64(k)*1e-5))
	}
	got := d.Candidates[d.Chosen].Step
	if math.Abs(got.OvershootPct-100*(peak-1)) > 1e-6 {
		t.Errorf("overshoot = %.12g %%, want %.12g %%", got.OvershootPct, 100*(peak-1))
	}
}

func TestRun(t *testing.T) {
	dir := t.TempDir()
	var out bytes.Buffer
	if err := run(&out, dir); err != nil {
		t.Fatal(err)
	}
	for _, want := range []string{"τ = 0.2025 s", "CHOSEN", "nearly"} {
		if !strings.Contains(out.String(), want) {
			t.Errorf("summary lacks %q:\n%s", want, out.String())
		}
	}
	entries, err := os.ReadDir(dir)
	if err != nil || len(entries) == 0 {
		t.Errorf("no plots written (%v)", err)
	}
}
