package margins

import (
	"fmt"
	"math"
	"math/cmplx"
	"slices"
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
	if r0 == 0 && lp.num.VanishesAt(0) {
		// L(0⁺) → 0 (a zero at the origin): G ≈ 1/L, Arg G = −ψ(0⁺).
		argG0 = principalAngle(-lp.sumPhase(0))
	} else if r0 == 0 {
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
	delta -= lp.zeroPassages(we)
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

// zeroPassages returns the sum of the jumps, in radians, of
// A(ω) = ψ(ω) + Arg G(ω) where L passes through 0 at a zero on the
// imaginary axis at ω = b, 0 < b < we. There F = 1 + L → 1 is continuous
// while ψ jumps by m·π (m the multiplicity) and G ≈ 1/L turns with it, so
// A jumps by m·π + Arg e^(−j(ψ(b⁻)+mπ)) − Arg e^(−jψ(b⁻)), 0 or 2π, which
// is taken out of Δ like the branch-cut passages of G at phase crossovers.
func (lp *loop) zeroPassages(we float64) float64 {
	if lp.ensureRoots() != nil {
		return 0
	}
	var bs []float64
	for _, z := range lp.zeros {
		if real(z) == 0 && imag(z) > 0 {
			bs = append(bs, imag(z))
		}
	}
	slices.Sort(bs)
	sum := 0.0
	for i := 0; i < len(bs); {
		m := 1
		for i+m < len(bs) && bs[i+m]-bs[i] <= dedupeRel*bs[i] {
			m++
		}
		b := lp.fromAxis(bs[i])
		i += m
		if b >= we {
			continue
		}
		jump := float64(m) * math.Pi
		before := lp.sumPhase(bs[i-m]) - b*lp.tau - jump
		sum += jump + principalAngle(-before-jump) - principalAngle(-before)
	}
	return sum
}

// principalAngle maps an angle in radians to (−π, π].
func principalAngle(a float64) float64 {
	a = math.Remainder(a, 2*math.Pi)
	if a <= -math.Pi {
		a += 2 * math.Pi
	}
	return a
}

// limitAtInfinity returns L(∞) of the rational part (0 for strictly proper
// loops; L(z = −1) for discrete ones is not meant here).
func (lp *loop) limitAtInfinity() complex128 {
	if lp.an.Degree() < lp.ad.Degree() {
		return 0
	}
	return complex(lp.an.Lead()/lp.ad.Lead(), 0)
}
