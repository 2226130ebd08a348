//go:build linux

package bricks

import "golang.org/x/sys/unix"

// totalMemory returns the machine's RAM in bytes (sysinfo(2)).
func totalMemory() (int64, bool) {
	var si unix.Sysinfo_t
	if err := unix.Sysinfo(&si); err != nil {
		return 0, false
	}
	return int64(si.Totalram) * int64(si.Unit), true
}

// freeBytes returns the space an unprivileged user may still write in
// dir's file system (statfs(2)).
func freeBytes(dir string) (int64, bool) {
	var st unix.Statfs_t
	if err := unix.Statfs(dir, &st); err != nil {
		return 0, false
	}
	return int64(st.Bavail) * int64(st.Bsize), true
}

// evict drops f's pages from the page cache (posix_fadvise
// POSIX_FADV_DONTNEED; needs no privilege).
func evict(f interface{ Fd() uintptr }) error {
	return unix.Fadvise(int(f.Fd()), 0, 0, unix.FADV_DONTNEED)
}
