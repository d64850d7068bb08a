package design

import (
	"fmt"
	"math"
	"math/cmplx"
	"slices"

	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/poly"
	"github.com/loopwise/loopwise/spec"
)

type targetKind int

const (
	targetInvalid targetKind = iota
	targetPhaseMargin
	targetGainMargin
	targetDelayMargin
	targetPeakSensitivity
	targetCrossover
	targetBandwidth
	targetDamping
)

var targetNames = map[targetKind]string{
	targetPhaseMargin:     "phase margin",
	targetGainMargin:      "gain margin",
	targetDelayMargin:     "delay margin",
	targetPeakSensitivity: "peak sensitivity",
	targetCrossover:       "gain-crossover frequency",
	targetBandwidth:       "closed-loop bandwidth",
	targetDamping:         "damping ratio of the dominant poles",
}

// Target is a value of a loop quantity that Values solves for. Make it with
// PhaseMarginDeg, GainMarginDB, DelayMarginSec, PeakSensitivity,
// CrossoverRadPerSec, BandwidthRadPerSec or DominantDampingRatio.
type Target struct {
	kind  targetKind
	value float64
}

// PhaseMarginDeg targets the phase margin (margins.Result.PhaseMarginDeg).
func PhaseMarginDeg(deg float64) Target { return Target{targetPhaseMargin, deg} }

// GainMarginDB targets the (upper) gain margin in dB.
func GainMarginDB(db float64) Target { return Target{targetGainMargin, db} }

// DelayMarginSec targets the delay margin in seconds.
func DelayMarginSec(sec float64) Target { return Target{targetDelayMargin, sec} }

// PeakSensitivity targets Ms = max|1/(1 + L)|.
func PeakSensitivity(ms float64) Target { return Target{targetPeakSensitivity, ms} }

// CrossoverRadPerSec targets a gain crossover (|L| = 1) at the frequency w.
func CrossoverRadPerSec(w float64) Target { return Target{targetCrossover, w} }

// BandwidthRadPerSec targets the closed-loop bandwidth (the lowest
// frequency where |T| falls 3 dB below |T(0)|).
func BandwidthRadPerSec(w float64) Target { return Target{targetBandwidth, w} }

// DominantDampingRatio targets the damping ratio of the dominant
// closed-loop poles: a pair on the line of damping ratio zeta with no other
// closed-loop pole nearer the imaginary axis (continuous time).
func DominantDampingRatio(zeta float64) Target { return Target{targetDamping, zeta} }

// String returns the target in words: "phase margin = 60".
func (t Target) String() string {
	n, ok := targetNames[t.kind]
	if !ok {
		return "invalid target"
	}
	return n + " = " + fmtNum(t.value)
}

// Solution is one value of the variable that gives the target.
type Solution struct {
	// Value is the variable's value.
	Value float64
	// FrequencyRadPerSec is the frequency at which the target is met
	// (the crossover, the peak, the bandwidth; the natural frequency of the
	// dominant pole for a damping ratio).
	FrequencyRadPerSec float64
	// Measured is the target quantity at Value, measured independently by
	// margins.Compute (or from the closed-loop poles).
	Measured float64
	// Stable reports whether the closed loop is stable at Value.
	Stable bool
}

// Values returns every value of the variable in the range at which the
// loop's quantity equals the target, ascending. Candidates are the
// solutions of the boundary equations of Solve (see the package
// documentation; crossover: |N_v(jω)|² = |D_v(jω)|², quadratic in v;
// bandwidth: |N_v(jω)|²·|C_v(0)|² = ½·N_v(0)²·|C_v(jω)|² with C = D + N,
// quartic in v; damping: locus.DampingCrossings); a candidate is kept when
// the quantity measured at it by margins.Compute (which takes the smallest
// margin over all crossovers) equals the target to 1e-6 relative. Errors:
// ErrInvalidInput for a NaN or infinite target, ErrUnsupported for a
// margin target of a loop with dead time or a damping ratio in discrete
// time.
func Values(v Variable, t Target, set *Settings) ([]Solution, error) {
	if _, ok := targetNames[t.kind]; !ok || math.IsNaN(t.value) || math.IsInf(t.value, 0) {
		return nil, fmt.Errorf("%w: target %s", ErrInvalidInput, t)
	}
	p, err := newProblem(v, set)
	if err != nil {
		return nil, err
	}
	if v.delay > 0 && t.kind != targetDamping {
		return nil, fmt.Errorf("%w: %s of a loop with dead time (solve the requirement with Solve instead)", ErrUnsupported, t)
	}
	var cands []candidate
	switch t.kind {
	case targetPhaseMargin:
		cands = p.targetCandidates(cmplx.Rect(1, (t.value-180)*math.Pi/180), "", "")
	case targetGainMargin:
		cands = p.targetCandidates(complex(-math.Pow(10, -t.value/20), 0), "", "")
	case targetDelayMargin:
		if !(t.value > 0) {
			return nil, fmt.Errorf("%w: %s must be positive", ErrInvalidInput, t)
		}
		cands = p.delayMarginCandidates(t.value)
	case targetPeakSensitivity:
		if !(t.value > 0) {
			return nil, fmt.Errorf("%w: %s must be positive", ErrInvalidInput, t)
		}
		cands = p.peakSensitivityCandidates(t.value)
	case targetCrossover:
		if !(t.value > 0) {
			return nil, fmt.Errorf("%w: %s must be positive", ErrInvalidInput, t)
		}
		cands = p.crossoverValues(t.value)
	case targetBandwidth:
		if !(t.value > 0) {
			return nil, fmt.Errorf("%w: %s must be positive", ErrInvalidInput, t)
		}
		cands = p.bandwidthValues(t.value)
	case targetDamping:
		if v.ts > 0 || !(t.value >= 0 && t.value < 1) {
			return nil, fmt.Errorf("%w: %s (continuous time, 0 ≤ ζ < 1 only)", ErrUnsupported, t)
		}
		return p.dampingValues(t.value)
	}
	var out []Solution
	for _, c := range cands {
		if !(c.value > p.rng.Min && c.value < p.rng.Max) {
			continue
		}
		l, err := v.LoopAt(c.value)
		if err != nil {
			continue
		}
		m, err := margins.Compute(l, nil)
		if err != nil {
			continue
		}
		meas, w := math.NaN(), math.NaN()
		switch t.kind {
		case targetPhaseMargin:
			meas, w = m.PhaseMarginDeg, m.GainCrossoverRadPerSec
		case targetGainMargin:
			meas, w = m.GainMarginDB, m.PhaseCrossoverRadPerSec
		case targetDelayMargin:
			meas, w = m.DelayMarginSec, m.DelayMarginRadPerSec
		case targetPeakSensitivity:
			meas, w = m.PeakSensitivity, m.PeakSensitivityRadPerSec
		case targetCrossover:
			for _, g := range m.GainCrossovers {
				if math.Abs(g.FrequencyRadPerSec-t.value) <= 1e-6*t.value {
					meas, w = g.FrequencyRadPerSec, g.FrequencyRadPerSec
				}
			}
		case targetBandwidth:
			meas, w = m.BandwidthRadPerSec, m.BandwidthRadPerSec
		}
		if !(math.Abs(meas-t.value) <= 1e-6*math.Max(math.Abs(t.value), 1e-12)) {
			continue
		}
		out = appendSolution(out, Solution{Value: c.value, FrequencyRadPerSec: w, Measured: meas, Stable: m.ClosedLoopStable})
	}
	slices.SortFunc(out, func(a, b Solution) int { return cmpFloat(a.Value, b.Value) })
	return out, nil
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// appendSolution appends s unless the same value is already there.
func appendSolution(out []Solution, s Solution) []Solution {
	for _, o := range out {
		if sameValue(o.Value, s.Value) {
			return out
		}
	}
	return append(out, s)
}

// pointAt returns the boundary point of the frequency w: jw, or e^(jwT).
func (p *problem) pointAt(w float64) complex128 {
	if p.v.ts > 0 {
		return cmplx.Exp(complex(0, w*p.v.ts))
	}
	return complex(0, w)
}

// quadIn returns |X0 + v·X1|² as coefficients (c0, c1, c2) in v.
func quadIn(x0, x1 complex128) [3]float64 {
	return [3]float64{real(x0 * cmplx.Conj(x0)), 2 * real(x0*cmplx.Conj(x1)), real(x1 * cmplx.Conj(x1))}
}

func (p *problem) crossoverValues(w float64) []candidate {
	x := p.pointAt(w)
	n := quadIn(p.v.num0.EvalComplex(x), p.v.num1.EvalComplex(x))
	d := quadIn(p.v.den0.EvalComplex(x), p.v.den1.EvalComplex(x))
	var out []candidate
	for _, v := range quadRoots(n[2]-d[2], n[1]-d[1], n[0]-d[0]) {
		out = append(out, candidate{v, ""})
	}
	return out
}

func (p *problem) bandwidthValues(w float64) []candidate {
	x, o := p.pointAt(w), p.origin()
	n0, n1 := p.v.num0.EvalComplex(x), p.v.num1.EvalComplex(x)
	c0, c1 := p.v.den0.EvalComplex(x)+n0, p.v.den1.EvalComplex(x)+n1
	m0, m1 := p.v.num0.EvalComplex(o), p.v.num1.EvalComplex(o)
	k0, k1 := p.v.den0.EvalComplex(o)+m0, p.v.den1.EvalComplex(o)+m1
	a := quadIn(n0, n1)
	b := quadIn(k0, k1)
	c := quadIn(m0, m1)
	d := quadIn(c0, c1)
	mul := func(x, y [3]float64) []float64 {
		out := make([]float64, 5)
		for i := range 3 {
			for j := range 3 {
				out[i+j] += x[i] * y[j]
			}
		}
		return out
	}
	ab, cd := mul(a, b), mul(c, d)
	q := make([]float64, 5)
	for i := range q {
		q[i] = ab[i] - 0.5*cd[i]
	}
	qp, err := poly.FromAscending(q)
	if err != nil || qp.Degree() < 1 {
		return nil
	}
	rs, err := qp.Roots()
	if err != nil {
		return nil
	}
	var out []candidate
	for _, r := range rs {
		if math.Abs(imag(r)) <= 1e-9*math.Max(1, cmplx.Abs(r)) {
			out = append(out, candidate{real(r), ""})
		}
	}
	return out
}

func (p *problem) dampingValues(zeta float64) ([]Solution, error) {
	var out []Solution
	for _, c := range p.dampingCandidates(zeta) {
		if !(c.value > p.rng.Min && c.value < p.rng.Max) {
			continue
		}
		l, err := p.v.LoopAt(c.value)
		if err != nil {
			continue
		}
		r := spec.Check(l, spec.Requirements{spec.MinDampingRatio(zeta)}).Results[0]
		poles, err := closedPoles(p, c.value)
		if err != nil {
			continue
		}
		// Dominant: the pole on the ζ line is the rightmost pole.
		var right float64 = math.Inf(-1)
		for _, q := range poles {
			right = math.Max(right, real(q))
		}
		var on complex128
		found := false
		for _, q := range poles {
			if imag(q) > 0 && math.Abs(spec.DampingRatio(q, 0)-zeta) <= 1e-7 {
				on, found = q, true
			}
		}
		if !found || real(on) < right-1e-9*math.Max(1, cmplx.Abs(on)) {
			continue
		}
		out = appendSolution(out, Solution{Value: c.value, FrequencyRadPerSec: cmplx.Abs(on), Measured: spec.DampingRatio(on, 0), Stable: right < 0 && r.Err == nil})
	}
	slices.SortFunc(out, func(a, b Solution) int { return cmpFloat(a.Value, b.Value) })
	return out, nil
}

// closedPoles returns the roots of a + x·b (dead time by Padé).
func closedPoles(p *problem, x float64) ([]complex128, error) {
	a, b, err := p.v.rationalCharacteristic(p.pade)
	if err != nil {
		return nil, err
	}
	return a.Add(b.Scale(x)).Roots()
}
