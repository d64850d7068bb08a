package design

import (
	"math"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/internal/rootfind"
	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// TestStableSetDeadTimeExact: the stable set of a continuous loop with dead
// time is that of the quasi-polynomial, not of a Padé approximation.
//
//   - Gain: K·e^(−s)/(s + 1) is stable for 0 < K < √(1 + ω²), ω the root of
//     ω = −tan ω in (π/2, π) (the textbook condition ωT = −tan(ωτ) for a
//     first-order lag with delay under proportional control; from memory).
//     The Padé(6) limit differs in the 6th digit.
//   - Parameter: the integral gain Ki of the PI controller 1 + Ki/s on
//     e^(−s)/s. A root pair of s² + (s + Ki)·e^(−s) at ±jω needs
//     −ω² + (jω + Ki)(cos ω − j sin ω) = 0, i.e. Ki·cos ω + ω·sin ω = ω²
//     and ω·cos ω = Ki·sin ω; so Ki = ω·cot ω and, substituting,
//     ω·sin ω = 1. The first crossing from small Ki is at the root
//     ω ≈ 1.114 of ω·sin ω = 1, Ki = ω·cot ω (hand derivation). The
//     Padé(6) limits differ from both in the 10th digit or earlier.
func TestStableSetDeadTimeExact(t *testing.T) {
	fLag := func(w float64) float64 { return w*math.Cos(w) + math.Sin(w) } // ω + tan ω, times cos ω
	wLag := rootfind.Brent(fLag, math.Pi/2, math.Pi, fLag(math.Pi/2), fLag(math.Pi), 1e-16)
	kc := math.Hypot(1, wLag)
	lag, err := tf.MustNew([]float64{1}, []float64{1, 1}).WithDelay(1)
	if err != nil {
		t.Fatal(err)
	}
	v, err := Gain(lag)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Solve(v, spec.Requirements{spec.MinPhaseMarginDeg(30)}, &Settings{Range: Range{Min: 0, Max: 10}})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Stable) != 1 || res.Stable[0].Lo != 0 || math.Abs(res.Stable[0].Hi-kc) > 1e-12*kc {
		t.Fatalf("stable gains %v, want (0, %.17g)", res.Stable, kc)
	}
	if !strings.Contains(res.StableNote, "exact") || !strings.Contains(res.Stable[0].HiBinding, "stability boundary") {
		t.Errorf("note %q, binding %q", res.StableNote, res.Stable[0].HiBinding)
	}

	fPI := func(w float64) float64 { return w*math.Sin(w) - 1 }
	wPI := rootfind.Brent(fPI, 0.5, 1.5, fPI(0.5), fPI(1.5), 1e-16)
	kiC := wPI / math.Tan(wPI)
	pv, err := ParameterText("Ki", "(s + Ki)/s * exp(-s)/s")
	if err != nil {
		t.Fatal(err)
	}
	res, err = Solve(pv, spec.Requirements{spec.MinPhaseMarginDeg(20)}, &Settings{Range: Range{Min: 0.01, Max: 2}})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Stable) != 1 || res.Stable[0].Lo != 0.01 || math.Abs(res.Stable[0].Hi-kiC) > 1e-12*kiC {
		t.Fatalf("stable Ki %v, want (0.01, %.17g)", res.Stable, kiC)
	}
	if !strings.Contains(res.StableNote, "exact") {
		t.Errorf("note %q", res.StableNote)
	}
	// Every all-met value is stable: its phase margin holds at the
	// midpoint, judged by spec with the dead time exact.
	for _, iv := range res.AllMet {
		if iv.Hi > res.Stable[0].Hi {
			t.Errorf("all-met interval %v beyond the stable limit %v", iv, res.Stable[0].Hi)
		}
	}
}

// TestDampingSetDeadTime: with dead time the damping-ratio set is that of
// spec's dominant exact roots: at every end inside the range the smallest
// dominant damping ratio equals the limit (1e-9 relative, or the end is a
// jump of the dominant set, where the verdict changes across it), and the
// verdict holds just inside and fails just outside.
func TestDampingSetDeadTime(t *testing.T) {
	loop, err := tf.MustNew([]float64{1}, []float64{1, 1, 0}).WithDelay(0.2) // k·e^(−0.2s)/(s(s+1))
	if err != nil {
		t.Fatal(err)
	}
	v, err := Gain(loop)
	if err != nil {
		t.Fatal(err)
	}
	const zeta = 0.5
	req := spec.Requirements{spec.MinDampingRatio(zeta)}
	res, err := Solve(v, req, &Settings{Range: Range{Min: 0.01, Max: 3}})
	if err != nil {
		t.Fatal(err)
	}
	ivs := res.Requirements[0].Intervals
	t.Logf("stable %v; damping ≥ %v: %v (%s)", res.Stable, zeta, ivs, res.Requirements[0].Method)
	if len(ivs) == 0 {
		t.Fatalf("no damping interval; stable %v", res.Stable)
	}
	holds := func(k float64) bool {
		l, err := v.LoopAt(k)
		if err != nil {
			t.Fatal(err)
		}
		return spec.Check(l, req).Passed()
	}
	for _, iv := range ivs {
		for _, end := range []float64{iv.Lo, iv.Hi} {
			if end == 0.01 || end == 3 {
				continue
			}
			in, out := end*(1+1e-7), end*(1-1e-7)
			if end == iv.Hi {
				in, out = out, in
			}
			if !holds(in) || holds(out) {
				t.Errorf("end %.12g of %v: holds inside %v, outside %v", end, iv, holds(in), holds(out))
			}
		}
	}
}

// TestPartsRequirementNotDesigned: a requirement measured on the loop's
// parts is not designed (no set, named in Binding) and does not empty the
// all-met set of the others.
func TestPartsRequirementNotDesigned(t *testing.T) {
	v, err := Gain(tf.MustNew([]float64{1}, []float64{1, 3, 2, 0})) // k/(s(s+1)(s+2)), stable for k < 6
	if err != nil {
		t.Fatal(err)
	}
	res, err := Solve(v, spec.Requirements{spec.MaxDisturbancePeak(2), spec.MinGainMarginDB(6)}, &Settings{Range: Range{Min: 0.1, Max: 10}})
	if err != nil {
		t.Fatal(err)
	}
	if rs := res.Requirements[0]; rs.Intervals != nil || rs.Method != notDesigned || !strings.Contains(res.Binding, "not designed: max_disturbance_peak") {
		t.Errorf("parts requirement: %+v, binding %q", rs, res.Binding)
	}
	// Gain margin ≥ 6 dB: k ≤ 6/10^(6/20) = 3.0072 (closed form: the
	// critical gain is 6 at ω = √2).
	want := 6 / math.Pow(10, 6.0/20)
	if len(res.AllMet) != 1 || math.Abs(res.AllMet[0].Hi-want) > 1e-9*want || res.Requirements[1].Key != "min_gain_margin_db" {
		t.Errorf("all met %v, want (0.1, %.12g]", res.AllMet, want)
	}
	if _, err := Solve(v, spec.Requirements{spec.MaxControlPeak(5)}, nil); err != nil {
		t.Errorf("only a parts requirement: %v", err)
	}
}
