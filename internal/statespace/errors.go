package statespace

import "errors"

// Sentinel errors of this package, matched with errors.Is; returned errors
// wrap them with the offending value.
var (
	// ErrNotFinite reports a NaN or infinite coefficient or sample period,
	// or a discretisation whose result overflowed.
	ErrNotFinite = errors.New("statespace: value is NaN or infinite")
	// ErrDenominator reports an empty denominator or one whose leading
	// coefficient is zero.
	ErrDenominator = errors.New("statespace: invalid denominator")
	// ErrImproper reports a numerator longer than the denominator.
	ErrImproper = errors.New("statespace: transfer function is improper")
	// ErrSampleTime reports a sample period that is not positive.
	ErrSampleTime = errors.New("statespace: sample period must be positive")
	// ErrNoState reports a discretisation of a model without state (a
	// static gain).
	ErrNoState = errors.New("statespace: model has no state")
)
