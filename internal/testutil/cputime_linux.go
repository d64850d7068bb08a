//go:build linux

package testutil

import (
	"syscall"
	"time"
	"unsafe"
)

// ThreadCPU returns the CPU time of the calling OS thread
// (CLOCK_THREAD_CPUTIME_ID), so that the ratio of two interleaved
// measurements does not count the time other processes of a shared
// machine take. Callers lock the goroutine to its thread.
func ThreadCPU() time.Duration {
	const clockThreadCPUTimeID = 3
	var ts syscall.Timespec
	if _, _, e := syscall.RawSyscall(syscall.SYS_CLOCK_GETTIME, clockThreadCPUTimeID, uintptr(unsafe.Pointer(&ts)), 0); e != 0 {
		return 0
	}
	return time.Duration(ts.Nano())
}
