//go:build !linux

package response

import "time"

var start = time.Now()

// threadCPU falls back to wall-clock time where per-thread CPU time is not
// available.
func threadCPU() time.Duration { return time.Since(start) }
