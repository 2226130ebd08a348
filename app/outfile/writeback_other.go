//go:build !linux

package outfile

import "os"

// backgroundSync is off here: the background syncs were measured on Linux
// only, and Commit's fsync writes everything anyway.
const backgroundSync = false

// dataSync is fh.Sync (unused while backgroundSync is off).
func dataSync(fh *os.File) error { return fh.Sync() }
