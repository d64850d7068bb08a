package spec

import "testing"

// TestNeedsLoopParts: exactly the five requirements on load disturbance,
// control signal and noise are measured on the loop's parts.
func TestNeedsLoopParts(t *testing.T) {
	parts := map[string]bool{"max_disturbance_peak": true, "max_recovery_time_sec": true, "max_control_peak": true,
		"max_integrated_absolute_error": true, "max_noise_to_control_gain": true}
	for q := phaseMargin; q <= lastQuantity; q++ {
		r := Requirement{q, 1}
		if got, want := r.NeedsLoopParts(), parts[r.Key()]; got != want {
			t.Errorf("%s: NeedsLoopParts %v, want %v", r.Key(), got, want)
		}
	}
}
