package spec

import (
	"testing"

	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/tf"
)

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

// TestMarginsGiven: Settings.Margins, when given, is the margins result
// used (not computed again), so a sampling caller computes it once; the
// verdicts equal those of a plain check when it is the loop's own.
func TestMarginsGiven(t *testing.T) {
	l := tf.MustNew([]float64{2}, []float64{1, 3, 2, 0})
	req := Requirements{MinPhaseMarginDeg(30), MaxOvershootPct(40)}
	m, err := margins.Compute(l, nil)
	if err != nil {
		t.Fatal(err)
	}
	plain, given := CheckWith(l, req, nil), CheckWith(l, req, &Settings{Margins: &m})
	for i := range req {
		if plain.Results[i].Value != given.Results[i].Value || plain.Results[i].Pass != given.Results[i].Pass {
			t.Errorf("%s: plain %v, with the margins given %v", req[i].Key(), plain.Results[i].Value, given.Results[i].Value)
		}
	}
	doctored := m
	doctored.PhaseMarginDeg = 99
	if v := CheckWith(l, req, &Settings{Margins: &doctored}).Results[0].Value; v != 99 {
		t.Errorf("phase margin %v: Settings.Margins not used", v)
	}
}
