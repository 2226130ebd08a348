package export

import (
	"fmt"
	"strconv"
	"strings"
	"unicode"
)

// DefaultBudget is the memory budget for trace blocks when Job.BudgetBytes
// is zero: 256 MiB.
const DefaultBudget int64 = 256 << 20

// gcPercent is the collector's heap growth ratio (GOGC) that Command sets
// during an export; blockSize leaves room for the garbage it allows.
// The trace blocks are pointer-free float arrays, cheap to collect, so a
// collection every 25% of growth costs little and keeps the garbage of
// finished blocks small next to the budget (the default 100% would let it
// reach the live heap's size).
const gcPercent = 25

// blocksInFlight is the number of trace blocks alive at once: one being read,
// one being computed, one being written.
const blocksInFlight = 3

// traceHeaderBytes is the memory kept per trace beside its samples (the
// 240-byte header as decoded plus its bookkeeping), rounded up.
const traceHeaderBytes = 320

// blockSize returns the number of traces per block so that blocksInFlight
// blocks, each holding the input samples, a conditioned copy when
// conditioned, and one output per attribute, fit in budget bytes together
// with the garbage the collector lets accumulate (gcPercent of the live
// heap, the setting of the export command):
//
//	budget / (bytes per trace * (1 + conditioned + outputs) * blocksInFlight * (1 + gcPercent/100))
//
// It is also capped so that a volume is cut into at least about 16 blocks
// (progress moves and the stages overlap), but never below 64 traces a
// block, the least that keeps every core of Compute busy. It fails when
// the budget cannot hold one trace per block.
func blockSize(budget int64, samples, outputs int, conditioned bool, total int) (int, error) {
	copies := int64(1 + outputs)
	if conditioned {
		copies++
	}
	perTrace := (int64(samples)*4*copies + traceHeaderBytes) * blocksInFlight
	n := budget * 100 / (perTrace * (100 + gcPercent))
	if n < 1 {
		return 0, fmt.Errorf("memory budget of %s cannot hold one trace of %d samples for %d outputs (needs at least %s)",
			formatBytes(budget), samples, outputs, formatBytes(perTrace*(100+gcPercent)/100))
	}
	limit := max(64, (total+15)/16)
	return int(min(n, int64(limit))), nil
}

// parseBytes reads a memory size such as "256M", "1G", "512MiB", "64k" or
// "1000000". The suffixes K, M, G and T (with or without a trailing "B" or
// "iB", any case) are binary multiples (1 K = 1024 bytes), as memory sizes
// commonly are.
func parseBytes(s string) (int64, error) {
	t := strings.TrimSpace(s)
	i := strings.IndexFunc(t, func(r rune) bool { return !unicode.IsDigit(r) && r != '.' })
	num, unit := t, ""
	if i >= 0 {
		num, unit = t[:i], strings.ToUpper(strings.TrimSpace(t[i:]))
	}
	unit = strings.TrimSuffix(strings.TrimSuffix(unit, "B"), "I")
	shift := map[string]uint{"": 0, "K": 10, "M": 20, "G": 30, "T": 40}
	sh, ok := shift[unit]
	if !ok || num == "" {
		return 0, fmt.Errorf("memory size %q: want a number with an optional K, M, G or T suffix", s)
	}
	v, err := strconv.ParseFloat(num, 64)
	if err != nil || v <= 0 {
		return 0, fmt.Errorf("memory size %q: want a positive number with an optional K, M, G or T suffix", s)
	}
	b := v * float64(uint64(1)<<sh)
	if b >= 1<<62 {
		return 0, fmt.Errorf("memory size %q: too large", s)
	}
	return int64(b), nil
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

// parseRange reads an inclusive range "A:B" of inline or crossline numbers.
// A single number "A" is the range A:A.
func parseRange(s string) (*Range, error) {
	a, b, found := strings.Cut(strings.TrimSpace(s), ":")
	first, err := strconv.Atoi(strings.TrimSpace(a))
	if err != nil {
		return nil, fmt.Errorf("range %q: want FIRST:LAST, two whole numbers", s)
	}
	last := first
	if found {
		if last, err = strconv.Atoi(strings.TrimSpace(b)); err != nil {
			return nil, fmt.Errorf("range %q: want FIRST:LAST, two whole numbers", s)
		}
	}
	if last < first {
		return nil, fmt.Errorf("range %q: last %d is before first %d", s, last, first)
	}
	return &Range{First: first, Last: last}, nil
}
