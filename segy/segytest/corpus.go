package segytest

import (
	"os"
	"path/filepath"
	"testing"
)

// CorpusFile returns the path of file name in the open SEG-Y corpus that
// sits beside the project, ../shared/segy-corpus relative to the module
// root (the folder holding go.mod, found upwards from the test's working
// directory). The files were written by segyio, an independent SEG-Y
// implementation, and their contents are documented in that folder's
// README. A missing corpus fails the test: it is an outside reference, and
// a check that silently does not run is no check.
func CorpusFile(t testing.TB, name string) string {
	t.Helper()
	dir, err := os.Getwd()
	if err != nil {
		t.Fatalf("segy corpus: %v", err)
	}
	for {
		if _, err := os.Stat(filepath.Join(dir, "go.mod")); err == nil {
			break
		}
		parent := filepath.Dir(dir)
		if parent == dir {
			t.Fatalf("segy corpus: no go.mod above the test's folder")
		}
		dir = parent
	}
	p := filepath.Join(dir, "..", "shared", "segy-corpus", name)
	if _, err := os.Stat(p); err != nil {
		t.Fatalf("segy corpus file missing (the tests need ../shared/segy-corpus beside the project): %v", err)
	}
	return p
}
