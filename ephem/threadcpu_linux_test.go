//go:build linux

package ephem_test

import (
	"syscall"
	"time"
)

// threadCPU returns the CPU time of the calling OS thread (Linux
// RUSAGE_THREAD); ok is false where it cannot be read. With the goroutine
// locked to its thread it times a single-threaded benchmark by the CPU it
// got, which a shared machine's load inflates far less than the wall time.
func threadCPU() (time.Duration, bool) {
	var ru syscall.Rusage
	if err := syscall.Getrusage(1 /* RUSAGE_THREAD */, &ru); err != nil {
		return 0, false
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano()), true
}
