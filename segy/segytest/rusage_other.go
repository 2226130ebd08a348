//go:build !unix

package segytest

import "time"

// ProcessCPU is 0 where getrusage(2) is missing: benchmarks then report
// no CPU time.
func ProcessCPU() time.Duration { return 0 }

// MinorFaults is 0 where getrusage(2) is missing.
func MinorFaults() int64 { return 0 }
