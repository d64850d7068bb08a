//go:build !linux

package testutil

import "time"

var cpuStart = time.Now()

// ThreadCPU falls back to wall-clock time where the thread clock is not
// available.
func ThreadCPU() time.Duration { return time.Since(cpuStart) }
