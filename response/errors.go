package response

import "errors"

// Sentinel errors of this package. Match them with errors.Is; the errors
// returned wrap them with the offending input and the reason.
var (
	// ErrImproper reports a transfer function whose numerator degree exceeds
	// its denominator degree: its step or impulse response contains
	// derivatives of a Dirac impulse and has no sampled form.
	ErrImproper = errors.New("response: transfer function is improper")
	// ErrNotFinite reports a NaN or infinite setting, time or input value.
	ErrNotFinite = errors.New("response: value is NaN or infinite")
	// ErrSettings reports an invalid setting (negative horizon or step,
	// fractions outside their range, a horizon with too many samples).
	ErrSettings = errors.New("response: invalid settings")
	// ErrTimeVector reports an empty, too short or non-increasing time
	// vector, or one whose length differs from the input's.
	ErrTimeVector = errors.New("response: invalid time vector")
	// ErrInitialState reports an initial state whose length is not the
	// denominator degree.
	ErrInitialState = errors.New("response: invalid initial state")
	// ErrUnstable reports an unstable or marginally stable system (a pole
	// with Re ≥ 0, or |z| ≥ 1 in discrete time) where a settled response is
	// needed, or an unstable closed loop for steady-state errors.
	ErrUnstable = errors.New("response: system is unstable or marginally stable")
	// ErrZeroFinalValue reports step metrics of a system whose static gain
	// is zero: every metric is a fraction of the final value.
	ErrZeroFinalValue = errors.New("response: final value is zero")
	// ErrDelay reports a dead time that cannot be simulated exactly: in
	// discrete time it must be a whole number of sample periods; a
	// continuous loop with dead time has no rational closed loop whose
	// stability SteadyState could decide; ClosedLoopStep refuses a dead
	// time so long against the loop's dynamics that the method of steps
	// would need more collocation intervals than it allows.
	ErrDelay = errors.New("response: dead time not supported here")
	// ErrNotSettled reports a response that did not settle into its band
	// within the longest horizon tried (about 10⁴ time constants of the
	// slowest pole).
	ErrNotSettled = errors.New("response: response did not settle")
)
