package design

import (
	"fmt"
	"math"
	"math/cmplx"
	"slices"
	"strconv"

	"github.com/loopwise/loopwise/locus"
	"github.com/loopwise/loopwise/spec"
)

// candidate is a value of the variable at which a requirement may change
// between met and not met, with what happens there in words.
type candidate struct {
	value float64
	label string
}

// Requirement keys of package spec with an exact boundary construction.
const (
	keyPhaseMargin = "min_phase_margin_deg"
	keyGainMargin  = "min_gain_margin_db"
	keyDelayMargin = "min_delay_margin_sec"
	keyPeakSens    = "max_peak_sensitivity"
	keyDamping     = "min_damping_ratio"
	keyOvershoot   = "max_overshoot_pct"
	keyRiseTime    = "max_rise_time_sec"
	keySettling    = "max_settling_time_sec"
	keySteadyState = "max_steady_state_error"
)

// exactCandidates returns the candidates of a requirement whose boundary is
// the solution of polynomial (or, for the delay margin, monotone
// transcendental) equations, and false when the requirement has no exact
// construction here (step metrics, unknown kinds, dead time): it is then
// bracketed on the metric itself.
func (p *problem) exactCandidates(r spec.Requirement) ([]candidate, bool) {
	lim := r.Limit()
	switch r.Key() {
	case keyPhaseMargin:
		if p.v.delay > 0 {
			return nil, false
		}
		return p.phaseMarginCandidates(lim), true
	case keyGainMargin:
		if p.v.delay > 0 {
			return nil, false
		}
		return p.gainMarginCandidates(lim), true
	case keyDelayMargin:
		if p.v.delay > 0 || !(lim > 0) {
			return nil, false
		}
		c := p.delayMarginCandidates(lim)
		// The delay margin also jumps where a gain crossover appears or
		// disappears and where the phase margin wraps at 180°.
		c = append(c, p.crossoverTangencies()...)
		c = append(c, p.wrapCandidates()...)
		return c, true
	case keyPeakSens:
		if p.v.delay > 0 || !(lim > 0) {
			return nil, false
		}
		return p.peakSensitivityCandidates(lim), true
	case keyDamping:
		// With dead time the damping ratio is that of spec's dominant
		// exact roots (spec.DominantClosedLoopRoots), which no polynomial
		// construction gives: bracketed on the metric.
		if p.v.ts > 0 || p.v.delay > 0 || !(lim >= 0 && lim < 1) {
			return nil, false
		}
		return p.dampingCandidates(lim), true
	case keySteadyState:
		if p.v.delay > 0 && p.v.ts == 0 {
			return nil, false
		}
		return p.steadyStateCandidates(lim), true
	}
	return nil, false
}

func fmtNum(x float64) string { return strconv.FormatFloat(x, 'g', 4, 64) }

// targetCandidates returns the values at which L_v(jω) = c for some ω > 0
// (including ω = 0 and, in discrete time, the Nyquist frequency for a real
// c), labelled with what.
func (p *problem) targetCandidates(c complex128, what, key string) []candidate {
	f := p.f
	u := expr{{1, f.n0}, {-c, f.d0}}
	w := expr{{1, f.n1}, {-c, f.d1}}
	var out []candidate
	for _, pt := range solveTarget(u, w) {
		out = append(out, candidate{pt.v, fmt.Sprintf("%s at %s rad/s", what, fmtNum(f.omega(pt.nu)))})
	}
	if imag(c) == 0 {
		// ω = 0 (s = 0, z = 1) and the Nyquist frequency (z = −1): the
		// equation is real there.
		for _, e := range p.axisEnds() {
			n0, n1 := p.v.num0.EvalComplex(e.z), p.v.num1.EvalComplex(e.z)
			d0, d1 := p.v.den0.EvalComplex(e.z), p.v.den1.EvalComplex(e.z)
			uu, ww := n0-c*d0, n1-c*d1
			if ww != 0 {
				v := real(-uu / ww)
				if !math.IsInf(v, 0) && !math.IsNaN(v) {
					out = append(out, candidate{v, fmt.Sprintf("%s at %s rad/s", what, fmtNum(e.omega))})
				}
			}
		}
	}
	return out
}

// axisEnd is an end of the frequency axis: the point and its frequency.
type axisEnd struct {
	z     complex128
	omega float64
}

// axisEnds returns ω = 0 (s = 0, z = 1) and, in discrete time, the Nyquist
// frequency (z = −1).
func (p *problem) axisEnds() []axisEnd {
	ends := []axisEnd{{p.origin(), 0}}
	if p.v.ts > 0 {
		ends = append(ends, axisEnd{-1, math.Pi / p.v.ts})
	}
	return ends
}

// origin is s = 0 (z = 1 in discrete time).
func (p *problem) origin() complex128 {
	if p.v.ts > 0 {
		return 1
	}
	return 0
}

// wrapCandidates returns the values at which the phase margin wraps at
// 180° (L_v(jω) = 1), shared by the phase and delay margins: the roots are
// solved once per Solve.
func (p *problem) wrapCandidates() []candidate {
	if p.wraps == nil {
		p.wraps = append([]candidate{}, p.targetCandidates(1, "the phase margin wraps at 180°", keyPhaseMargin)...)
	}
	return slices.Clone(p.wraps)
}

// crossoverTangencies returns the values at which a gain crossover appears
// or disappears: |N_v|² − |D_v|² has a double root in ω². The phase and
// delay margins share them: the resultant is solved once per Solve.
func (p *problem) crossoverTangencies() []candidate {
	if p.tangencies == nil {
		p.tangencies = append([]candidate{}, p.solveCrossoverTangencies()...)
	}
	return slices.Clone(p.tangencies)
}

func (p *problem) solveCrossoverTangencies() []candidate {
	f := p.f
	q := normSq(onAxis(f.n0), onAxis(f.n1)).sub(normSq(onAxis(f.d0), onAxis(f.d1)), 1)
	var out []candidate
	for _, pt := range solveTangency(q) {
		out = append(out, candidate{pt.v, fmt.Sprintf("a gain crossover appears or disappears at %s rad/s", fmtNum(f.omega(pt.nu)))})
	}
	return out
}

func (p *problem) phaseMarginCandidates(deg float64) []candidate {
	theta := (deg - 180) * math.Pi / 180
	c := cmplx.Rect(1, theta)
	out := p.targetCandidates(c, "phase margin = "+fmtNum(deg)+"°", keyPhaseMargin)
	out = append(out, p.crossoverTangencies()...)
	out = append(out, p.wrapCandidates()...)
	return out
}

func (p *problem) gainMarginCandidates(db float64) []candidate {
	g := math.Pow(10, db/20)
	out := p.targetCandidates(complex(-1/g, 0), "gain margin = "+fmtNum(db)+" dB", keyGainMargin)
	// Phase crossovers appear or disappear where Im(N_v·conj D_v)/ν has a
	// double root.
	f := p.f
	n0, n1, d0, d1 := onAxis(f.n0), onAxis(f.n1), onAxis(f.d0), onAxis(f.d1)
	q := quadratic{
		f0: oddToSquare(imConj(n0, d0)),
		f1: oddToSquare(imConj(n1, d0).Add(imConj(n0, d1))),
		f2: oddToSquare(imConj(n1, d1)),
	}
	for _, pt := range solveTangency(q) {
		out = append(out, candidate{pt.v, fmt.Sprintf("a phase crossover appears or disappears at %s rad/s", fmtNum(f.omega(pt.nu)))})
	}
	return out
}

func (p *problem) peakSensitivityCandidates(ms float64) []candidate {
	f := p.f
	r2 := 1 / (ms * ms)
	c0 := onAxis(f.d0.Add(f.n0))
	c1 := onAxis(f.d1.Add(f.n1))
	q := normSq(c0, c1).sub(normSq(onAxis(f.d0), onAxis(f.d1)), r2)
	label := "peak sensitivity = " + fmtNum(ms)
	var out []candidate
	for _, pt := range solveTangency(q) {
		out = append(out, candidate{pt.v, fmt.Sprintf("%s at %s rad/s", label, fmtNum(f.omega(pt.nu)))})
	}
	// The ends of the frequency axis are stationary points of |1 + L| too.
	for _, e := range p.axisEnds() {
		n0, n1 := p.v.num0.EvalComplex(e.z), p.v.num1.EvalComplex(e.z)
		d0, d1 := p.v.den0.EvalComplex(e.z), p.v.den1.EvalComplex(e.z)
		// |C0 + v·C1|² − r²|D0 + v·D1|² = 0 with real values.
		a0, a1 := real(d0+n0), real(d1+n1)
		b0, b1 := real(d0), real(d1)
		for _, v := range quadRoots(a1*a1-r2*b1*b1, 2*(a0*a1-r2*b0*b1), a0*a0-r2*b0*b0) {
			out = append(out, candidate{v, fmt.Sprintf("%s at %s rad/s", label, fmtNum(e.omega))})
		}
	}
	return out
}

// delayMarginCandidates returns the values at which the loop with an extra
// dead time tau has a closed-loop pole on the boundary: N_v(jω)·e^(−jωτ) +
// D_v(jω) = 0. Only frequencies below 2π/τ matter (the delay margin of a
// crossover at ω is below 2π/ω). v is real where h(ω) = Im(U·conj W) = 0,
// U = N₀e + D₀, W = N₁e + D₁ (e = e^(−jωτ)); h is scanned on 4000 points
// and every sign change refined by Brent's method (the equation is
// transcendental).
func (p *problem) delayMarginCandidates(tau float64) []candidate {
	wmax := 2 * math.Pi / tau
	if p.v.ts > 0 {
		wmax = math.Min(wmax, math.Pi/p.v.ts)
	}
	uw := func(w float64) (complex128, complex128) {
		var x complex128
		if p.v.ts > 0 {
			x = cmplx.Exp(complex(0, w*p.v.ts))
		} else {
			x = complex(0, w)
		}
		e := cmplx.Exp(complex(0, -w*tau))
		u := p.v.num0.EvalComplex(x)*e + p.v.den0.EvalComplex(x)
		ww := p.v.num1.EvalComplex(x)*e + p.v.den1.EvalComplex(x)
		return u, ww
	}
	h := func(w float64) float64 {
		u, ww := uw(w)
		return imag(u * cmplx.Conj(ww))
	}
	if p.v.ts == 0 {
		// In continuous time U·conj W = N₀N̄₁ + D₀D̄₁ + X·e + Y·ē with
		// X = N₀D̄₁, Y = D₀N̄₁, e = e^(−jωτ), so h is a combination of
		// three real polynomials in ω with cos ωτ and sin ωτ:
		// h = P + (Im X + Im Y)·cos ωτ + (Re Y − Re X)·sin ωτ. They are
		// formed once, which makes a frequency of the scan three real
		// Horner evaluations and one sincos.
		n0, n1, d0, d1 := onAxis(p.v.num0), onAxis(p.v.num1), onAxis(p.v.den0), onAxis(p.v.den1)
		pp := imConj(n0, n1).Add(imConj(d0, d1))
		pc := imConj(n0, d1).Add(imConj(d0, n1))
		ps := reConj(d0, n1).Sub(reConj(n0, d1))
		h = func(w float64) float64 {
			s, c := math.Sincos(w * tau)
			return pp.Eval(w) + pc.Eval(w)*c + ps.Eval(w)*s
		}
	}
	const n = 4000
	var out []candidate
	prev := h(wmax * 1e-9)
	xprev := wmax * 1e-9
	for i := 1; i <= n; i++ {
		x := wmax * float64(i) / n
		if i == n && p.v.ts > 0 && x >= math.Pi/p.v.ts {
			x = math.Pi / p.v.ts * (1 - 1e-12)
		}
		hx := h(x)
		if (prev < 0) != (hx < 0) || hx == 0 {
			root := brent(h, xprev, x, prev, hx)
			u, ww := uw(root)
			d := real(ww)*real(ww) + imag(ww)*imag(ww)
			if d > 0 {
				v := -real(u*cmplx.Conj(ww)) / d
				out = append(out, candidate{v, fmt.Sprintf("delay margin = %s s at %s rad/s", fmtNum(tau), fmtNum(root))})
			}
		}
		prev, xprev = hx, x
	}
	return out
}

// steadyStateCandidates: the error to a unit step is D_v(0)/(D_v(0) +
// N_v(0)); it equals e where (1 − e)·D_v(0) − e·N_v(0) = 0, linear in v.
func (p *problem) steadyStateCandidates(e float64) []candidate {
	x := p.origin()
	n0, n1 := real(p.v.num0.EvalComplex(x)), real(p.v.num1.EvalComplex(x))
	d0, d1 := real(p.v.den0.EvalComplex(x)), real(p.v.den1.EvalComplex(x))
	a := (1-e)*d1 - e*n1
	b := (1-e)*d0 - e*n0
	if a == 0 {
		return nil
	}
	return []candidate{{-b / a, "steady-state error = " + fmtNum(e)}}
}

// dampingCandidates uses locus.DampingCrossings on the characteristic
// polynomial a + v·b (dead time replaced by Padé).
func (p *problem) dampingCandidates(zeta float64) []candidate {
	pts, err := locus.DampingCrossings(p.charLoop, zeta, &locus.Settings{Range: p.locusRange(), Variable: p.v.name})
	if err != nil {
		return nil
	}
	var out []candidate
	for _, d := range pts {
		out = append(out, candidate{d.Value, fmt.Sprintf("a closed-loop pole crosses the line ζ = %s at %s", fmtNum(zeta), fmtPole(d.Point))})
	}
	return out
}

func fmtPole(z complex128) string {
	if imag(z) == 0 {
		return fmtNum(real(z))
	}
	return fmt.Sprintf("%s ± %sj", fmtNum(real(z)), fmtNum(math.Abs(imag(z))))
}
