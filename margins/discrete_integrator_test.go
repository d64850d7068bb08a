package margins

import (
	"math"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// TestDiscreteIntegratorExpanded: a discrete loop whose integrator pole is
// written in factors, L = 0.1(z + 0.8)/((z − 1)(z − 0.6)), T = 0.1 s. The
// expanded denominator z² − 1.6z + 0.6 sums to −1.1e-16 at z = 1, not 0;
// the pole must still count as a pole on the unit circle, not as a phase
// crossover at ω = 0 with a gain factor of 6e-16 (−304 dB).
//
// Hand derivation (Jury's test for z² + a1·z + a0, Jury 1964): the closed
// loop z² + (0.1k − 1.6)z + (0.6 + 0.08k) is stable for a0 < 1 → k < 5,
// P(1) = 0.18k > 0, P(−1) = 3.2 − 0.02k > 0 → k < 160. At k = 1 the gain
// margin is 5, reached on the unit circle where 2cos θ = 1.6 − 0.5, i.e.
// ω = acos(0.55)/T; the other phase crossover is z = −1 (ω = π/T) with
// factor 160. There is no lower gain margin.
func TestDiscreteIntegratorExpanded(t *testing.T) {
	loop, err := tf.ParseDiscrete("0.1(z+0.8)/((z-1)(z-0.6))", 0.1)
	if err != nil {
		t.Fatal(err)
	}
	r, err := Compute(loop, nil)
	if err != nil {
		t.Fatal(err)
	}
	// 1e-12: crossover frequencies and factors are polished roots; the
	// loop's coefficients are exact to a few ulps.
	const tol = 1e-12
	if len(r.PhaseCrossovers) != 2 {
		t.Fatalf("phase crossovers %+v, want two (ω = acos(0.55)/T and π/T)", r.PhaseCrossovers)
	}
	if w := math.Acos(0.55) / 0.1; math.Abs(r.PhaseCrossovers[0].FrequencyRadPerSec-w) > tol*w {
		t.Errorf("first phase crossover at %v rad/s, want %v", r.PhaseCrossovers[0].FrequencyRadPerSec, w)
	}
	if math.Abs(r.GainMargin-5) > tol*5 || math.Abs(r.PhaseCrossovers[1].GainFactor-160) > tol*160 {
		t.Errorf("gain margin %v and factor at π/T %v, want 5 and 160", r.GainMargin, r.PhaseCrossovers[1].GainFactor)
	}
	if !math.IsNaN(r.LowerGainMargin) || !r.ClosedLoopStable {
		t.Errorf("lower gain margin %v (want NaN), closed loop stable %v (want true)", r.LowerGainMargin, r.ClosedLoopStable)
	}
}
