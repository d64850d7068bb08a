package response

import (
	"fmt"
	"math"

	"github.com/loopwise/loopwise/tf"
)

// Settings sets the time grid and initial condition of Step, Impulse and
// Ramp. A nil *Settings means all defaults.
type Settings struct {
	// HorizonSec is the last time of the grid, in seconds, ≥ 0.
	// If zero, defaults to DelaySec + 10/σ, σ the decay rate −Re(p) of the
	// slowest stable pole (−ln|z|/T in discrete time): e^(−10) ≈ 4.5e-5 of
	// the slowest mode is left. Without a stable pole, σ is the smallest
	// nonzero pole modulus (1 s⁻¹ if there is none).
	HorizonSec float64
	// StepSec is the grid spacing in seconds, ≥ 0. If zero, defaults to
	// min(HorizonSec/400, 0.1/max|p|) (at least 62 samples per period of
	// the fastest mode), raised if needed to keep at most 20000 intervals.
	// Discrete time: must be zero or the sample period (the automatic
	// horizon then covers at most 20000 samples). Any grid has at most
	// 10 000 000 samples (ErrSettings beyond).
	StepSec float64
	// InitialState holds the initial conditions of the denominator's
	// differential equation: y(0), y'(0), …, y^(n−1)(0) of the free
	// response, the solution of den(d/dt)·y = 0 (n = denominator degree).
	// In discrete time it holds y[0], …, y[n−1] of the free sequence,
	// den(q)·y = 0 with q the shift. The free response is added to the
	// input's response from rest. If nil, the system starts at rest.
	InitialState []float64
}

// Response is a sampled time response.
type Response struct {
	// TimeSec holds the sample times in seconds: k·StepSec for
	// k = 0 … ⌈HorizonSec/StepSec⌉ (Step, Impulse, Ramp), or the given
	// times (Simulate).
	TimeSec []float64
	// Output holds the output at TimeSec. In continuous time these are
	// exact values of the continuous response at those times (to rounding);
	// in discrete time, the output sequence y[k] at t = k·T.
	Output []float64
	// DirectTerm is the weight of the Dirac impulse in the continuous
	// impulse response of a proper (not strictly proper) system, located at
	// t = DelaySec: the response is DirectTerm·δ(t − DelaySec) plus the
	// samples in Output. Zero in every other case.
	DirectTerm float64
	// DelaySec is the dead time of the system; the response to the input
	// is shifted by exactly this much (the free response is not).
	DelaySec float64
	// SampleTimeSec is the sample period of a discrete-time system, 0 for
	// continuous time. A discrete output is a sequence; read it as held
	// constant between samples.
	SampleTimeSec float64
}

type inputKind int

const (
	stepInput inputKind = iota
	impulseInput
	rampInput
)

func (k inputKind) String() string {
	return [...]string{"step response", "impulse response", "ramp response"}[k]
}

// Step returns the response of sys to a unit step applied at t = 0
// (reaching the system after its dead time), sampled on the grid of set.
//
// Continuous time: the state is advanced by the exact zero-order-hold
// recursion x[k+1] = Φ·x[k] + Γ, with Φ = e^(A·h) and Γ from the block
// matrix exponential of Van Loan (1978), on a scaled and balanced companion
// realisation (package internal/statespace); a step is constant between
// samples, so the samples are exact up to rounding (measured: within 1e-12
// of the peak for orders 2–24, see the benchmarks). Dead time is an exact
// shift: the first partial interval is integrated exactly.
// Discrete time: the difference equation is run through the same
// realisation (its companion matrix stored sparse), or in the δ form when
// the poles crowd at z = 1 (see the package doc); a dead time must be a
// whole number of samples.
//
// Errors: ErrImproper, ErrSettings, ErrNotFinite, ErrInitialState, ErrDelay.
func Step(sys tf.TF, set *Settings) (Response, error) { return run(sys, set, stepInput) }

// Impulse returns the response of sys to a unit Dirac impulse at t = 0
// (continuous time) or a unit pulse at k = 0 (discrete time).
// In continuous time a proper system's response contains D·δ(t − DelaySec);
// its weight D is returned in Response.DirectTerm, and Output holds only the
// regular part C·e^(A(t−DelaySec))·B, exact at the samples (its value at
// t = DelaySec is the right limit). In discrete time the pulse response
// sequence holds D at k = delay samples and DirectTerm is 0.
func Impulse(sys tf.TF, set *Settings) (Response, error) { return run(sys, set, impulseInput) }

// Ramp returns the response of sys to the unit ramp u(t) = t (t ≥ 0),
// delayed by the dead time. In continuous time the ramp is linear between
// samples, so the triangle-hold recursion (first-order hold, see
// internal/statespace) is exact at the samples. In discrete time the input
// is the sampled ramp u[k] = k·T.
func Ramp(sys tf.TF, set *Settings) (Response, error) { return run(sys, set, rampInput) }

func checkFinite(name string, v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return fmt.Errorf("%w: %s is %v", ErrNotFinite, name, v)
	}
	return nil
}

// grid resolves the horizon and step of set for s.
func (s *system) grid(set *Settings) (horizon, step float64, count int, err error) {
	var h, st float64
	if set != nil {
		h, st = set.HorizonSec, set.StepSec
	}
	if err := checkFinite("Settings.HorizonSec", h); err != nil {
		return 0, 0, 0, err
	}
	if err := checkFinite("Settings.StepSec", st); err != nil {
		return 0, 0, 0, err
	}
	if h < 0 {
		return 0, 0, 0, fmt.Errorf("%w: Settings.HorizonSec %v s is negative", ErrSettings, h)
	}
	if st < 0 {
		return 0, 0, 0, fmt.Errorf("%w: Settings.StepSec %v s is negative", ErrSettings, st)
	}
	if s.discrete && st != 0 && math.Abs(st-s.ts) > 1e-12*s.ts {
		return 0, 0, 0, fmt.Errorf("%w: Settings.StepSec %v s differs from the sample period %v s of a discrete system", ErrSettings, st, s.ts)
	}
	if h == 0 || st == 0 {
		if err := s.findPoles(); err != nil {
			return 0, 0, 0, err
		}
	}
	if h == 0 {
		h = s.autoHorizon()
	}
	if st == 0 {
		st = s.autoStep(h)
	}
	if s.discrete {
		st = s.ts
	}
	c := math.Ceil(h/st - 1e-9)
	if c > maxSamples {
		return 0, 0, 0, fmt.Errorf("%w: horizon %v s with step %v s needs %g samples (at most %d)", ErrSettings, h, st, c, maxSamples)
	}
	return h, st, int(c), nil
}

// freeState returns the realisation's initial state for the initial
// conditions ic (companion coordinates), or nil when ic is nil.
func (s *system) freeState(ic []float64) ([]float64, error) {
	if ic == nil {
		return nil, nil
	}
	if len(ic) != s.n {
		return nil, fmt.Errorf("%w: %d values given, the denominator degree is %d", ErrInitialState, len(ic), s.n)
	}
	z := make([]float64, s.n)
	for i, v := range ic {
		if err := checkFinite(fmt.Sprintf("InitialState[%d]", i), v); err != nil {
			return nil, err
		}
		z[i] = v / s.m.Scale[i]
	}
	return z, nil
}

func run(sys tf.TF, set *Settings, kind inputKind) (Response, error) {
	s, err := prepare(sys, kind.String())
	if err != nil {
		return Response{}, err
	}
	_, h, count, err := s.grid(set)
	if err != nil {
		return Response{}, err
	}
	var ic []float64
	if set != nil {
		ic = set.InitialState
	}
	z, err := s.freeState(ic)
	if err != nil {
		return Response{}, err
	}
	r := Response{
		TimeSec:  make([]float64, count+1),
		Output:   make([]float64, count+1),
		DelaySec: s.delay,
	}
	for k := range r.TimeSec {
		r.TimeSec[k] = float64(k) * h
	}
	if s.discrete {
		r.SampleTimeSec = s.ts
		err = s.runDiscrete(kind, r.Output, z)
	} else {
		if kind == impulseInput {
			r.DirectTerm = s.m.D
		}
		err = s.runContinuous(kind, h, r.Output, z)
	}
	if err != nil {
		return Response{}, err
	}
	for k, v := range r.Output {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Response{}, fmt.Errorf("%w: the %v overflows at t = %v s (unstable system over a long horizon)", ErrNotFinite, kind, r.TimeSec[k])
		}
	}
	return r, nil
}
