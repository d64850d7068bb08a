package response

import (
	"fmt"
	"math"
	"sort"

	"github.com/loopwise/loopwise/tf"
)

// Interpolation says how Simulate reads the input between its samples.
type Interpolation int

const (
	// Hold keeps each input sample until the next one (zero-order hold).
	Hold Interpolation = iota
	// Linear joins consecutive input samples by straight lines
	// (triangle hold).
	Linear
)

// String returns "hold" or "linear".
func (i Interpolation) String() string {
	switch i {
	case Hold:
		return "hold"
	case Linear:
		return "linear"
	}
	return fmt.Sprintf("Interpolation(%d)", int(i))
}

// SimulateSettings sets how Simulate reads its input. A nil
// *SimulateSettings means all defaults.
type SimulateSettings struct {
	// Interpolation of the input between samples (continuous time only).
	// If zero, defaults to Hold.
	Interpolation Interpolation
	// InitialState: as Settings.InitialState, at the first time of the
	// time vector. If nil, the system starts at rest.
	InitialState []float64
}

// Simulate returns the response of sys to the sampled input given at the
// increasing times timeSec (seconds, not necessarily evenly spaced), read
// between samples as set.Interpolation says; the input is zero before
// timeSec[0] and the system starts there (at rest or from
// set.InitialState). The output is returned at the same times.
//
// Continuous time: the state is advanced exactly over every interval by
// the zero- or first-order-hold equivalent (Van Loan 1978 block matrix
// exponential; one exponential per distinct interval length, so evenly
// spaced times cost n² multiply–adds per sample). A dead time delays the
// input exactly: the delayed input's break points are merged into the
// intervals. Discrete time: timeSec must be evenly spaced by the sample
// period and input is the input sequence; the dead time must be a whole number
// of samples.
//
// Errors: ErrTimeVector (fewer than one sample, lengths differ, not
// strictly increasing, uneven spacing in discrete time), ErrNotFinite,
// ErrImproper, ErrInitialState, ErrDelay, ErrSettings (unknown
// interpolation).
func Simulate(sys tf.TF, timeSec, input []float64, set *SimulateSettings) (Response, error) {
	u := input
	if len(timeSec) == 0 {
		return Response{}, fmt.Errorf("%w: no samples", ErrTimeVector)
	}
	if len(timeSec) != len(u) {
		return Response{}, fmt.Errorf("%w: %d times but %d input values", ErrTimeVector, len(timeSec), len(u))
	}
	for i := range timeSec {
		if err := checkFinite(fmt.Sprintf("timeSec[%d]", i), timeSec[i]); err != nil {
			return Response{}, err
		}
		if err := checkFinite(fmt.Sprintf("input[%d]", i), u[i]); err != nil {
			return Response{}, err
		}
		if i > 0 && !(timeSec[i] > timeSec[i-1]) {
			return Response{}, fmt.Errorf("%w: timeSec[%d] = %v does not exceed timeSec[%d] = %v", ErrTimeVector, i, timeSec[i], i-1, timeSec[i-1])
		}
	}
	var interp Interpolation
	var ic []float64
	if set != nil {
		interp, ic = set.Interpolation, set.InitialState
	}
	if interp != Hold && interp != Linear {
		return Response{}, fmt.Errorf("%w: unknown interpolation %v", ErrSettings, interp)
	}
	s, err := prepare(sys, "simulation")
	if err != nil {
		return Response{}, err
	}
	z, err := s.freeState(ic)
	if err != nil {
		return Response{}, err
	}
	r := Response{
		TimeSec:  append([]float64(nil), timeSec...),
		Output:   make([]float64, len(u)),
		DelaySec: s.delay,
	}
	if s.discrete {
		r.SampleTimeSec = s.ts
		for i := 1; i < len(timeSec); i++ {
			if math.Abs(timeSec[i]-timeSec[0]-float64(i)*s.ts) > 1e-9*s.ts*math.Max(1, float64(i)) {
				return Response{}, fmt.Errorf("%w: discrete system with sample period %v s, but timeSec[%d] = %v is not timeSec[0] + %d·T", ErrTimeVector, s.ts, i, timeSec[i], i)
			}
		}
		v := make([]float64, len(u))
		if s.delaySamp < len(u) {
			copy(v[s.delaySamp:], u)
		}
		s.discreteSequence(v, r.Output)
		if z != nil {
			s.addFree(newTransition(flat(s.m.A), s.n), z, r.Output)
		}
	} else if err := s.simulateContinuous(timeSec, u, interp, z, r.Output); err != nil {
		return Response{}, err
	}
	for k, v := range r.Output {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return Response{}, fmt.Errorf("%w: the response overflows at t = %v s", ErrNotFinite, timeSec[k])
		}
	}
	return r, nil
}

// event is a point of the merged time grid: a query time (output wanted)
// and/or a break point of the delayed input (input segment seg starts).
type event struct {
	t     float64
	query int // index into timeSec, or −1
	seg   int // input segment starting here, or −1
}

// holdCache keeps the hold equivalents per interval length. Lengths equal
// to within a few ulps of the largest time are the same length.
type holdCache struct {
	s       *system
	tol     float64
	lengths []float64
	phi     [][]float64
	g1, g2  [][]float64
}

const maxCachedLengths = 64

func (c *holdCache) get(dt float64) (phi, g1, g2 []float64, err error) {
	for i, l := range c.lengths {
		if math.Abs(l-dt) <= c.tol {
			return c.phi[i], c.g1[i], c.g2[i], nil
		}
	}
	p, a, b, err := c.s.m.FirstOrderHold(dt)
	if err != nil {
		return nil, nil, nil, err
	}
	phi = flat(p)
	if len(c.lengths) < maxCachedLengths {
		c.lengths = append(c.lengths, dt)
		c.phi = append(c.phi, phi)
		c.g1 = append(c.g1, a)
		c.g2 = append(c.g2, b)
	}
	return phi, a, b, nil
}

func (s *system) simulateContinuous(ts, u []float64, interp Interpolation, z []float64, out []float64) error {
	m := s.m
	d := s.delay
	last := ts[len(ts)-1]
	evs := make([]event, 0, 2*len(ts))
	for i, t := range ts {
		e := event{t: t, query: i, seg: -1}
		if d == 0 {
			e.seg = i
		}
		evs = append(evs, e)
	}
	if d > 0 {
		for j, t := range ts {
			if t+d <= last {
				evs = append(evs, event{t: t + d, query: -1, seg: j})
			}
		}
	}
	sort.SliceStable(evs, func(i, j int) bool { return evs[i].t < evs[j].t })
	// Merge events closer than rounding.
	tol := 8 * 0x1p-52 * math.Max(math.Abs(ts[0]), math.Abs(last))
	merged := evs[:1]
	for _, e := range evs[1:] {
		p := &merged[len(merged)-1]
		if e.t-p.t <= tol {
			if e.query >= 0 {
				p.query = e.query
				p.t = e.t // keep the query's own time
			}
			if e.seg >= 0 {
				p.seg = e.seg
			}
			continue
		}
		merged = append(merged, e)
	}
	if s.n == 0 {
		seg := -1
		for _, e := range merged {
			if e.seg >= 0 {
				seg = e.seg
			}
			if e.query >= 0 {
				out[e.query] = m.D * inputAt(ts, u, seg, e.t-d, interp)
			}
		}
		return nil
	}
	cache := &holdCache{s: s, tol: tol}
	n := s.n
	x := make([]float64, n)
	nx := make([]float64, n)
	var fz, nfz, w, zero []float64
	if z != nil {
		fz = append([]float64(nil), z...)
		nfz = make([]float64, n)
		w = make([]float64, n)
		w[0] = m.Scale[0]
		zero = make([]float64, n)
	}
	seg := -1
	for i, e := range merged {
		if e.seg >= 0 {
			seg = e.seg
		}
		if e.query >= 0 {
			y := dot(m.C, x) + m.D*inputAt(ts, u, seg, e.t-d, interp)
			if fz != nil {
				y += w[0] * fz[0]
			}
			out[e.query] = y
		}
		if i+1 == len(merged) {
			break
		}
		next := merged[i+1].t
		phi, g1, g2, err := cache.get(next - e.t)
		if err != nil {
			return err
		}
		if seg < 0 {
			// No input yet: free evolution of a zero forced state.
			for k := range x {
				x[k] = 0
			}
		} else {
			vs := inputAt(ts, u, seg, e.t-d, interp)
			if interp == Hold {
				advance(phi, x, nx, g1, vs, nil, 0, m.C)
			} else {
				ve := inputAt(ts, u, seg, next-d, interp)
				advance(phi, x, nx, g1, vs, g2, ve-vs, m.C)
			}
			x, nx = nx, x
		}
		if fz != nil {
			advance(phi, fz, nfz, zero, 0, nil, 0, w)
			fz, nfz = nfz, fz
		}
	}
	return nil
}

// inputAt returns the input at time τ (delayed time) within segment seg
// (the input sample index whose interval [t_seg, t_seg+1) holds τ, by
// construction of the event grid).
func inputAt(ts, u []float64, seg int, tau float64, interp Interpolation) float64 {
	if seg < 0 {
		return 0
	}
	if interp == Hold || seg+1 >= len(ts) {
		return u[seg]
	}
	frac := (tau - ts[seg]) / (ts[seg+1] - ts[seg])
	frac = math.Min(math.Max(frac, 0), 1)
	return u[seg] + (u[seg+1]-u[seg])*frac
}
