package tf

import (
	"errors"
	"fmt"
)

// Sentinel errors returned by this package. Match them with errors.Is; the
// errors returned wrap them with the offending input and the reason.
var (
	// ErrNotFinite reports a NaN or infinite coefficient, gain, dead time or
	// sample period.
	ErrNotFinite = errors.New("tf: value is NaN or infinite")
	// ErrZeroDenominator reports an empty or all-zero denominator.
	ErrZeroDenominator = errors.New("tf: denominator is zero")
	// ErrEmpty reports an empty coefficient list.
	ErrEmpty = errors.New("tf: no coefficients given")
	// ErrSampleTime reports a negative sample period, or a value that needs
	// a positive one.
	ErrSampleTime = errors.New("tf: invalid sample period")
	// ErrDomainMismatch reports an operation that mixes continuous and
	// discrete transfer functions, or discrete ones with different sample
	// periods.
	ErrDomainMismatch = errors.New("tf: continuous and discrete, or different sample periods, mixed")
	// ErrNegativeDelay reports a negative dead time.
	ErrNegativeDelay = errors.New("tf: dead time must be non-negative")
	// ErrDelayInLoop reports an algebraic operation whose result would not
	// be rational times a single dead time (for example feedback around a
	// loop with dead time); approximate the dead time first with Pade.
	ErrDelayInLoop = errors.New("tf: dead time cannot be kept exactly by this operation")
	// ErrImproper reports an improper transfer function (numerator degree
	// above denominator degree) where a proper one is needed.
	ErrImproper = errors.New("tf: transfer function is improper")
	// ErrInfiniteGain reports a static gain that is infinite (a pole at
	// s = 0, or z = 1 in discrete time).
	ErrInfiniteGain = errors.New("tf: static gain is infinite")
	// ErrZeroTransferFunction reports an operation undefined for the zero
	// transfer function (its inverse, for example).
	ErrZeroTransferFunction = errors.New("tf: transfer function is zero")
	// ErrAboveNyquist reports a frequency above the Nyquist frequency π/T of
	// a discrete transfer function.
	ErrAboveNyquist = errors.New("tf: frequency above the Nyquist frequency")
	// ErrSyntax reports text that does not parse; the *SyntaxError carries
	// the position.
	ErrSyntax = errors.New("tf: syntax error")
	// ErrShape reports state-space matrices whose dimensions do not fit a
	// single-input single-output model (A n×n, B n×1, C 1×n, D 1×1).
	ErrShape = errors.New("tf: matrix dimensions do not fit a single-input single-output model")
	// ErrOrder reports an approximation order outside its valid range.
	ErrOrder = errors.New("tf: approximation order out of range")
	// ErrMethod reports an unknown discretization method, or a setting that
	// the chosen method does not use.
	ErrMethod = errors.New("tf: unknown discretization method")
	// ErrFractionalDelay reports a dead time that is not a whole number of
	// sample periods where the method can only keep whole sample periods.
	ErrFractionalDelay = errors.New("tf: dead time is not a whole number of sample periods")
	// ErrFrequency reports a frequency outside its valid range (for
	// example a pre-warping frequency that is not in (0, π/T)).
	ErrFrequency = errors.New("tf: frequency out of range")
	// ErrTolerance reports a negative, NaN or infinite tolerance.
	ErrTolerance = errors.New("tf: invalid tolerance")
	// ErrNumerical reports a failure of an underlying numerical routine
	// (an eigenvalue iteration that did not converge, a singular system).
	ErrNumerical = errors.New("tf: numerical method failed")
)

// SyntaxError describes text that does not parse: where, and what was
// expected there. It matches ErrSyntax with errors.Is.
type SyntaxError struct {
	// Text is the whole input.
	Text string
	// Offset is the byte offset of the problem in Text (0-based).
	Offset int
	// Msg says what was found and what was expected.
	Msg string
}

// Error returns the message with a 1-based column.
func (e *SyntaxError) Error() string {
	return fmt.Sprintf("tf: cannot parse %q at column %d: %s", e.Text, e.Offset+1, e.Msg)
}

// Is reports whether target is ErrSyntax.
func (e *SyntaxError) Is(target error) bool { return target == ErrSyntax }
