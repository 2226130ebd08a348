//go:build unix

package segy

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
)

// TestShrinkingMappedFile: another program truncates the file while it is
// mapped. Reading the lost pages raises SIGBUS in the kernel; the reads must
// come back as errors wrapping ErrChanged that name the trace, and reads of
// what is left still work.
func TestShrinkingMappedFile(t *testing.T) {
	path := writeTemp(t, bigBase().Bytes())
	f, err := Open(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if f.data == nil {
		t.Fatal("file not mapped: the test needs the mapped path")
	}
	if err := os.Truncate(path, 4000); err != nil {
		t.Fatal(err)
	}
	_, err = f.ReadTrace(399, nil)
	if !errors.Is(err, ErrChanged) || !strings.Contains(err.Error(), "trace 399") {
		t.Fatalf("ReadTrace past the new end: %v, want an ErrChanged error naming trace 399", err)
	}
	if _, err := f.TraceHeader(300); !errors.Is(err, ErrChanged) {
		t.Fatalf("TraceHeader past the new end: %v", err)
	}
	if _, err := f.TimeSlice(3, 0); !errors.Is(err, ErrChanged) {
		t.Fatalf("TimeSlice past the new end: %v", err)
	}
	if _, err := f.TraceHeader(0); err != nil {
		t.Fatalf("trace 0's header lies in the first page, still in the file: %v", err)
	}
	// Opening while shrunk to a page: an error, never a crash.
	if g, err := Open(path, Options{}); err == nil {
		g.Close()
		t.Fatal("opened a file cut inside its traces")
	}
}

// TestRefusesNonRegularInputs: a FIFO would block a reader forever, a
// device is not a file; Open refuses both, and directories, with one line
// and without opening them for reading first (a FIFO open would block).
func TestRefusesNonRegularInputs(t *testing.T) {
	dir := t.TempDir()
	fifo := filepath.Join(dir, "pipe.sgy")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	cases := map[string]string{fifo: "is a FIFO", dir: "is a directory"}
	dev := filepath.Join(dir, "zero.sgy")
	// A character device of our own (major 1, minor 5: the kernel's zero
	// device), made in the temporary folder; needs root.
	if err := syscall.Mknod(dev, syscall.S_IFCHR|0o644, 1<<8|5); err == nil {
		cases[dev] = "is a character device"
	} else {
		t.Logf("character device case skipped: mknod needs root (%v)", err)
	}
	for path, want := range cases {
		_, err := Open(path, Options{})
		if err == nil || !strings.Contains(err.Error(), want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("Open(%s) = %v, want one line containing %q", path, err, want)
		}
	}
}
