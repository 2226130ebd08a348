package cli

import (
	"fmt"
	"os"
	"path/filepath"

	"quadtrace/app/export"
)

// prepareOutput is the one place where every command checks a file it is
// about to write, before any work: out must not be one of the command's
// inputs (by path, symlink or hard link), must not be a folder or any other
// non-regular file (a device, a pipe, a socket), and its folder is made
// when missing. The writers then replace out only atomically (a temporary
// file renamed into place).
func prepareOutput(out string, inputs ...string) error {
	for _, in := range inputs {
		if in != "" && export.SameFile(out, in) {
			return fmt.Errorf("refusing to write %s: it is an input of this command", out)
		}
	}
	if st, err := os.Stat(out); err == nil && !st.Mode().IsRegular() {
		if st.IsDir() {
			return fmt.Errorf("refusing to write %s: it is a folder", out)
		}
		return fmt.Errorf("refusing to write %s: it is not a regular file (%v)", out, st.Mode().Type())
	}
	if dir := filepath.Dir(out); dir != "" {
		if err := os.MkdirAll(dir, 0o777); err != nil {
			return fmt.Errorf("making the output folder: %w", err)
		}
	}
	return nil
}
