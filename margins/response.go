package margins

import (
	"fmt"
	"math"
	"math/cmplx"
	"slices"

	"github.com/loopwise/loopwise/tf"
)

// Response is the frequency response of a loop on a frequency grid. All
// slices have the length of FrequencyRadPerSec.
type Response struct {
	// FrequencyRadPerSec holds the frequencies in rad/s, ascending.
	FrequencyRadPerSec []float64
	// Magnitude is |L| (absolute; +Inf at a pole on the axis).
	Magnitude []float64
	// MagnitudeDB is 20·log10|L|.
	MagnitudeDB []float64
	// PhaseDeg is the phase of L in degrees, unwrapped continuously: it is
	// the phase built from the poles and zeros (and −ωτ for dead time), so
	// it has no 360° jumps whatever the grid, and jumps by ∓180° only where
	// the axis passes a pole or zero of L on it.
	PhaseDeg []float64
	// Value is L(jω) (discrete: L(e^(jωT))).
	Value []complex128
}

// GridSettings tunes AutoGrid and NyquistCurve. A nil *GridSettings means
// the defaults; the zero value of every field selects its default.
type GridSettings struct {
	// MinRadPerSec is the lowest frequency in rad/s, > 0. If zero, defaults
	// to 1/20 of the lowest characteristic frequency (smallest non-zero
	// pole or zero modulus, or crossover).
	MinRadPerSec float64
	// MaxRadPerSec is the highest frequency in rad/s, > MinRadPerSec; for
	// discrete loops at most π/T (ErrAboveNyquist otherwise). If zero,
	// defaults to 20 times the highest characteristic frequency (π/T for
	// discrete loops).
	MaxRadPerSec float64
	// PointsPerDecade is the density of the starting logarithmic grid,
	// 1 to 10⁴. If zero, defaults to 20.
	PointsPerDecade int
	// MaxPhaseStepDeg bounds the phase change between neighbouring points,
	// in degrees, > 0. If zero, defaults to 3.
	MaxPhaseStepDeg float64
	// MaxMagnitudeStepDB bounds the magnitude change between neighbouring
	// points, in dB, > 0. If zero, defaults to 1.
	MaxMagnitudeStepDB float64
	// MaxPoints caps the number of points the refinement may reach, ≥ 10
	// (a starting grid that is already larger is returned as it is). If
	// zero, defaults to 4000.
	MaxPoints int
}

func checkGridSettings(set *GridSettings) (GridSettings, error) {
	var s GridSettings
	if set != nil {
		s = *set
	}
	bad := func(name string, v any, want string) error {
		return fmt.Errorf("%w: %s = %v, want %s", ErrBadSettings, name, v, want)
	}
	for _, f := range []struct {
		name string
		v    float64
	}{{"MinRadPerSec", s.MinRadPerSec}, {"MaxRadPerSec", s.MaxRadPerSec}, {"MaxPhaseStepDeg", s.MaxPhaseStepDeg}, {"MaxMagnitudeStepDB", s.MaxMagnitudeStepDB}} {
		if math.IsNaN(f.v) || math.IsInf(f.v, 0) || f.v < 0 {
			return s, bad(f.name, f.v, "finite and ≥ 0 (0 for the default)")
		}
	}
	if s.PointsPerDecade < 0 || s.PointsPerDecade > 10000 {
		return s, bad("PointsPerDecade", s.PointsPerDecade, "0 to 10000")
	}
	if s.MaxPoints != 0 && s.MaxPoints < 10 {
		return s, bad("MaxPoints", s.MaxPoints, "≥ 10 (0 for the default)")
	}
	if s.MinRadPerSec > 0 && s.MaxRadPerSec > 0 && s.MaxRadPerSec <= s.MinRadPerSec {
		return s, bad("MaxRadPerSec", s.MaxRadPerSec, fmt.Sprintf("> MinRadPerSec = %v", s.MinRadPerSec))
	}
	if s.PointsPerDecade == 0 {
		s.PointsPerDecade = 20
	}
	if s.MaxPhaseStepDeg == 0 {
		s.MaxPhaseStepDeg = 3
	}
	if s.MaxMagnitudeStepDB == 0 {
		s.MaxMagnitudeStepDB = 1
	}
	if s.MaxPoints == 0 {
		s.MaxPoints = 4000
	}
	return s, nil
}

// AutoGrid returns an ascending frequency grid in rad/s for the loop,
// denser where the magnitude or the phase changes fast. It starts from a
// logarithmic grid over [MinRadPerSec, MaxRadPerSec] with the exact gain
// and phase crossover frequencies and the resonance frequencies |Im p| of
// lightly damped poles and zeros inserted, then halves (geometrically)
// every interval across which the phase changes by more than
// MaxPhaseStepDeg or the magnitude by more than MaxMagnitudeStepDB, round
// after round, until no interval does or MaxPoints would be exceeded.
// Errors are those of Compute for the loop, ErrBadSettings and
// ErrAboveNyquist.
func AutoGrid(loop tf.TF, set *GridSettings) ([]float64, error) {
	s, err := checkGridSettings(set)
	if err != nil {
		return nil, err
	}
	lp, err := newLoop(loop)
	if err != nil {
		return nil, err
	}
	special := lp.specialFrequencies()
	lo, hi := s.MinRadPerSec, s.MaxRadPerSec
	fl, fh := math.Inf(1), 0.0
	for _, w := range special {
		if w > 0 && !math.IsInf(w, 0) {
			fl, fh = math.Min(fl, w), math.Max(fh, w)
		}
	}
	if fh == 0 {
		fl, fh = 1, 1
		if lp.tau > 0 {
			fl, fh = 1/lp.tau, 1/lp.tau
		}
	}
	if hi == 0 {
		hi = 20 * fh
	}
	if lp.discrete() {
		if s.MaxRadPerSec > lp.nyquist()*(1+1e-12) {
			return nil, fmt.Errorf("%w: MaxRadPerSec = %v rad/s > π/T = %v rad/s", ErrAboveNyquist, s.MaxRadPerSec, lp.nyquist())
		}
		if s.MaxRadPerSec == 0 {
			hi = lp.nyquist()
		}
		hi = math.Min(hi, lp.nyquist())
	}
	if lo == 0 {
		lo = math.Min(fl/20, hi/100)
	}
	if lo >= hi {
		return nil, fmt.Errorf("%w: grid from %v to %v rad/s is empty (Nyquist frequency %v rad/s)", ErrBadSettings, lo, hi, lp.nyquist())
	}
	decades := math.Log10(hi / lo)
	n := max(2, int(math.Ceil(decades*float64(s.PointsPerDecade)))+1)
	grid := make([]float64, 0, n+len(special))
	for i := range n {
		grid = append(grid, lo*math.Pow(hi/lo, float64(i)/float64(n-1)))
	}
	grid[n-1] = hi
	for _, w := range special {
		if w > lo && w < hi {
			grid = append(grid, w)
		}
	}
	grid = sortUnique(grid, 1e-12)
	if len(grid) > s.MaxPoints {
		return grid, nil
	}
	// Adaptive refinement.
	type pt struct{ db, ph float64 }
	eval := func(w float64) pt {
		return pt{20 * math.Log10(cmplx.Abs(lp.value(w))), lp.phase(w) * 180 / math.Pi}
	}
	vals := make([]pt, len(grid))
	for i, w := range grid {
		vals[i] = eval(w)
	}
	for {
		var split []int
		for i := 0; i+1 < len(grid); i++ {
			a, b := vals[i], vals[i+1]
			dph := math.Abs(b.ph - a.ph)
			ddb := math.Abs(b.db - a.db)
			if math.IsNaN(ddb) || math.IsInf(a.db, 0) || math.IsInf(b.db, 0) {
				ddb = 0
			}
			if (dph > s.MaxPhaseStepDeg || ddb > s.MaxMagnitudeStepDB) && grid[i+1] > grid[i]*(1+1e-9) {
				split = append(split, i)
			}
		}
		if len(split) == 0 || len(grid)+len(split) > s.MaxPoints {
			break
		}
		ng := make([]float64, 0, len(grid)+len(split))
		nv := make([]pt, 0, len(grid)+len(split))
		k := 0
		for i := range grid {
			ng = append(ng, grid[i])
			nv = append(nv, vals[i])
			if k < len(split) && split[k] == i {
				m := math.Sqrt(grid[i] * grid[i+1])
				ng = append(ng, m)
				nv = append(nv, eval(m))
				k++
			}
		}
		grid, vals = ng, nv
	}
	return grid, nil
}

// specialFrequencies returns the crossover frequencies and the resonance
// frequencies of lightly damped (damping ratio < 0.5) poles and zeros.
func (lp *loop) specialFrequencies() []float64 {
	var out []float64
	if lp.ensureRoots() != nil {
		return nil
	}
	if g, err := lp.gainCrossovers(); err == nil {
		out = append(out, g...)
	}
	if lp.tau == 0 {
		if cs, err := lp.rationalPhaseCrossovers(); err == nil {
			for _, c := range cs {
				out = append(out, c.w)
			}
		}
	}
	for _, rs := range [][]complex128{lp.poles, lp.zeros} {
		for _, r := range rs {
			m := cmplx.Abs(r)
			if m == 0 {
				continue
			}
			if imag(r) > 0 && math.Abs(real(r)) < 0.5*m {
				out = append(out, lp.fromAxis(imag(r)))
			}
			out = append(out, lp.fromAxis(m))
		}
	}
	return out
}

// FrequencyResponse returns L(jω) (discrete: L(e^(jωT))) with magnitude,
// magnitude in dB and continuously unwrapped phase in degrees, at the given
// frequencies in rad/s, or on AutoGrid(loop, nil) when omegasRadPerSec is
// nil. The frequencies must be finite and ≥ 0 (ErrNotFinite,
// ErrNegativeFrequency) and, for discrete loops, at most π/T
// (ErrAboveNyquist); they need not be sorted and are returned in the given
// order. At a pole on the axis the value is complex infinity.
func FrequencyResponse(loop tf.TF, omegasRadPerSec []float64) (Response, error) {
	lp, err := newLoop(loop)
	if err != nil {
		return Response{}, err
	}
	ws := slices.Clone(omegasRadPerSec)
	if omegasRadPerSec == nil {
		if ws, err = AutoGrid(loop, nil); err != nil {
			return Response{}, err
		}
	}
	for i, w := range ws {
		switch {
		case math.IsNaN(w) || math.IsInf(w, 0):
			return Response{}, fmt.Errorf("%w: frequency %d is %v", ErrNotFinite, i, w)
		case w < 0:
			return Response{}, fmt.Errorf("%w: frequency %d is %v rad/s", ErrNegativeFrequency, i, w)
		case lp.discrete() && w > lp.nyquist()*(1+1e-12):
			return Response{}, fmt.Errorf("%w: frequency %d is %v rad/s > π/T = %v rad/s", ErrAboveNyquist, i, w, lp.nyquist())
		}
	}
	r := Response{
		FrequencyRadPerSec: ws,
		Magnitude:          make([]float64, len(ws)),
		MagnitudeDB:        make([]float64, len(ws)),
		PhaseDeg:           make([]float64, len(ws)),
		Value:              make([]complex128, len(ws)),
	}
	for i, w := range ws {
		v := lp.value(w)
		r.Value[i] = v
		r.Magnitude[i] = cmplx.Abs(v)
		r.MagnitudeDB[i] = 20 * math.Log10(r.Magnitude[i])
		r.PhaseDeg[i] = lp.phase(w) * 180 / math.Pi
	}
	return r, nil
}

// Nyquist is the Nyquist curve of a loop: L along the imaginary axis
// (discrete: the unit circle), as two branches ordered along the Nyquist
// contour, which runs upwards from −j∞ to +j∞. The mirror branch comes
// first (ω from −ωmax up to −ωmin, values conj L(j|ω|)), then the positive
// branch (ω from ωmin up to ωmax). Within each branch, the direction of
// travel (for arrows) is from index i to i+1. The arcs that close the
// contour (at infinity, and around poles on the axis, where |L| is
// infinite) are not sampled.
type Nyquist struct {
	// PositiveFrequencyRadPerSec holds ω > 0 of the positive branch,
	// ascending.
	PositiveFrequencyRadPerSec []float64
	// Positive holds L(jω) at PositiveFrequencyRadPerSec.
	Positive []complex128
	// MirrorFrequencyRadPerSec holds the negative frequencies −ω of the
	// mirror branch, ascending (from −ωmax to −ωmin).
	MirrorFrequencyRadPerSec []float64
	// Mirror holds L(−jω) = conj L(jω) at MirrorFrequencyRadPerSec.
	Mirror []complex128
}

// NyquistCurve returns the Nyquist curve of the loop on AutoGrid(loop,
// set), with the mirror branch. Errors are those of AutoGrid.
func NyquistCurve(loop tf.TF, set *GridSettings) (Nyquist, error) {
	ws, err := AutoGrid(loop, set)
	if err != nil {
		return Nyquist{}, err
	}
	lp, err := newLoop(loop)
	if err != nil {
		return Nyquist{}, err
	}
	n := len(ws)
	out := Nyquist{
		PositiveFrequencyRadPerSec: ws,
		Positive:                   make([]complex128, n),
		MirrorFrequencyRadPerSec:   make([]float64, n),
		Mirror:                     make([]complex128, n),
	}
	for i, w := range ws {
		v := lp.value(w)
		out.Positive[i] = v
		out.MirrorFrequencyRadPerSec[n-1-i] = -w
		out.Mirror[n-1-i] = cmplx.Conj(v)
	}
	return out, nil
}
