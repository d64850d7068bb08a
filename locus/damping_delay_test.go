package locus

import (
	"math"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// TestDampingCrossingsDeadTime: issue 11 item 9. The ζ = 0.5 crossings of
// K·e^(−0.02s)/(s(s+10)) with the exact dead time, from mpmath
// (testdata/damping_delay.py, 40 digits): ωn = 8.4340958968668374124,
// K = 72.219106038490130402 and ωn = 303.9718249130854384,
// K = 4350.2363946732678559. Every reported point must be Approximate, with
// PadeRelativeError ≤ MaxPadeRelativeError, and within PadeRelativeError
// (relative) of the exact point (Rouché: the approximated equation differs
// from the exact one by that much there). With a Padé order of 2 the far
// point comes from the approximant's own poles and zeros (the
// approximated loop has a crossing beyond 100 rad/s) and must be left out.
func TestDampingCrossingsDeadTime(t *testing.T) {
	g, err := tf.Parse("exp(-0.02s)/(s*(s+10))")
	if err != nil {
		t.Fatal(err)
	}
	exact := [][2]float64{{8.4340958968668374124, 72.219106038490130402}, {303.9718249130854384, 4350.2363946732678559}}
	for _, tc := range []struct {
		order int
		want  int // number of points kept
	}{{6, 2}, {2, 1}} {
		ds, err := DampingCrossings(g, 0.5, &Settings{PadeOrder: tc.order})
		if err != nil {
			t.Fatal(err)
		}
		if len(ds) != tc.want {
			t.Errorf("Padé order %d: %d points, want %d", tc.order, len(ds), tc.want)
		}
		for i, d := range ds {
			if !d.Approximate || !(d.PadeRelativeError <= MaxPadeRelativeError) {
				t.Errorf("order %d point %d: Approximate %v, PadeRelativeError %v", tc.order, i, d.Approximate, d.PadeRelativeError)
			}
			if i >= len(exact) {
				break
			}
			tol := math.Max(d.PadeRelativeError, 1e-14)
			if e := math.Abs(d.NaturalFrequencyRadPerSec-exact[i][0]) / exact[i][0]; e > tol {
				t.Errorf("order %d point %d: ωn %v, exact %v (rel. error %.2g > %.2g)", tc.order, i, d.NaturalFrequencyRadPerSec, exact[i][0], e, tol)
			}
			if e := math.Abs(d.Value-exact[i][1]) / exact[i][1]; e > tol {
				t.Errorf("order %d point %d: K %v, exact %v (rel. error %.2g > %.2g)", tc.order, i, d.Value, exact[i][1], e, tol)
			}
		}
	}
	// The approximated loop itself (order 2, no dead time left) has points
	// beyond 100 rad/s: those are the ones the filter removes.
	pg, err := g.Pade(2)
	if err != nil {
		t.Fatal(err)
	}
	ds, err := DampingCrossings(pg, 0.5, nil)
	if err != nil {
		t.Fatal(err)
	}
	far := 0
	for _, d := range ds {
		if d.Approximate {
			t.Errorf("a loop without dead time gave an Approximate point")
		}
		if d.NaturalFrequencyRadPerSec > 100 {
			far++
		}
	}
	if far == 0 {
		t.Errorf("the order-2 Padé loop has no crossing beyond 100 rad/s: %+v", ds)
	}
}
