package margins

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/internal/rootfind"
	"github.com/loopwise/loopwise/poly"
)

// sensitivities returns |S| and |T| at ω, S = 1/(1 + L), T = L/(1 + L),
// evaluated as den/(den + num·e) and num·e/(den + num·e).
func (lp *loop) sensitivities(w float64) (s, t float64) {
	n, d, e := lp.parts(w)
	ne := n * e
	q := d + ne
	if q == 0 {
		return math.Inf(1), math.Inf(1)
	}
	return cmplx.Abs(d / q), cmplx.Abs(ne / q)
}

// rationalPeak returns max |S| (complementary = false) or max |T| over the
// frequency axis of a loop without dead time, with its frequency. With
// |S(jv)|² = P(x)/Q(x), P = |ad|², Q = |ad + an|², x = v², the candidates
// are x = 0, the positive roots of P′Q − PQ′ (the stationary points) and
// x = ∞; the largest value, evaluated directly from num and den, wins (a
// later candidate must exceed the earlier by a relative 1e-13 to replace
// it, so a maximum at ω = 0 or at a finite ω is preferred to an equal
// limit).
//
// The stationary points are only sought where they can matter, by a
// level-set step in the manner of the bisection method for the H∞ norm
// (Boyd, Balakrishnan & Kabamba 1989, Math. Control Signals Systems 2,
// 207–219): with γ the best value found so far (at x = 0, ∞, the hint
// frequencies and the midpoints of earlier level sets), the set where
// |S|² > γ²·(1 − η), η = 10⁻², is a union of intervals bounded by the positive roots
// of P − γ²(1 − η)·Q, a polynomial of degree n instead of 2n − 2. The
// global maximum lies in one of them, so the roots of P′Q − PQ′ are
// isolated in those intervals only (poly.RealRootsIn), which is exact and
// several times cheaper than isolating them on (0, ∞).
func (lp *loop) rationalPeak(complementary bool, hints []float64) (peak, freq float64) {
	p, q := lp.peakPolys(complementary)
	val := func(w float64) float64 {
		s, t := lp.sensitivities(w)
		if complementary {
			return t
		}
		return s
	}
	peak, freq = val(0), 0
	if lp.openIntegrators > 0 {
		// S(0) = 0 and T(0) = 1 exactly as limits.
		peak = 0
		if complementary {
			peak = 1
		}
	}
	consider := func(w, v float64) {
		if v > peak*(1+1e-13) || (math.IsNaN(peak) && !math.IsNaN(v)) {
			peak, freq = v, w
		}
	}
	// ω → ∞ (continuous) or ω = π/T (discrete).
	if lp.discrete() {
		consider(lp.nyquist(), val(lp.nyquist()))
	} else if q.Degree() == p.Degree() && !q.IsZero() {
		consider(math.Inf(1), math.Sqrt(p.Lead()/q.Lead()))
	}
	for _, w := range hints {
		consider(w, val(w))
	}
	dd := p.Derivative().Mul(q).Sub(p.Mul(q.Derivative()))
	// The level is raised to a local maximum near the best candidate so
	// far (golden-section search over [ω/2, 2ω], 16 steps; Kiefer 1953):
	// a higher level gives narrower intervals, hence fewer stationary
	// points to isolate. The value found is a value of |S| (|T|), so the
	// level stays below the global maximum; it is not itself a candidate
	// (its frequency is only good to about √u).
	gamma := peak
	if freq > 0 && !math.IsInf(freq, 0) {
		hi := 2 * freq
		if lp.discrete() {
			hi = math.Min(hi, lp.nyquist())
		}
		if _, v := rootfind.GoldenMax(val, freq/2, hi, 16, 1e-3); v > gamma && !math.IsInf(v, 0) {
			gamma = v
		}
	}
	search := [][2]float64{{0, math.Inf(1)}}
	if gamma > 0 && !math.IsInf(gamma, 0) && !math.IsNaN(gamma) {
		if iv, ok := lp.levelSet(p, q, gamma, val, consider); ok {
			search = iv
		}
	}
	for _, iv := range search {
		rs, err := poly.RealRootsInWithSettings(dd, iv[0], iv[1], &poly.RealRootSettings{CandidateImagTolerance: candidateImagTol, RelTolerance: candidateRelTol})
		if err != nil {
			continue
		}
		for _, r := range rs {
			w := lp.fromX(r.Value)
			consider(w, val(w))
		}
	}
	return peak, freq
}

// peakPolys returns P and Q with |S|² = P/Q (|T|² when complementary) as
// polynomials in x = u².
func (lp *loop) peakPolys(complementary bool) (p, q poly.Poly) {
	cr, ci := axisParts(lp.sad.Add(lp.san))
	q = squaredModulus(cr, ci)
	p = squaredModulus(lp.dr, lp.di)
	if complementary {
		p = squaredModulus(lp.nr, lp.ni)
	}
	return p, q
}

// levelSetEta is the relative margin η of the level set in rationalPeak:
// small enough that the intervals are narrow, large enough that the level
// polynomial's roots near the best point stay well separated.
const levelSetEta = 1e-2

// levelSet returns the intervals of x = u² where P/Q > γ²·(1 − η), γ the
// best value so far; they hold every point where |S| (or |T|) exceeds that
// level, the global maximum among them. The value at the midpoint of each
// interval is offered to consider. ok is false when the roots of the level
// polynomial could not be found.
func (lp *loop) levelSet(p, q poly.Poly, gamma float64, val func(float64) float64, consider func(w, v float64)) ([][2]float64, bool) {
	h := p.Sub(q.Scale(gamma * gamma * (1 - levelSetEta)))
	if h.IsZero() {
		return nil, false
	}
	// The bounds need not be exact: the level lies a relative η below the
	// best value, so a bound off by 1e-10 relative cannot cut the maximum.
	rs, err := poly.RealRootsInWithSettings(h, 0, math.Inf(1), &poly.RealRootSettings{CandidateImagTolerance: candidateImagTol, RelTolerance: 1e-10})
	if err != nil {
		return nil, false
	}
	bounds := []float64{0}
	for _, r := range rs {
		bounds = append(bounds, r.Value)
	}
	bounds = append(bounds, math.Inf(1))
	var out [][2]float64
	for i := 0; i+1 < len(bounds); i++ {
		a, b := bounds[i], bounds[i+1]
		var m float64
		switch {
		case math.IsInf(b, 1):
			m = 2*a + 1
		case a == 0:
			m = b / 2
		default:
			m = math.Sqrt(a * b)
		}
		if !(h.Eval(m) > 0) {
			continue
		}
		out = append(out, [2]float64{a, b})
		w := lp.fromX(m)
		consider(w, val(w))
	}
	return out, true
}

// rationalBandwidth returns the lowest ω where |T| = |T(0)|/√2: the
// smallest positive root of 2·|an|² − T(0)²·|ad + an|² (a polynomial in
// x = v²), polished by Newton's method on ln|T|.
func (lp *loop) rationalBandwidth() float64 {
	cr, ci := axisParts(lp.sad.Add(lp.san))
	q := squaredModulus(cr, ci)
	p := squaredModulus(lp.nr, lp.ni)
	if q.Coef(0) == 0 || p.Coef(0) == 0 {
		return math.NaN()
	}
	t0sq := p.Coef(0) / q.Coef(0)
	target := 0.5 * math.Log(t0sq/2)
	f := func(w float64) (float64, float64) {
		_, dlnL := lp.logValue(w)
		n, d, e := lp.parts(w)
		t := n * e / (d + n*e)
		dlnT := dlnL * d / (d + n*e) // d ln T/dω = (d ln L/dω)/(1 + L)
		return math.Log(cmplx.Abs(t)) - target, real(dlnT)
	}
	// The smallest candidate is almost always the bandwidth: look at it
	// alone first (an ordered search that stops early), then at all.
	h := p.Scale(2).Sub(q.Scale(t0sq))
	first, err := poly.RealRootsInWithSettings(h, 0, math.Inf(1), &poly.RealRootSettings{CandidateImagTolerance: candidateImagTol, RelTolerance: candidateRelTol, MaxRoots: 1})
	if err == nil && len(first) == 1 {
		w0 := lp.fromX(first[0].Value)
		w, ok := newton(f, w0, 0, lp.nyquist())
		if !ok {
			w = w0
		}
		if v, _ := f(w); math.Abs(v) <= 1e-7 {
			return w
		}
	}
	for _, x := range positiveCandidates(h) {
		w0 := lp.fromX(x)
		w, ok := newton(f, w0, 0, lp.nyquist())
		if !ok {
			w = w0
		}
		if v, _ := f(w); math.Abs(v) <= 1e-7 {
			return w
		}
	}
	return math.NaN()
}

// delayPeaks finds Ms, Mt and the bandwidth of a loop with dead time
// numerically: |S| and |T| are sampled on a grid that is logarithmic
// (60 points per decade) and at the same time at most π/(16τ) apart, up to
// a frequency beyond which |L| ≤ 10⁻³ (so |S|, |T| stay within 0.1 % of 1
// and 0); every local maximum of the samples is refined by golden-section
// search (Kiefer 1953), and the bandwidth is bracketed on the grid and
// refined by Brent's method.
//
// The work is bounded: |L| at the end of the grid is taken from the poles
// and zeros as a sum of logarithms (no overflow at any frequency), the end
// stays finite, and a grid of more than maxPeakGridPoints points is
// refused with ErrUnsupported before it is built.
func (lp *loop) delayPeaks(res *Result, gains []float64) error {
	lo, hi := lp.characteristicScale()
	for _, g := range gains {
		hi = math.Max(hi, g)
		if lo == 0 || g < lo {
			lo = g
		}
	}
	if hi == 0 {
		lo, hi = 1/lp.tau, 1/lp.tau
	}
	wEnd := math.Max(10*hi, 20/lp.tau)
	if cmplx.Abs(lp.limitAtInfinity()) <= 1e-3 {
		for range 60 {
			if lp.logAbsRational(wEnd) <= math.Log(1e-3) || wEnd > math.MaxFloat64/4 {
				break
			}
			wEnd *= 2
		}
	}
	wStart := math.Min(lo, 1/lp.tau) * 1e-3
	ratio := math.Pow(10, 1.0/60)
	dmax := math.Pi / (16 * lp.tau)
	// Points: 60 per decade up to the end, plus the linear part beyond
	// dmax/(ratio − 1), where the step dmax is the smaller one.
	count := 60*math.Log10(wEnd/wStart) + 16*lp.tau*wEnd/math.Pi + 2
	if !(count <= maxPeakGridPoints) {
		return fmt.Errorf("%w: the sensitivity peaks of a loop with dead time %v s up to %.3g rad/s (where |L| falls to 1e-3) need about %.3g grid points, more than %d; set Settings.SkipPeaks to leave them out", ErrUnsupported, lp.tau, wEnd, count, maxPeakGridPoints)
	}
	grid := make([]float64, 0, int(count)+2)
	grid = append(grid, 0)
	for w := wStart; w < wEnd; {
		grid = append(grid, w)
		w = math.Min(w*ratio, w+dmax)
	}
	grid = append(grid, wEnd)
	ss := make([]float64, len(grid))
	ts := make([]float64, len(grid))
	for i, w := range grid {
		ss[i], ts[i] = lp.sensitivities(w)
	}
	peakOf := func(vals []float64, pick func(float64) float64) (float64, float64) {
		best, bw := vals[0], grid[0]
		for i := 1; i+1 < len(grid); i++ {
			if vals[i] >= vals[i-1] && vals[i] >= vals[i+1] {
				w, v := goldenMax(pick, grid[i-1], grid[i+1])
				if vals[i] > v {
					w, v = grid[i], vals[i]
				}
				if v > best {
					best, bw = v, w
				}
			}
		}
		if vals[len(vals)-1] > best {
			best, bw = vals[len(vals)-1], grid[len(grid)-1]
		}
		return best, bw
	}
	res.PeakSensitivity, res.PeakSensitivityRadPerSec = peakOf(ss, func(w float64) float64 { s, _ := lp.sensitivities(w); return s })
	res.PeakComplementarySensitivity, res.PeakComplementarySensitivityRadPerSec = peakOf(ts, func(w float64) float64 { _, t := lp.sensitivities(w); return t })
	res.BandwidthRadPerSec = math.NaN()
	t0 := ts[0]
	if lp.openIntegrators > 0 {
		t0 = 1
	}
	if t0 == 0 || math.IsInf(t0, 0) || math.IsNaN(t0) {
		return nil
	}
	level := t0 / math.Sqrt2
	h := func(w float64) float64 { _, t := lp.sensitivities(w); return t - level }
	for i := 1; i < len(grid); i++ {
		if ts[i] < level {
			res.BandwidthRadPerSec = brent(h, grid[i-1], grid[i], ts[i-1]-level, ts[i]-level)
			return nil
		}
	}
	return nil
}

// maxPeakGridPoints bounds the frequency grid of delayPeaks (three float64
// slices of this length, 48 MiB, and as many evaluations of L).
const maxPeakGridPoints = 2 << 20

// logAbsRational returns ln |L(jω)| of the rational part of a continuous
// loop from its poles and zeros, ln|k| + Σ ln|jω − zᵢ| − Σ ln|jω − pᵢ|
// with k the ratio of the leading coefficients: finite where the
// polynomials themselves overflow. It needs ensureRoots.
func (lp *loop) logAbsRational(w float64) float64 {
	v := math.Log(math.Abs(lp.an.Lead())) - math.Log(math.Abs(lp.ad.Lead()))
	s := complex(0, w)
	for _, z := range lp.zeros {
		v += math.Log(cmplx.Abs(s - z))
	}
	for _, p := range lp.poles {
		v -= math.Log(cmplx.Abs(s - p))
	}
	return v
}
