//go:build unix

package viewer

import (
	"syscall"
	"time"
)

// processCPU returns the CPU time (user + system) the test process has
// used so far, from getrusage(2): on the shared machine it counts the
// work a benchmark did, where wall time also counts the waits for a core.
func processCPU() time.Duration {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
