//go:build unix

package outfile

import (
	"os"

	"golang.org/x/sys/unix"
)

// openNamed creates a hidden temporary file for base in dir and takes an
// exclusive flock(2) on it that lasts as long as the writer lives.
func openNamed(dir, base string) (*os.File, string, error) {
	name := tmpName(dir, base)
	fh, err := os.OpenFile(name, os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o600)
	if err != nil {
		return nil, "", err
	}
	if err := unix.Flock(int(fh.Fd()), unix.LOCK_EX|unix.LOCK_NB); err != nil {
		fh.Close()
		os.Remove(name)
		return nil, "", err
	}
	return fh, name, nil
}

// writerGone reports whether no process holds the lock of our temporary
// file p (its writer has exited or been killed).
func writerGone(p string) bool {
	fh, err := os.OpenFile(p, os.O_RDONLY|unix.O_NOFOLLOW|unix.O_NONBLOCK, 0)
	if err != nil {
		return false
	}
	defer fh.Close()
	return unix.Flock(int(fh.Fd()), unix.LOCK_EX|unix.LOCK_NB) == nil
}

// unlinkOpen removes the name of an open file: the data live as long as it
// is open (POSIX unlink semantics).
func unlinkOpen(fh *os.File) { os.Remove(fh.Name()) }
