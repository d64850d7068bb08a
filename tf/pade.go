package tf

import (
	"fmt"
	"math"

	"github.com/loopwise/loopwise/poly"
)

// MaxPadeOrder is the largest Padé order accepted by Pade and PadeDelay, a
// bound chosen by this package: the coefficients of order n span
// (2n)!/n!·T⁻ⁿ (about 3e29·T⁻²⁰ at n = 20), and orders up to about 10 are
// what is used in practice (common practice).
const MaxPadeOrder = 20

// PadeDelay returns the Padé approximant of order (n, n) of the dead time
// e^(−s·delaySec) as a rational transfer function (Padé 1892):
//
//	e^(−sT) ≈ Σₖ cₖ·(−sT)ᵏ / Σₖ cₖ·(sT)ᵏ,  k = 0…n,
//	cₖ = (2n − k)!·n! / ((2n)!·k!·(n − k)!),
//
// with the cₖ computed by the exact recurrence cₖ = cₖ₋₁·(n − k + 1)/((2n −
// k + 1)·k). The approximant is all-pass (|·| = 1 on the imaginary axis),
// matches the Taylor series of e^(−sT) to order 2n and has its poles in the
// left half plane. A zero delay gives 1.
//
// Reference: H. Padé, "Sur la représentation approchée d'une fonction par
// des fractions rationnelles", Ann. Sci. École Norm. Sup. 9:3–93, 1892.
//
// Errors: ErrOrder unless 1 ≤ order ≤ MaxPadeOrder; ErrNotFinite or
// ErrNegativeDelay for a bad delaySec.
func PadeDelay(delaySec float64, order int) (TF, error) {
	if math.IsNaN(delaySec) || math.IsInf(delaySec, 0) {
		return TF{}, fmt.Errorf("%w: dead time %v", ErrNotFinite, delaySec)
	}
	if delaySec < 0 {
		return TF{}, fmt.Errorf("%w: got %v s", ErrNegativeDelay, delaySec)
	}
	if order < 1 || order > MaxPadeOrder {
		return TF{}, fmt.Errorf("%w: Padé order %d, want 1 to %d", ErrOrder, order, MaxPadeOrder)
	}
	if delaySec == 0 {
		return one(0), nil
	}
	num, den, ok := padeCoeffs(delaySec, order)
	if !ok {
		return TF{}, fmt.Errorf("%w: the Padé coefficients of order %d for a dead time of %v s overflow float64", ErrNotFinite, order, delaySec)
	}
	return FromPolys(num, den, 0)
}

// padeCoeffs returns the numerator and denominator of the (n, n) Padé
// approximant of e^(−sT), scaled so that the constant terms are 1; ok is
// false when a coefficient overflows.
func padeCoeffs(T float64, n int) (num, den poly.Poly, ok bool) {
	nc := make([]float64, n+1) // ascending powers of s
	dc := make([]float64, n+1)
	c := 1.0
	tk := 1.0
	for k := 0; k <= n; k++ {
		if k > 0 {
			c *= float64(n-k+1) / (float64(2*n-k+1) * float64(k))
			tk *= T
		}
		dc[k] = c * tk
		if k%2 == 0 {
			nc[k] = c * tk
		} else {
			nc[k] = -c * tk
		}
	}
	num, err1 := poly.FromAscending(nc)
	den, err2 := poly.FromAscending(dc)
	return num, den, err1 == nil && err2 == nil
}

// Pade returns the rational transfer function g with its dead time replaced
// by the Padé approximant of order (order, order) of e^(−s·DelaySec) (see PadeDelay):
// the series connection of the rational part of g and the approximant. A g
// without dead time is returned unchanged.
//
// For a discrete g no approximation is needed for whole sample periods: a
// dead time of k·T becomes k poles at z = 0 (exactly); a fractional dead
// time returns ErrFractionalDelay.
//
// Errors: ErrOrder unless 1 ≤ order ≤ MaxPadeOrder.
func (g TF) Pade(order int) (TF, error) {
	if order < 1 || order > MaxPadeOrder {
		return TF{}, fmt.Errorf("%w: Padé order %d, want 1 to %d", ErrOrder, order, MaxPadeOrder)
	}
	if g.delay == 0 {
		return g.WithoutDelay(), nil
	}
	if g.IsDiscrete() {
		k, theta := splitDelay(g.delay, g.ts)
		if theta != 0 {
			return TF{}, fmt.Errorf("%w: dead time %v s is %v sample periods of %v s", ErrFractionalDelay, g.delay, g.delay/g.ts, g.ts)
		}
		return TF{num: g.num, den: g.Den().ShiftUp(k), ts: g.ts}, nil
	}
	p, err := PadeDelay(g.delay, order)
	if err != nil {
		return TF{}, err
	}
	return g.WithoutDelay().Series(p) // Series reports overflow
}
