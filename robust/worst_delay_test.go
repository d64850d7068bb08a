package robust

import (
	"math"
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
