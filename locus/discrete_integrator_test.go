package locus

import (
	"math"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// TestDiscreteIntegratorExpanded: L = 0.1(z + 0.8)/((z − 1)(z − 0.6)),
// T = 0.1 s. The expanded denominator sums to −1.1e-16 at z = 1, not 0; the
// open-loop pole at z = 1 must not be reported as a crossing with a gain of
// 6e-16, nor start the stable interval there.
//
// Hand derivation (Jury 1964, second order): z² + (0.1k − 1.6)z +
// (0.6 + 0.08k) is stable for 0 < k < 5 (a0 < 1; P(1) = 0.18k > 0;
// P(−1) = 3.2 − 0.02k > 0 needs k < 160). The circle is crossed at k = 5
// where 2cos θ = 1.1, and at z = −1 where k = 160.
func TestDiscreteIntegratorExpanded(t *testing.T) {
	loop, err := tf.ParseDiscrete("0.1(z+0.8)/((z-1)(z-0.6))", 0.1)
	if err != nil {
		t.Fatal(err)
	}
	an, err := Analyze(loop, nil)
	if err != nil {
		t.Fatal(err)
	}
	// 1e-12: crossings are polished roots of exactly known polynomials.
	const tol = 1e-12
	if len(an.AxisCrossings) != 2 {
		t.Fatalf("crossings %+v, want two (k = 5 and k = 160)", an.AxisCrossings)
	}
	c0, c1 := an.AxisCrossings[0], an.AxisCrossings[1]
	if w := math.Acos(0.55) / 0.1; math.Abs(c0.FrequencyRadPerSec-w) > tol*w || math.Abs(c0.Value-5) > tol*5 {
		t.Errorf("first crossing %+v, want k = 5 at %v rad/s", c0, w)
	}
	if w := math.Pi / 0.1; math.Abs(c1.FrequencyRadPerSec-w) > tol*w || math.Abs(c1.Value-160) > tol*160 {
		t.Errorf("second crossing %+v, want k = 160 at π/T", c1)
	}
	if len(an.StableIntervals) != 1 || an.StableIntervals[0].Lo != 0 || math.Abs(an.StableIntervals[0].Hi-5) > tol*5 {
		t.Errorf("stable intervals %v, want (0, 5)", an.StableIntervals)
	}
}
