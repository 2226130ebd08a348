//go:build unix

package compute

import (
	"syscall"
	"time"
)

// processCPU returns the CPU time (user + system) the test process has
// used so far, from getrusage(2): on a shared machine it counts the work
// done, where wall time also counts the waits for a core.
func processCPU() time.Duration {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// minorFaults returns the minor page faults of the test process so far,
// from getrusage(2): first touches of fresh memory.
func minorFaults() int64 {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	return ru.Minflt
}
