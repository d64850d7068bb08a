package margins

import (
	"math/rand/v2"
	"testing"

	"github.com/loopwise/loopwise/poly"
)

// TestProductSumBitIdentical: productSum(a, b, c, d) must give exactly the
// coefficients of a.Mul(b).Add(xPoly.Mul(c.Mul(d))), the composition it
// replaces (the margins' reference results were computed with that), on
// seeded random polynomials of degree −1 (zero) to 12.
func TestProductSumBitIdentical(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	draw := func() poly.Poly {
		n := rng.IntN(14) - 1
		c := make([]float64, n+1)
		for i := range c {
			c[i] = rng.NormFloat64() * float64(rng.IntN(1000))
		}
		p, _ := poly.FromAscending(c)
		return p
	}
	for i := range 2000 {
		a, b, c, d := draw(), draw(), draw(), draw()
		want := a.Mul(b).Add(xPoly.Mul(c.Mul(d)))
		got := productSum(a, b, c, d)
		if got.Degree() != want.Degree() {
			t.Fatalf("case %d: degree %d, want %d", i, got.Degree(), want.Degree())
		}
		for k := 0; k <= want.Degree(); k++ {
			if got.Coef(k) != want.Coef(k) {
				t.Fatalf("case %d: coefficient %d is %v, want %v", i, k, got.Coef(k), want.Coef(k))
			}
		}
	}
}
