package robustrig_test

import (
	"math"
	"testing"

	"github.com/loopwise/loopwise/examples/robustrig"
	"github.com/loopwise/loopwise/margins"
	"github.com/loopwise/loopwise/robust"
)

// TestShippedGainMetForWholeBox is the check a team runs in CI: every
// requirement must be proven for every plant of the box.
func TestShippedGainMetForWholeBox(t *testing.T) {
	res, err := robustrig.Check(robustrig.ShippedGain)
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range res {
		if r.Verdict != robust.MetForBox {
			t.Errorf("%v: %v — %s", r.Requirement, r.Verdict, r.Message)
		}
	}
}

// TestRigCatchesAHotGain shows what a failing build says: at three times
// the gain a requirement is violated at a point of the box, and that point
// really misses it.
func TestRigCatchesAHotGain(t *testing.T) {
	res, err := robustrig.Check(3 * robustrig.ShippedGain)
	if err != nil {
		t.Fatal(err)
	}
	l, _ := robustrig.Loop(3 * robustrig.ShippedGain)
	violated := 0
	for _, r := range res {
		if r.Verdict != robust.ViolatedAtPoint {
			continue
		}
		violated++
		g, _ := l.At(r.At)
		m, err := margins.Compute(g, nil)
		if err != nil {
			t.Fatal(err)
		}
		if r.Requirement.Key() == "min_phase_margin_deg" && m.ClosedLoopStable && m.PhaseMarginDeg >= r.Requirement.Limit() {
			t.Errorf("phase margin %v at %v meets the limit", m.PhaseMarginDeg, r.At)
		}
	}
	if violated == 0 {
		t.Fatal("a gain three times too high passed the rig")
	}
}

// Without the delay the closed loop Ti·τ s² + Ti(1 + K·Kp) s + K·Kp is stable
// for every positive K, τ, Kp (second order with positive coefficients,
// closed form); with it, the worst phase margin the rig reports must be the
// one margins.Compute finds at the reported point, and must lie above the
// guaranteed bound.
func TestWorstPhaseMargin(t *testing.T) {
	l, err := robustrig.Loop(robustrig.ShippedGain)
	if err != nil {
		t.Fatal(err)
	}
	w, st, err := robust.WorstCases(l, nil)
	if err != nil {
		t.Fatal(err)
	}
	if st.Verdict != robust.StableForBox {
		t.Fatalf("verdict %v", st.Verdict)
	}
	pm := w[robust.PhaseMargin]
	g, _ := l.At(pm.At)
	m, _ := margins.Compute(g, nil)
	if math.Abs(m.PhaseMarginDeg-pm.Value) > 1e-9*pm.Value || !(pm.Bound <= pm.Value) || pm.Bound < 70 {
		t.Fatalf("worst PM %v (bound %v) at %v; margins %v", pm.Value, pm.Bound, pm.At, m.PhaseMarginDeg)
	}
	t.Logf("worst phase margin %.4g° at K, τ, T = %v; guaranteed ≥ %.4g°", pm.Value, pm.At, pm.Bound)
}
