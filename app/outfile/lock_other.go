//go:build !unix

package outfile

import "os"

// openNamed creates a hidden temporary file for base in dir. Without
// flock(2) there is no lock telling a live writer from a dead one.
func openNamed(dir, base string) (*os.File, string, error) {
	name := tmpName(dir, base)
	fh, err := os.OpenFile(name, os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o600)
	if err != nil {
		return nil, "", err
	}
	return fh, name, nil
}

// writerGone cannot tell without locks: stale files are left alone.
func writerGone(p string) bool { return false }

// unlinkOpen: an open file cannot lose its name here; the caller removes it.
func unlinkOpen(fh *os.File) {}
