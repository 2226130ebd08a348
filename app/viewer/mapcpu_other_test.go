//go:build !unix

package viewer

import "time"

// processCPU is 0 where getrusage(2) is missing: the benchmarks then
// report no CPU time.
func processCPU() time.Duration { return 0 }
