package report

import (
	"testing"
)

// TestLongDeadTimeStableBySwitches: 1/(s + 1) with 10⁶ s of dead time has
// |L(jω)| < 1 for every ω > 0, so it is stable for every dead time (the
// small-gain form of delay-independent stability; Hale & Verduyn Lunel
// 1993, from memory), while its roots near the axis are too many to count
// and its phase turns too often for the Nyquist count. The stability
// switches in the dead time decide: stable, and the steady-state error to a
// step is 1/(1 + L(0)) = 0.5 (closed form).
func TestLongDeadTimeStableBySwitches(t *testing.T) {
	r, err := Analyze(&Loop{Plant: "1/(s+1)", DelaySec: 1e6, Gain: 1}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if s := r.ClosedLoop.Stable; s == nil || !*s {
		t.Fatalf("closed_loop.stable %v, want true; warnings %q", s, r.Warnings)
	}
	if d := r.DeadTime; d == nil || d.DelayIndependent == nil || !*d.DelayIndependent {
		t.Errorf("dead_time %+v, want delay_independent true", d)
	}
	if e := float64(r.SteadyState.StepError); e != 0.5 {
		t.Errorf("steady-state step error %v, want 0.5", e)
	}
}
