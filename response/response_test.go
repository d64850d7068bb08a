package response

import (
	"errors"
	"math"
	"testing"

	"github.com/loopwise/loopwise/internal/testutil"
	"github.com/loopwise/loopwise/tf"
)

// secondOrder returns ωn²/(s² + 2ζωn s + ωn²).
func secondOrder(zeta, wn float64) tf.TF {
	return tf.MustNew([]float64{wn * wn}, []float64{1, 2 * zeta * wn, wn * wn})
}

// secondOrderStep is the closed-form unit-step response of secondOrder for
// ζ < 1 (Ogata, Modern Control Engineering, 5th ed., Sec. 5-3, from
// memory; the same formula is checked against mpmath in
// internal/statespace).
func secondOrderStep(zeta, wn, t float64) float64 {
	if t < 0 {
		return 0
	}
	wd := wn * math.Sqrt(1-zeta*zeta)
	return 1 - math.Exp(-zeta*wn*t)/math.Sqrt(1-zeta*zeta)*math.Sin(wd*t+math.Acos(zeta))
}

func TestSecondOrderFormulas(t *testing.T) {
	// Overshoot 100·exp(−ζπ/√(1−ζ²)) and peak time π/(ωn√(1−ζ²)) of the
	// standard second-order system (Ogata, Modern Control Engineering,
	// 5th ed., Sec. 5-3, eqs. for Mp and tp; Nise, Control Systems
	// Engineering, Sec. 4.6; from memory). The times must be located to
	// 1e-9 relative (the requirement; measured ~1e-13); the
	// overshoot is a difference of values near 1, so 1e-9 absolute in
	// percent. Dead time variants check the exact shift.
	for _, zeta := range []float64{0.05, 0.1, 0.3, 0.5, 0.7, 0.9, 0.99} {
		for _, wn := range []float64{0.01, 0.5, 2, 30, 1000} {
			for _, delay := range []float64{0, 0.73 / wn} {
				sys := secondOrder(zeta, wn)
				if delay > 0 {
					sys, _ = sys.WithDelay(delay)
				}
				m, err := StepMetrics(sys, nil)
				if err != nil {
					t.Fatal(err)
				}
				r := math.Sqrt(1 - zeta*zeta)
				wantOS := 100 * math.Exp(-zeta*math.Pi/r)
				wantTp := math.Pi/(wn*r) + delay
				if math.Abs(m.OvershootPct-wantOS) > 1e-9 {
					t.Errorf("ζ=%v ωn=%v delay=%v: overshoot %.15g %%, want %.15g", zeta, wn, delay, m.OvershootPct, wantOS)
				}
				// At ζ = 0.99 the overshoot is 2.8e-10 of the final value: y′
				// near the peak is ~1e-10·ωn and carries rounding of ~1e-17,
				// so the peak time is only determined to ~1e-6 relative in
				// double precision. Checked to 1e-9 where the overshoot
				// exceeds 1e-6 (ζ ≤ 0.9), to 1e-5 otherwise.
				tolTp := 1e-9
				if wantOS < 1e-4 {
					tolTp = 1e-5
				}
				if !testutil.Close(m.PeakTimeSec, wantTp, tolTp, 0) {
					t.Errorf("ζ=%v ωn=%v delay=%v: peak time %.15g, want %.15g", zeta, wn, delay, m.PeakTimeSec, wantTp)
				}
				if !testutil.Close(m.PeakValue, 1+wantOS/100, 1e-11, 0) {
					t.Errorf("ζ=%v ωn=%v: peak %v", zeta, wn, m.PeakValue)
				}
				// The located times satisfy their defining equations on the
				// closed form: y(t10) = 0.1, y(t90) = 0.9, |y(ts) − 1| = 0.02.
				for _, c := range []struct {
					name  string
					t, lv float64
				}{{"t10", m.RiseStartSec, 0.1}, {"t90", m.RiseEndSec, 0.9}} {
					if y := secondOrderStep(zeta, wn, c.t-delay); math.Abs(y-c.lv) > 1e-12 {
						t.Errorf("ζ=%v ωn=%v: y(%s = %v) = %.15g, want %v", zeta, wn, c.name, c.t, y, c.lv)
					}
				}
				if y := secondOrderStep(zeta, wn, m.SettlingTimeSec-delay); math.Abs(math.Abs(y-1)-0.02) > 1e-12 {
					t.Errorf("ζ=%v ωn=%v: |y(ts) − 1| = %.15g, want 0.02", zeta, wn, math.Abs(y-1))
				}
				// …and the band is never left after ts: a fine scan of the
				// closed form over ten more envelope time constants.
				for k := 1; k <= 20000; k++ {
					tt := m.SettlingTimeSec - delay + float64(k)*10/(zeta*wn)/20000
					if math.Abs(secondOrderStep(zeta, wn, tt)-1) > 0.02+1e-12 {
						t.Errorf("ζ=%v ωn=%v: leaves the band at %v after settling %v", zeta, wn, tt, m.SettlingTimeSec)
						break
					}
				}
			}
		}
	}
}

func TestStepSamplesWithDeadTime(t *testing.T) {
	// Dead time is an exact shift: samples of the delayed step equal the
	// closed form at t − delay, including the sample right after the delay
	// (partial first interval). 1e-13 absolute: rounding only.
	zeta, wn, delay := 0.4, 3.0, 0.737
	sys, _ := secondOrder(zeta, wn).WithDelay(delay)
	r, err := Step(sys, &Settings{HorizonSec: 6, StepSec: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	if r.DelaySec != delay {
		t.Errorf("DelaySec %v", r.DelaySec)
	}
	for k, tk := range r.TimeSec {
		if want := secondOrderStep(zeta, wn, tk-delay); math.Abs(r.Output[k]-want) > 1e-13 {
			t.Fatalf("y(%v) = %.17g, want %.17g", tk, r.Output[k], want)
		}
	}
	// The same through Simulate with uneven times and the delay not a
	// multiple of any interval.
	times := []float64{0, 0.2, 0.5, 0.74, 0.9, 1.3, 2.0, 2.05, 3.7}
	ones := make([]float64, len(times))
	for i := range ones {
		ones[i] = 1
	}
	s, err := Simulate(sys, times, ones, nil)
	if err != nil {
		t.Fatal(err)
	}
	for k, tk := range times {
		if want := secondOrderStep(zeta, wn, tk-delay); math.Abs(s.Output[k]-want) > 1e-13 {
			t.Errorf("simulated y(%v) = %.17g, want %.17g", tk, s.Output[k], want)
		}
	}
}

func TestImpulseDirectTerm(t *testing.T) {
	// (s + 2)/(s + 1) = 1 + 1/(s + 1): impulse δ(t) + e^(−t), step
	// 2 − e^(−t) (partial fractions by hand). The Dirac weight is reported
	// apart, not smeared into a sample.
	sys, _ := tf.MustNew([]float64{1, 2}, []float64{1, 1}).WithDelay(0.25)
	imp, err := Impulse(sys, &Settings{HorizonSec: 3, StepSec: 0.1})
	if err != nil {
		t.Fatal(err)
	}
	if imp.DirectTerm != 1 {
		t.Errorf("DirectTerm = %v, want 1", imp.DirectTerm)
	}
	step, err := Step(sys, &Settings{HorizonSec: 3, StepSec: 0.1})
	if err != nil {
		t.Fatal(err)
	}
	for k, tk := range imp.TimeSec {
		wi, ws := 0.0, 0.0
		if tk >= 0.25 {
			wi = math.Exp(-(tk - 0.25))
			ws = 2 - math.Exp(-(tk - 0.25))
		}
		if math.Abs(imp.Output[k]-wi) > 1e-14 || math.Abs(step.Output[k]-ws) > 1e-14 {
			t.Errorf("t=%v: impulse %v want %v, step %v want %v", tk, imp.Output[k], wi, step.Output[k], ws)
		}
	}
}

func TestRamp(t *testing.T) {
	// 1/(s + a) driven by u = t: y = t/a − (1 − e^(−at))/a² (partial
	// fractions by hand), shifted by the dead time; 1e-13 absolute.
	a, delay := 2.5, 0.33
	sys, _ := tf.MustNew([]float64{1}, []float64{1, a}).WithDelay(delay)
	r, err := Ramp(sys, &Settings{HorizonSec: 5, StepSec: 0.1})
	if err != nil {
		t.Fatal(err)
	}
	for k, tk := range r.TimeSec {
		want := 0.0
		if s := tk - delay; s > 0 {
			want = s/a + math.Expm1(-a*s)/(a*a)
		}
		if math.Abs(r.Output[k]-want) > 1e-13 {
			t.Errorf("y(%v) = %.17g, want %.17g", tk, r.Output[k], want)
		}
	}
	// Linear interpolation of u = t at uneven times gives the same exact
	// response (the triangle hold is exact for piecewise-linear inputs).
	times := []float64{0, 0.1, 0.15, 0.7, 0.71, 1.9, 3.3}
	s, err := Simulate(sys, times, times, &SimulateSettings{Interpolation: Linear})
	if err != nil {
		t.Fatal(err)
	}
	for k, tk := range times {
		want := 0.0
		if s := tk - delay; s > 0 {
			want = s/a + math.Expm1(-a*s)/(a*a)
		}
		if math.Abs(s.Output[k]-want) > 1e-13 {
			t.Errorf("linear y(%v) = %.17g, want %.17g", tk, s.Output[k], want)
		}
	}
}

func TestSimulateHoldSuperposition(t *testing.T) {
	// A held input is a sum of delayed steps: y(t) = Σ Δu_j·step(t − t_j −
	// delay). The step response is the closed form of secondOrder. Uneven
	// times; 1e-12 absolute (sums of a few exact terms).
	zeta, wn, delay := 0.25, 4.0, 0.41
	sys, _ := secondOrder(zeta, wn).WithDelay(delay)
	times := []float64{0, 0.3, 0.35, 1.0, 1.6, 2.2, 2.21, 3.5, 5}
	u := []float64{1, -0.5, 2, 0, 0.7, -1.2, 0.3, 1, 1}
	r, err := Simulate(sys, times, u, nil)
	if err != nil {
		t.Fatal(err)
	}
	for k, tk := range times {
		want, prev := 0.0, 0.0
		for j, tj := range times {
			if tj > tk {
				break
			}
			want += (u[j] - prev) * secondOrderStep(zeta, wn, tk-tj-delay)
			prev = u[j]
		}
		if math.Abs(r.Output[k]-want) > 1e-12 {
			t.Errorf("y(%v) = %.17g, want %.17g", tk, r.Output[k], want)
		}
	}
}

func TestInitialState(t *testing.T) {
	// 1/(s² + 3s + 2) from y(0) = 1, y'(0) = 0 with a unit step:
	// free response 2e^(−t) − e^(−2t), forced 1/2 − e^(−t) + e^(−2t)/2
	// (partial fractions by hand); 1e-14 absolute.
	sys := tf.MustNew([]float64{1}, []float64{1, 3, 2})
	ic := []float64{1, 0}
	r, err := Step(sys, &Settings{HorizonSec: 4, StepSec: 0.1, InitialState: ic})
	if err != nil {
		t.Fatal(err)
	}
	free := func(t float64) float64 { return 2*math.Exp(-t) - math.Exp(-2*t) }
	for k, tk := range r.TimeSec {
		want := free(tk) + 0.5 - math.Exp(-tk) + 0.5*math.Exp(-2*tk)
		if math.Abs(r.Output[k]-want) > 1e-14 {
			t.Errorf("y(%v) = %.17g, want %.17g", tk, r.Output[k], want)
		}
	}
	times := []float64{0, 0.5, 1.5, 2}
	s, err := Simulate(sys, times, make([]float64, 4), &SimulateSettings{InitialState: ic})
	if err != nil {
		t.Fatal(err)
	}
	for k, tk := range times {
		if math.Abs(s.Output[k]-free(tk)) > 1e-14 {
			t.Errorf("free y(%v) = %.17g, want %.17g", tk, s.Output[k], free(tk))
		}
	}
	if _, err := Step(sys, &Settings{InitialState: []float64{1}}); !errors.Is(err, ErrInitialState) {
		t.Errorf("short initial state: %v", err)
	}
}

// differenceEquation runs a0·y[k] + a1·y[k−1] + … = b0·u[k−(n−m)] + … for
// num (degree m) and den (degree n) in z, the naive reference.
func differenceEquation(num, den, u []float64) []float64 {
	n := len(den) - 1
	lag := n - (len(num) - 1)
	y := make([]float64, len(u))
	for k := range u {
		s := 0.0
		for i, b := range num {
			if j := k - lag - i; j >= 0 {
				s += b * u[j]
			}
		}
		for i := 1; i <= n; i++ {
			if k-i >= 0 {
				s -= den[i] * y[k-i]
			}
		}
		y[k] = s / den[0]
	}
	return y
}

func TestDiscreteAgainstDifferenceEquation(t *testing.T) {
	// G(z) = (0.1z + 0.22)/(z² − 1.2z + 0.52), T = 0.1 s, with and without
	// a dead time of 3 samples: step, pulse and ramp sequences against the
	// difference equation; metrics against their sequence definitions
	// (package doc). 1e-13 absolute: both are exact recursions.
	num, den := []float64{0.1, 0.22}, []float64{1, -1.2, 0.52}
	T := 0.1
	// A biproper system too: (0.5z² + 0.1z + 0.22)/(z² − 1.2z + 0.52) has
	// a direct term, which appears in the pulse response's first sample.
	for _, nm := range [][]float64{num, {0.5, 0.1, 0.22}} {
		checkDiscrete(t, nm, den, T)
	}
}

func checkDiscrete(t *testing.T, num, den []float64, T float64) {
	t.Helper()
	for _, lag := range []int{0, 3} {
		sys, _ := tf.NewDiscrete(num, den, T)
		if lag > 0 {
			sys, _ = sys.WithDelay(float64(lag) * T)
		}
		N := 120
		inputs := map[string]func(k int) float64{
			"step":    func(k int) float64 { return 1 },
			"impulse": func(k int) float64 { return map[bool]float64{true: 1}[k == 0] },
			"ramp":    func(k int) float64 { return float64(k) * T },
		}
		runs := map[string]func(tf.TF, *Settings) (Response, error){"step": Step, "impulse": Impulse, "ramp": Ramp}
		for name, f := range inputs {
			u := make([]float64, N+1)
			for k := range u {
				if k >= lag {
					u[k] = f(k - lag)
				}
			}
			want := differenceEquation(num, den, u)
			r, err := runs[name](sys, &Settings{HorizonSec: float64(N) * T})
			if err != nil {
				t.Fatal(err)
			}
			if len(r.Output) != N+1 || r.SampleTimeSec != T {
				t.Fatalf("%s: %d samples, T %v", name, len(r.Output), r.SampleTimeSec)
			}
			for k := range want {
				if math.Abs(r.Output[k]-want[k]) > 1e-13 {
					t.Fatalf("lag %d %s: y[%d] = %v, want %v", lag, name, k, r.Output[k], want[k])
				}
			}
		}
		// Metrics on the held sequence.
		u := make([]float64, 400)
		for k := range u {
			if k >= lag {
				u[k] = 1
			}
		}
		y := differenceEquation(num, den, u)
		final := 0.0
		for _, b := range num {
			final += b
		}
		final /= 1 - 1.2 + 0.52
		firstAt := func(lv float64) float64 {
			for k, v := range y {
				if v/final >= lv {
					return float64(k) * T
				}
			}
			return math.NaN()
		}
		kPeak, kLast := 0, -1
		for k, v := range y {
			if v > y[kPeak] {
				kPeak = k
			}
			if math.Abs(v/final-1) > 0.02 {
				kLast = k
			}
		}
		m, err := StepMetrics(sys, nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, c := range []struct {
			name      string
			got, want float64
		}{
			{"final", m.FinalValue, final},
			{"t10", m.RiseStartSec, firstAt(0.1)},
			{"t90", m.RiseEndSec, firstAt(0.9)},
			{"peak value", m.PeakValue, y[kPeak]},
			{"peak time", m.PeakTimeSec, float64(kPeak) * T},
			{"overshoot", m.OvershootPct, 100 * (y[kPeak]/final - 1)},
			{"settling", m.SettlingTimeSec, float64(kLast+1) * T},
		} {
			if !testutil.Close(c.got, c.want, 1e-12, 1e-12) {
				t.Errorf("lag %d: %s = %v, want %v", lag, c.name, c.got, c.want)
			}
		}
		// Simulate with the same sequence.
		times := make([]float64, 50)
		uu := make([]float64, 50)
		for k := range times {
			times[k] = float64(k) * T
			uu[k] = math.Sin(0.3 * float64(k))
		}
		sim, err := Simulate(sys, times, uu, nil)
		if err != nil {
			t.Fatal(err)
		}
		shifted := make([]float64, 50)
		copy(shifted[lag:], uu)
		want := differenceEquation(num, den, shifted)
		for k := range want {
			if math.Abs(sim.Output[k]-want[k]) > 1e-13 {
				t.Fatalf("lag %d: simulated y[%d] = %v, want %v", lag, k, sim.Output[k], want[k])
			}
		}
	}
}

func TestDiscreteInitialState(t *testing.T) {
	// y[0], y[1] of the free sequence of den = z² − 1.2z + 0.52:
	// y[k] = 1.2·y[k−1] − 0.52·y[k−2] (the homogeneous difference equation).
	sys, _ := tf.NewDiscrete([]float64{0.1, 0.22}, []float64{1, -1.2, 0.52}, 0.1)
	sim, err := Simulate(sys, []float64{0, 0.1, 0.2, 0.3, 0.4}, make([]float64, 5), &SimulateSettings{InitialState: []float64{1, 0.5}})
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{1, 0.5, 0}
	for k := 2; k < 5; k++ {
		want = append(want[:k], 1.2*want[k-1]-0.52*want[k-2])
	}
	for k := range want {
		if math.Abs(sim.Output[k]-want[k]) > 1e-14 {
			t.Errorf("free y[%d] = %v, want %v", k, sim.Output[k], want[k])
		}
	}
}

func TestSteadyStateMore(t *testing.T) {
	// Type 1: L = 20/(s(s+4)): Kv = 5, ramp error 0.2 (by hand).
	e, err := SteadyState(tf.MustNew([]float64{20}, []float64{1, 4, 0}))
	if err != nil {
		t.Fatal(err)
	}
	if e.SystemType != 1 || !math.IsInf(e.PositionConstant, 1) || e.VelocityConstant != 5 || e.AccelerationConstant != 0 ||
		e.StepError != 0 || e.RampError != 0.2 || !math.IsInf(e.ParabolaError, 1) {
		t.Errorf("type 1: %+v", e)
	}
	// Discrete type 1: the zero-order-hold equivalent of 1/s at T = 0.5 is
	// 0.5/(z − 1) (Franklin, Powell & Workman, 3rd ed., Table of ZOH
	// equivalents, from memory); with gain 0.8: L = 0.4/(z − 1),
	// Kv = lim (z−1)L/T = 0.8, as for the continuous 0.8/s. Closed-loop pole
	// z = 0.6: stable.
	ld, _ := tf.NewDiscrete([]float64{0.4}, []float64{1, -1}, 0.5)
	e, err = SteadyState(ld)
	if err != nil {
		t.Fatal(err)
	}
	if e.SystemType != 1 || !testutil.Close(e.VelocityConstant, 0.8, 1e-15, 0) || !testutil.Close(e.RampError, 1.25, 1e-15, 0) {
		t.Errorf("discrete type 1: %+v", e)
	}
	// Unstable closed loop: 10/(s(s+1)(s+2)) has s³ + 3s² + 2s + 10,
	// unstable by Routh (3·2 < 10).
	if _, err := SteadyState(tf.MustNew([]float64{10}, []float64{1, 3, 2, 0})); !errors.Is(err, ErrUnstable) {
		t.Errorf("unstable loop: %v", err)
	}
	delayed, _ := tf.MustNew([]float64{1}, []float64{1, 1}).WithDelay(0.1)
	if _, err := SteadyState(delayed); !errors.Is(err, ErrDelay) {
		t.Errorf("delayed loop: %v", err)
	}
}

func TestUnstableAndBadInput(t *testing.T) {
	for _, c := range []struct {
		name string
		sys  tf.TF
	}{
		{"right-half-plane pole", tf.MustNew([]float64{1}, []float64{1, -1})},
		{"integrator", tf.MustNew([]float64{1}, []float64{1, 0})},
		{"undamped oscillator", tf.MustNew([]float64{1}, []float64{1, 0, 1})},
	} {
		if _, err := StepMetrics(c.sys, nil); !errors.Is(err, ErrUnstable) {
			t.Errorf("%s: %v, want ErrUnstable", c.name, err)
		}
	}
	zd, _ := tf.NewDiscrete([]float64{1}, []float64{1, -1}, 0.1)
	if _, err := StepMetrics(zd, nil); !errors.Is(err, ErrUnstable) {
		t.Errorf("discrete integrator: %v", err)
	}
	if _, err := StepMetrics(tf.MustNew([]float64{1, 0}, []float64{1, 1}), nil); !errors.Is(err, ErrZeroFinalValue) {
		t.Errorf("zero static gain: %v", err)
	}
	improper := tf.MustNew([]float64{1, 0, 1}, []float64{1, 1})
	ok := tf.MustNew([]float64{1}, []float64{1, 1})
	nan := math.NaN()
	for _, c := range []struct {
		name string
		run  func() error
		want error
	}{
		{"improper step", func() error { _, err := Step(improper, nil); return err }, ErrImproper},
		{"overflowing unstable response", func() error {
			_, err := Step(tf.MustNew([]float64{1}, []float64{1, -1}), &Settings{HorizonSec: 1000})
			return err
		}, ErrNotFinite},
		{"improper impulse", func() error { _, err := Impulse(improper, nil); return err }, ErrImproper},
		{"improper metrics", func() error { _, err := StepMetrics(improper, nil); return err }, ErrImproper},
		{"negative horizon", func() error { _, err := Step(ok, &Settings{HorizonSec: -1}); return err }, ErrSettings},
		{"negative step", func() error { _, err := Step(ok, &Settings{StepSec: -1}); return err }, ErrSettings},
		{"NaN horizon", func() error { _, err := Step(ok, &Settings{HorizonSec: nan}); return err }, ErrNotFinite},
		{"Inf step", func() error { _, err := Ramp(ok, &Settings{StepSec: math.Inf(1)}); return err }, ErrNotFinite},
		{"too many samples", func() error { _, err := Step(ok, &Settings{HorizonSec: 1e9, StepSec: 1e-3}); return err }, ErrSettings},
		{"NaN initial state", func() error { _, err := Step(ok, &Settings{InitialState: []float64{nan}}); return err }, ErrNotFinite},
		{"empty time vector", func() error { _, err := Simulate(ok, nil, nil, nil); return err }, ErrTimeVector},
		{"length mismatch", func() error { _, err := Simulate(ok, []float64{0, 1}, []float64{1}, nil); return err }, ErrTimeVector},
		{"non-monotone times", func() error { _, err := Simulate(ok, []float64{0, 1, 1}, []float64{1, 1, 1}, nil); return err }, ErrTimeVector},
		{"decreasing times", func() error { _, err := Simulate(ok, []float64{0, 2, 1}, []float64{1, 1, 1}, nil); return err }, ErrTimeVector},
		{"NaN time", func() error { _, err := Simulate(ok, []float64{0, nan}, []float64{1, 1}, nil); return err }, ErrNotFinite},
		{"Inf input", func() error { _, err := Simulate(ok, []float64{0, 1}, []float64{1, math.Inf(-1)}, nil); return err }, ErrNotFinite},
		{"bad interpolation", func() error {
			_, err := Simulate(ok, []float64{0, 1}, []float64{1, 1}, &SimulateSettings{Interpolation: 7})
			return err
		}, ErrSettings},
		{"bad rise fractions", func() error {
			_, err := StepMetrics(ok, &MetricSettings{RiseLowFraction: 0.9, RiseHighFraction: 0.1})
			return err
		}, ErrSettings},
		{"bad band", func() error { _, err := StepMetrics(ok, &MetricSettings{SettlingBandFraction: 1.5}); return err }, ErrSettings},
		{"NaN band", func() error { _, err := StepMetrics(ok, &MetricSettings{SettlingBandFraction: nan}); return err }, ErrNotFinite},
		{"fractional discrete delay", func() error {
			g, _ := tf.NewDiscrete([]float64{1}, []float64{1, -0.5}, 0.1)
			g, _ = g.WithDelay(0.15)
			_, err := Step(g, nil)
			return err
		}, ErrDelay},
		{"discrete uneven times", func() error {
			g, _ := tf.NewDiscrete([]float64{1}, []float64{1, -0.5}, 0.1)
			_, err := Simulate(g, []float64{0, 0.1, 0.25}, []float64{1, 1, 1}, nil)
			return err
		}, ErrTimeVector},
		{"discrete step spacing", func() error {
			g, _ := tf.NewDiscrete([]float64{1}, []float64{1, -0.5}, 0.1)
			_, err := Step(g, &Settings{StepSec: 0.05})
			return err
		}, ErrSettings},
	} {
		if err := c.run(); !errors.Is(err, c.want) {
			t.Errorf("%s: err = %v, want %v", c.name, err, c.want)
		}
	}
}

func TestMarginallyStableStep(t *testing.T) {
	// 1/s: the step response is the ramp t (exact at the samples);
	// automatic horizon 10 s (no nonzero pole: σ = 1 s⁻¹), 400 intervals.
	r, err := Step(tf.MustNew([]float64{1}, []float64{1, 0}), nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(r.TimeSec) != 401 {
		t.Errorf("%d samples", len(r.TimeSec))
	}
	for k, tk := range r.TimeSec {
		if math.Abs(r.Output[k]-tk) > 1e-13 {
			t.Fatalf("y(%v) = %v", tk, r.Output[k])
		}
	}
}

func TestCustomLevelsAndAutoGrid(t *testing.T) {
	// 5–95 % rise and a 5 % band on the first-order 1/(τs + 1), τ = 2:
	// y = 1 − e^(−t/τ), so t_f = −τ·ln(1 − f) and the band exit is
	// −τ·ln(0.05) (closed form by hand); 1e-12 relative.
	sys := tf.MustNew([]float64{1}, []float64{2, 1})
	m, err := StepMetrics(sys, &MetricSettings{RiseLowFraction: 0.05, RiseHighFraction: 0.95, SettlingBandFraction: 0.05})
	if err != nil {
		t.Fatal(err)
	}
	tf := func(f float64) float64 { return -2 * math.Log(1-f) }
	if !testutil.Close(m.RiseTimeSec, tf(0.95)-tf(0.05), 1e-12, 0) || !testutil.Close(m.SettlingTimeSec, tf(0.95), 1e-12, 0) {
		t.Errorf("first order: %+v", m)
	}
	if !math.IsNaN(m.PeakValue) || !math.IsNaN(m.PeakTimeSec) || m.OvershootPct != 0 || m.UndershootPct != 0 || !math.IsNaN(m.UndershootTimeSec) {
		t.Errorf("first order has no peak or undershoot: %+v", m)
	}
	// Automatic grid: horizon 10/σ = 20 s, step min(20/400, 0.1/0.5).
	r, err := Step(sys, nil)
	if err != nil {
		t.Fatal(err)
	}
	if last := r.TimeSec[len(r.TimeSec)-1]; !testutil.Close(last, 20, 1e-12, 0) || len(r.TimeSec) != 401 {
		t.Errorf("auto grid: %d samples up to %v s", len(r.TimeSec), last)
	}
}

func TestConcurrentUse(t *testing.T) {
	// Values are immutable and functions keep no shared state: the same
	// system simulated from several goroutines gives identical results
	// (run with -race).
	sys, _ := secondOrder(0.3, 2).WithDelay(0.2)
	want, err := Step(sys, nil)
	if err != nil {
		t.Fatal(err)
	}
	done := make(chan []float64)
	for range 4 {
		go func() {
			r, _ := Step(sys, nil)
			_, _ = StepMetrics(sys, nil)
			done <- r.Output
		}()
	}
	for range 4 {
		got := <-done
		for k := range want.Output {
			if got[k] != want.Output[k] {
				t.Fatalf("sample %d differs between goroutines", k)
			}
		}
	}
}

func TestSimulateLinearSuperposition(t *testing.T) {
	// A linearly interpolated input is a step of u0 plus ramps at every
	// change of slope: u(t) = u0·1(t) + Σ (m_j − m_{j−1})·(t − t_j)·1(t − t_j).
	// For 1/(s + a): step response (1 − e^(−at))/a and ramp response
	// t/a − (1 − e^(−at))/a² (partial fractions by hand); with the dead time
	// every term is shifted. Uneven times, dead time off the grid;
	// 1e-13 absolute.
	a, delay := 1.7, 0.29
	sys, _ := tf.MustNew([]float64{1}, []float64{1, a}).WithDelay(delay)
	times := []float64{0, 0.2, 0.25, 0.9, 1.4, 2.6, 3.0, 4.1}
	u := []float64{0.5, 1.5, -0.3, 0.2, 0.2, 2, -1, 0}
	r, err := Simulate(sys, times, u, &SimulateSettings{Interpolation: Linear})
	if err != nil {
		t.Fatal(err)
	}
	step := func(t float64) float64 {
		if t <= 0 {
			return 0
		}
		return -math.Expm1(-a*t) / a
	}
	ramp := func(t float64) float64 {
		if t <= 0 {
			return 0
		}
		return t/a + math.Expm1(-a*t)/(a*a)
	}
	for k, tk := range times {
		want := u[0] * step(tk-delay)
		prev := 0.0
		for j := 0; j+1 < len(times); j++ {
			m := (u[j+1] - u[j]) / (times[j+1] - times[j])
			want += (m - prev) * ramp(tk-times[j]-delay)
			prev = m
		}
		if math.Abs(r.Output[k]-want) > 1e-13 {
			t.Errorf("y(%v) = %.17g, want %.17g", tk, r.Output[k], want)
		}
	}
}

func FuzzSimulate(f *testing.F) {
	// Arbitrary times, inputs, dead time and interpolation: Simulate
	// returns a response or an error, never panics, and a response has
	// finite samples of the requested length.
	f.Add(0.0, 0.1, 0.3, 1.0, 2.0, -1.0, 0.25, false)
	f.Add(1.0, 1.0, 0.5, math.NaN(), 0.0, 0.0, 0.0, true)
	f.Add(-3.0, 1e-9, 1e6, 2.0, math.Inf(1), 5.0, 1e3, true)
	f.Fuzz(func(t *testing.T, t0, t1, t2, u0, u1, u2, delay float64, linear bool) {
		sys := tf.MustNew([]float64{2, 1}, []float64{1, 0.7, 4})
		if !math.IsNaN(delay) && !math.IsInf(delay, 0) && delay >= 0 && delay < 1e6 {
			sys, _ = sys.WithDelay(delay)
		}
		set := &SimulateSettings{}
		if linear {
			set.Interpolation = Linear
		}
		times := []float64{t0, t0 + math.Abs(t1), t0 + math.Abs(t1) + math.Abs(t2)}
		if math.Abs(t0) > 1e6 || math.Abs(t1) > 1e6 || math.Abs(t2) > 1e6 {
			return // keep the horizon to a few thousand time constants
		}
		r, err := Simulate(sys, times, []float64{u0, u1, u2}, set)
		if err != nil {
			return
		}
		if len(r.Output) != 3 {
			t.Fatalf("%d outputs", len(r.Output))
		}
		for _, v := range r.Output {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatalf("non-finite output %v", r.Output)
			}
		}
	})
}
