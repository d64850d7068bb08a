package margins

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// TestNegligibleDelayBoundedWork: L = e^(−sτ)/(s+1)^30 with τ = 1e-300 s
// ran out of memory building the peak grid (|L| at the grid end overflowed
// to NaN and the end doubled to +Inf). The margins must be those of the
// loop without delay, from closed forms (hand derivation): each pole
// contributes a phase of −arctan ω, so the phase crossover lies at
// 30·arctan ω = π, ω = tan(π/30), where |L| = cos(π/30)^30 and the gain
// margin is sec(π/30)^30.
func TestNegligibleDelayBoundedWork(t *testing.T) {
	ref, err := Compute(tf.MustParse("1/(s+1)^30"), nil)
	if err != nil {
		t.Fatal(err)
	}
	wantW := math.Tan(math.Pi / 30)
	wantGM := math.Pow(1/math.Cos(math.Pi/30), 30)
	// τ = 1e-300 s is left out (ω·τ ≤ 2⁻⁵⁶); τ = 1e-12 s is kept and
	// analysed on the grid, whose end (|L| ≤ 1e-3) lies where (s+1)^30
	// overflows float64. At the phase crossover the delay shifts the phase
	// by ωτ ≈ 1e-13 rad, the gain margin by a relative 1e-14.
	for _, tau := range []float64{1e-300, 1e-12} {
		g, err := tf.MustParse("1/(s+1)^30").WithDelay(tau)
		if err != nil {
			t.Fatal(err)
		}
		res, err := Compute(g, nil)
		if err != nil {
			t.Fatalf("τ = %v: %v", tau, err)
		}
		if !closeRel(res.PhaseCrossoverRadPerSec, wantW, 1e-12) || !closeRel(res.GainMargin, wantGM, 1e-12) {
			t.Errorf("τ = %v: phase crossover %v rad/s, gain margin %v; want %v, %v", tau, res.PhaseCrossoverRadPerSec, res.GainMargin, wantW, wantGM)
		}
		if !res.ClosedLoopStable {
			t.Errorf("τ = %v: closed loop unstable; want stable (gain margin %v > 1)", tau, wantGM)
		}
		// The peaks agree with the loop without delay (exact, rational
		// method) to the grid method's accuracy (golden-section
		// refinement, 1e-9).
		if !closeRel(res.PeakSensitivity, ref.PeakSensitivity, 1e-9) || !closeRel(res.PeakComplementarySensitivity, ref.PeakComplementarySensitivity, 1e-9) {
			t.Errorf("τ = %v: Ms, Mt = %v, %v; want %v, %v as without delay", tau, res.PeakSensitivity, res.PeakComplementarySensitivity, ref.PeakSensitivity, ref.PeakComplementarySensitivity)
		}
	}
}

// TestDelayPeaksGridBounded: a loop whose sensitivity grid would need
// billions of points (|L| = 1e4/ω falls to 1e-3 only at 1e7 rad/s, sampled
// every π/(16τ) with τ = 0.3 s) is refused with ErrUnsupported naming the
// dead time, and SkipPeaks still gives its margins.
func TestDelayPeaksGridBounded(t *testing.T) {
	g, err := tf.MustParse("1e4/s").WithDelay(0.3)
	if err != nil {
		t.Fatal(err)
	}
	_, err = Compute(g, &Settings{OmegaMaxRadPerSec: 2e4})
	if !errors.Is(err, ErrUnsupported) || !strings.Contains(err.Error(), "0.3 s") {
		t.Fatalf("err = %v; want ErrUnsupported naming the dead time 0.3 s", err)
	}
	res, err := Compute(g, &Settings{OmegaMaxRadPerSec: 2e4, SkipPeaks: true})
	if err != nil {
		t.Fatal(err)
	}
	// Closed form: |L| = 1e4/ω = 1 at ω = 1e4 rad/s.
	if !closeRel(res.GainCrossoverRadPerSec, 1e4, 1e-12) {
		t.Errorf("gain crossover %v; want 1e4 rad/s", res.GainCrossoverRadPerSec)
	}
}

// TestDiscreteDelayCapped: a discrete loop with dead time 1e20 s at
// T = 0.1 s (1e21 samples) panicked with "poly: negative shift" (the sample
// count overflowed int); it must be refused with ErrUnsupported naming the
// dead time, as must anything above MaxDelaySamples.
func TestDiscreteDelayCapped(t *testing.T) {
	base, err := tf.ParseDiscrete("0.5/(z-0.5)", 0.1)
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range []float64{1e20, 0.1 * (MaxDelaySamples + 1), 1e300} {
		g, err := base.WithDelay(d)
		if err != nil {
			t.Fatal(err)
		}
		_, err = Compute(g, nil)
		if !errors.Is(err, ErrUnsupported) || !strings.Contains(err.Error(), "dead time") {
			t.Errorf("delay %v s: err = %v; want ErrUnsupported naming the dead time", d, err)
		}
	}
}

// TestDegree500Margins: the report's margins section on 1/(s+1)^500 was a
// recovered panic (index out of range [-1] in the real-root isolation,
// whose shifted polynomial overflowed). Closed form as for order 30: the
// phase crossover at ω = tan(π/500), gain margin sec(π/500)^500; |L| < 1
// for every ω > 0, so there is no gain crossover.
func TestDegree500Margins(t *testing.T) {
	if testing.Short() {
		t.Skip("degree-500 root solves take seconds")
	}
	res, err := Compute(tf.MustParse("1/(s+1)^500"), nil)
	if err != nil {
		t.Fatal(err)
	}
	wantW := math.Tan(math.Pi / 500)
	wantGM := math.Pow(1/math.Cos(math.Pi/500), 500)
	// The roots of (s+1)^500 in double precision spread over a disc of
	// radius about 1 (a 500-fold cluster), but the margins come from
	// |L(jω)| and ∠L(jω) evaluated directly: 1e-9 relative.
	if !closeRel(res.PhaseCrossoverRadPerSec, wantW, 1e-9) || !closeRel(res.GainMargin, wantGM, 1e-9) {
		t.Errorf("phase crossover %v rad/s, gain margin %v; want %v, %v", res.PhaseCrossoverRadPerSec, res.GainMargin, wantW, wantGM)
	}
	if len(res.GainCrossovers) != 0 {
		t.Errorf("gain crossovers %v; want none", res.GainCrossovers)
	}
}
