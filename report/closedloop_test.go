package report

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"
)

// TestStructuredControllerEqualsText: the structured PID of the loop file
// gives the same report as its transfer function written as text, and the
// whole-loop sections agree with closedloop's mpmath reference for the
// same loop (closedloop/testdata/reference.json: peak deviation
// 0.124901204010097769…, IAE 0.404373386962283517…, u(0+) = K·(1 + N) = 33,
// u(∞) = 1/G(0) = 4).
func TestStructuredControllerEqualsText(t *testing.T) {
	form := analyzeText(t, `{"plant": "2/((s+1)(s+2)(s+4))", "sensor": "1/(0.05s+1)",
		"controller": {"form": "pid", "gain": 3, "integral_time_sec": 1.2, "derivative_time_sec": 0.25, "derivative_filter": 10}}`)
	text := analyzeText(t, `{"plant": "2/((s+1)(s+2)(s+4))", "sensor": "1/(0.05s+1)",
		"controller": "3*(1 + 1/(1.2s) + 0.25s/(1 + 0.025s))"}`)
	for _, r := range []*Report{form, text} {
		d, c, n := r.LoadDisturbance, r.ControlEffort, r.Noise
		if d == nil || c == nil || n == nil {
			t.Fatalf("sections missing: %v %v %v; warnings %v", d, c, n, r.Warnings)
		}
		for _, q := range []struct {
			name      string
			got, want float64
		}{
			{"peak deviation", float64(d.PeakDeviation), 0.124901204010097769},
			{"IAE", float64(d.IntegratedAbsoluteError), 0.404373386962283517},
			{"ISE", float64(d.IntegratedSquaredError), 0.0359151303549525099},
			{"u(0+)", float64(c.Initial), 33},
			{"u(∞)", float64(c.FinalValue), 4},
			{"noise → u high-frequency gain", float64(n.ToControlHighFrequencyGain), 33},
		} {
			if math.Abs(q.got-q.want) > 1e-9*math.Abs(q.want) {
				t.Errorf("%s = %.15g, want %.15g", q.name, q.got, q.want)
			}
		}
		if !math.IsInf(float64(n.ToControlH2), 1) {
			t.Errorf("noise → u H2 = %v, want infinite (biproper controller)", n.ToControlH2)
		}
	}
}

// TestHiddenModeInReport: 10(s − 1)/(s(s + 5)) cancels the unstable plant
// pole of 1/(s − 1); the report says the loop is internally unstable and
// names the hidden mode.
func TestHiddenModeInReport(t *testing.T) {
	r := analyzeText(t, `{"plant": "1/(s-1)", "controller": "10(s-1)/(s(s+5))"}`)
	if r.LoadDisturbance != nil || r.ControlEffort != nil || r.Noise != nil {
		t.Error("metrics of an internally unstable loop")
	}
	found := false
	for _, w := range r.Warnings {
		if strings.Contains(w, "internally unstable") && strings.Contains(w, "hidden") {
			found = true
		}
	}
	if !found {
		t.Errorf("no warning about the hidden mode: %v", r.Warnings)
	}
}

func TestControllerFormErrors(t *testing.T) {
	for _, c := range []struct{ content, want string }{
		{`{"plant": "1/(s+1)", "controller": {"form": "pid", "gain": 2, "integral_time_sec": 0.5}}`, `needs the key "derivative_time_sec"`},
		{`{"plant": "1/(s+1)", "controller": {"form": "pidd", "gain": 2}}`, "unknown form"},
		{`{"plant": "1/(s+1)", "controller": {"form": "pi", "gain": 2, "integral_time_sec": -1}}`, "integral time"},
		{`{"plant": "1/(s+1)", "controller": {"form": "pi", "gain": 2, "integral_time_sec": 1, "depth": 0.1}}`, "has no such parameter"},
		{`{"plant": "1/(s+1)", "controller": {"form": "notch", "frequency_rad_per_sec": 10, "depth": 1.5, "width_rad_per_sec": 2}}`, "notch depth"},
		{`{"plant": "1/(s+1)", "controller": {"form": "pi", "gain": 2, "integral_time_sec": 1, "colour": 1}}`, "colour"},
	} {
		_, err := ReadLoop("c.json", []byte(c.content))
		if !errors.Is(err, ErrBadInput) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want ErrBadInput mentioning %q", c.content, err, c.want)
		}
	}
}

// TestDiscretizedLoopAgainstDifferenceEquations: a loop with "discretize"
// is analysed as the sampled-data loop (closedloop.go, sampledParts); its
// load_disturbance, control_effort and noise sections must agree with the
// loop's difference equations run directly, sample by sample (no
// transfer-function algebra, no Lyapunov equation, no tf.Discretize).
//
// Plant 1/(s + 1) with dead time τ = d·T + θ (0 ≤ θ < T) behind a
// zero-order hold: over one period the held input v is v[k−d−1] for the
// first θ and v[k−d] after it, so integrating y′ = −y + v gives
//
//	y[k+1] = a·y[k] + (e^(−(T−θ)) − a)·v[k−d−1] + (1 − e^(−(T−θ)))·v[k−d],  a = e^(−T).
//
// Controller 2 + 3/s: Tustin 1/s → (T/2)(z + 1)/(z − 1) gives
// u[k] = u[k−1] + (2 + 1.5T)·e[k] − (2 − 1.5T)·e[k−1]; the zero-order
// hold 3/s → 3T/(z − 1) gives u[k] = u[k−1] + 2·e[k] − (2 − 3T)·e[k−1].
func TestDiscretizedLoopAgainstDifferenceEquations(t *testing.T) {
	for _, c := range []struct {
		method     string
		delay      float64
		d          int
		theta      float64
		b0, b1, ts float64
	}{
		{"tustin", 0, 0, 0, 2 + 1.5*0.1, -(2 - 1.5*0.1), 0.1},
		{"zoh", 0.25, 2, 0.05, 2, -(2 - 3*0.1), 0.1},
	} {
		T := c.ts
		content := fmt.Sprintf(`{"plant": "1/(s+1)", "controller": "2 + 3/s", "delay_sec": %v, "discretize": {"method": %q, "sample_time_sec": %v}}`, c.delay, c.method, T)
		r := analyzeText(t, content)
		ld, ce, no := r.LoadDisturbance, r.ControlEffort, r.Noise
		if ld == nil || ce == nil || no == nil {
			t.Fatalf("%s: sections missing; warnings %v", c.method, r.Warnings)
		}
		a := math.Exp(-T)
		c1, c2 := math.Exp(-(T-c.theta))-a, 1-math.Exp(-(T-c.theta))
		const N = 6000
		simulate := func(ref, dist, noise func(k int) float64) (ys, us []float64) {
			v := make([]float64, N+c.d+2) // v[k] stored at k + d + 1
			y, u, ePrev := 0.0, 0.0, 0.0
			for k := range N {
				e := ref(k) - (y + noise(k))
				u = u + c.b0*e + c.b1*ePrev
				ePrev = e
				ys, us = append(ys, y), append(us, u)
				v[k+c.d+1] = u + dist(k)
				y = a*y + c1*v[k] + c2*v[k+1] // v[k−d−1], v[k−d]
			}
			return ys, us
		}
		zero := func(int) float64 { return 0 }
		one := func(int) float64 { return 1 }
		impulse := func(k int) float64 {
			if k == 0 {
				return 1
			}
			return 0
		}
		alternating := func(k int) float64 { return math.Pow(-1, float64(k)) }
		// Load-disturbance step.
		ys, _ := simulate(zero, one, zero)
		peak, pk := 0.0, 0
		iae, ise := 0.0, 0.0
		for k, y := range ys {
			if math.Abs(y) > math.Abs(peak)*(1+1e-13) {
				peak, pk = y, k
			}
			iae += T * math.Abs(y)
			ise += T * y * y
		}
		last := 0
		for k, y := range ys {
			if math.Abs(y) > 0.02*math.Abs(peak) {
				last = k
			}
		}
		// Reference step: the control signal.
		_, us := simulate(one, zero, zero)
		upeak, uk := 0.0, 0
		for k, u := range us {
			if math.Abs(u) > math.Abs(upeak)*(1+1e-13) {
				upeak, uk = u, k
			}
		}
		// Noise: impulse → energies per sample; alternating → the gain at π/T.
		yi, ui := simulate(zero, zero, impulse)
		h2u, h2y := 0.0, 0.0
		for k := range yi {
			h2u += ui[k] * ui[k]
			h2y += yi[k] * yi[k]
		}
		_, ua := simulate(zero, zero, alternating)
		hf := math.Abs(ua[N-1])
		t.Logf("%s: peak %.15g at %v s, recovery %v s, IAE %.15g, ISE %.15g; u(0) %.15g, peak u %.15g at %v s; noise H2 u %.15g y %.15g, gain at π/T %.15g",
			c.method, peak, float64(pk)*T, float64(last+1)*T, iae, ise, us[0], upeak, float64(uk)*T, math.Sqrt(h2u), math.Sqrt(h2y), hf)
		for _, q := range []struct {
			name      string
			got, want float64
			tol       float64 // relative; sums of 6000 terms and a Lyapunov solve: 1e-10
		}{
			{"peak deviation", float64(ld.PeakDeviation), peak, 1e-12},
			{"peak time", float64(ld.PeakTimeSec), float64(pk) * T, 1e-12},
			{"recovery time", float64(ld.RecoveryTimeSec), float64(last+1) * T, 1e-12},
			{"IAE", float64(ld.IntegratedAbsoluteError), iae, 1e-10},
			{"ISE", float64(ld.IntegratedSquaredError), ise, 1e-10},
			{"u(0)", float64(ce.Initial), us[0], 1e-12},
			{"peak u", float64(ce.Peak), upeak, 1e-12},
			{"peak u time", float64(ce.PeakTimeSec), float64(uk) * T, 1e-12},
			{"u(∞)", float64(ce.FinalValue), us[N-1], 1e-10},
			{"noise → u H2", float64(no.ToControlH2), math.Sqrt(h2u), 1e-10},
			{"noise → y H2", float64(no.ToOutputH2), math.Sqrt(h2y), 1e-10},
			{"noise → u at π/T", float64(no.ToControlHighFrequencyGain), hf, 1e-10},
		} {
			if math.Abs(q.got-q.want) > q.tol*math.Abs(q.want) {
				t.Errorf("%s: %s = %.15g, want %.15g (difference equations)", c.method, q.name, q.got, q.want)
			}
		}
		said := false
		for _, w := range r.Warnings {
			said = said || strings.Contains(w, "sampled-data loop")
		}
		if !said {
			t.Errorf("%s: no warning says what is computed: %v", c.method, r.Warnings)
		}
	}
}

// TestWholeLoopRequirementWithoutParts: with "discretize" and the method
// "zoh", an improper controller (2 + s) cannot be converted to z on its
// own, so the sampled-data loop has no parts. The requirement on the
// disturbance peak then fails with a message in words (no Go field names)
// and the warnings say why in the loop file's terms.
func TestWholeLoopRequirementWithoutParts(t *testing.T) {
	r := analyzeText(t, `{"plant": "1/((s+1)(s+2))", "controller": "2 + s", "discretize": {"method": "zoh", "sample_time_sec": 0.1},
		"requirements": {"max_disturbance_peak": 1}}`)
	if len(r.Requirements) != 1 {
		t.Fatalf("requirements %+v", r.Requirements)
	}
	q := r.Requirements[0]
	if q.Pass || strings.Contains(q.Message, "Settings") || !strings.Contains(q.Message, "the plant and the controller taken apart") {
		t.Errorf("message %q: want a failure in words, without Go names", q.Message)
	}
	found := false
	for _, w := range r.Warnings {
		found = found || strings.Contains(w, `"discretize.method" "zoh" cannot convert it to z on its own`)
	}
	if !found {
		t.Errorf("no warning says why: %v", r.Warnings)
	}
	t.Logf("message: %s", q.Message)
	for _, w := range r.Warnings {
		t.Logf("warning: %s", w)
	}
}
