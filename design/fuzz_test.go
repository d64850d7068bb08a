package design

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// checkMarginEnds solves PM, GM and Ms requirements for the gain of the
// loop with poles and zeros from the inputs and checks that at every end
// labelled with the requirement's own equation margins.Compute (through
// spec) measures the limit to 1e-7 relative, and that the verdict flips
// there. It reports false when the inputs make no usable loop.
func checkMarginEnds(t *testing.T, p1, p2, p3, z1 float64) bool {
	for _, x := range []float64{p1, p2, p3, z1} {
		if math.IsNaN(x) || math.Abs(x) > 100 || math.Abs(x) < 1e-2 {
			return false
		}
	}
	den, err := poly.FromRoots([]complex128{complex(-math.Abs(p1), 0), complex(-math.Abs(p2), 0), complex(-math.Abs(p3), 0), 0})
	if err != nil {
		return false
	}
	num := poly.MustNew(1, math.Abs(z1))
	l, err := tf.FromPolys(num, den, 0)
	if err != nil {
		return false
	}
	v, _ := Gain(l)
	req := spec.Requirements{spec.MinPhaseMarginDeg(40), spec.MinGainMarginDB(8), spec.MaxPeakSensitivity(1.5)}
	res, err := Solve(v, req, nil)
	if err != nil {
		t.Errorf("loop %s: %v", l, err)
		return true
	}
	for _, rs := range res.Requirements {
		for _, iv := range rs.Intervals {
			for j, x := range []float64{iv.Lo, iv.Hi} {
				label := []string{iv.LoBinding, iv.HiBinding}[j]
				if math.IsInf(x, 0) || label == "end of the range" || len(label) > 9 && label[:9] == "stability" {
					continue
				}
				lx, _ := v.LoopAt(x)
				r := spec.Check(lx, spec.Requirements{rs.Requirement}).Results[0]
				if math.Abs(r.Value-r.Limit) > 1e-7*math.Abs(r.Limit) {
					t.Errorf("loop %s, %s: at k = %.17g (%s) the value is %.12g", l, rs.Name, x, label, r.Value)
				}
			}
		}
	}
	return true
}

// TestRandomMarginEnds runs checkMarginEnds on a seeded family of loops
// 1·(s + z)/(s(s + p₁)(s + p₂)(s + p₃)).
func TestRandomMarginEnds(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 7))
	lg := func() float64 { return math.Pow(10, -1+2.5*rng.Float64()) }
	n := 60
	if testing.Short() {
		n = 15
	}
	for range n {
		checkMarginEnds(t, lg(), lg(), lg(), lg())
	}
}

// FuzzMarginEnds is the same check on fuzzed poles and zero.
func FuzzMarginEnds(f *testing.F) {
	f.Add(1.0, 2.0, 10.0, 0.5)
	f.Add(0.1, 0.1, 30.0, 3.0)
	f.Fuzz(func(t *testing.T, p1, p2, p3, z1 float64) { checkMarginEnds(t, p1, p2, p3, z1) })
}
