package crosscheck

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"github.com/loopwise/loopwise/internal/refcases"
	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// relTol is the agreement required between the two packages. Both compute
// the ends of the stable gain interval as roots of polynomials polished to
// a few ulps (locus from the imaginary-axis crossings of a + k·b, margins
// from the phase crossovers of L); 1e-9 relative leaves room for the
// conditioning of the crossing frequency of the loops below, whose
// coefficients span at most six decades.
const relTol = 1e-9

// checkAgreement analyses loop with locus, and at a gain inside each stable
// interval with margins, and reports every disagreement.
func checkAgreement(t *testing.T, name string, loop tf.TF) int {
	t.Helper()
	an, err := locus.Analyze(loop, nil)
	if err != nil {
		t.Errorf("%s: locus.Analyze: %v", name, err)
		return 0
	}
	checked := 0
	for _, iv := range an.StableIntervals {
		k := sampleInside(iv)
		scaled, err := loop.Scale(k)
		if err != nil {
			t.Fatal(err)
		}
		m, err := margins.Compute(scaled, nil)
		if err != nil {
			t.Errorf("%s at k = %g: margins.Compute: %v", name, k, err)
			continue
		}
		if !m.ClosedLoopStable {
			t.Errorf("%s at k = %g: margins says unstable, locus says stable on (%g, %g)", name, k, iv.Lo, iv.Hi)
		}
		// Upper end: hi = k·GainMargin, or both infinite.
		wantHi := iv.Hi
		gotHi := k * m.GainMargin
		if !agree(gotHi, wantHi) {
			t.Errorf("%s at k = %g: k·gain margin = %.17g, stable interval ends at %.17g", name, k, gotHi, wantHi)
		}
		// Lower end: lo = k·LowerGainMargin; an interval that starts at the
		// range end k = 0 has no lower gain margin (NaN).
		if iv.Lo == 0 {
			if !math.IsNaN(m.LowerGainMargin) && !agree(k*m.LowerGainMargin, 0) {
				t.Errorf("%s at k = %g: lower gain margin %g, but the stable interval starts at k = 0", name, k, m.LowerGainMargin)
			}
		} else if gotLo := k * m.LowerGainMargin; !agree(gotLo, iv.Lo) {
			t.Errorf("%s at k = %g: k·lower gain margin = %.17g, stable interval starts at %.17g", name, k, gotLo, iv.Lo)
		}
		checked++
	}
	// Between and beyond the stable intervals the closed loop is unstable.
	for _, k := range unstableSamples(an.StableIntervals) {
		scaled, _ := loop.Scale(k)
		m, err := margins.Compute(scaled, nil)
		if err != nil {
			continue // e.g. a gain where 1 + L is degenerate
		}
		if m.ClosedLoopStable {
			t.Errorf("%s at k = %g: margins says stable, but k is outside the stable intervals %v", name, k, an.StableIntervals)
		}
		checked++
	}
	return checked
}

func agree(got, want float64) bool {
	if math.IsInf(want, 1) {
		return math.IsInf(got, 1)
	}
	return math.Abs(got-want) <= relTol*math.Abs(want)+1e-300
}

// sampleInside returns a gain well inside the open interval iv.
func sampleInside(iv locus.Interval) float64 {
	switch {
	case math.IsInf(iv.Hi, 1):
		return 2*iv.Lo + 1
	default:
		return iv.Lo + 0.37*(iv.Hi-iv.Lo) // not a symmetric point, so no accidental ties
	}
}

// unstableSamples returns gains in (0, ∞) outside every stable interval,
// at a margin of 1 % from their ends.
func unstableSamples(ivs []locus.Interval) []float64 {
	var out []float64
	prev := 0.0
	for _, iv := range ivs {
		if iv.Lo > prev*1.02 && iv.Lo > 0 {
			out = append(out, (prev+iv.Lo)/2)
		}
		prev = iv.Hi
	}
	if !math.IsInf(prev, 1) {
		out = append(out, 1.5*prev+1e-3)
	}
	return out
}

// TestReferenceLoops runs the check on every continuous root-locus
// reference case with K > 0 (../shared/refcases, category A).
func TestReferenceLoops(t *testing.T) {
	cases, err := refcases.ByType("root_locus")
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, c := range cases {
		var q struct {
			GainSign int `json:"gain_sign"`
		}
		if err := c.DecodeQuery(&q); err != nil {
			t.Fatal(err)
		}
		if c.Loop == nil || c.Loop.SampleTime != 0 || q.GainSign < 0 {
			continue
		}
		var num, den []float64
		if c.Param != nil {
			num, den = c.Param.B, c.Param.A
		} else {
			num, den = c.Loop.Num, c.Loop.Den
		}
		loop, err := tf.New(num, den)
		if err != nil {
			t.Fatal(err)
		}
		n += checkAgreement(t, c.ID, loop)
	}
	if n < 10 {
		t.Fatalf("only %d comparisons made", n)
	}
}

// TestSeededLoops runs the check on seeded random loops of order 2 to 8 with
// real and complex poles, some unstable, and up to two zeros.
func TestSeededLoops(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 1))
	n := 0
	for i := range 60 {
		order := 2 + i%7
		poles := randomRoots(rng, order, 0.25)
		zeros := randomRoots(rng, rng.IntN(min(3, order)), 0)
		loop, err := tf.FromZerosPolesGain(zeros, poles, 1)
		if err != nil {
			t.Fatal(err)
		}
		n += checkAgreement(t, fmt.Sprintf("loop %d %v", i, loop), loop)
	}
	if n < 60 {
		t.Fatalf("only %d comparisons made", n)
	}
}

// randomRoots returns n roots (conjugate pairs kept together) with real
// parts in (−10, 0), a fraction unstable of them mirrored into the right
// half plane.
func randomRoots(rng *rand.Rand, n int, unstable float64) []complex128 {
	var r []complex128
	for len(r) < n {
		re := -10 * (0.05 + rng.Float64())
		if rng.Float64() < unstable {
			re = -re / 4
		}
		if n-len(r) >= 2 && rng.Float64() < 0.5 {
			im := 10 * (0.05 + rng.Float64())
			r = append(r, complex(re, im), complex(re, -im))
			continue
		}
		r = append(r, complex(re, 0))
	}
	poly.SortRoots(r)
	return r
}
