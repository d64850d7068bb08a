package report

import "errors"

// ErrBadInput marks an unusable loop: a loop file that is not valid JSON,
// an unknown key, a value of the wrong type or out of range, an
// expression that does not parse, an improper or zero loop. The error's
// message names the key and, for a loop file, its line and column.
var ErrBadInput = errors.New("report: bad input")
