//go:build unix

package cli

import (
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// `quadtrace track --out` refuses a FIFO (made here, never a real device)
// and leaves it a FIFO.
func TestTrackRefusesFIFO(t *testing.T) {
	fifo := filepath.Join(t.TempDir(), "fifo.txt")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, stderr := run(trackCmd, "--demo", "--seed", "1075,2100,91", "--out", fifo)
	if code != 1 || !strings.Contains(stderr, "fifo.txt") {
		t.Errorf("exit %d, %q; want exit 1 naming the FIFO", code, stderr)
	}
	if fi, err := os.Lstat(fifo); err != nil || fi.Mode()&os.ModeNamedPipe == 0 {
		t.Errorf("the FIFO is gone or replaced: %v %v", fi, err)
	}
}
