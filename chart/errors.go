package chart

import "errors"

// Sentinel errors returned by this package. Match them with errors.Is; the
// errors returned wrap them with the offending input and the reason.
var (
	// ErrNoData reports an empty input: a locus without branches, a response
	// without samples, a figure without panels.
	ErrNoData = errors.New("chart: no data to plot")
	// ErrNotFinite reports a NaN or infinite value where a finite one is
	// needed (a time, an axis limit, a gain for the closed-loop marker).
	ErrNotFinite = errors.New("chart: value is NaN or infinite")
	// ErrLength reports slices that should have the same length and do not.
	ErrLength = errors.New("chart: lengths differ")
	// ErrSize reports a figure size or resolution out of range.
	ErrSize = errors.New("chart: invalid figure size")
	// ErrFormat reports an output format other than svg, png or pdf.
	ErrFormat = errors.New("chart: unsupported output format")
	// ErrSettings reports a settings field out of its documented range.
	ErrSettings = errors.New("chart: invalid settings")
	// ErrFrequency reports a frequency response that cannot go on a
	// logarithmic axis (a frequency that is not positive).
	ErrFrequency = errors.New("chart: frequency must be positive for a logarithmic axis")
)
