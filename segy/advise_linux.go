//go:build linux

package segy

import (
	"os"

	"golang.org/x/sys/unix"
)

// adviseScattered tells the kernel how the mapping is about to be read
// (madvise(2)): scattered (true: MADV_RANDOM, no read-ahead around each
// page fault, which on a cold cache would read a large window of the file
// for every sampled header) or in runs again (false: MADV_NORMAL). Advice
// only: errors are ignored.
//
// Build constraint: Linux, where golang.org/x/sys/unix has Madvise with
// these constants; advise_other.go does nothing elsewhere.
func adviseScattered(data []byte, on bool) {
	if len(data) == 0 {
		return
	}
	adv := unix.MADV_NORMAL
	if on {
		adv = unix.MADV_RANDOM
	}
	unix.Madvise(data, adv)
}

// prefetch asks the kernel to start reading the pages of the given byte
// ranges (offset, length) of the mapping now (MADV_WILLNEED), so that the
// reads that follow, one at a time, find them read or on their way: the
// disk gets many requests at once instead of one per page fault. Advice
// only: errors are ignored.
func prefetch(data []byte, ranges [][2]int64) {
	if len(data) == 0 {
		return
	}
	page := int64(os.Getpagesize())
	for _, r := range ranges {
		lo := r[0] &^ (page - 1)
		hi := min(int64(len(data)), (r[0]+r[1]+page-1)&^(page-1))
		if lo < 0 || lo >= hi {
			continue
		}
		unix.Madvise(data[lo:hi], unix.MADV_WILLNEED)
	}
}
