package outfile

import (
	"fmt"
	"os"
	"path/filepath"

	"golang.org/x/sys/unix"
)

// openUnnamed opens an unnamed regular file in dir (open(2) O_TMPFILE,
// Linux 3.11+), locked as our writer's. It fails on filesystems without
// O_TMPFILE support; the caller then uses a named file.
func openUnnamed(dir string) (*os.File, error) {
	fd, err := unix.Open(dir, unix.O_TMPFILE|unix.O_RDWR|unix.O_CLOEXEC, 0o600)
	if err != nil {
		return nil, err
	}
	if err := unix.Flock(fd, unix.LOCK_EX|unix.LOCK_NB); err != nil {
		unix.Close(fd)
		return nil, err
	}
	return os.NewFile(uintptr(fd), filepath.Join(dir, "(unnamed output)")), nil
}

// linkUnnamedAt gives the unnamed file fh the name path, which must not
// exist (the error then wraps os.ErrExist).
func linkUnnamedAt(fh *os.File, path string) error {
	src := fmt.Sprintf("/proc/self/fd/%d", fh.Fd())
	if err := unix.Linkat(unix.AT_FDCWD, src, unix.AT_FDCWD, path, unix.AT_SYMLINK_FOLLOW); err != nil {
		return &os.LinkError{Op: "linkat", Old: src, New: path, Err: err}
	}
	return nil
}
