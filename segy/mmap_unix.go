//go:build aix || darwin || dragonfly || freebsd || linux || netbsd || openbsd || solaris

package segy

import (
	"os"

	"golang.org/x/sys/unix"
)

// mapFile maps the whole file read-only. It returns nil (and the caller
// falls back to ReadAt) when the file is empty, too large for the address
// space, or the filesystem refuses mmap.
//
// Build constraint: the systems where golang.org/x/sys/unix offers Mmap;
// every other system (Windows among them) builds mmap_other.go.
func mapFile(f *os.File, size int64) []byte {
	if size <= 0 || int64(int(size)) != size {
		return nil
	}
	data, err := unix.Mmap(int(f.Fd()), 0, int(size), unix.PROT_READ, unix.MAP_SHARED)
	if err != nil {
		return nil
	}
	return data
}

func unmapFile(data []byte) error {
	if data == nil {
		return nil
	}
	return unix.Munmap(data)
}
