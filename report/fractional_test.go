package report

import (
	"errors"
	"math"
	"strings"
	"testing"
)

// TestFractionalDelayInZRefused: a loop written in z holds dead time only as
// whole sample periods; a fractional one is refused once, naming the key and
// the way to an exact analysis, and whole periods (within tf's tolerance) pass.
func TestFractionalDelayInZRefused(t *testing.T) {
	_, err := ReadLoop("x.json", []byte(`{"plant": "0.2/(z-0.8)", "sample_time_sec": 0.1, "delay_sec": 0.25}`))
	if !errors.Is(err, ErrBadInput) {
		t.Fatalf("fractional dead time in z: error %v, want ErrBadInput", err)
	}
	for _, want := range []string{`"delay_sec"`, "2.5 sample periods", `"discretize"`} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("error %q does not contain %q", err, want)
		}
	}
	if _, err := Analyze(&Loop{Plant: "0.2/(z-0.8)", SampleTimeSec: 0.1, DelaySec: 0.25, Gain: 1}, nil); !errors.Is(err, ErrBadInput) {
		t.Errorf("fractional dead time in a Loop value: error %v, want ErrBadInput", err)
	}
	// 0.3 s is 3 periods of 0.1 s although 0.3/0.1 = 2.9999999999999996 in
	// float64: accepted, analysed as z^−3.
	r, err := Analyze(&Loop{Plant: "0.2/(z-0.8)", SampleTimeSec: 0.1, DelaySec: 0.3, Gain: 1}, nil)
	if err != nil {
		t.Fatalf("whole periods: %v", err)
	}
	if pm := float64(r.Margins.PhaseMarginDeg); math.IsNaN(pm) || math.IsInf(pm, 0) {
		t.Errorf("whole periods: no phase margin; warnings %q", r.Warnings)
	}
}
