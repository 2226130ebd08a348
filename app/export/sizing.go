package export

import (
	"fmt"
)

// DefaultBudget is the memory budget for trace blocks when Job.BudgetBytes
// is zero: 256 MiB.
const DefaultBudget int64 = 256 << 20

// GCPercent is the collector's heap growth ratio (GOGC) that the export command sets
// during an export; blockSize leaves room for the garbage it allows.
// The trace blocks are pointer-free float arrays, cheap to collect, so a
// collection every 25% of growth costs little and keeps the garbage of
// finished blocks small next to the budget (the default 100% would let it
// reach the live heap's size).
const GCPercent = 25

// blocksInFlight is the number of trace blocks alive at once: one being read,
// one being computed, one being written.
const blocksInFlight = 3

// blockInputBytes caps the input samples of a block (float32): 4 MiB, about
// 700 traces of 1501 samples. The blocks in flight, input and outputs,
// then stay near the size of the processor's cache, so what one stage
// writes is still there when the next reads it, and an export's first
// blocks touch little fresh memory. Measured on the export benchmark's
// volume (40,000 traces of 1501 samples, envelope): 2500 traces a block
// (the 16-block cap alone) 764-792 CPU-ms an export, 727 traces 711-723,
// 363 traces 713-732, 181 traces 783-789.
const blockInputBytes = 4 << 20

// traceHeaderBytes is the memory kept per trace beside its samples (the
// 240-byte header as decoded plus its bookkeeping), rounded up.
const traceHeaderBytes = 320

// blockSize returns the number of traces per block so that blocksInFlight
// blocks, each holding the input samples, a conditioned copy when
// conditioned, and one output per attribute, fit in budget bytes together
// with the garbage the collector lets accumulate (GCPercent of the live
// heap, the setting of the export command):
//
//	budget / (bytes per trace * (1 + conditioned + outputs) * blocksInFlight * (1 + GCPercent/100))
//
// It is also capped so that a volume is cut into at least about 16 blocks
// (progress moves and the stages overlap) and a block's input samples take
// at most blockInputBytes, but never below 64 traces a block, the least
// that keeps every core of Compute busy. It fails when the budget cannot
// hold one trace per block.
func blockSize(budget int64, samples, outputs int, conditioned bool, total int) (int, error) {
	copies := int64(1 + outputs)
	if conditioned {
		copies++
	}
	perTrace := (int64(samples)*4*copies + traceHeaderBytes) * blocksInFlight
	n := budget * 100 / (perTrace * (100 + GCPercent))
	if n < 1 {
		return 0, fmt.Errorf("memory budget of %s cannot hold one trace of %d samples for %d outputs (needs at least %s)",
			formatBytes(budget), samples, outputs, formatBytes(perTrace*(100+GCPercent)/100))
	}
	limit := max(64, min((total+15)/16, blockInputBytes/(samples*4)))
	return int(min(n, int64(limit))), nil
}

// formatBytes writes n bytes in binary units for messages.
func formatBytes(n int64) string {
	switch {
	case n >= 1<<30:
		return fmt.Sprintf("%.1f GiB", float64(n)/(1<<30))
	case n >= 1<<20:
		return fmt.Sprintf("%.1f MiB", float64(n)/(1<<20))
	case n >= 1<<10:
		return fmt.Sprintf("%.1f KiB", float64(n)/(1<<10))
	}
	return fmt.Sprintf("%d bytes", n)
}
