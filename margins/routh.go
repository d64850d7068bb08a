package margins

import (
	"math"

	"github.com/loopwise/loopwise/poly"
)

// routhSafety multiplies the running error bound of each first-column
// element of the Routh array; the sign of an element is trusted only when
// its modulus exceeds the bound times routhSafety.
const routhSafety = 16

// rightHalfPlaneRoots returns the number of roots of p with Re s > 0 and the
// number at s = 0, for a continuous-time polynomial. Exact zero roots (zero
// trailing coefficients) are split off; the rest is counted by the sign
// changes in the first column of the Routh array (Routh 1877; Gantmacher
// 1959, The Theory of Matrices, vol. 2, ch. XV), an O(n²) test. Every
// element carries a first-order running bound on its rounding error (in the
// manner of Higham 2002, Accuracy and Stability of Numerical Algorithms,
// §3.3); when a first-column element is not larger than routhSafety times
// its bound (a root near the imaginary axis, a singular array, or too much
// cancellation), ok is false and the caller counts from the roots.
func rightHalfPlaneRoots(p poly.Poly) (rhp, atZero int, ok bool) {
	c := p.Ascending()
	for atZero < len(c) && c[atZero] == 0 {
		atZero++
	}
	c = c[atZero:]
	n := len(c) - 1
	if n <= 0 {
		return 0, atZero, n == 0
	}
	w := n/2 + 1
	r0 := make([]float64, w)
	r1 := make([]float64, w)
	e0 := make([]float64, w)
	e1 := make([]float64, w)
	for i := 0; i <= n; i++ {
		v := c[n-i] // highest power first
		if i%2 == 0 {
			r0[i/2] = v
		} else {
			r1[i/2] = v
		}
	}
	changes := 0
	prev := r0[0]
	for k := 1; k <= n; k++ {
		if !(math.Abs(r1[0]) > routhSafety*e1[0]) || r1[0] == 0 {
			return 0, atZero, false
		}
		if (r1[0] > 0) != (prev > 0) {
			changes++
		}
		prev = r1[0]
		q := r0[0] / r1[0]
		eq := math.Abs(q) * (e0[0]/math.Abs(r0[0]) + e1[0]/math.Abs(r1[0]) + eps)
		next := make([]float64, w)
		en := make([]float64, w)
		for i := 0; i+1 < w; i++ {
			a, b := r0[i+1], r1[i+1]
			next[i] = a - q*b
			en[i] = e0[i+1] + math.Abs(q)*e1[i+1] + math.Abs(b)*eq + 2*eps*(math.Abs(a)+math.Abs(q*b))
		}
		r0, r1 = r1, next
		e0, e1 = e1, en
	}
	return changes, atZero, true
}
