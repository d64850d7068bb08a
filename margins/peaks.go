package margins

import (
	"math"
	"math/cmplx"
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
// are x = 0, the positive roots of P′Q − PQ′ and x = ∞; the largest value,
// evaluated directly from num and den, wins (a later candidate must exceed
// the earlier by a relative 1e-13 to replace it, so a maximum at ω = 0 or
// at a finite ω is preferred to an equal limit).
func (lp *loop) rationalPeak(complementary bool) (peak, freq float64) {
	cr, ci := axisParts(lp.sad.Add(lp.san))
	q := squaredModulus(cr, ci)
	p := squaredModulus(lp.dr, lp.di)
	if complementary {
		p = squaredModulus(lp.nr, lp.ni)
	}
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
	dd := p.Derivative().Mul(q).Sub(p.Mul(q.Derivative()))
	for _, x := range positiveRoots(dd) {
		w := lp.fromX(x)
		consider(w, val(w))
	}
	// ω → ∞ (continuous) or ω = π/T (discrete).
	if lp.discrete() {
		consider(lp.nyquist(), val(lp.nyquist()))
	} else if q.Degree() == p.Degree() && !q.IsZero() {
		consider(math.Inf(1), math.Sqrt(p.Lead()/q.Lead()))
	}
	return peak, freq
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
	for _, x := range positiveRoots(p.Scale(2).Sub(q.Scale(t0sq))) {
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
func (lp *loop) delayPeaks(res *Result, gains []float64) {
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
	for range 60 {
		if cmplx.Abs(lp.value(wEnd)) <= 1e-3 || cmplx.Abs(lp.limitAtInfinity()) > 1e-3 {
			break
		}
		wEnd *= 2
	}
	wStart := math.Min(lo, 1/lp.tau) * 1e-3
	var grid []float64
	ratio := math.Pow(10, 1.0/60)
	dmax := math.Pi / (16 * lp.tau)
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
		return
	}
	level := t0 / math.Sqrt2
	h := func(w float64) float64 { _, t := lp.sensitivities(w); return t - level }
	for i := 1; i < len(grid); i++ {
		if ts[i] < level {
			res.BandwidthRadPerSec = brent(h, grid[i-1], grid[i], ts[i-1]-level, ts[i]-level)
			return
		}
	}
}
