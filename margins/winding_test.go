package margins

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/loopwise/loopwise/poly"
)

// TestWindingRootsAgainstRoots checks the winding count of right-half-plane
// roots against the roots themselves: random polynomials of degree 2–60
// built from known roots (fixed seed), none within 5 % of the imaginary
// axis relative to its modulus, some at the origin. The count is exact or
// declines (ok = false); it must not decline on most.
func TestWindingRootsAgainstRoots(t *testing.T) {
	r := rand.New(rand.NewPCG(12, 60))
	declined, checked := 0, 0
	for range 300 {
		n := 2 + r.IntN(59)
		var rs []complex128
		want, zeros := 0, 0
		for len(rs) < n {
			mag := math.Pow(10, -1+2*r.Float64())
			re := -(0.05 + 0.95*r.Float64()) * mag
			if r.IntN(4) == 0 {
				re = -re // right half plane
			}
			switch {
			case r.IntN(20) == 0:
				rs = append(rs, 0)
				zeros++
				continue
			case n-len(rs) >= 2 && r.IntN(2) == 0:
				im := math.Sqrt(math.Max(mag*mag-re*re, 0.01*mag*mag))
				rs = append(rs, complex(re, im), complex(re, -im))
				if re > 0 {
					want += 2
				}
			default:
				rs = append(rs, complex(re, 0))
				if re > 0 {
					want++
				}
			}
		}
		p, err := poly.FromRoots(rs)
		if err != nil {
			t.Fatal(err)
		}
		rhp, z, ok := windingRoots(p)
		if !ok {
			declined++
			continue
		}
		checked++
		if rhp != want || z != zeros {
			t.Errorf("degree %d: winding count %d right-half-plane and %d zero roots, want %d and %d", n, rhp, z, want, zeros)
		}
	}
	if declined > 30 {
		t.Errorf("declined %d of 300", declined)
	}
	t.Logf("%d checked, %d declined", checked, declined)
}
