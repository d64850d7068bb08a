package design

import (
	"math"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// allNine returns one requirement of every kind of package spec.
func allNine(pm, gm, ms, zeta, dm, os, tr, ts, ess float64) spec.Requirements {
	return spec.Requirements{spec.MinPhaseMarginDeg(pm), spec.MinGainMarginDB(gm), spec.MaxPeakSensitivity(ms),
		spec.MinDampingRatio(zeta), spec.MinDelayMarginSec(dm), spec.MaxOvershootPct(os), spec.MaxRiseTimeSec(tr),
		spec.MaxSettlingTimeSec(ts), spec.MaxSteadyStateError(ess)}
}

// checkEnds verifies every interval end independently: where the end is a
// solution of the requirement's own boundary equation, the quantity
// measured by spec.CheckWith (margins.Compute, the closed-loop poles,
// response.StepMetrics) equals the limit to tol relative; just inside the
// interval the requirement holds and just outside (unless the outside is
// beyond the range or the quantity jumps there) it fails.
func checkEnds(t *testing.T, v Variable, res Result, tol float64) {
	t.Helper()
	for _, rs := range res.Requirements {
		for _, iv := range rs.Intervals {
			for side, x := range []float64{iv.Lo, iv.Hi} {
				label := iv.LoBinding
				if side == 1 {
					label = iv.HiBinding
				}
				if math.IsInf(x, 0) || label == "end of the range" {
					continue
				}
				l, err := v.LoopAt(x)
				if err != nil {
					t.Fatal(err)
				}
				r := spec.Check(l, spec.Requirements{rs.Requirement}).Results[0]
				if strings.Contains(label, " = ") && !strings.Contains(label, "wraps") {
					if d := math.Abs(r.Value-r.Limit) / math.Max(math.Abs(r.Limit), 1e-300); !(d <= tol) {
						t.Errorf("%s: at the end %s = %.17g (%s) the value is %.17g, limit %g (relative %.2g)", rs.Name, v.Name(), x, label, r.Value, r.Limit, d)
					}
				}
				// Just inside and just outside.
				h := 1e-6 * math.Max(math.Abs(x), 1e-3)
				in, out := x+h, x-h
				if side == 1 {
					in, out = x-h, x+h
				}
				if !iv.Contains(in) {
					continue
				}
				if rs.Method == "bracketing" && strings.HasPrefix(label, "stability boundary") {
					// Right at a stability boundary the step response rings
					// for ever and StepMetrics cannot settle; the set ends
					// there by the samples (see solveGeneric).
					continue
				}
				if li, _ := v.LoopAt(in); !spec.Check(li, spec.Requirements{rs.Requirement}).Passed() {
					t.Errorf("%s: fails just inside the end %s = %.12g (%s)", rs.Name, v.Name(), x, label)
				}
				if out < res.Range.Min || out > res.Range.Max || strings.Contains(label, "jumps") {
					continue
				}
				if lo, err := v.LoopAt(out); err == nil && spec.Check(lo, spec.Requirements{rs.Requirement}).Passed() {
					t.Errorf("%s: holds just outside the end %s = %.12g (%s)", rs.Name, v.Name(), x, label)
				}
			}
		}
	}
}

// TestThirdOrderGain checks the gain design of L = k/(s(s+1)(s+2)) against
// hand derivations: stable for 0 < k < 6 (Routh–Hurwitz on s³ + 3s² + 2s + k:
// 3·2 > k); phase margin 45° where atan ω + atan(ω/2) = 45°, i.e.
// ω² + 3ω − 2 = 0, ω = (√17 − 3)/2, k = ω·√(ω²+1)·√(ω²+4); gain margin
// 6 dB at k = 6/10^(6/20) (phase crossover at √2 rad/s, where |L| = k/6).
func TestThirdOrderGain(t *testing.T) {
	v, err := Gain(tf.MustParse("1/(s*(s+1)*(s+2))"))
	if err != nil {
		t.Fatal(err)
	}
	res, err := Solve(v, allNine(45, 6, 1.6, 0.4, 0.5, 20, 3, 12, 0.1), nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Stable) != 1 || res.Stable[0].Lo != 0 || math.Abs(res.Stable[0].Hi-6) > 1e-14*6 {
		t.Fatalf("stable %v, want (0, 6)", res.Stable)
	}
	w := (math.Sqrt(17) - 3) / 2
	kpm := w * math.Sqrt(w*w+1) * math.Sqrt(w*w+4)
	kgm := 6 / math.Pow(10, 0.3)
	for _, c := range []struct {
		i    int
		want float64
	}{{0, kpm}, {1, kgm}} {
		ivs := res.Requirements[c.i].Intervals
		if len(ivs) != 1 || math.Abs(ivs[0].Hi-c.want) > 1e-12*c.want {
			t.Errorf("%s: %v, want upper end %.15g", res.Requirements[c.i].Name, ivs, c.want)
		}
	}
	if math.IsNaN(res.Suggested) || len(res.AllMet) == 0 {
		t.Fatalf("no suggestion: %s", res.Binding)
	}
	checkEnds(t, v, res, 1e-9)
	// The suggestion meets every requirement.
	l, _ := v.LoopAt(res.Suggested)
	if rep := spec.Check(l, allNine(45, 6, 1.6, 0.4, 0.5, 20, 3, 12, 0.1)); !rep.Passed() {
		t.Errorf("suggested %v fails:\n%s", res.Suggested, rep)
	}
}
