package robust

import (
	"math"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/spec"
)

// TestWorstDampingDeadTime: with dead time the worst damping ratio is that
// of the dominant exact roots (spec.DominantClosedLoopRoots), not of a Padé
// approximation's poles: the worst value equals spec's smallest dominant
// damping ratio at the reported point, and no corner of the box is worse.
// For k·e^(−0.2s)/(s(s+1)) with k ≤ 0.3 the dominant roots are real or
// well damped (without the delay, s² + s + k has ζ = 1/(2√k) ≥ 0.91), while
// the Padé(8) approximant's own poles bring damping ratios down to 0.41: a
// worst case judged on them would be an artefact.
func TestWorstDampingDeadTime(t *testing.T) {
	l := mustLoop(t, Description{Expressions: []string{"k*exp(-0.2*s)/(s*(s+1))"},
		Params: []Param{{Name: "k", Min: 0.1, Max: 0.3}}})
	ws, _, err := WorstCases(l, &WorstSettings{Points: 8})
	if err != nil {
		t.Fatal(err)
	}
	zetaAt := func(v []float64) float64 {
		g, err := l.At(v)
		if err != nil {
			t.Fatal(err)
		}
		d, err := spec.DominantClosedLoopRoots(g, nil)
		if err != nil {
			t.Fatal(err)
		}
		z := math.Inf(1)
		for _, s := range d.Roots {
			z = math.Min(z, spec.DampingRatio(s, 0))
		}
		return z
	}
	for _, w := range ws {
		if w.Quantity != DampingRatio {
			continue
		}
		if got := zetaAt(w.At); math.Abs(got-w.Value) > 1e-12 {
			t.Errorf("worst damping %.15g at %v, spec's dominant damping there %.15g", w.Value, w.At, got)
		}
		for _, k := range []float64{0.1, 0.3} {
			if z := zetaAt([]float64{k}); z < w.Value-1e-12 {
				t.Errorf("corner k = %v has damping %.15g below the worst %.15g", k, z, w.Value)
			}
		}
		if w.Value < 0.85 {
			t.Errorf("worst damping %.15g: below the dominant roots' range", w.Value)
		}
		return
	}
	t.Fatal("no damping worst case")
}

// TestPartsRequirementUndecided: a requirement measured on the loop's parts
// (here the load-disturbance peak) cannot be judged on an uncertain loop
// given as one transfer function: undecided with that reason, never
// "violated at a point" for want of the parts.
func TestPartsRequirementUndecided(t *testing.T) {
	l := mustLoop(t, Description{Expressions: []string{"k*(s+1)/(s*(s+2))"},
		Params: []Param{{Name: "k", Min: 1, Max: 2}}})
	res, err := CheckRequirements(l, spec.Requirements{spec.MaxDisturbancePeak(2), spec.MinPhaseMarginDeg(30)}, nil, &WorstSettings{Points: 4})
	if err != nil {
		t.Fatal(err)
	}
	if res[0].Verdict != RequirementUndecided || !strings.Contains(res[0].Message, "plant and the controller apart") {
		t.Errorf("disturbance peak: %v, %q; want undecided naming the parts", res[0].Verdict, res[0].Message)
	}
	if res[1].Verdict != MetForBox {
		t.Errorf("phase margin: %v, %q; want met for the whole box", res[1].Verdict, res[1].Message)
	}
}
