package response

import (
	"fmt"
	"math"
	"math/cmplx"

	"github.com/loopwise/loopwise/internal/statespace"
	"github.com/loopwise/loopwise/tf"
)

// system is a transfer function prepared for simulation: its realisation,
// poles and time scales.
type system struct {
	sys       tf.TF
	m         statespace.Model
	n         int
	discrete  bool
	ts        float64 // sample period (discrete only)
	delay     float64 // seconds
	delaySamp int     // discrete: delay in whole samples
	poles     []complex128
}

// delaySampleTol is the relative tolerance with which a discrete dead time
// must be a whole number of sample periods (a few ulps of the quotient).
const delaySampleTol = 1e-9

func prepare(sys tf.TF, what string) (*system, error) {
	if !sys.IsProper() {
		return nil, fmt.Errorf("%w: %s of %v needs deg numerator (%d) ≤ deg denominator (%d)",
			ErrImproper, what, sys, sys.Num().Degree(), sys.Den().Degree())
	}
	m, err := statespace.FromTransferFunction(sys.Num().Coeffs(), sys.Den().Coeffs())
	if err != nil {
		return nil, fmt.Errorf("%w: realisation of %v: %v", ErrNotFinite, sys, err)
	}
	s := &system{sys: sys, m: m, n: m.Order(), discrete: sys.IsDiscrete(), ts: sys.SampleTimeSec(), delay: sys.DelaySec()}
	if s.discrete && s.delay > 0 {
		q := s.delay / s.ts
		r := math.Round(q)
		if math.Abs(q-r) > delaySampleTol*math.Max(1, q) {
			return nil, fmt.Errorf("%w: discrete dead time %v s is not a whole number of sample periods (%v s)", ErrDelay, s.delay, s.ts)
		}
		s.delaySamp = int(r)
	}
	return s, nil
}

// findPoles computes the poles, which only the automatic grid and the
// stability checks need (a simulation on a given grid skips the cost).
func (s *system) findPoles() error {
	if s.n == 0 || s.poles != nil {
		return nil
	}
	p, err := s.sys.Poles()
	if err != nil {
		return fmt.Errorf("%w: poles of %v: %v", ErrNotFinite, s.sys, err)
	}
	s.poles = p
	return nil
}

// rate returns the continuous-time decay rate −Re(s) and the modulus |s| of
// a pole; a discrete pole z is mapped by s = ln(z)/T.
func (s *system) rate(p complex128) (decay, speed float64) {
	if s.discrete {
		if p == 0 {
			return math.Inf(1), math.Inf(1) // deadbeat: gone after one sample
		}
		c := cmplx.Log(p) / complex(s.ts, 0)
		return -real(c), cmplx.Abs(c)
	}
	return -real(p), cmplx.Abs(p)
}

// stable reports whether every pole lies strictly in the open left half
// plane (continuous) or the open unit disc (discrete).
func (s *system) stable() bool {
	for _, p := range s.poles {
		if s.discrete {
			if cmplx.Abs(p) >= 1 {
				return false
			}
		} else if real(p) >= 0 {
			return false
		}
	}
	return true
}

func (s *system) unstableError(what string) error {
	var worst complex128
	first := true
	for _, p := range s.poles {
		bad := real(p) >= 0
		if s.discrete {
			bad = cmplx.Abs(p) >= 1
		}
		if bad && (first || real(p) > real(worst)) {
			worst, first = p, false
		}
	}
	where := "Re ≥ 0"
	if s.discrete {
		where = "|z| ≥ 1"
	}
	return fmt.Errorf("%w: %s of %v: pole %s has %s", ErrUnstable, what, s.sys, formatComplex(worst), where)
}

// formatComplex prints a pole as 0.5, −0.5+2i or 2i (no negative zeros).
func formatComplex(z complex128) string {
	re, im := real(z)+0, imag(z)+0 // +0 turns −0 into 0
	switch {
	case im == 0:
		return fmt.Sprintf("%.6g", re)
	case re == 0:
		return fmt.Sprintf("%.6gi", im)
	}
	return fmt.Sprintf("%.6g%+.6gi", re, im)
}

// Rules for the automatic time grid (continuous time):
//
//	horizon = DelaySec + horizonTimeConstants / σ,  σ = min −Re(p) over poles with Re(p) < 0
//	step    = min(horizon/minSamples, stepPerFastest / max|p|)
//	          then raised so that the grid has at most maxAutoSamples intervals
//
// Without stable poles, σ is replaced by the smallest nonzero |p| (1 s⁻¹ if
// every pole is at the origin, or there are none). Discrete time uses the
// sample period as the step, σ = −ln|z|/T, and rounds the horizon up to
// whole samples, at most maxAutoSamples of them.
const (
	horizonTimeConstants = 10         // e^(−10) ≈ 4.5e-5 of the slowest mode remains
	minSamples           = 400        // at least this many intervals over the horizon
	stepPerFastest       = 0.1        // ≥ 62 samples per period of the fastest mode
	maxAutoSamples       = 20000      // cap for very stiff systems
	maxSamples           = 10_000_000 // any grid, given or automatic (160 MB of output)
)

// autoHorizon returns the automatic horizon in seconds.
func (s *system) autoHorizon() float64 {
	sigma := math.Inf(1)
	smallest := math.Inf(1)
	for _, p := range s.poles {
		d, sp := s.rate(p)
		if d > 0 && !math.IsInf(d, 1) {
			sigma = math.Min(sigma, d)
		}
		if sp > 0 && !math.IsInf(sp, 1) {
			smallest = math.Min(smallest, sp)
		}
	}
	if !s.stable() || math.IsInf(sigma, 1) {
		sigma = smallest
	}
	if math.IsInf(sigma, 1) || sigma == 0 {
		sigma = 1
		if s.discrete {
			sigma = 1 / (float64(s.n+1) * s.ts) // deadbeat or static: a few samples
		}
	}
	h := s.delay + horizonTimeConstants/sigma
	if s.discrete {
		h = math.Min(math.Ceil(h/s.ts-1e-9), maxAutoSamples) * s.ts
	}
	return h
}

// autoStep returns the automatic step for the given horizon.
func (s *system) autoStep(horizon float64) float64 {
	if s.discrete {
		return s.ts
	}
	fastest := 0.0
	for _, p := range s.poles {
		fastest = math.Max(fastest, cmplx.Abs(p))
	}
	h := horizon / minSamples
	if fastest > 0 {
		h = math.Min(h, stepPerFastest/fastest)
	}
	return math.Max(h, horizon/maxAutoSamples)
}
