//go:build !linux

package outfile

import "os"

// startWriteback does nothing here: sync_file_range(2) is Linux-only, and
// Commit's fsync writes everything.
func startWriteback(fh *os.File, off, n int64) error { return nil }
