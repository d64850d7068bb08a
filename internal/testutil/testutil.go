// Package testutil holds comparison helpers shared by the tests of several
// packages. It is not part of the public API.
package testutil

import (
	"math"
	"math/cmplx"
)

// Close reports whether |got − want| ≤ abs + rel·|want|. Equal infinities
// are close; NaN is never close.
func Close(got, want, rel, abs float64) bool {
	if math.IsInf(want, 0) || math.IsInf(got, 0) {
		return got == want
	}
	return math.Abs(got-want) <= abs+rel*math.Abs(want)
}

// CloseComplex reports whether |got − want| ≤ abs + rel·|want|.
func CloseComplex(got, want complex128, rel, abs float64) bool {
	return cmplx.Abs(got-want) <= abs+rel*cmplx.Abs(want)
}

// MatchMultiset pairs every want value with its nearest unused got value
// and returns, for each want value in order, the distance to its match.
// ok is false when the lengths differ.
func MatchMultiset(got, want []complex128) (dist []float64, ok bool) {
	if len(got) != len(want) {
		return nil, false
	}
	used := make([]bool, len(got))
	dist = make([]float64, len(want))
	for i, w := range want {
		best, bd := -1, math.Inf(1)
		for j, g := range got {
			if !used[j] && cmplx.Abs(g-w) < bd {
				best, bd = j, cmplx.Abs(g-w)
			}
		}
		used[best] = true
		dist[i] = bd
	}
	return dist, true
}

// AngleDiffDeg returns the absolute difference of two angles in degrees,
// modulo 360, in [0, 180].
func AngleDiffDeg(a, b float64) float64 {
	d := math.Mod(math.Abs(a-b), 360)
	return math.Min(d, 360-d)
}
