//go:build !linux

package design

import "time"

var cpuStart = time.Now()

// threadCPU falls back to wall-clock time where the thread clock is not
// available.
func threadCPU() time.Duration { return time.Since(cpuStart) }
