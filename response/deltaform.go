package response

import (
	"math"
	"math/big"

	"github.com/loopwise/loopwise/internal/statespace"
)

// The δ form of a discrete system (difference equations sampled much
// faster than their dynamics).
//
// A discrete system whose poles crowd at z = 1 is fixed only loosely by
// its coefficients in z: den(1), which sets the static gain, is a sum of
// terms of size 1 that cancel to 1e-13 for time constants of 100 s sampled
// at 2 ms. Run through the companion realisation in z, every rounding of
// x ← A·x + B·u acts like a relative perturbation of the coefficients, and
// is amplified by κ = Σ|den_i|/|den(1)|: the recursion settles 1.4e-3 away
// from the static gain (measured for a PI loop, 6e13·eps). The δ form
// (R. H. Middleton and G. C. Goodwin, Digital Control and Estimation: A
// Unified Approach, Prentice Hall 1990, ch. 2, from memory) writes the
// same system in w = z − 1: N(w)/D(w) with D(w) = den(1 + w), realised as
// w·x = A_w·x + B_w·u, that is
//
//	x[k+1] = x[k] + (A_w·x[k] + B_w·u[k]),   y[k] = C_w·x[k] + D·u[k].
//
// The eigenvalues of A_w are z − 1, small and well separated relative to
// their size, and the increment is formed before it is added to x, so the
// rounding no longer sees the cancellation; at rest the increment is 0 and
// the fixed point is −C_w·A_w⁻¹·B_w + D = N(0)/D(0) = T(1) to the
// conditioning of A_w. The shift to w is done exactly (math/big), so the δ
// coefficients are the z coefficients' own, rounded once.

// deltaThreshold is the amplification κ = Σ|den_i|/|den(1)| above which a
// discrete system runs in the δ form: beyond it the shift form's rounding
// (eps·κ) exceeds 1e-10 of the output.
const deltaThreshold = 1e6

// needsDelta reports whether the discrete denominator den is conditioned
// badly enough at z = 1 to run in the δ form.
func needsDelta(den []float64) bool {
	sum := 0.0
	for _, v := range den {
		sum += math.Abs(v)
	}
	v, _ := exactSum(den).Float64()
	return math.Abs(v)*deltaThreshold < sum
}

// exactSum returns Σ c_i exactly.
func exactSum(c []float64) *big.Float {
	s := new(big.Float).SetPrec(exactPrec(c, 0))
	for _, v := range c {
		s.Add(s, big.NewFloat(v))
	}
	return s
}

// exactPrec returns a precision in bits in which every sum of the values
// of c with integer weights up to 2^extra is exact.
func exactPrec(c []float64, extra int) uint {
	lo, hi := math.MaxInt, math.MinInt
	for _, v := range c {
		if v == 0 {
			continue
		}
		e := math.Ilogb(v)
		lo, hi = min(lo, e), max(hi, e)
	}
	if lo > hi {
		return 64
	}
	return uint(hi - lo + 53 + extra + len(c) + 8)
}

// shiftToW returns the coefficients of p(1 + w), highest power first, from
// those of p(z): Taylor shift by repeated synthetic division (Horner's
// scheme), exact in big.Float and rounded once to float64.
func shiftToW(p []float64, n int) []float64 {
	prec := exactPrec(p, n+1) // binomial weights below 2^n
	c := make([]*big.Float, len(p))
	for i, v := range p {
		c[i] = new(big.Float).SetPrec(prec).SetFloat64(v)
	}
	m := len(c) - 1
	for i := 0; i < m; i++ {
		for j := 1; j <= m-i; j++ {
			c[j].Add(c[j], c[j-1])
		}
	}
	out := make([]float64, len(c))
	for i, v := range c {
		out[i], _ = v.Float64()
	}
	return out
}

// deltaModel returns the realisation of the δ form of the discrete
// system s (see above): A_w, B_w, C_w, D of N(w)/D(w).
func (s *system) deltaModel() (statespace.Model, error) {
	den := s.sys.Den().Coeffs()
	num := s.sys.Num().Coeffs()
	n := len(den) - 1
	return statespace.FromTransferFunction(shiftToW(num, n), shiftToW(den, n))
}
