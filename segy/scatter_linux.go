//go:build linux

package segy

import (
	"os"

	"golang.org/x/sys/unix"
)

// openScattered opens path a second time for the scattered reads of a
// sampled open, with posix_fadvise(POSIX_FADV_RANDOM) on that descriptor
// only: no read-ahead around each small read (on a cold cache a header
// of 240 bytes would otherwise read a whole read-ahead window), while the
// file's own descriptor and mapping keep their read-ahead for sections.
// nil when it cannot be opened (the sample then reads through the file).
//
// Build constraint: Linux, where golang.org/x/sys/unix has Fadvise;
// scatter_other.go returns nil elsewhere.
func openScattered(path string) *os.File {
	fh, err := os.Open(path)
	if err != nil {
		return nil
	}
	if st, err := fh.Stat(); err != nil || !st.Mode().IsRegular() {
		fh.Close()
		return nil
	}
	unix.Fadvise(int(fh.Fd()), 0, 0, unix.FADV_RANDOM)
	return fh
}
