package closedloop

import "errors"

// Sentinel errors of this package. Match them with errors.Is; the errors
// returned wrap them with the offending input and the reason.
var (
	// ErrLoop reports a loop description that cannot be analysed: a
	// missing plant or controller, a non-finite or zero gain, mixed sample
	// periods, an improper loop.
	ErrLoop = errors.New("closedloop: invalid loop")
	// ErrInternallyUnstable reports a closed loop with a pole in the closed
	// right half plane (|z| ≥ 1 in discrete time), visible or hidden by a
	// pole–zero cancellation; time-domain metrics and norms do not exist.
	ErrInternallyUnstable = errors.New("closedloop: the closed loop is internally unstable")
	// ErrImproper reports a closed-loop function that is improper where a
	// proper one is needed (for example the control signal of a controller
	// with an unfiltered derivative, which contains an impulse).
	ErrImproper = errors.New("closedloop: closed-loop function is improper")
	// ErrSettings reports an invalid field of Settings.
	ErrSettings = errors.New("closedloop: invalid settings")
	// ErrNumerical reports a failure of an underlying numerical routine.
	ErrNumerical = errors.New("closedloop: numerical method failed")
	// ErrNotSettled reports a response that did not settle within the
	// longest horizon tried.
	ErrNotSettled = errors.New("closedloop: response did not settle")
)
