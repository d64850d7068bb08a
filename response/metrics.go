package response

import (
	"fmt"
	"math"
	"sort"

	"github.com/loopwise/loopwise/internal/rootfind"
	"github.com/loopwise/loopwise/tf"
	"gonum.org/v1/gonum/mat"
)

// MetricSettings sets the levels of StepMetrics. A nil *MetricSettings
// means all defaults.
type MetricSettings struct {
	// RiseLowFraction and RiseHighFraction are the fractions of the final
	// value between which the rise time is measured, 0 < low < high ≤ 1.
	// If zero, default to 0.1 and 0.9 (10–90 %, common practice).
	// With a high fraction of 1 and no overshoot the level is only
	// approached: RiseEndSec and RiseTimeSec are then +Inf.
	RiseLowFraction, RiseHighFraction float64
	// SettlingBandFraction is the half-width of the settling band as a
	// fraction of |final value|, in (0, 1). If zero, defaults to 0.02
	// (2 %, common practice).
	SettlingBandFraction float64
}

// Metrics are the step-response numbers of a stable system. Times are in
// seconds from the application of the step and include the dead time.
// A quantity that does not exist is NaN, as listed per field.
type Metrics struct {
	// FinalValue is the static gain (exact: from the transfer function,
	// not from the last sample).
	FinalValue float64
	// RiseTimeSec is RiseEndSec − RiseStartSec.
	RiseTimeSec float64
	// RiseStartSec and RiseEndSec are the first times the output reaches
	// RiseLowFraction and RiseHighFraction of the final value.
	RiseStartSec, RiseEndSec float64
	// SettlingTimeSec is the last time |y − FinalValue| equals
	// SettlingBandFraction·|FinalValue|; afterwards the output stays inside
	// the band. Zero if the output never leaves the band.
	SettlingTimeSec float64
	// OvershootPct is 100·(PeakValue − FinalValue)/FinalValue, 0 when the
	// output never exceeds the final value (in the direction of the final
	// value).
	OvershootPct float64
	// UndershootPct is 100·max(0, −min(y/FinalValue)): how far the output
	// first goes the wrong way (non-minimum-phase systems), 0 if it never
	// does.
	UndershootPct float64
	// PeakValue and PeakTimeSec are the value and time of the global
	// maximum of y/FinalValue; NaN when there is no overshoot (below 1e-10
	// of the final value, which rounding cannot tell from none). The peak
	// is flat: for an overshoot of fraction ε its time is determined only to
	// about 1e-17/ε relative in double precision (1e-9 for ε ≥ 1e-6; a
	// second-order system with ζ = 0.99, ε = 2.8e-10, gets ~1e-6).
	PeakValue, PeakTimeSec float64
	// UndershootValue and UndershootTimeSec are the value and time of the
	// global minimum of y/FinalValue when it is negative; NaN otherwise.
	UndershootValue, UndershootTimeSec float64
	// SampleTimeSec is the sample period of a discrete system (0 for
	// continuous time); see StepMetrics for how discrete metrics are read.
	SampleTimeSec float64
}

const (
	// existTol: overshoot or undershoot smaller than this fraction of the
	// final value cannot be told from rounding of the response (its samples
	// carry relative errors of about 1e-13 at order 24) and is reported as
	// none.
	existTol = 1e-10
	// maxHorizonGrowth bounds the horizon extensions (×4 each) when the
	// response has not settled within the automatic horizon.
	maxHorizonGrowth = 8
)

func (set *MetricSettings) resolve() (lo, hi, band float64, err error) {
	lo, hi, band = 0.1, 0.9, 0.02
	if set != nil {
		for _, f := range []struct {
			name string
			v    float64
			dst  *float64
		}{{"RiseLowFraction", set.RiseLowFraction, &lo}, {"RiseHighFraction", set.RiseHighFraction, &hi}, {"SettlingBandFraction", set.SettlingBandFraction, &band}} {
			if err := checkFinite("MetricSettings."+f.name, f.v); err != nil {
				return 0, 0, 0, err
			}
			if f.v != 0 {
				*f.dst = f.v
			}
		}
	}
	if !(lo > 0 && lo < hi && hi <= 1) {
		return 0, 0, 0, fmt.Errorf("%w: rise fractions %v and %v must satisfy 0 < low < high ≤ 1", ErrSettings, lo, hi)
	}
	if !(band > 0 && band < 1) {
		return 0, 0, 0, fmt.Errorf("%w: settling band fraction %v must lie in (0, 1)", ErrSettings, band)
	}
	return lo, hi, band, nil
}

// StepMetrics returns the unit-step metrics of sys (typically a closed loop
// T = L/(1+L)): final value, rise, settling, overshoot, undershoot and peak,
// with the definitions of the Conventions section of the package doc.
//
// Continuous time: every time is located by root finding (Brent 1973) on
// the exact continuous response between samples, y(t) = C·x(t) + D with
// x(t_k + τ) = Φ(τ)·x(t_k) + Γ(τ) from the block matrix exponential
// (Van Loan 1978), to a relative accuracy of about 1e-13 — independent of
// the sample spacing. The samples (spacing of the automatic rule, see
// Settings) only bracket the events: each sign change of y′ between two
// samples is an extremum located exactly, and between consecutive samples
// and extrema the response is monotone. A dead time adds exactly to every
// time. The horizon grows (×4, up to 8 times) until the last exit from the
// band lies in the first half and the output at the end is within
// band/100 of the final value.
//
// Discrete time: the metrics are those of the output held constant
// between samples (piecewise constant, as a zero-order hold would show
// it): times are sample instants k·T — the first sample at or beyond a
// level for rise, the sample of the largest value for the peak, and for
// settling the first sample after the last one outside the band (the
// moment the held output enters the band for good).
//
// Errors: ErrUnstable for a pole with Re ≥ 0 (|z| ≥ 1), with no metric
// invented; ErrZeroFinalValue when the static gain is zero; ErrImproper;
// ErrSettings; ErrNotSettled.
func StepMetrics(sys tf.TF, set *MetricSettings) (Metrics, error) {
	lo, hi, band, err := set.resolve()
	if err != nil {
		return Metrics{}, err
	}
	s, err := prepare(sys, "step metrics")
	if err != nil {
		return Metrics{}, err
	}
	if err := s.findPoles(); err != nil {
		return Metrics{}, err
	}
	if !s.stable() {
		return Metrics{}, s.unstableError("step metrics")
	}
	final, err := sys.StaticGain()
	if err != nil {
		return Metrics{}, fmt.Errorf("%w: %v", ErrUnstable, err)
	}
	if final == 0 {
		return Metrics{}, fmt.Errorf("%w: the static gain of %v is 0; levels relative to it are undefined", ErrZeroFinalValue, sys)
	}
	var pts []point
	var ev *evaluator
	if s.discrete {
		pts, err = s.discretePoints(final, band)
	} else {
		ev, pts, err = s.continuousPoints(final, band)
	}
	if err != nil {
		return Metrics{}, err
	}
	m := Metrics{FinalValue: final, SampleTimeSec: s.ts}
	// Root finder on r(t) − level within a monotone stretch.
	locate := func(a, b point, level float64) float64 {
		if s.discrete {
			return b.t
		}
		return ev.solve(a.t, b.t, func(t float64) float64 { y, _ := ev.eval(t); return y/final - level })
	}
	first := func(level float64) float64 {
		for i, p := range pts {
			if p.r >= level {
				if i == 0 {
					return p.t
				}
				return locate(pts[i-1], p, level)
			}
		}
		return math.NaN() // not reached: a settled response reaches every level ≤ 1
	}
	m.RiseStartSec = first(lo)
	m.RiseEndSec = first(hi)
	// The high level 1 is reached only at a peak ≥ 1 or asymptotically.
	if math.IsNaN(m.RiseEndSec) && hi == 1 {
		m.RiseEndSec = math.Inf(1)
	}
	m.RiseTimeSec = m.RiseEndSec - m.RiseStartSec
	last := -1
	for i, p := range pts {
		if math.Abs(p.r-1) > band {
			last = i
		}
	}
	switch {
	case last < 0:
		m.SettlingTimeSec = 0
	case s.discrete:
		m.SettlingTimeSec = pts[last+1].t
	default:
		level := 1 + band
		if pts[last].r < 1 {
			level = 1 - band
		}
		m.SettlingTimeSec = locate(pts[last], pts[last+1], level)
	}
	iMax, iMin := 0, 0
	for i, p := range pts {
		if p.r > pts[iMax].r {
			iMax = i
		}
		if p.r < pts[iMin].r {
			iMin = i
		}
	}
	m.PeakValue, m.PeakTimeSec = math.NaN(), math.NaN()
	if pts[iMax].r-1 > existTol {
		m.PeakValue = pts[iMax].r * final
		m.PeakTimeSec = pts[iMax].t
		m.OvershootPct = 100 * (pts[iMax].r - 1)
	}
	m.UndershootValue, m.UndershootTimeSec = math.NaN(), math.NaN()
	if pts[iMin].r < -existTol {
		m.UndershootValue = pts[iMin].r * final
		m.UndershootTimeSec = pts[iMin].t
		m.UndershootPct = -100 * pts[iMin].r
	}
	// Dead time: an exact shift of every time. Before it, y = 0: outside
	// the band, below every level.
	if d := s.delay; d > 0 {
		m.RiseStartSec += d
		m.RiseEndSec += d
		m.PeakTimeSec += d
		m.UndershootTimeSec += d
		m.SettlingTimeSec = math.Max(m.SettlingTimeSec+d, d)
	}
	return m, nil
}

// point is a sample or a located extremum of the normalised step response
// r = y/final (without dead time); r is monotone between consecutive points.
type point struct {
	t, r float64
}

func (s *system) discretePoints(final, band float64) ([]point, error) {
	N := int(math.Round(s.autoHorizon() / s.ts))
	N = max(N, 2*s.n+4)
	tried := N
	for range maxHorizonGrowth {
		tried = N
		u := make([]float64, N+1)
		for i := range u {
			u[i] = 1
		}
		y := make([]float64, N+1)
		s.discreteSequence(u, y)
		pts := make([]point, N+1)
		last := -1
		for k, v := range y {
			pts[k] = point{t: float64(k) * s.ts, r: v / final}
			if math.Abs(pts[k].r-1) > band {
				last = k
			}
		}
		if last < N/2 && math.Abs(pts[N].r-1) < band/100 {
			return pts, nil
		}
		if 4*N > maxSamples {
			break
		}
		N *= 4
	}
	return nil, fmt.Errorf("%w: %v within %d samples", ErrNotSettled, s.sys, tried)
}

// evaluator gives the exact continuous step response from rest between
// stored samples.
type evaluator struct {
	s      *system
	h      float64
	states []float64 // (N+1)·n, row k = x(k·h)
	ca     []float64 // C·A
	cb     float64   // C·B
}

// eval returns y(t) and y′(t) (t ≥ 0, no dead time) of the unit-step
// response, exact up to rounding.
func (ev *evaluator) eval(t float64) (y, dy float64) {
	n := ev.s.n
	m := ev.s.m
	N := len(ev.states)/n - 1
	k := int(math.Floor(t / ev.h))
	k = min(max(k, 0), N)
	tau := t - float64(k)*ev.h
	xk := ev.states[k*n : k*n+n]
	x := make([]float64, n)
	if tau == 0 {
		copy(x, xk)
	} else {
		phi, g, err := m.ZeroOrderHold(tau)
		if err != nil {
			return math.NaN(), math.NaN()
		}
		var xv mat.VecDense
		xv.MulVec(phi, mat.NewVecDense(n, append([]float64(nil), xk...)))
		for i := range x {
			x[i] = xv.AtVec(i) + g[i]
		}
	}
	return dot(m.C, x) + m.D, dot(ev.ca, x) + ev.cb
}

// solve returns the root of f in [a, b], where f(a) and f(b) differ in
// sign (or one is zero), by Brent's method (R. P. Brent, Algorithms for
// Minimization without Derivatives, 1973, ch. 4), to about 4 ulps of t.
func (ev *evaluator) solve(a, b float64, f func(float64) float64) float64 {
	return rootfind.Brent(f, a, b, f(a), f(b), 4*0x1p-52)
}

// continuousPoints samples the step response from rest (no dead time) on
// the automatic grid, locates every extremum between samples, and grows
// the horizon until the response has settled.
func (s *system) continuousPoints(final, band float64) (*evaluator, []point, error) {
	if s.n == 0 {
		// Static gain: y = D from t = 0 on.
		return nil, []point{{0, s.m.D / final}, {1, s.m.D / final}}, nil
	}
	n := s.n
	m := s.m
	H := s.autoHorizon() - s.delay
	ca := make([]float64, n)
	for j := 0; j < n; j++ {
		for i := 0; i < n; i++ {
			ca[j] += m.C[i] * m.A.At(i, j)
		}
	}
	cb := dot(m.C, m.B)
	for range maxHorizonGrowth {
		h := s.autoStep(H)
		N := int(math.Ceil(H/h - 1e-9))
		phiD, g, err := m.ZeroOrderHold(h)
		if err != nil {
			return nil, nil, err
		}
		phi := flat(phiD)
		states := make([]float64, (N+1)*n)
		for k := 0; k < N; k++ {
			advance(phi, states[k*n:k*n+n], states[(k+1)*n:(k+2)*n], g, 1, nil, 0, m.C)
		}
		ev := &evaluator{s: s, h: h, states: states, ca: ca, cb: cb}
		ys := make([]float64, N+1)
		ds := make([]float64, N+1)
		for k := 0; k <= N; k++ {
			x := states[k*n : k*n+n]
			ys[k] = dot(m.C, x) + m.D
			ds[k] = dot(ca, x) + cb
		}
		pts := make([]point, 0, N+16)
		last := -1
		for k := 0; k <= N; k++ {
			pts = append(pts, point{float64(k) * h, ys[k] / final})
			if k < N && ds[k]*ds[k+1] < 0 {
				t := ev.solve(float64(k)*h, float64(k+1)*h, func(t float64) float64 { _, d := ev.eval(t); return d })
				y, _ := ev.eval(t)
				pts = append(pts, point{t, y / final})
			}
		}
		sort.SliceStable(pts, func(i, j int) bool { return pts[i].t < pts[j].t })
		for i, p := range pts {
			if math.Abs(p.r-1) > band {
				last = i
			}
		}
		if (last < 0 || pts[last].t < H/2) && math.Abs(pts[len(pts)-1].r-1) < band/100 {
			return ev, pts, nil
		}
		H *= 4
	}
	return nil, nil, fmt.Errorf("%w: %v within %v s", ErrNotSettled, s.sys, H/4)
}

// String formats the metrics in words, for logs and reports.
func (m Metrics) String() string {
	s := fmt.Sprintf("final value %.6g, rise time %.6g s (%.6g s to %.6g s), settling time %.6g s",
		m.FinalValue, m.RiseTimeSec, m.RiseStartSec, m.RiseEndSec, m.SettlingTimeSec)
	if math.IsNaN(m.PeakValue) {
		s += ", no overshoot"
	} else {
		s += fmt.Sprintf(", overshoot %.4g %% (peak %.6g at %.6g s)", m.OvershootPct, m.PeakValue, m.PeakTimeSec)
	}
	if !math.IsNaN(m.UndershootValue) {
		s += fmt.Sprintf(", undershoot %.4g %% (%.6g at %.6g s)", m.UndershootPct, m.UndershootValue, m.UndershootTimeSec)
	}
	return s
}
