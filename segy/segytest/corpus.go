package segytest

import (
	"os"
	"path/filepath"
	"testing"
)

// CorpusDir is the folder of the open SEG-Y corpus inside the project,
// relative to the module root: files written by segyio, an independent
// SEG-Y implementation, copied unchanged, with their origin, licence and
// check values in its README.md.
const CorpusDir = "testdata/segy-corpus"

// CorpusFile returns the path of file name in the project's copy of the
// open SEG-Y corpus, CorpusDir under the module root (the folder holding
// go.mod, found upwards from the test's working directory). A missing file
// fails the test: it is an outside reference kept in the repository, and a
// check that silently does not run is no check.
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
	p := filepath.Join(dir, filepath.FromSlash(CorpusDir), name)
	if _, err := os.Stat(p); err != nil {
		t.Fatalf("segy corpus file missing (the project keeps it under %s): %v", CorpusDir, err)
	}
	return p
}
