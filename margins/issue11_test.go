package margins

import (
	"encoding/json"
	"errors"
	"github.com/loopwise/loopwise/internal/testutil"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// issue11Refs holds testdata/issue11.json, written by
// testdata/gen_issue11.py (mpmath, 50 digits, closed forms in the script).
type issue11Refs struct {
	AxisZeroDelay struct {
		GainCrossovers []struct {
			W     string `json:"w"`
			PMDeg string `json:"pm_deg"`
		} `json:"gain_crossovers"`
		PhaseCrossovers []struct {
			W          string `json:"w"`
			GainFactor string `json:"gain_factor"`
		} `json:"phase_crossovers"`
		DelayMarginSec string `json:"delay_margin_sec"`
	} `json:"axis_zero_delay"`
	MatchedTripleIntegrator struct {
		W     string `json:"gain_crossover_w"`
		PMDeg string `json:"phase_margin_deg"`
	} `json:"matched_triple_integrator"`
	HugeGain struct {
		W              string `json:"gain_crossover_w"`
		PMDeg          string `json:"phase_margin_deg"`
		DelayMarginSec string `json:"delay_margin_sec"`
		Bandwidth      string `json:"bandwidth"`
	} `json:"huge_gain"`
	TimeScale struct {
		Ms, MsW, Mt, Bandwidth string
	} `json:"time_scale_1e10"`
	SlowPole struct {
		Bandwidth string `json:"bandwidth"`
	} `json:"slow_pole_1e308"`
}

func loadIssue11(t *testing.T) issue11Refs {
	t.Helper()
	b, err := os.ReadFile("testdata/issue11.json")
	if err != nil {
		t.Fatal(err)
	}
	var r issue11Refs
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	// Field names without tags follow the JSON keys in lower case.
	var raw map[string]map[string]any
	if err := json.Unmarshal(b, &raw); err != nil {
		t.Fatal(err)
	}
	ts := raw["time_scale_1e10"]
	r.TimeScale.Ms, r.TimeScale.MsW = ts["ms"].(string), ts["ms_w"].(string)
	r.TimeScale.Mt, r.TimeScale.Bandwidth = ts["mt"].(string), ts["bandwidth"].(string)
	return r
}

// f parses a reference value.
func f(t *testing.T, s string) float64 { return testutil.ParseFloat(t, s) }

func checkRel(t *testing.T, what string, got, want, tol float64) {
	t.Helper()
	if !closeRel(got, want, tol) {
		t.Errorf("%s = %.17g, want %.17g (tolerance %g relative)", what, got, want, tol)
	}
}

// TestExtremeScales is the regression test of issue 11 item 4: loops whose
// gain or time scale is near the limits of float64 were reported as
// all-pass loops with no margins. Reference values: closed forms in
// testdata/gen_issue11.py. Tolerance 1e-14 relative: each value is a
// polished crossover or a closed-loop quantity of a first- or second-order
// loop, a few roundings from the exact answer.
func TestExtremeScales(t *testing.T) {
	ref := loadIssue11(t)
	res, err := Compute(tf.MustParse("1e300/(s+1)"), nil)
	if err != nil {
		t.Fatalf("1e300/(s+1): %v", err)
	}
	checkRel(t, "1e300/(s+1) gain crossover", res.GainCrossoverRadPerSec, f(t, ref.HugeGain.W), 1e-14)
	checkRel(t, "1e300/(s+1) phase margin", res.PhaseMarginDeg, f(t, ref.HugeGain.PMDeg), 1e-14)
	checkRel(t, "1e300/(s+1) delay margin", res.DelayMarginSec, f(t, ref.HugeGain.DelayMarginSec), 1e-14)
	checkRel(t, "1e300/(s+1) bandwidth", res.BandwidthRadPerSec, f(t, ref.HugeGain.Bandwidth), 1e-14)
	if !math.IsInf(res.GainMargin, 1) || !res.ClosedLoopStable {
		t.Errorf("1e300/(s+1): gain margin %v, stable %v; want +Inf, true", res.GainMargin, res.ClosedLoopStable)
	}

	res, err = Compute(tf.MustParse("1e20/((s+1e10)^2)"), nil)
	if err != nil {
		t.Fatalf("1e20/(s+1e10)²: %v", err)
	}
	if len(res.GainCrossovers) != 0 || !math.IsNaN(res.PhaseMarginDeg) || !math.IsInf(res.GainMargin, 1) || !math.IsInf(res.DelayMarginSec, 1) || !res.ClosedLoopStable {
		t.Errorf("1e20/(s+1e10)²: %+v; want no gain crossover (|L| < 1 for ω > 0), infinite gain and delay margins, stable", res)
	}
	checkRel(t, "1e20/(s+1e10)² Ms", res.PeakSensitivity, f(t, ref.TimeScale.Ms), 1e-14)
	// The frequency of a smooth maximum is good to about √eps (documented).
	checkRel(t, "1e20/(s+1e10)² Ms frequency", res.PeakSensitivityRadPerSec, f(t, ref.TimeScale.MsW), 1e-7)
	checkRel(t, "1e20/(s+1e10)² Mt", res.PeakComplementarySensitivity, f(t, ref.TimeScale.Mt), 1e-14)
	checkRel(t, "1e20/(s+1e10)² bandwidth", res.BandwidthRadPerSec, f(t, ref.TimeScale.Bandwidth), 1e-14)

	res, err = Compute(tf.MustParse("1/(1e308s+1)"), nil)
	if err != nil {
		t.Fatalf("1/(1e308s+1): %v", err)
	}
	if len(res.GainCrossovers) != 0 || !math.IsInf(res.GainMargin, 1) || !res.ClosedLoopStable {
		t.Errorf("1/(1e308s+1): %+v; want no gain crossover, infinite gain margin, stable", res)
	}
	checkRel(t, "1/(1e308s+1) bandwidth", res.BandwidthRadPerSec, f(t, ref.SlowPole.Bandwidth), 1e-14)

	// A true all-pass loop is still recognised, at any scale; half of it
	// is an ordinary loop without gain crossover.
	for _, text := range []string{"(s-1)(s-2)/((s+1)(s+2))", "(1e-200s-1)/(1e-200s+1)", "(s-1e150)/(s+1e150)"} {
		if _, err := Compute(tf.MustParse(text), nil); !errors.Is(err, ErrDegenerate) {
			t.Errorf("%s: error %v, want ErrDegenerate (all-pass)", text, err)
		}
	}
	res, err = Compute(tf.MustParse("0.5(s-1)(s-2)/((s+1)(s+2))"), nil)
	if err != nil || len(res.GainCrossovers) != 0 {
		t.Errorf("0.5·(s−1)(s−2)/((s+1)(s+2)): %+v, %v; want no gain crossover", res.GainCrossovers, err)
	}
}

// TestPhaseCrossoverNeedsNonZeroGain is the regression test of issue 11
// item 5: 1/s³ sampled by the matched pole–zero map (T = 0.1 s) has its
// three zeros at z = −1, where L = 0; a gain margin of about 2^68 was
// reported there. On the unit circle L = j·(T³/8)·cot³(θ/2) is purely
// imaginary (testdata/gen_issue11.py): no phase crossover at all, and the
// gain crossover has a phase margin of −90°. Tolerance 1e-12 relative: the
// expanded triple pole (z − 1)³ loses three digits to cancellation at
// |z − 1| = 0.1 (terms of size 8, value 1e-3).
func TestPhaseCrossoverNeedsNonZeroGain(t *testing.T) {
	ref := loadIssue11(t)
	d, err := tf.MustParse("1/s^3").Discretize(0.1, tf.MatchedPoleZero, nil)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Compute(d, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(res.PhaseCrossovers) != 0 || !math.IsInf(res.GainMargin, 1) {
		t.Errorf("phase crossovers %+v, gain margin %v; want none and +Inf", res.PhaseCrossovers, res.GainMargin)
	}
	checkRel(t, "gain crossover", res.GainCrossoverRadPerSec, f(t, ref.MatchedTripleIntegrator.W), 1e-12)
	checkRel(t, "phase margin", res.PhaseMarginDeg, f(t, ref.MatchedTripleIntegrator.PMDeg), 1e-12)
}

// TestDeadTimeWithAxisZero is the regression test of issue 11 item 14:
// loops with dead time and a zero on the imaginary axis were refused. The
// reference for 10s·e^(−0.1s)/((s+1)(s+2)) is the closed form of
// testdata/gen_issue11.py (crossovers from ω⁴ − 95ω² + 4 = 0 and the
// strictly decreasing phase π/2 − atan ω − atan(ω/2) − 0.1ω). Tolerance
// 1e-13 relative: polished crossovers of a well-conditioned loop.
func TestDeadTimeWithAxisZero(t *testing.T) {
	ref := loadIssue11(t).AxisZeroDelay
	g, err := tf.MustParse("10s/((s+1)(s+2))").WithDelay(0.1)
	if err != nil {
		t.Fatal(err)
	}
	res, err := Compute(g, &Settings{OmegaMaxRadPerSec: 100})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.GainCrossovers) != len(ref.GainCrossovers) || len(res.PhaseCrossovers) != len(ref.PhaseCrossovers) {
		t.Fatalf("crossovers %+v and %+v, want %d and %d", res.GainCrossovers, res.PhaseCrossovers, len(ref.GainCrossovers), len(ref.PhaseCrossovers))
	}
	for i, c := range ref.GainCrossovers {
		checkRel(t, "gain crossover", res.GainCrossovers[i].FrequencyRadPerSec, f(t, c.W), 1e-13)
		checkRel(t, "phase margin", res.GainCrossovers[i].PhaseMarginDeg, f(t, c.PMDeg), 1e-13)
	}
	for i, c := range ref.PhaseCrossovers {
		checkRel(t, "phase crossover", res.PhaseCrossovers[i].FrequencyRadPerSec, f(t, c.W), 1e-13)
		checkRel(t, "gain factor", res.PhaseCrossovers[i].GainFactor, f(t, c.GainFactor), 1e-13)
	}
	checkRel(t, "delay margin", res.DelayMarginSec, f(t, ref.DelayMarginSec), 1e-13)
	// Closed-loop verdict against the roots of the 10th-order Padé closed
	// loop (the delay's phase is matched far beyond the crossovers).
	pade, err := g.Pade(10)
	if err != nil {
		t.Fatal(err)
	}
	z := 0
	for _, r := range closedLoopRoots(t, pade) {
		if real(r) >= 0 {
			z++
		}
	}
	if res.ClosedLoopUnstablePoles != z || z != 0 {
		t.Errorf("Z = %d, Padé closed loop gives %d (stable expected)", res.ClosedLoopUnstablePoles, z)
	}
}

// TestDeadTimeAxisZerosAgainstPade checks the Nyquist count of random
// loops with dead time and zeros on the imaginary axis (at the origin, or a
// pair ±jb) against the closed-loop roots of their 10th-order Padé
// approximation (fixed seed; loops whose crossovers reach ωτ > 3, where the
// approximation is poor, or whose Padé roots lie within 1e-3 of the axis,
// are skipped).
func TestDeadTimeAxisZerosAgainstPade(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 14))
	checked, unstable := 0, 0
	for range 300 {
		g := randomLoop(r, 2+r.IntN(4))
		zeros := []complex128{0}
		if r.IntN(2) == 0 {
			b := 0.2 + 2*r.Float64()
			zeros = []complex128{complex(0, b), complex(0, -b)}
		}
		if g.Num().Degree()+len(zeros) >= g.Den().Degree() {
			continue
		}
		if zeros[0] == 0 && g.Den().Coef(0) == 0 {
			// A zero and an integrator at the origin would cancel.
			continue
		}
		zp, err := tf.FromZerosPolesGain(zeros, nil, 1)
		if err != nil {
			t.Fatal(err)
		}
		h, err := g.Series(zp)
		if err != nil {
			t.Fatal(err)
		}
		tau := 0.01 + 0.5*r.Float64()
		if h, err = h.WithDelay(tau); err != nil {
			t.Fatal(err)
		}
		res, want, skip := padeCheck(t, h, tau)
		if skip {
			continue
		}
		if res.ClosedLoopUnstablePoles != want {
			t.Errorf("%v: Nyquist Z = %d, Padé closed loop gives %d", h, res.ClosedLoopUnstablePoles, want)
		}
		for _, c := range res.PhaseCrossovers {
			if !(c.GainFactor > 0) || math.IsInf(c.GainFactor, 0) {
				t.Errorf("%v: phase crossover %+v at a zero of L", h, c)
			}
		}
		checked++
		if want > 0 {
			unstable++
		}
	}
	if checked < 60 || unstable == 0 || unstable == checked {
		t.Errorf("only %d loops checked (%d unstable)", checked, unstable)
	}
	t.Logf("%d loops checked, %d unstable", checked, unstable)
}

// padeCheck computes the margins of a loop with dead time tau and the
// number of right-half-plane closed-loop poles of its 10th-order Padé
// approximation; skip is set when the comparison is not meaningful (an
// error, already reported; crossovers beyond ωτ = 3 where the
// approximation is poor; a Padé root within 1e-3 of the axis).
func padeCheck(t *testing.T, h tf.TF, tau float64) (res Result, want int, skip bool) {
	t.Helper()
	res, err := Compute(h, &Settings{SkipPeaks: true})
	if err != nil {
		t.Errorf("%v: %v", h, err)
		return res, 0, true
	}
	if n := len(res.GainCrossovers); n > 0 && res.GainCrossovers[n-1].FrequencyRadPerSec*tau > 3 {
		return res, 0, true
	}
	pade, err := h.Pade(10)
	if err != nil {
		t.Fatal(err)
	}
	for _, z := range closedLoopRoots(t, pade) {
		if real(z) >= 0 {
			want++
		}
		if math.Abs(real(z)) < 1e-3*math.Max(1, cmplx.Abs(z)) {
			return res, want, true
		}
	}
	return res, want, false
}
