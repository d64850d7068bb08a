package locus

// Exact stable ranges of a loop with dead time: of the gain at a fixed
// delay, and of the delay at a fixed gain (issue 14, item 2). This file is
// new; nothing else in the package depends on it.

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"sort"

	"github.com/loopwise/loopwise/internal/quasipoly"
	"github.com/loopwise/loopwise/internal/rootfind"
	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/tf"
)

// DelayCrossing is a value of the locus variable k at which a closed-loop
// root of D + k·N·e^(−sτ) lies on the imaginary axis, at s = ±jω.
type DelayCrossing struct {
	// Value is the crossing value of k.
	Value float64
	// FrequencyRadPerSec is ω ≥ 0.
	FrequencyRadPerSec float64
	// Direction is +1 when, as k increases through Value, roots move into
	// the right half plane (two for ω > 0, one for ω = 0), and −1 when they
	// move out.
	Direction int
}

// DelayGainStability is the exact stable set of the locus variable for a
// loop with dead time.
type DelayGainStability struct {
	// Crossings in the range, sorted by value.
	Crossings []DelayCrossing
	// StableIntervals are the open intervals of k in the range for which
	// every closed-loop root has Re s < 0.
	StableIntervals []Interval
	// Range is the range searched (Settings.Range).
	Range Range
	// ProvedBeyond is the value |k| beyond which every crossing moves roots
	// into the right half plane (the phase φ(ω) = ωτ + arg D(jω) −
	// arg N(jω) is increasing at all higher crossing frequencies), so no
	// stable value lies beyond the last reported unstable piece. It bounds
	// the search of an unbounded range.
	ProvedBeyond float64
	// DelaySec echoes the dead time τ.
	DelaySec float64
}

// DelayedStableGains returns the exact set of stable values of k for the
// closed loop D(s) + k·N(s)·e^(−sτ) = 0 of the loop k·N/D·e^(−sτ), τ =
// loop.DelaySec(), over set.Range ((0, +Inf) by default). The loop may be
// the Parametric.Loop of a parameter entering affinely.
//
// Method: a root on the axis at s = jω needs k = −D(jω)e^(jωτ)/N(jω)
// real, that is φ(ω) = ωτ + arg D(jω) − arg N(jω) ≡ 0 (mod π). φ is
// continuous, and monotone between the real roots of the polynomial
// |D|²|N|²·φ′(ω) = τ|D|²|N|² + Re(D′·conj D)|N|² − Re(N′·conj N)|D|² (all
// on s = jω), so each level qπ is met at most once per monotone piece; it
// is bracketed there (Brent) and polished on Im(D·conj N·e^(jωτ)) = 0,
// computed from the coefficients. The direction of a crossing is the sign
// of k·φ′(ω), since ds/dk = 1/(k·(D′/D − N′/N + τ)) there. Beyond the last
// root of φ′ every crossing is destabilising, which ends the search of an
// unbounded range. The stability of each piece between crossings is
// decided by counting the roots with Re s > 0 by the argument principle
// (see DelayedRoots).
//
// Special cases are:
//   - no dead time: the crossings of Analyze, computed the same way.
//   - a biproper loop (deg N = deg D): ErrUnsupported. Its closed loop is
//     of neutral type: for |k| ≥ |d_n/n_n| a chain of infinitely many roots
//     lies on or right of the axis, so those gains are never exponentially
//     stable, and crossings accumulate at |k| = |d_n/n_n|.
//   - open-loop zeros on the imaginary axis with an unbounded range:
//     ErrUnsupported (give a finite Settings.Range).
//   - discrete loops: ErrUnsupported (use Analyze: a whole-sample dead time
//     is exact there).
func DelayedStableGains(loop tf.TF, set *Settings) (DelayGainStability, error) {
	r, err := resolve(set)
	if err != nil {
		return DelayGainStability{}, err
	}
	if loop.IsDiscrete() {
		return DelayGainStability{}, fmt.Errorf("%w: DelayedStableGains is for continuous loops; Analyze writes a whole-sample dead time exactly", ErrUnsupported)
	}
	if loop.Num().IsZero() {
		return DelayGainStability{}, fmt.Errorf("%w: loop %v", ErrZeroNumerator, loop)
	}
	if !loop.IsStrictlyProper() {
		return DelayGainStability{}, fmt.Errorf("%w: loop %v is not strictly proper: with dead time its closed loop is of neutral type (for |k| ≥ |d_n/n_n| infinitely many roots lie on or right of the imaginary axis)", ErrUnsupported, loop)
	}
	if loop.DelaySec() == 0 {
		// A rational loop: Analyze's exact crossings and intervals.
		an, err := Analyze(loop, set)
		if err != nil {
			return DelayGainStability{}, err
		}
		out := DelayGainStability{Range: r.rng, StableIntervals: an.StableIntervals, ProvedBeyond: math.Inf(1)}
		for _, c := range an.AxisCrossings {
			out.Crossings = append(out.Crossings, DelayCrossing{Value: c.Value, FrequencyRadPerSec: c.FrequencyRadPerSec})
		}
		return out, nil
	}
	ph, err := newPhase(loop)
	if err != nil {
		return DelayGainStability{}, err
	}
	out := DelayGainStability{Range: r.rng, DelaySec: ph.tau}
	kmax := math.Max(math.Abs(r.rng.Min), math.Abs(r.rng.Max))
	if math.IsInf(kmax, 1) && ph.axisZero {
		return out, fmt.Errorf("%w: the loop numerator has a zero on the imaginary axis, so crossings of any size occur at finite frequencies; give a finite Settings.Range", ErrUnsupported)
	}
	// Crossings up to ω_big (the last critical point of φ) have |k| ≤ K1.
	var all []DelayCrossing
	bound := kmax
	if math.IsInf(bound, 1) {
		k1 := 0.0
		for _, c := range ph.crossingsUpTo(ph.big) {
			k1 = math.Max(k1, math.Abs(c.Value))
		}
		k1 = math.Max(k1, ph.ratio(ph.big))
		out.ProvedBeyond = k1
		// Every crossing at ω > ω_big destabilises (for increasing |k|):
		// we need those up to the first crossing above K1 on each side.
		bound = 2*k1 + 1
		for range 60 {
			all = ph.crossingsUpTo(ph.omegaFor(bound))
			pos, neg := false, false
			for _, c := range all {
				pos = pos || c.Value > k1
				neg = neg || c.Value < -k1
			}
			if (pos || r.rng.Max <= k1) && (neg || r.rng.Min >= -k1) {
				break
			}
			bound *= 2
		}
	} else {
		out.ProvedBeyond = kmax
		all = ph.crossingsUpTo(ph.omegaFor(bound))
	}
	sort.Slice(all, func(i, j int) bool { return all[i].Value < all[j].Value })
	for _, c := range all {
		// Only crossings with |k| ≤ bound are known to be complete.
		if c.Value > r.rng.Min && c.Value < r.rng.Max && c.Value != 0 && math.Abs(c.Value) <= bound {
			out.Crossings = append(out.Crossings, c)
		}
	}
	// Pieces between consecutive critical values.
	cuts := []float64{r.rng.Min}
	if r.rng.Min < 0 && r.rng.Max > 0 {
		cuts = append(cuts, 0)
	}
	for _, c := range out.Crossings {
		cuts = append(cuts, c.Value)
	}
	cuts = append(cuts, r.rng.Max)
	sort.Float64s(cuts)
	for i := 0; i+1 < len(cuts); i++ {
		lo, hi := cuts[i], cuts[i+1]
		if !(hi > lo) {
			continue
		}
		// An unbounded piece lies beyond every crossing found, hence beyond
		// ProvedBeyond and at least one destabilising crossing: unstable.
		if math.IsInf(lo, -1) || math.IsInf(hi, 1) {
			continue
		}
		k := sampleBetween(lo, hi)
		if math.IsInf(k, 0) || math.IsNaN(k) {
			continue
		}
		ok, err := ph.stableAt(k)
		if err != nil {
			return out, err
		}
		if ok {
			if n := len(out.StableIntervals); n > 0 && out.StableIntervals[n-1].Hi == lo && (lo != 0 || ph.openLoopStable()) {
				out.StableIntervals[n-1].Hi = hi
			} else {
				out.StableIntervals = append(out.StableIntervals, Interval{Lo: lo, Hi: hi})
			}
		}
	}
	return out, nil
}

// phase holds D, N of a loop with dead time and the monotone pieces of
// φ(ω) = ωτ + arg D(jω) − arg N(jω).
type phase struct {
	d, n       poly.Poly
	dd, nd     poly.Poly
	tau        float64
	dRoots     []complex128
	nRoots     []complex128
	crit       []float64 // ω > 0 where φ′ = 0 or an open-loop root lies on the axis
	big        float64   // the largest of crit (0 if none)
	axisZero   bool
	leadOffset float64 // arg of the leading-coefficient ratio
}

func newPhase(loop tf.TF) (*phase, error) {
	ph := &phase{d: loop.Den(), n: loop.Num(), tau: loop.DelaySec()}
	ph.dd, ph.nd = ph.d.Derivative(), ph.n.Derivative()
	var err error
	if ph.dRoots, err = ph.d.Roots(); err != nil {
		return nil, fmt.Errorf("%w: poles of %v: %v", ErrNotFinite, loop, err)
	}
	if ph.nRoots, err = ph.n.Roots(); err != nil {
		return nil, fmt.Errorf("%w: zeros of %v: %v", ErrNotFinite, loop, err)
	}
	if ph.d.Lead()/ph.n.Lead() < 0 {
		ph.leadOffset = math.Pi
	}
	// |D|²|N|²·φ′(ω) as a polynomial in ω.
	dr, di := partsOnAxis(ph.d)
	nr, ni := partsOnAxis(ph.n)
	d1r, d1i := partsOnAxis(ph.dd)
	n1r, n1i := partsOnAxis(ph.nd)
	dm := dr.Mul(dr).Add(di.Mul(di))
	nm := nr.Mul(nr).Add(ni.Mul(ni))
	p := dm.Mul(nm).Scale(ph.tau).Add(d1r.Mul(dr).Add(d1i.Mul(di)).Mul(nm)).Sub(n1r.Mul(nr).Add(n1i.Mul(ni)).Mul(dm))
	ph.crit = positiveRealRoots(p)
	for _, z := range append(append([]complex128(nil), ph.dRoots...), ph.nRoots...) {
		if math.Abs(real(z)) <= 1e-12*math.Max(1, cmplx.Abs(z)) && imag(z) > 0 {
			ph.crit = append(ph.crit, imag(z))
		}
	}
	for _, z := range ph.nRoots {
		if math.Abs(real(z)) <= 1e-12*math.Max(1, cmplx.Abs(z)) {
			ph.axisZero = true
		}
	}
	sort.Float64s(ph.crit)
	if len(ph.crit) > 0 {
		ph.big = ph.crit[len(ph.crit)-1]
	}
	return ph, nil
}

// positiveRealRoots returns the real roots ω > 0 of p, ascending.
func positiveRealRoots(p poly.Poly) []float64 {
	if p.Degree() < 1 {
		return nil
	}
	rs, err := p.RootsWithMultiplicity()
	if err != nil {
		return nil
	}
	var out []float64
	for _, r := range rs {
		v := r.Value
		if real(v) > 0 && math.Abs(imag(v)) <= 1e-7*real(v) {
			out = append(out, real(v))
		}
	}
	sort.Float64s(out)
	return out
}

// phi returns the continuous phase φ(ω) from the open-loop roots.
func (ph *phase) phi(w float64) float64 {
	v := w*ph.tau + ph.leadOffset
	s := complex(0, w)
	for _, p := range ph.dRoots {
		v += cmplx.Phase(s - p)
	}
	for _, z := range ph.nRoots {
		v -= cmplx.Phase(s - z)
	}
	return v
}

// phiDeriv returns φ′(ω) = τ + Re(D′/D) − Re(N′/N) at s = jω.
func (ph *phase) phiDeriv(w float64) float64 {
	s := complex(0, w)
	return ph.tau + real(ph.dd.EvalComplex(s)/ph.d.EvalComplex(s)) - real(ph.nd.EvalComplex(s)/ph.n.EvalComplex(s))
}

// ratio returns |D(jω)/N(jω)|.
func (ph *phase) ratio(w float64) float64 {
	s := complex(0, w)
	return cmplx.Abs(ph.d.EvalComplex(s) / ph.n.EvalComplex(s))
}

// omegaFor returns an ω beyond which |D(jω)/N(jω)| > K: the largest
// positive root of |D(jω)|² − K²|N(jω)|² (strictly proper: it tends to
// +∞), at least ω_big.
func (ph *phase) omegaFor(K float64) float64 {
	dr, di := partsOnAxis(ph.d)
	nr, ni := partsOnAxis(ph.n)
	f := dr.Mul(dr).Add(di.Mul(di)).Sub(nr.Mul(nr).Add(ni.Mul(ni)).Scale(K * K))
	w := ph.big
	for _, r := range positiveRealRoots(f) {
		w = math.Max(w, r)
	}
	return w * (1 + 1e-9)
}

// gimag returns Im(D(jω)·conj N(jω)·e^(jωτ)), zero at crossings.
func (ph *phase) gimag(w float64) float64 {
	s := complex(0, w)
	return imag(ph.d.EvalComplex(s) * cmplx.Conj(ph.n.EvalComplex(s)) * cmplx.Rect(1, w*ph.tau))
}

// crossingsUpTo returns every crossing with 0 ≤ ω ≤ wmax.
func (ph *phase) crossingsUpTo(wmax float64) []DelayCrossing {
	var out []DelayCrossing
	if n0 := ph.n.Eval(0); n0 != 0 {
		k := -ph.d.Eval(0) / n0
		out = append(out, DelayCrossing{Value: k, FrequencyRadPerSec: 0, Direction: sgn(k * ph.phiDeriv(0))})
	}
	edges := []float64{0}
	for _, c := range ph.crit {
		if c < wmax {
			edges = append(edges, c)
		}
	}
	edges = append(edges, wmax)
	for i := 0; i+1 < len(edges); i++ {
		a, b := edges[i], edges[i+1]
		// Stay off the ends (critical points, axis roots) by a hair.
		ea, eb := a+1e-12*math.Max(b, 1e-300), b-1e-12*math.Max(b, 1e-300)
		if i == 0 {
			ea = a
		}
		if !(eb > ea) {
			continue
		}
		fa, fb := ph.phi(ea), ph.phi(eb)
		lo, hi := math.Min(fa, fb), math.Max(fa, fb)
		for q := math.Floor(lo/math.Pi) + 1; q*math.Pi < hi; q++ {
			level := q * math.Pi
			if ea == 0 && math.Abs(level-fa) < 1e-12 {
				continue // ω = 0 is handled above
			}
			w, ok := ph.solveLevel(ea, eb, fa, level)
			if !ok {
				continue
			}
			s := complex(0, w)
			kc := -real(ph.d.EvalComplex(s) * cmplx.Rect(1, w*ph.tau) / ph.n.EvalComplex(s))
			out = append(out, DelayCrossing{Value: kc, FrequencyRadPerSec: w, Direction: sgn(kc * ph.phiDeriv(w))})
		}
	}
	return out
}

// solveLevel finds ω in [a, b] (φ monotone there) with φ(ω) = level: the
// bracket comes from φ, the root from Im(D·conj N·e^(jωτ)) = 0 within the
// part of the bracket where φ stays within π/2 of the level.
func (ph *phase) solveLevel(a, b, fa, level float64) (float64, bool) {
	f := func(w float64) float64 { return ph.phi(w) - level }
	inc := ph.phi(b) > fa
	at := func(l float64) float64 { // ω where φ = l, clipped to [a, b]
		g := func(w float64) float64 { return ph.phi(w) - l }
		ga, gb := g(a), g(b)
		if ga*gb > 0 {
			if (ga > 0) == inc {
				return a
			}
			return b
		}
		return rootfind.Brent(g, a, b, ga, gb, 1e-15)
	}
	lo, hi := at(level-0.5*math.Pi), at(level+0.5*math.Pi)
	if lo > hi {
		lo, hi = hi, lo
	}
	glo, ghi := ph.gimag(lo), ph.gimag(hi)
	if glo*ghi > 0 {
		// Rounding at a bracket end: fall back on φ itself.
		fl, fh := f(lo), f(hi)
		if fl*fh > 0 {
			return 0, false
		}
		return rootfind.Brent(f, lo, hi, fl, fh, 1e-16), true
	}
	return rootfind.Brent(ph.gimag, lo, hi, glo, ghi, 1e-16), true
}

func sgn(x float64) int {
	switch {
	case x > 0:
		return 1
	case x < 0:
		return -1
	}
	return 0
}

// openLoopStable reports whether every root of D has Re s < 0 (k = 0 is
// then a stable value, and pieces on both sides of it join).
func (ph *phase) openLoopStable() bool {
	for _, p := range ph.dRoots {
		if real(p) >= 0 {
			return false
		}
	}
	return true
}

// stableAt reports whether every root of D + k·N·e^(−sτ) has Re s < 0.
func (ph *phase) stableAt(k float64) (bool, error) {
	q := quasipoly.Q{D: ph.d.Coeffs(), N: ph.n.Coeffs(), K: k, Tau: ph.tau}
	c, _, err := q.Count(0)
	if err != nil {
		if errors.Is(err, quasipoly.ErrOnContour) {
			return false, nil // a root on the axis: not asymptotically stable
		}
		return false, fmt.Errorf("%w: counting roots at k = %v: %v", ErrTraceFailed, k, err)
	}
	return c == 0, nil
}

// DelaySwitch is a dead time at which a closed-loop root pair crosses the
// imaginary axis at ±jω (a stability switch).
type DelaySwitch struct {
	// DelaySec is the total dead time τ of the loop at the switch.
	DelaySec float64
	// FrequencyRadPerSec is ω > 0.
	FrequencyRadPerSec float64
	// Direction is +1 when, as τ increases through DelaySec, the pair moves
	// into the right half plane, −1 when it moves out.
	Direction int
}

// DelayStability lists the dead times for which the loop is stable at a
// fixed gain.
type DelayStability struct {
	// Gain is the fixed gain k.
	Gain float64
	// CrossingFrequenciesRadPerSec are the ω > 0 with |D(jω)| = |k·N(jω)|:
	// the only frequencies at which a root can cross the axis, for any τ.
	CrossingFrequenciesRadPerSec []float64
	// Switches are the crossings in increasing dead time, up to the last
	// one that can change stability.
	Switches []DelaySwitch
	// StableDelayIntervals are the intervals of the total dead time, in
	// seconds, over which the closed loop is stable (Lo = 0 included when
	// it is stable without dead time; Hi = +Inf when stable for every
	// larger delay).
	StableDelayIntervals []Interval
	// DelayIndependent reports stability for every τ ≥ 0.
	DelayIndependent bool
	// DelaySec is the loop's own dead time τ₀.
	DelaySec float64
	// DelayMarginSec is how much dead time can be added to τ₀ before the
	// loop becomes unstable (+Inf if never; 0 when unstable at τ₀).
	DelayMarginSec float64
	// StableAtDelay reports whether the loop is stable at its own τ₀.
	StableAtDelay bool
}

// maxSwitches bounds the switches listed by DelayedStableDelays.
const maxSwitches = 100000

// DelayedStableDelays returns the stable ranges of the total dead time τ
// of the loop gain·N/D·e^(−sτ) at a fixed gain, with the stability
// switches (Cooke & van den Driessche 1986; Walton & Marshall 1987).
//
// Method: a root at s = jω needs |D(jω)| = |k·N(jω)|, the real positive
// roots ωᵢ of the polynomial F(ω) = |D(jω)|² − k²|N(jω)|² (finitely many,
// independent of τ). At ωᵢ the delays are τ = (θᵢ + 2πm)/ωᵢ, m = 0, 1, …,
// with θᵢ ∈ [0, 2π) the angle of −k·N(jωᵢ)/D(jωᵢ); the pair moves right
// as τ increases when F′(ωᵢ) > 0 and left when F′(ωᵢ) < 0, the same at
// every m. Starting from the number of right-half-plane roots of the
// polynomial D + k·N (τ = 0), the switches are walked in increasing τ;
// once that number exceeds 2·(number of ωᵢ) no later sequence of switches
// can bring it back to zero, and the walk stops.
//
// Special cases are:
//   - no ωᵢ and stable at τ = 0: stable for every delay (DelayIndependent).
//   - D(0) + k·N(0) = 0: a root at s = 0 for every τ; never asymptotically
//     stable.
//   - deg N = deg D with |k·n_n| ≥ |d_n|: neutral chains on or right of
//     the axis; ErrUnsupported. Below that bound the method holds.
//   - discrete loops: ErrUnsupported.
//
// References:
//   - K. L. Cooke and P. van den Driessche, "On zeroes of some
//     transcendental equations", Funkcialaj Ekvacioj 29, 77–90, 1986.
//   - K. Walton and J. E. Marshall, "Direct method for TDS stability
//     analysis", IEE Proc. D 134(2), 101–107, 1987.
func DelayedStableDelays(loop tf.TF, gain float64) (DelayStability, error) {
	if math.IsNaN(gain) || math.IsInf(gain, 0) {
		return DelayStability{}, fmt.Errorf("%w: gain %v", ErrNotFinite, gain)
	}
	if loop.IsDiscrete() {
		return DelayStability{}, fmt.Errorf("%w: DelayedStableDelays is for continuous loops", ErrUnsupported)
	}
	if loop.Num().IsZero() || gain == 0 {
		return DelayStability{}, fmt.Errorf("%w: loop %v with gain %v", ErrZeroNumerator, loop, gain)
	}
	d, n := loop.Den(), loop.Num()
	if n.Degree() > d.Degree() || (n.Degree() == d.Degree() && math.Abs(gain*n.Lead()) >= math.Abs(d.Lead())) {
		return DelayStability{}, fmt.Errorf("%w: loop %v at gain %v: |k·n_n| ≥ |d_n| gives a neutral closed loop with infinitely many roots on or right of the axis", ErrUnsupported, loop, gain)
	}
	out := DelayStability{Gain: gain, DelaySec: loop.DelaySec()}
	dr, di := partsOnAxis(d)
	nr, ni := partsOnAxis(n)
	F := dr.Mul(dr).Add(di.Mul(di)).Sub(nr.Mul(nr).Add(ni.Mul(ni)).Scale(gain * gain))
	Fd := F.Derivative()
	out.CrossingFrequenciesRadPerSec = positiveRealRoots(F)
	// τ = 0: the polynomial D + k·N.
	c0 := d.Add(n.Scale(gain))
	r0, err := c0.Roots()
	if err != nil {
		return out, fmt.Errorf("%w: roots of D + k·N: %v", ErrNotFinite, err)
	}
	count := 0
	for _, r := range r0 {
		if real(r) >= 0 {
			count++
		}
	}
	if d.Eval(0)+gain*n.Eval(0) == 0 {
		// A root at s = 0 for every delay.
		out.Switches = nil
		return out, nil
	}
	type freq struct {
		w, theta float64
		dir      int
	}
	var fs []freq
	for _, w := range out.CrossingFrequenciesRadPerSec {
		s := complex(0, w)
		v := -complex(gain, 0) * n.EvalComplex(s) / d.EvalComplex(s)
		// e^(−jωτ) = −D/(kN) = 1/v, so ωτ ≡ arg v (mod 2π).
		th := math.Mod(cmplx.Phase(v)+2*math.Pi, 2*math.Pi)
		fs = append(fs, freq{w: w, theta: th, dir: sgn(Fd.Eval(w))})
	}
	next := make([]int, len(fs)) // next m per frequency
	stable := count == 0
	if stable {
		out.StableDelayIntervals = append(out.StableDelayIntervals, Interval{Lo: 0, Hi: math.Inf(1)})
	}
	limit := 2 * len(fs)
	for len(out.Switches) < maxSwitches && len(fs) > 0 {
		best := -1
		bestTau := math.Inf(1)
		for i, f := range fs {
			if f.dir == 0 {
				continue
			}
			tau := (f.theta + 2*math.Pi*float64(next[i])) / f.w
			if tau < bestTau {
				best, bestTau = i, tau
			}
		}
		if best < 0 {
			break
		}
		next[best]++
		sw := DelaySwitch{DelaySec: bestTau, FrequencyRadPerSec: fs[best].w, Direction: fs[best].dir}
		out.Switches = append(out.Switches, sw)
		count += 2 * sw.Direction
		if count < 0 {
			count = 0 // cannot happen for exact data; guard against rounding
		}
		now := count == 0
		switch {
		case stable && !now:
			out.StableDelayIntervals[len(out.StableDelayIntervals)-1].Hi = bestTau
		case !stable && now:
			out.StableDelayIntervals = append(out.StableDelayIntervals, Interval{Lo: bestTau, Hi: math.Inf(1)})
		}
		stable = now
		if count > limit {
			break
		}
	}
	out.DelayIndependent = len(out.StableDelayIntervals) == 1 && out.StableDelayIntervals[0].Lo == 0 && math.IsInf(out.StableDelayIntervals[0].Hi, 1)
	for _, iv := range out.StableDelayIntervals {
		if out.DelaySec >= iv.Lo && out.DelaySec < iv.Hi && !(iv.Lo > 0 && out.DelaySec == iv.Lo) {
			out.StableAtDelay = true
			out.DelayMarginSec = iv.Hi - out.DelaySec
		}
	}
	return out, nil
}
