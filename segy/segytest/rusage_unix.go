//go:build unix

package segytest

import (
	"syscall"
	"time"
)

// ProcessCPU returns the CPU time (user + system) the test process has
// used so far, from getrusage(2): on a shared machine it counts the work
// a benchmark did, where wall time also counts the waits for a core.
func ProcessCPU() time.Duration {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// MinorFaults returns the minor page faults of the test process so far,
// from getrusage(2): first touches of fresh memory.
func MinorFaults() int64 {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	return ru.Minflt
}
