// Package robustrig is a test rig that signs a loop off for every plant in
// its uncertainty box, not for the nominal one: its test fails the build
// when a requirement is not proven for the whole box.
//
// The scenario is this project's own: the belt-speed loop of a parcel
// conveyor. From the drive command to the belt speed the plant is a first
// order lag with a transport delay, G(s) = K·e^(−T s)/(τ s + 1): the gain K
// varies with the load on the belt (0.8 to 1.25), the time constant τ with
// the number of parcels on it (0.4 to 0.6 s), and the delay T of the speed
// measurement over the field bus between 20 and 50 ms. A PI controller,
// C(s) = Kp·(Ti s + 1)/(Ti s) with Ti = 0.5 s, closes the loop.
//
// The rig's test (go test ./examples/robustrig) asks robust.CheckRequirements
// for the verdict on every requirement and fails unless each is "met for the
// whole box".
package robustrig

import (
	"fmt"

	"github.com/loopwise/loopwise/robust"
	"github.com/loopwise/loopwise/spec"
)

// ShippedGain is the proportional gain Kp of the shipped controller.
const ShippedGain = 2

// Box is the uncertainty box of the conveyor plant.
func Box() []robust.Param {
	return []robust.Param{
		{Name: "K", Min: 0.8, Max: 1.25},
		{Name: "tau", Min: 0.4, Max: 0.6},
		{Name: "T", Min: 0.02, Max: 0.05},
	}
}

// Loop returns the uncertain loop with the proportional gain kp.
func Loop(kp float64) (*robust.Loop, error) {
	return robust.NewLoop(robust.Description{
		Expressions: []string{"K*exp(-T*s)/(tau*s + 1)", fmt.Sprintf("%g*(0.5*s + 1)/(0.5*s)", kp)},
		Params:      Box(),
	})
}

// Requirements are the sign-off limits of the belt-speed loop.
func Requirements() spec.Requirements {
	return spec.Requirements{
		spec.MinPhaseMarginDeg(50),
		spec.MinGainMarginDB(10),
		spec.MaxPeakSensitivity(1.6),
		spec.MinDelayMarginSec(0.1),
	}
}

// Check returns the robust verdict on every requirement for the gain kp.
func Check(kp float64) ([]robust.RequirementResult, error) {
	l, err := Loop(kp)
	if err != nil {
		return nil, err
	}
	return robust.CheckRequirements(l, Requirements(), nil, nil)
}
