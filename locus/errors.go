package locus

import "errors"

// Sentinel errors returned by this package. Match them with errors.Is; the
// returned errors wrap them with the offending input and the reason.
var (
	// ErrZeroNumerator reports a loop whose numerator b(s) is identically
	// zero: the variable then does not enter the characteristic equation
	// a + k·b = 0 and there is no locus.
	ErrZeroNumerator = errors.New("locus: the loop numerator b is identically zero")
	// ErrNotFinite reports a NaN or infinite value, gain, point or ratio.
	ErrNotFinite = errors.New("locus: value is NaN or infinite")
	// ErrInvalidRange reports a range of the locus variable with NaN ends or
	// with Min ≥ Max.
	ErrInvalidRange = errors.New("locus: invalid range of the locus variable")
	// ErrInvalidSettings reports a Settings field outside its documented
	// range (negative tolerance, Padé order above the limit...).
	ErrInvalidSettings = errors.New("locus: invalid settings")
	// ErrNotOnLocus reports a point of the plane that lies on no branch of
	// the locus within the tolerance, for values in the range.
	ErrNotOnLocus = errors.New("locus: point is not on the locus")
	// ErrNotAffine reports a parameter that does not enter the
	// characteristic polynomial affinely, so a(s) + p·b(s) does not exist.
	ErrNotAffine = errors.New("locus: the parameter does not enter the characteristic polynomial affinely")
	// ErrUnsupported reports a request this package does not handle, with
	// the reason (for example a damping-ratio line in discrete time).
	ErrUnsupported = errors.New("locus: unsupported request")
	// ErrDegenerate reports a characteristic polynomial a + k·b that is
	// identically zero at the requested value.
	ErrDegenerate = errors.New("locus: characteristic polynomial is identically zero")
	// ErrIllConditioned reports an analysis that double precision cannot
	// carry out: a closed-loop pole lies within its rounding uncertainty of
	// the stability boundary (for example 1/(s+1)^500, whose 500-fold pole
	// is only known to about ε^(1/500)).
	ErrIllConditioned = errors.New("locus: too ill-conditioned for double precision")
	// ErrTraceFailed reports a continuation that could not follow the
	// branches to the requested accuracy; the partial locus is returned.
	ErrTraceFailed = errors.New("locus: tracing failed")
	// ErrTooManyPoints reports a trace that reached Settings.MaxPoints; the
	// partial locus is returned.
	ErrTooManyPoints = errors.New("locus: trace reached the maximum number of points")
)
