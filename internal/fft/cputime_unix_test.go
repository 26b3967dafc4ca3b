//go:build unix

package fft

import (
	"syscall"
	"time"
)

// processCPU returns the CPU time (user + system) used so far by this process, the quantity
// numpy_baseline.py measures with time.process_time. Unlike wall-clock time it does not grow
// while the process waits for a core on a shared machine.
func processCPU() (time.Duration, bool) {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0, false
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano()), true
}
