package response

import (
	"math"
	"testing"

	"github.com/loopwise/loopwise/tf"
)

// delayedLoop returns the closed loop of G(s) = e^(−100s)/(s + 1) sampled
// with a zero-order hold at T = 1 s, in unity negative feedback. Hand
// derivation: the hold equivalent of 1/(s + 1) is b/(z − a) with
// a = e^(−T), b = 1 − e^(−T), and 100 whole sample periods of dead time
// are z^(−100), so L(z) = b/(z^100·(z − a)) and
//
//	T(z) = L/(1 + L) = b/(z^101 − a·z^100 + b),
//
// the difference equation y[k+101] = a·y[k+100] − b·y[k] + b·u[k]: an
// order-101 closed loop whose poles lie near the unit circle (|L| < 1
// except at ω = 0), so the step response rings for about 10⁶ samples.
func delayedLoop(t testing.TB) (sys tf.TF, a, b float64) {
	t.Helper()
	a = math.Exp(-1)
	b = 1 - a
	den := make([]float64, 102)
	den[0], den[1], den[101] = 1, -a, b
	sys, err := tf.NewDiscrete([]float64{b}, den, 1)
	if err != nil {
		t.Fatal(err)
	}
	return sys, a, b
}

// delayedLoopSequence iterates the difference equation of delayedLoop for
// a unit step from rest, k = 0 … K: the reference, independent of the
// state-space realisation. The recursion is a scalar three-term one with
// all poles inside the unit disc, so its rounding stays near 1e-13.
func delayedLoopSequence(a, b float64, K int) []float64 {
	y := make([]float64, K+1)
	for k := 101; k <= K; k++ {
		y[k] = a*y[k-1] - b*y[k-101] + b
	}
	return y
}

// TestStepMetricsDiscreteDeadTime is the regression test of a 100-sample
// dead time in a sampled loop (loop file {"plant":"1/(s+1)",
// "delay_sec":100, "discretize":{"method":"zoh","sample_time_sec":1}}):
// StepMetrics took about a minute, running the dense n² = 101² recursion
// over 6.8 million samples (the horizon regrown ×4 from the start each
// time). The metrics must equal those read from the difference equation
// (the hand derivation above), and the work must be bounded: the sparse
// companion matrix (a shift register) and a horizon grown from where it
// stopped, to about twice the last exit from the band.
func TestStepMetricsDiscreteDeadTime(t *testing.T) {
	sys, a, b := delayedLoop(t)
	m, err := StepMetrics(sys, nil)
	if err != nil {
		t.Fatal(err)
	}
	// Closed forms: T(1) = b/(1 − a + b) = 1/2; y[k] = 0 for k ≤ 100 and
	// y[101] = b = 0.632 > 0.9·(1/2), so both rise levels are first
	// reached at k = 101.
	if math.Abs(m.FinalValue-0.5) > 1e-15 {
		t.Errorf("FinalValue = %.17g, want 0.5", m.FinalValue)
	}
	if m.RiseStartSec != 101 || m.RiseEndSec != 101 || m.RiseTimeSec != 0 {
		t.Errorf("rise %v s to %v s (%v s), want 101 s to 101 s", m.RiseStartSec, m.RiseEndSec, m.RiseTimeSec)
	}
	// Settling, peak and undershoot from the difference equation.
	y := delayedLoopSequence(a, b, 3_000_000)
	last, yMax, yMin := -1, math.Inf(-1), math.Inf(1)
	minMargin := math.Inf(1) // distance of any sample from the band edge
	for k, v := range y {
		d := math.Abs(v/0.5 - 1)
		if d > 0.02 {
			last = k
		}
		minMargin = math.Min(minMargin, math.Abs(d-0.02))
		yMax, yMin = math.Max(yMax, v), math.Min(yMin, v)
	}
	if last < 0 || last > len(y)/2 {
		t.Fatalf("reference: last sample outside the band %d of %d", last, len(y))
	}
	// The decision per sample is safe from rounding (≈1e-13) when no sample
	// lies closer than 1e-10 to the band edge.
	if minMargin < 1e-10 {
		t.Fatalf("reference: a sample lies %g from the band edge; the settling sample is ambiguous", minMargin)
	}
	if want := float64(last + 1); m.SettlingTimeSec != want {
		t.Errorf("SettlingTimeSec = %v, want %v (first sample after the last one outside the 2 %% band)", m.SettlingTimeSec, want)
	}
	if want := 100 * (yMax/0.5 - 1); math.Abs(m.OvershootPct-want) > 1e-9 {
		t.Errorf("OvershootPct = %.15g, want %.15g", m.OvershootPct, want)
	}
	if math.Abs(m.PeakValue-yMax) > 1e-12 {
		t.Errorf("PeakValue = %.17g, want %.17g", m.PeakValue, yMax)
	}
	if yMin/0.5 < -existTol {
		if math.Abs(m.UndershootValue-yMin) > 1e-12 {
			t.Errorf("UndershootValue = %.17g, want %.17g", m.UndershootValue, yMin)
		}
	} else if m.UndershootPct != 0 {
		t.Errorf("UndershootPct = %v, want 0 (min y = %g)", m.UndershootPct, yMin)
	}

	// Work bounds (deterministic, not timed).
	s, err := prepare(sys, "step metrics")
	if err != nil {
		t.Fatal(err)
	}
	if err := s.findPoles(); err != nil {
		t.Fatal(err)
	}
	if e := newTransition(flat(s.m.A), s.n).entries(); e > 3*s.n {
		t.Errorf("a sample multiplies %d entries, want at most 3n = %d (sparse companion matrix)", e, 3*s.n)
	}
	pts, err := s.discretePoints(0.5, 0.02)
	if err != nil {
		t.Fatal(err)
	}
	// The settled test needs the last exit in the first half (≥ 2×); the
	// old ×4 regrowth ran 5.12e6 samples here (5.3×) after 1.7e6 thrown away.
	if len(pts) > 22*(last+1)/10 {
		t.Errorf("the settling search ran %d samples, want at most 2.2× the settling sample %d", len(pts), last+1)
	}
}
