package spec

import "errors"

// Sentinel errors of this package. Match them with errors.Is.
var (
	// ErrNotMet is wrapped by the error of Report.Err when at least one
	// requirement is not met.
	ErrNotMet = errors.New("spec: requirements not met")
	// ErrInvalidRequirement reports a requirement that cannot be checked:
	// the zero Requirement (not made by one of this package's functions),
	// or a NaN or infinite limit. Its Result fails and Report.Err wraps this
	// error as well as ErrNotMet.
	ErrInvalidRequirement = errors.New("spec: invalid requirement")
	// ErrInvalidSettings reports a setting outside its documented range.
	ErrInvalidSettings = errors.New("spec: invalid settings")
)
