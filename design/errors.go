package design

import "errors"

// Sentinel errors returned by this package. Match them with errors.Is; the
// returned errors wrap them with the offending input and the reason.
var (
	// ErrNotAffine reports a parameter that does not enter the loop's
	// numerator and denominator affinely (one variable), or a plane whose
	// parameters enter with a product x·y or non-affinely; the message
	// names the parameters.
	ErrNotAffine = errors.New("design: the parameters do not enter the loop affinely")
	// ErrInvalidInput reports a bad argument: an empty or NaN range, a NaN
	// or infinite limit or target, a missing loop function, an unknown
	// target kind.
	ErrInvalidInput = errors.New("design: invalid input")
	// ErrUnsupported reports a request this package does not handle, with
	// the reason.
	ErrUnsupported = errors.New("design: unsupported request")
)
