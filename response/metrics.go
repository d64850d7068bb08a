package response

import (
	"fmt"
	"math"
	"math/cmplx"
	"slices"

	"github.com/loopwise/loopwise/tf"
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
	// maxHorizonGrowth bounds the horizon of a continuous response that
	// has not settled within the automatic one: at most
	// 4^(maxHorizonGrowth−1) times it. (A discrete response is bounded by
	// maxSamples samples instead.)
	maxHorizonGrowth = 8
	// maxExtendedSamples bounds the grid of a continuous response extended
	// with its first step (8 MB of states per unit of order … 24 at most
	// 15 MB); a longer horizon gets a new, coarser automatic grid.
	maxExtendedSamples = 4 * maxAutoSamples
	// pairDecays: time constants after which a complex pair's mode
	// (e^(−25) ≈ 1.4e-11 of its start, below existTol for residues up to
	// order one) no longer needs to be covered for its extrema.
	pairDecays = 25
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
// the exact continuous response between samples, to a relative accuracy of
// about 1e-13 — independent of the sample spacing. The samples (spacing of
// the automatic rule, see Settings) only bracket the events: each sign
// change of y′ between two samples is an extremum located exactly, and
// between consecutive samples and extrema the response is monotone. Inside
// a sample interval the state is carried along a dyadic lattice by cached
// scaling-and-squaring pieces of the step's matrix exponential, and the
// last lattice cell is resolved by quintic Hermite interpolation of y, y′,
// y″, which is exact to rounding there (the method and its error bound are
// in between.go); a call costs about 1.5–3 Step calls on the same grid. A
// dead time adds exactly to every time. The horizon covers 1.5 half
// periods of every complex pole pair (until e^(−25) of its mode is left)
// and is extended, with the same step, until the last exit from the band
// lies in the first half and the output at the end is within band/100 of
// the final value.
//
// Discrete time: the metrics are those of the output held constant
// between samples (piecewise constant, as a zero-order hold would show
// it): times are sample instants k·T — the first sample at or beyond a
// level for rise, the sample of the largest value for the peak, and for
// settling the first sample after the last one outside the band (the
// moment the held output enters the band for good). The sequence is run
// once, continued from where it stopped until it has settled (at most
// 10 000 000 samples), through the sparse companion matrix: a dead time of
// d samples (z^(−d)) adds d states but only d entries, so each sample
// costs O(n) and a call costs about one Step over the same samples.
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
	w := getStepWork()
	defer w.release()
	var pts []point
	var ev *evaluator
	if s.discrete {
		pts, err = s.discretePointsIn(final, band, w)
	} else {
		ev, pts, err = s.continuousPoints(final, band, w)
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
		t, _ := ev.locate(a.t, b.t, 0, level*final)
		return t
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
	m.setExtremes(pts, final)
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

// discretePoints runs the step sequence over the automatic horizon and,
// until the response has settled (the last sample outside the band lies in
// the first half and the output at the end is within band/100 of the
// final value), continues it from where it stopped: to twice the last
// exit, and by what the slowest decay rate says is missing for the end to
// come within band/100 (at least 1/64 more), up to maxSamples samples. Earlier samples are never
// recomputed.
func (s *system) discretePoints(final, band float64) ([]point, error) {
	return s.discretePointsIn(final, band, new(stepWork))
}

// discretePointsIn is discretePoints with its buffers in w.
func (s *system) discretePointsIn(final, band float64, w *stepWork) ([]point, error) {
	N := int(math.Round(s.autoHorizon() / s.ts))
	N = max(N, 2*s.n+4)
	// σ: the slowest decay per sample, −ln|z| of the largest pole modulus.
	sigma := math.Inf(1)
	for _, p := range s.poles {
		if r := cmplx.Abs(p); r > 0 {
			sigma = math.Min(sigma, -math.Log(r))
		}
	}
	q := s.newSequence()
	u, y, pts := w.u[:0], w.y[:0], w.pts[:0]
	defer func() { w.u, w.y, w.pts = u, y, pts }()
	last := -1
	for {
		k0 := len(pts)
		for len(u) < N+1-k0 {
			u = append(u, 1)
		}
		y = slices.Grow(y[:0], N+1-k0)[:N+1-k0]
		q.run(u[:N+1-k0], y)
		pts = slices.Grow(pts, N+1-k0)
		for i, v := range y {
			k := k0 + i
			pts = append(pts, point{t: float64(k) * s.ts, r: v / final})
			if math.Abs(pts[k].r-1) > band {
				last = k
			}
		}
		dev := math.Abs(pts[N].r - 1)
		if last < N/2 && dev < band/100 {
			return pts, nil
		}
		if N >= maxSamples {
			return nil, fmt.Errorf("%w: %v within %d samples", ErrNotSettled, s.sys, N)
		}
		// Both rules below exceed N when the test fails; the floor keeps
		// the number of rounds small when they exceed it only slightly.
		need := float64(N) * (1 + 1.0/64)
		need = math.Max(need, 2*float64(last)+2)
		if dev >= band/100 && sigma > 0 && !math.IsInf(sigma, 1) {
			need = math.Max(need, float64(N)+math.Log(100*dev/band)/sigma)
		}
		N = int(math.Min(math.Ceil(need), maxSamples))
	}
}

// continuousPoints samples the step response from rest (no dead time) on
// the automatic grid, locates every extremum between samples, and extends
// the horizon until the response has settled: with the same step, by what
// the slowest decay rate says is missing (at least a quarter more each
// time), up to 4^(maxHorizonGrowth−1) times the automatic horizon; past
// maxExtendedSamples samples the grid is rebuilt with the automatic step of
// the longer horizon. The buffers are those of w.
func (s *system) continuousPoints(final, band float64, w *stepWork) (*evaluator, []point, error) {
	if s.n == 0 {
		// Static gain: y = D from t = 0 on.
		return nil, []point{{0, s.m.D / final}, {1, s.m.D / final}}, nil
	}
	H := s.autoHorizon() - s.delay
	maxH := H * math.Pow(4, maxHorizonGrowth-1)
	sigma := math.Inf(1)
	for _, p := range s.poles {
		sigma = math.Min(sigma, -real(p))
		// A well-damped pair peaks late (ζ = 0.99: at π/ω_d ≈ 2.2/σ·…):
		// cover 1.5 half periods of it, or until e^(−25) of it is left.
		if w := math.Abs(imag(p)); w > 0 {
			H = math.Max(H, math.Min(1.5*math.Pi/w, pairDecays/-real(p)))
		}
	}
	H = math.Min(H, maxH)
	for {
		h := s.autoStep(H)
		ev, err := s.newEvaluator(h, w)
		if err != nil {
			return nil, nil, err
		}
		N := int(math.Ceil(H/h - 1e-9))
		pts := append(w.pts[:0], point{0, ev.ys[0] / final})
		for {
			done := len(ev.ys) - 1
			ev.extend(N)
			for k := done; k < N; k++ {
				if ev.ds[k]*ev.ds[k+1] < 0 {
					t, y := ev.locate(float64(k)*h, float64(k+1)*h, 1, 0)
					pts = append(pts, point{t, y / final})
				}
				pts = append(pts, point{float64(k+1) * h, ev.ys[k+1] / final})
			}
			end := float64(N) * h
			last := -1
			for i, p := range pts {
				if math.Abs(p.r-1) > band {
					last = i
				}
			}
			dev := math.Abs(pts[len(pts)-1].r - 1)
			w.pts = pts
			if (last < 0 || pts[last].t < end/2) && dev < band/100 {
				return ev, pts, nil
			}
			need := 1.25 * end
			if last >= 0 {
				need = math.Max(need, 2.01*pts[last].t)
			}
			if dev >= band/100 && sigma > 0 {
				need = math.Max(need, end+math.Log(100*dev/band)/sigma)
			}
			if need > maxH*(1+1e-12) {
				return nil, nil, fmt.Errorf("%w: %v within %v s", ErrNotSettled, s.sys, end)
			}
			H = need
			N = int(math.Ceil(H/h - 1e-9))
			if N > maxExtendedSamples {
				break // rebuild the grid for the longer horizon
			}
		}
	}
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

// setExtremes sets the peak (with the overshoot) and the undershoot of m
// from the located points pts of the normalised response r = y/final: the
// largest and the smallest r, kept only when they exceed the final value,
// or fall below zero, by more than existTol.
func (m *Metrics) setExtremes(pts []point, final float64) {
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
}
