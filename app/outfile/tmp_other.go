//go:build !linux

package outfile

import (
	"errors"
	"os"
)

// openUnnamed: unnamed files (O_TMPFILE) are Linux-only; a named file is
// used instead.
func openUnnamed(dir string) (*os.File, error) { return nil, errors.ErrUnsupported }

func linkUnnamedAt(fh *os.File, path string) error { return errors.ErrUnsupported }
