package testrig_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/loopwise/loopwise/examples/testrig"
	"github.com/loopwise/loopwise/spec"
)

// TestShippedGainMeetsRequirements is the check a team runs in CI: the
// design in package testrig must meet every requirement.
func TestShippedGainMeetsRequirements(t *testing.T) {
	loop, err := testrig.Loop(testrig.ShippedGain)
	if err != nil {
		t.Fatal(err)
	}
	report := spec.Check(loop, testrig.Requirements())
	if err := report.Err(); err != nil {
		t.Fatal(err)
	}
	t.Logf("roll-rate loop, Kp = %g:\n%v", testrig.ShippedGain, report)
}

// TestRigCatchesATooHotGain shows what a failing build says: a gain three
// times too high must fail, naming the phase margin among the failures.
func TestRigCatchesATooHotGain(t *testing.T) {
	loop, err := testrig.Loop(3 * testrig.ShippedGain)
	if err != nil {
		t.Fatal(err)
	}
	err = spec.Check(loop, testrig.Requirements()).Err()
	if err == nil {
		t.Fatal("a gain three times too high passed the rig")
	}
	if !errors.Is(err, spec.ErrNotMet) || !strings.Contains(err.Error(), "phase margin") {
		t.Errorf("error %q does not report the phase margin as not met", err)
	}
}

// TestPhaseMarginAgainstClosedForm checks the rig's measuring instrument
// against a hand derivation. For L(s) = k·e^(−θs)/(s(τs + 1)), k = 400·Kp,
// the dead time does not change |L|, so the gain crossover solves
// ω²(1 + τ²ω²) = k²: ωc² = (√(1 + 4τ²k²) − 1)/(2τ²), and the phase margin
// is 90° − atan(τωc) − θωc·180°/π.
func TestPhaseMarginAgainstClosedForm(t *testing.T) {
	k := testrig.TorqueToRate * testrig.ShippedGain
	tau, theta := testrig.MotorLagSec, testrig.SensorDelaySec
	wc := math.Sqrt((math.Sqrt(1+4*tau*tau*k*k) - 1) / (2 * tau * tau))
	want := 90 - (math.Atan(tau*wc)+theta*wc)*180/math.Pi

	loop, err := testrig.Loop(testrig.ShippedGain)
	if err != nil {
		t.Fatal(err)
	}
	report := spec.Check(loop, spec.Requirements{spec.MinPhaseMarginDeg(45)})
	got := report.Results[0].Value
	// 1e-9 relative: the crossover is a simple root located by the margins
	// package to near machine precision.
	if math.Abs(got-want) > 1e-9*want {
		t.Errorf("phase margin = %.12g degrees, want %.12g", got, want)
	}
}
