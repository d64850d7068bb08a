package robust

import "errors"

// Sentinel errors of this package. Match them with errors.Is.
var (
	// ErrParam reports a bad parameter: an empty or repeated name, a
	// range with NaN or infinite bounds, a reversed range (Min > Max),
	// a parameter that appears in no expression, or an unknown distribution.
	ErrParam = errors.New("robust: bad parameter")
	// ErrExpression reports an expression that cannot be read (the wrapped
	// error is the parser's) or whose coefficients are not polynomial in the
	// parameters of degree at most MaxDegreePerParam.
	ErrExpression = errors.New("robust: bad expression")
	// ErrUnsupported reports a family this package cannot analyse: a loop
	// with dead time whose numerator degree is not below its denominator's
	// (neutral type), or a discrete loop with dead time given in seconds
	// that are not whole samples.
	ErrUnsupported = errors.New("robust: unsupported family")
	// ErrSettings reports a setting outside its documented range.
	ErrSettings = errors.New("robust: bad settings")
	// ErrCanceled reports work stopped by its context; the result returned
	// with it is partial and marked so.
	ErrCanceled = errors.New("robust: canceled")
)
