package design

import (
	"math"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// TestExtremumValue checks the one-evaluation extremum of extremumValue
// against safeguarded Newton iteration on the exact y′ to extremumTol
// followed by an exact evaluation of y (the construction it replaces), at
// every extremum of the grids of the benchmark loops over a range of
// gains. Tolerance 1e-12 of the largest |y| on the grid: the quadratic
// model's error is of the third order in a Newton step of at most 1e-3 of
// the cell (below 1e-13), and the exact evaluations themselves carry
// rounding of about 1e-13.
func TestExtremumValue(t *testing.T) {
	for _, c := range ratioLoops {
		_, p := gainProblem(t, tf.MustParse(c.loop), nil)
		n := 0
		for _, x := range []float64{5, 15, 30, 45, 60, 70} {
			cl, g, ok := p.gridAt(x)
			if !ok {
				t.Fatalf("%s: no grid at %v", c.name, x)
			}
			scale := 0.0
			for _, y := range g.y {
				scale = math.Max(scale, math.Abs(y))
			}
			for k := 0; k+1 < len(g.y); k++ {
				if (g.dy[k] > 0) == (g.dy[k+1] > 0) {
					continue
				}
				got := cl.extremumValue(g, k)
				te := newtonRoot(func(t float64) (float64, float64) { _, d, dd := cl.between2(g, k, t); return d, dd }, g.t[k], g.t[k+1], g.dy[k], g.dy[k+1], extremumTol)
				want, _ := cl.between(g, k, te)
				if !(math.Abs(got-want) <= 1e-12*scale) {
					t.Errorf("%s, k = %v, cell %d: extremum %.17g, Newton %.17g", c.name, x, k, got, want)
				}
				n++
			}
		}
		if n < 20 {
			t.Errorf("%s: only %d extrema checked", c.name, n)
		}
	}
}
