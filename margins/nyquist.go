package margins

import (
	"fmt"
	"math"
	"math/cmplx"
)

// encirclementCount returns the number Z of closed-loop poles in the right
// half plane by the Nyquist criterion (Nyquist 1932), and P, the number of
// open-loop poles there.
//
// The D-contour runs up the imaginary axis, indented to the right of poles
// of L on the axis, and closes at infinity. By the symmetry
// F(−jω) = conj F(jω) of F = 1 + L, its counter-clockwise phase change is
// 2Δ − r₀π, where Δ is the change of arg F along ω from 0⁺ to ∞ and r₀ the
// number of poles at s = 0; then Z = P − (2Δ − r₀π)/(2π).
//
// Δ is obtained without tracking the phase of F numerically: writing
// F = L·G with G = 1 + 1/L,
//
//	arg F(ω_e) − arg F(0⁺) = [ψ(ω_e) − ψ(0⁺)] + [Arg G(ω_e) − Arg G(0⁺)] + 2π·Σ(−sign ψ′(ωᵢ)),
//
// where ψ is the continuous phase of L (exact, from its poles and zeros, with
// a jump of −π at each pole on the axis, which is the indentation), and the
// sum runs over the phase crossovers ωᵢ in (0, ω_e) with |L| < 1: the only
// places where G crosses its negative real axis. Beyond the last gain
// crossover ω_e, |L| < 1 and F stays in the right half plane, so the rest of
// the path adds −Arg F(ω_e). Every phase crossover is found by the
// guaranteed search, so the count is exact up to rounding; it is checked to
// be within 10⁻⁶ of a whole number.
func (lp *loop) encirclementCount(gains []float64, cross func(wmax float64) ([]crossing, error)) (z, p int, err error) {
	p = lp.openUnstable
	r0 := lp.openIntegrators
	we := 1.0
	if len(gains) > 0 {
		we = 1.5 * gains[len(gains)-1]
	}
	if lp.discrete() {
		we = math.Min(we, lp.nyquist()*(1-1e-9))
	}
	cs, err := cross(we)
	if err != nil {
		return 0, p, err
	}
	// G at ω = 0⁺.
	argG0 := 0.0
	if r0 == 0 {
		l0 := lp.value(0)
		g0 := 1 + 1/l0
		argG0 = cmplx.Phase(g0)
		if imag(g0) == 0 && real(g0) < 0 {
			// L(0) in (−1, 0): G starts on its branch cut; the side it
			// leaves to decides the branch.
			ws := we
			for _, c := range cs {
				if c.w > 0 {
					ws = math.Min(ws, c.w)
				}
			}
			ws *= 1e-3
			if imag(1+1/lp.value(ws)) >= 0 {
				argG0 = math.Pi
			} else {
				argG0 = -math.Pi
			}
		}
	}
	le := lp.value(we)
	delta := lp.phase(we) - lp.sumPhase(0) + cmplx.Phase(1+1/le) - argG0
	for _, c := range cs {
		if c.w > 0 && c.w < we && c.k > 1 {
			if c.slope > 0 {
				delta -= 2 * math.Pi
			} else if c.slope < 0 {
				delta += 2 * math.Pi
			}
		}
	}
	linf := lp.limitAtInfinity()
	if cmplx.Abs(linf) > 1 && lp.tau == 0 {
		// |L| > 1 beyond ω_e: G stays in the right half plane up to ω = ∞.
		delta += lp.sumPhase(math.Inf(1)) - lp.phase(we) + cmplx.Phase(1+1/linf) - cmplx.Phase(1+1/le)
	} else {
		delta -= cmplx.Phase(1 + le)
	}
	zf := float64(p) - (2*delta-float64(r0)*math.Pi)/(2*math.Pi)
	zi := math.Round(zf)
	if math.Abs(zf-zi) > 1e-6 || zi < 0 {
		return 0, p, fmt.Errorf("%w: the Nyquist count %.9g is not a whole non-negative number", ErrEncirclements, zf)
	}
	return int(zi), p, nil
}

// limitAtInfinity returns L(∞) of the rational part (0 for strictly proper
// loops; L(z = −1) for discrete ones is not meant here).
func (lp *loop) limitAtInfinity() complex128 {
	if lp.an.Degree() < lp.ad.Degree() {
		return 0
	}
	return complex(lp.an.Lead()/lp.ad.Lead(), 0)
}
