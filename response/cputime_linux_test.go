//go:build linux

package response

import (
	"syscall"
	"time"
	"unsafe"
)

// threadCPU returns the CPU time consumed by the calling OS thread
// (clock_gettime CLOCK_THREAD_CPUTIME_ID, Linux, nanosecond resolution):
// unlike wall-clock time it does not count the time the thread waits while
// other processes run, so ratios of benchmarks stay meaningful on a loaded,
// shared machine. Callers lock the goroutine to its thread.
func threadCPU() time.Duration {
	const clockThreadCPUTimeID = 3
	var ts syscall.Timespec
	_, _, errno := syscall.RawSyscall(syscall.SYS_CLOCK_GETTIME, clockThreadCPUTimeID, uintptr(unsafe.Pointer(&ts)), 0)
	if errno != 0 {
		return 0
	}
	return time.Duration(ts.Nano())
}
