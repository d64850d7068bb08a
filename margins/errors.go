package margins

import "errors"

// Sentinel errors returned by this package. Match them with errors.Is; the
// returned errors wrap them with the offending input and the reason.
var (
	// ErrZeroLoop reports a loop transfer function that is identically zero:
	// it has no crossovers and its closed loop is the open loop.
	ErrZeroLoop = errors.New("margins: loop transfer function is zero")
	// ErrImproper reports an improper loop (numerator degree above the
	// denominator degree): its frequency response grows without bound and
	// the unity-feedback loop is not causal.
	ErrImproper = errors.New("margins: loop transfer function is improper")
	// ErrNotFinite reports a NaN or infinite frequency, sample or setting.
	ErrNotFinite = errors.New("margins: value is NaN or infinite")
	// ErrAboveNyquist reports a frequency above π/T for a discrete loop.
	ErrAboveNyquist = errors.New("margins: frequency above the Nyquist frequency")
	// ErrNegativeFrequency reports a negative frequency on a caller's grid.
	ErrNegativeFrequency = errors.New("margins: frequency is negative")
	// ErrBadSettings reports a setting outside its documented range.
	ErrBadSettings = errors.New("margins: invalid setting")
	// ErrDegenerate reports a loop whose crossovers are not isolated points:
	// |L| = 1 at every frequency (an all-pass loop), or L real and negative
	// on a whole frequency band.
	ErrDegenerate = errors.New("margins: crossovers are not isolated")
	// ErrIllPosed reports a loop with 1 + L(∞) = 0: the closed loop is not
	// proper (continuous time) or not causal (discrete time).
	ErrIllPosed = errors.New("margins: closed loop is ill-posed (1 + L = 0 at infinite frequency)")
	// ErrUnsupported reports a loop this package does not analyse, with the
	// reason: a discrete loop whose dead time is not a whole number of
	// samples or more than MaxDelaySamples samples, or a loop with dead
	// time whose sensitivity peaks would need an unbounded frequency grid.
	ErrUnsupported = errors.New("margins: loop not supported")
	// ErrBadData reports unusable measured data: lengths that differ, fewer
	// than two points, frequencies not strictly increasing or not positive,
	// zero or non-finite values.
	ErrBadData = errors.New("margins: invalid measured data")
	// ErrEncirclements reports that the encirclements of −1 could not be
	// counted reliably from measured data (the count was not close to a
	// whole number, or |L| ≥ 1 at the highest measured frequency).
	ErrEncirclements = errors.New("margins: cannot count encirclements of −1")
)
