// Package testrig shows how a team keeps a controller design under test:
// the design lives in code (this package), the requirements sit beside it,
// and an ordinary Go test (rig_test.go) fails the build when a change to the
// plant model or the gains breaks a requirement. Run it with
//
//	go test ./examples/testrig
//
// The scenario is this project's own: the roll-rate loop of a small
// quadcopter. From the normalised torque command u to the roll rate p
// (rad/s), the airframe is an integrator (roll inertia) behind the lag of the
// motors and speed controllers (20 ms), and the gyro filter and the control
// period add about 4 ms of dead time:
//
//	G(s) = 400·e^(−0.004s) / (s (0.02s + 1))   rad/s per unit command.
//
// The rate controller is proportional, u = Kp·(p_ref − p).
package testrig

import (
	"fmt"

	"github.com/loopwise/loopwise/spec"
	"github.com/loopwise/loopwise/tf"
)

// Physical numbers of the airframe model.
const (
	// TorqueToRate is the roll acceleration per unit torque command, in
	// rad/s² (the integrator's gain).
	TorqueToRate = 400.0
	// MotorLagSec is the time constant of the motors and speed controllers.
	MotorLagSec = 0.02
	// SensorDelaySec is the dead time of the gyro filter and control period.
	SensorDelaySec = 0.004
)

// ShippedGain is the proportional rate gain flashed on the aircraft, in
// unit command per rad/s.
const ShippedGain = 0.08

// Plant returns the airframe model G(s) from torque command to roll rate.
func Plant() (tf.TF, error) {
	g, err := tf.New([]float64{TorqueToRate}, []float64{MotorLagSec, 1, 0})
	if err != nil {
		return tf.TF{}, fmt.Errorf("testrig: plant: %w", err)
	}
	return g.WithDelay(SensorDelaySec)
}

// Loop returns the loop transfer function Kp·G(s) for the rate gain kp.
func Loop(kp float64) (tf.TF, error) {
	g, err := Plant()
	if err != nil {
		return tf.TF{}, err
	}
	return g.Scale(kp)
}

// Requirements returns what the roll-rate loop must meet. The numbers are
// this project's own example of a flight-control team's rules.
func Requirements() spec.Requirements {
	return spec.Requirements{
		spec.MinPhaseMarginDeg(45),
		spec.MinGainMarginDB(6),
		spec.MinDelayMarginSec(0.008), // the gyro filter may be retuned to twice its delay
		spec.MaxPeakSensitivity(1.6),
		spec.MaxOvershootPct(15),
		spec.MaxSettlingTimeSec(0.25),
	}
}
