package robust

import (
	"math"
	"testing"
)

// FuzzLoop feeds arbitrary expressions and ranges to NewLoop and, when it
// accepts them, to Stability with a small cell limit: errors are fine,
// panics and verdicts that contradict a sampled point are not.
func FuzzLoop(f *testing.F) {
	f.Add("k/(s*(s+1))", 0.5, 2.0)
	f.Add("9*k/(s^2 (0.05 s + 1))", 0.8, 1.2)
	f.Add("k*exp(-0.3*s)/(s+1)", 0.1, 3.0)
	f.Add("(s+k)/(s^3 + k*s^2 + 2*s)", -1.0, 1.0)
	f.Add("k^3/(s+k^2)", -2.0, 2.0)
	f.Add("1/(k*s^2+s+1)", -0.1, 0.1)
	f.Fuzz(func(t *testing.T, text string, lo, hi float64) {
		// Large gains with long dead times make margins.Compute count
		// thousands of crossovers per point (seconds each): out of scope.
		if len(text) > 80 || math.Abs(lo) > 10 || math.Abs(hi) > 10 {
			return
		}
		l, err := NewLoop(Description{Expressions: []string{text}, Params: []Param{{Name: "k", Min: lo, Max: hi}}})
		if err != nil {
			return
		}
		r, err := Stability(l, &Settings{MaxCells: 2000, Probes: 8})
		if err != nil {
			return
		}
		if r.Verdict == StableForBox {
			for _, x := range []float64{-1, -0.5, 0, 0.5, 1} {
				if ok, _, err := l.pointStability([]float64{x}); err == nil && !ok {
					t.Fatalf("%q on [%g, %g]: proven stable, unstable at t = %g", text, lo, hi, x)
				}
			}
		}
		if r.Verdict == UnstableAtPoint && (r.Counterexample == nil || math.IsNaN(r.Counterexample.Values[0])) {
			t.Fatal("counterexample missing")
		}
	})
}
