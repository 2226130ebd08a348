//go:build !(aix || darwin || dragonfly || freebsd || linux || netbsd || openbsd || solaris)

package segy

import "os"

// mapFile never maps on systems without unix.Mmap (Windows, Plan 9, js,
// wasip1): it returns nil, and Open reads the file with ReadAt, the same
// path a refused mmap takes on Unix (TestMmapRefusedFallsBack proves that
// path on Linux). The constraint is the negation of mmap_unix.go's, so
// exactly one of the two files builds everywhere.
func mapFile(f *os.File, size int64) []byte { return nil }

// unmapFile has nothing to release: mapFile never maps here.
func unmapFile(data []byte) error { return nil }
