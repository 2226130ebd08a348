//go:build !unix

package compute

import "time"

// processCPU is not available here: benchmarks report 0 CPU time.
func processCPU() time.Duration { return 0 }

// minorFaults is not available here: benchmarks report 0 faults.
func minorFaults() int64 { return 0 }
