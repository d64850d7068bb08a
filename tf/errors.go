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
