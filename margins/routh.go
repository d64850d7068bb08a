package margins

import (
	"math"
	"slices"

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
	deg := p.Degree()
	for atZero < deg && p.Coef(atZero) == 0 {
		atZero++
	}
	n := deg - atZero
	if n <= 0 {
		return 0, atZero, n == 0
	}
	// Two rows and their bounds in one buffer; each new row overwrites
	// the row two above it, which is no longer needed.
	w := n/2 + 1
	rows := make([]float64, 4*w)
	r0, r1, e0, e1 := rows[:w], rows[w:2*w], rows[2*w:3*w], rows[3*w:]
	for i := 0; i <= n; i++ {
		v := p.Coef(deg - i) // highest power first
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
		// In place: entry i of the new row reads entries i + 1 only.
		for i := 0; i+1 < w; i++ {
			a, b := r0[i+1], r1[i+1]
			r0[i] = a - q*b
			e0[i] = e0[i+1] + math.Abs(q)*e1[i+1] + math.Abs(b)*eq + 2*eps*(math.Abs(a)+math.Abs(q*b))
		}
		r0[w-1], e0[w-1] = 0, 0
		r0, r1 = r1, r0
		e0, e1 = e1, e0
	}
	return changes, atZero, true
}

// countRightHalfPlane returns the numbers of roots of p with Re s > 0 and
// at s = 0 by the Routh array, or, when that is inconclusive, by the
// winding count; ok is false when both are (the caller then counts from
// the roots).
func countRightHalfPlane(p poly.Poly) (rhp, atZero int, ok bool) {
	if rhp, atZero, ok = rightHalfPlaneRoots(p); ok {
		return rhp, atZero, true
	}
	return windingRoots(p)
}

// windingRoots counts like rightHalfPlaneRoots, for when the Routh array is
// inconclusive at high degree (its running error bound grows with every
// row): by the argument principle, as ω runs from 0 to ∞ the phase of
// p(jω) changes by Δ = (n_L − n_R)·π/2, n_L + n_R = n for a polynomial
// without roots on the imaginary axis (the Hermite–Biehler view of the
// Routh–Hurwitz problem; Gantmacher 1959, The Theory of Matrices, vol. 2,
// ch. XV, §6). With p(jω) = R(x) + jω·I(x), x = ω², the curve crosses the
// axes only at the positive roots of R and of I, polynomials of degree about
// n/2 found by real-root isolation (poly.RealRootsIn); between them it
// stays in one quadrant, read from the signs of R and I at a midpoint.
// Each step between neighbouring quadrants or axes is ±π/2 or ±π/4, so Δ
// is counted exactly. ok is false when a sign is within the rounding of its
// evaluation (a root on or near the axis) or two crossings coincide.
func windingRoots(p poly.Poly) (rhp, atZero int, ok bool) {
	c := p.Ascending()
	for atZero < len(c) && c[atZero] == 0 {
		atZero++
	}
	q, err := poly.FromAscending(c[atZero:])
	if err != nil {
		return 0, atZero, false
	}
	n := q.Degree()
	if n <= 0 {
		return 0, atZero, n == 0
	}
	re, im := axisParts(q)
	var xs []float64
	for _, part := range []poly.Poly{re, im} {
		if part.Degree() < 1 {
			continue
		}
		rs, err := poly.RealRootsIn(part, 0, math.Inf(1))
		if err != nil {
			return 0, atZero, false
		}
		for _, r := range rs {
			xs = append(xs, r.Value)
		}
	}
	slices.Sort(xs)
	for i := 1; i < len(xs); i++ {
		if xs[i]-xs[i-1] <= 1e-9*xs[i] {
			return 0, atZero, false // a root on (or very near) the axis
		}
	}
	sign := func(part poly.Poly, x float64) float64 {
		v, bound := part.EvalCompensated(x)
		if !(math.Abs(v) > 4*bound) || v == 0 {
			return 0
		}
		return math.Copysign(1, v)
	}
	angle := 0.0 // arg p(0) = arg R(0)
	if re.Coef(0) < 0 {
		angle = math.Pi
	}
	step := func(target float64) bool {
		d := math.Remainder(target-angle, 2*math.Pi)
		if math.Abs(d) > math.Pi/2+1e-9 {
			return false // opposite quadrants: a crossing was missed
		}
		angle += d
		return true
	}
	for i := 0; i <= len(xs); i++ {
		var mid float64
		switch {
		case len(xs) == 0:
			mid = 1
		case i == 0:
			mid = xs[0] / 2
		case i == len(xs):
			mid = 2 * xs[i-1]
		default:
			mid = math.Sqrt(xs[i-1] * xs[i])
		}
		sr, si := sign(re, mid), sign(im, mid)
		if sr == 0 || si == 0 || !step(math.Atan2(si, sr)) {
			return 0, atZero, false
		}
	}
	// ω → ∞: p(jω) ≈ lead·(jω)ⁿ.
	end := float64(n) * math.Pi / 2
	if q.Lead() < 0 {
		end += math.Pi
	}
	if !step(end) {
		return 0, atZero, false
	}
	start := 0.0
	if re.Coef(0) < 0 {
		start = math.Pi
	}
	nr := (float64(n) - 2*(angle-start)/math.Pi) / 2
	r := math.Round(nr)
	if math.Abs(nr-r) > 1e-6 || r < 0 || r > float64(n) {
		return 0, atZero, false
	}
	return int(r), atZero, true
}
