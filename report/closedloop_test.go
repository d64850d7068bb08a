package report

import (
	"errors"
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
