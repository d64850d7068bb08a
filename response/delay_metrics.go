package response

// Step metrics of a closed loop with dead time (issue 14, item 3). New
// file; nothing else in the package depends on it.

import (
	"fmt"
	"math"

	"github.com/loopwise/loopwise/internal/rootfind"
	"github.com/loopwise/loopwise/tf"
)

// ClosedLoopStepMetrics returns the step metrics (definitions as for
// StepMetrics) of the closed loop of ClosedLoopStep, with the dead time
// exact. Stability is decided from the rightmost closed-loop root, found
// exactly with a proof that none is missed (see locus.DelayedRoots; the
// same code, internal/quasipoly). Every time is located by Brent's method
// on the interval interpolants of ClosedLoopStep (accurate to about 1e-14
// of the peak), the extrema on their derivatives; times agree with 50-digit
// references to 1e-10 relative or better (see the tests).
// The horizon grows (×4, up to 8 times) until the last exit from the band
// lies in the first half and the end is within band/100 of the final
// value.
//
// Errors: as ClosedLoopStep, plus ErrUnstable (a closed-loop root with
// Re s ≥ 0), ErrZeroFinalValue, ErrNotSettled, and ErrDelay for a biproper
// loop (neutral type, whose stability is not decided here).
func ClosedLoopStepMetrics(loop tf.TF, set *ClosedLoopSettings, mset *MetricSettings) (Metrics, error) {
	lo, hi, band, err := mset.resolve()
	if err != nil {
		return Metrics{}, err
	}
	var s ClosedLoopSettings
	if set != nil {
		s = *set
	}
	run, err := prepareDelay(loop, s)
	if err != nil {
		return Metrics{}, err
	}
	run.findRightmost()
	if !run.haveRoot {
		return Metrics{}, fmt.Errorf("%w: the closed loop of %v is of neutral type (biproper loop with dead time) or its rightmost root was not found; its stability is not decided here", ErrDelay, loop)
	}
	if real(run.rightmost) >= 0 {
		return Metrics{}, fmt.Errorf("%w: closed loop of %v: root %s has Re ≥ 0", ErrUnstable, loop, formatComplex(run.rightmost))
	}
	final, err := run.finalValue(loop, s)
	if err != nil {
		return Metrics{}, err
	}
	H := s.HorizonSec
	if err := checkFinite("ClosedLoopSettings.HorizonSec", H); err != nil {
		return Metrics{}, err
	}
	if H <= 0 {
		H = run.autoHorizon()
	}
	for grow := 0; ; grow++ {
		ys, _, err := run.integrate(H)
		if err != nil {
			return Metrics{}, err
		}
		pts := run.points(ys, final)
		last := -1
		for i, p := range pts {
			if math.Abs(p.r-1) > band {
				last = i
			}
		}
		end := pts[len(pts)-1]
		settled := (last < 0 || pts[last].t < H/2) && math.Abs(end.r-1) < band/100
		if !settled {
			if grow < maxHorizonGrowth {
				H *= 4
				continue
			}
			return Metrics{}, fmt.Errorf("%w: closed loop of %v within %v s", ErrNotSettled, loop, H)
		}
		return run.metrics(ys, pts, final, lo, hi, band, last), nil
	}
}

// finalValue returns the static gain of the closed-loop path.
func (r *delayRun) finalValue(loop tf.TF, s ClosedLoopSettings) (float64, error) {
	n0, d0 := loop.Num().Eval(0), loop.Den().Eval(0)
	c := d0 + n0 // ≠ 0 for a stable closed loop
	var f float64
	switch s.Input {
	case Reference:
		f = n0 / c
	case OutputDisturbance:
		f = d0 / c
	default:
		// lim_{s→0} F·D/(D + N), with the powers of s that F's and the
		// loop's integrators share cancelled exactly.
		a := s.Filter.Num().Mul(loop.Den()).Ascending()
		b := s.Filter.Den().Mul(loop.Den().Add(loop.Num())).Ascending()
		i := 0
		for i < len(b) && b[i] == 0 {
			if i < len(a) && a[i] != 0 {
				return 0, fmt.Errorf("%w: the filter %v integrates more often than the loop: the output grows without bound", ErrUnstable, s.Filter)
			}
			i++
		}
		if i < len(a) && i < len(b) {
			f = a[i] / b[i]
		}
	}
	if f == 0 {
		return 0, fmt.Errorf("%w: the %v response of the closed loop of %v settles at 0", ErrZeroFinalValue, s.Input, loop)
	}
	return f, nil
}

// samplesPerInterval is how finely each interval is scanned for sign
// changes of y′ before the extrema are located exactly.
const samplesPerInterval = 2 * collocDegree

// points returns the normalised response y/final at the interval ends,
// at scan points, and at every extremum (located by Brent on the
// derivative interpolant), so that it is monotone between points.
func (r *delayRun) points(ys [][]float64, final float64) []point {
	var pts []point
	dy := make([]float64, collocDegree+1)
	for i, y := range ys {
		t0 := float64(i) * r.h
		for j := range dy {
			v := 0.0
			for k, a := range r.dm[j] {
				v += a * y[k]
			}
			dy[j] = v
		}
		d := func(th float64) float64 { return r.interp(dy, th) }
		prevT, prevD := 0.0, d(0)
		pts = append(pts, point{t: t0, r: y[0] / final})
		for k := 1; k <= samplesPerInterval; k++ {
			th := r.h * float64(k) / samplesPerInterval
			dv := d(th)
			if k == samplesPerInterval {
				dv = dy[collocDegree]
			}
			if (prevD > 0) != (dv > 0) && prevD != 0 {
				te := rootfind.Brent(d, prevT, th, prevD, dv, 1e-15)
				pts = append(pts, point{t: t0 + te, r: r.interp(y, te) / final})
			}
			if k < samplesPerInterval {
				pts = append(pts, point{t: t0 + th, r: r.interp(y, th) / final})
			}
			prevT, prevD = th, dv
		}
	}
	last := ys[len(ys)-1]
	pts = append(pts, point{t: float64(len(ys)) * r.h, r: last[collocDegree] / final})
	return pts
}

// solve locates y/final = level between a and b (monotone there).
func (r *delayRun) solve(ys [][]float64, a, b point, final, level float64) float64 {
	f := func(t float64) float64 { return r.at(ys, t)/final - level }
	fa, fb := a.r-level, b.r-level
	if fa == 0 {
		return a.t
	}
	if (fa > 0) == (fb > 0) {
		return b.t // a jump at an interval end (neutral loops)
	}
	return rootfind.Brent(f, a.t, b.t, fa, fb, 1e-15)
}

func (r *delayRun) metrics(ys [][]float64, pts []point, final, lo, hi, band float64, last int) Metrics {
	m := Metrics{FinalValue: final}
	first := func(level float64) float64 {
		for i, p := range pts {
			if p.r >= level {
				if i == 0 {
					return p.t
				}
				return r.solve(ys, pts[i-1], p, final, level)
			}
		}
		return math.NaN()
	}
	m.RiseStartSec = first(lo)
	m.RiseEndSec = first(hi)
	if math.IsNaN(m.RiseEndSec) && hi == 1 {
		m.RiseEndSec = math.Inf(1)
	}
	m.RiseTimeSec = m.RiseEndSec - m.RiseStartSec
	if last >= 0 {
		level := 1 + band
		if pts[last].r < 1 {
			level = 1 - band
		}
		m.SettlingTimeSec = r.solve(ys, pts[last], pts[last+1], final, level)
	}
	m.setExtremes(pts, final)
	return m
}
