package poly

import "math"

// Error-free transformations (Ogita, Rump & Oishi 2005, "Accurate sum and
// dot product", SIAM J. Sci. Comput. 26(6)): for floating-point a and b,
// twoSum returns s = fl(a+b) and e with a + b = s + e exactly, twoProd
// returns p = fl(a·b) and e with a·b = p + e exactly (barring underflow),
// the latter with one fused multiply–add.
//
// The explicit float64 conversions force rounding of each operation: the Go
// specification lets a compiler fuse x*y + z across statements (it does on
// arm64, ppc64, s390x and amd64 with GOAMD64=v3), which would break the
// exactness these functions rely on.

const (
	// unitRoundoff is u = 2⁻⁵³, the unit roundoff of float64 (half the
	// machine epsilon): fl(a∘b) = (a∘b)(1+δ), |δ| ≤ u.
	unitRoundoff = 0x1p-53
)

// twoSum is Knuth's TwoSum (The Art of Computer Programming, vol. 2, 1969).
func twoSum(a, b float64) (s, e float64) {
	s = float64(a + b)
	bb := float64(s - a)
	e = float64(a-float64(s-bb)) + float64(b-bb)
	return s, e
}

// twoProd returns p = fl(a·b) and the exact error e = a·b − p.
func twoProd(a, b float64) (p, e float64) {
	p = float64(a * b)
	e = math.FMA(a, b, -p)
	return p, e
}

// gamma returns γₖ = k·u/(1 − k·u), the constant of Higham (2002, §3.1)
// that bounds the accumulated relative error of k roundings.
func gamma(k int) float64 {
	ku := float64(k) * unitRoundoff
	return ku / (1 - ku)
}
