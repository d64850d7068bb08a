package poly

import "errors"

// Sentinel errors returned by this package. Match them with errors.Is; the
// returned errors wrap them with the offending input and reason.
var (
	// ErrNotFinite reports a NaN or infinite coefficient or argument.
	ErrNotFinite = errors.New("poly: coefficient is NaN or infinite")
	// ErrEmpty reports a constructor called with no coefficients.
	ErrEmpty = errors.New("poly: no coefficients given")
	// ErrZeroPolynomial reports an operation that is undefined for the zero
	// polynomial (division by it, its roots, its monic form).
	ErrZeroPolynomial = errors.New("poly: zero polynomial")
	// ErrOverflow reports arithmetic whose result does not fit in float64.
	ErrOverflow = errors.New("poly: result overflows float64")
	// ErrNoConvergence reports that the eigenvalue solver behind Roots failed.
	ErrNoConvergence = errors.New("poly: root finder did not converge")
	// ErrRootCount reports a root set whose size differs from the degree.
	ErrRootCount = errors.New("poly: number of roots differs from the degree")
	// ErrBadTolerance reports a negative or NaN tolerance.
	ErrBadTolerance = errors.New("poly: tolerance must be a finite non-negative number")
)
