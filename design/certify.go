package design

import (
	"math"

	"github.com/loopwise/loopwise/spec"
)

// This file saves the step responses of samples whose verdicts are
// certain without measuring the step metrics. Near a stability boundary
// the closed loop rings for a long time and response.StepMetrics has to
// follow it over a long horizon with a step set by the fastest pole (the
// most expensive samples of a run: 2–3 times the cost at a well-damped
// value). There the verdicts on the step-response requirements usually are
// the ones that exact values of the response at a few times prove:
//
//   - overshoot fails when y(t)/y_∞ − 1 exceeds the limit at some t (the
//     peak is at least that value);
//   - rise time holds when y(t*)/y_∞ ≥ 90 % at some t* ≤ T: the first
//     time y reaches 90 % is at most t*, the first time it reaches 10 %
//     at least 0, so the rise time is at most t* ≤ T;
//   - settling time fails when |y(t)/y_∞ − 1| exceeds the band at some
//     t > T: y leaves the band after T, so its last exit is after t.
//
// The values are those of the grid of points.go (exact values of the
// continuous response at the grid times, to rounding), judged with a
// margin of 1e-9 relative, far above their rounding (about 1e-12) and
// the root-finding accuracy of the step metrics (1e-13), so that
// response.StepMetrics, which locates every extremum, cannot reach the
// other verdict. (StepMetrics could also fail to measure — ErrNotSettled —
// and fail every requirement, but only for a response still outside
// band/100 after 4⁷·10 time constants of its slowest pole, which a stable
// loop never is.) A sample is taken from these certificates only when every
// bracketed requirement has one there (otherwise one StepMetrics call is
// needed anyway); the numbers returned are bounds on the slacks with the
// certain sign, used to decide met or not met between samples. Every end
// is still located and confirmed on the step metrics themselves.

// certifyMargin is the relative margin of the certificates (see above).
const certifyMargin = 1e-9

// maxCertifyPoints bounds the grid of a certificate; a longer one is not
// tried (the step metrics are measured instead).
const maxCertifyPoints = 4096

// stepBounds returns, for the bracketed requirements req at x, bounds on
// their slacks whose signs are certain, and false when a requirement has
// no certificate there. Only continuous loops without dead time, whose
// bracketed requirements are all step-response requirements, with a
// stable closed loop having an oscillating pole pair, are tried.
func (p *problem) stepBounds(req spec.Requirements, x float64) ([]float64, bool) {
	if p.v.ts > 0 || p.v.delay > 0 || len(req) == 0 {
		return nil, false
	}
	horizon := 0.0
	for _, r := range req {
		switch r.Key() {
		case keyOvershoot, keyRiseTime, keySettling:
		default:
			return nil, false
		}
		if !(r.Limit() > 0) {
			return nil, false
		}
		if r.Key() != keyOvershoot {
			horizon = math.Max(horizon, r.Limit())
		}
	}
	c, ok := p.closedAt(x)
	if !ok || !(c.decay > 0) {
		return nil, false
	}
	h := c.half / 8
	m := math.Ceil(horizon / h)
	if !(m+33 <= maxCertifyPoints) {
		return nil, false
	}
	// The grid of eight half periods first (that of gridAt): it holds the
	// first peaks, so where the overshoot cannot be shown to fail on it the
	// longer grid is not computed.
	g, ok := c.grid(h, 64)
	if !ok {
		return nil, false
	}
	out := make([]float64, len(req))
	if !p.certify(req, c, g, keyOvershoot, out) {
		return nil, false
	}
	if n := int(m) + 33; n > 64 { // two periods beyond the horizon
		if g, ok = c.grid(h, n); !ok {
			return nil, false
		}
	}
	if !p.certify(req, c, g, "", out) {
		return nil, false
	}
	return out, true
}

// certify sets out[i] to the slack bound of every requirement of req of
// the given key (every other key when key is empty) from the grid g, and
// reports whether each has a certificate there.
func (p *problem) certify(req spec.Requirements, c *closedLoop, g samples, key string, out []float64) bool {
	for i, r := range req {
		if key != "" && r.Key() != key || key == "" && r.Key() == keyOvershoot {
			continue
		}
		lim := r.Limit()
		b := math.NaN()
		switch r.Key() {
		case keyOvershoot:
			top := math.Inf(-1)
			for _, y := range g.y {
				top = math.Max(top, y/c.final)
			}
			if v := 100 * (top - 1); v > lim*(1+certifyMargin) {
				b = (lim - v) / lim
			}
		case keyRiseTime:
			for k, y := range g.y {
				if y/c.final >= 0.9+certifyMargin {
					if t := g.t[k]; t <= lim*(1-certifyMargin) {
						b = (lim - t) / lim
					}
					break
				}
			}
		case keySettling:
			for k := len(g.y) - 1; k >= 0 && g.t[k] > lim*(1+certifyMargin); k-- {
				if math.Abs(g.y[k]/c.final-1) > settlingBand+certifyMargin {
					b = (lim - g.t[k]) / lim
					break
				}
			}
		}
		if math.IsNaN(b) {
			return false
		}
		out[i] = b
	}
	return true
}
