package segy

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"quadtrace/segy/segytest"
)

// corpusDir is the project's copy of the open SEG-Y corpus (files written
// by segyio; testdata/segy-corpus/README.md), relative to this package.
const corpusDir = "../" + segytest.CorpusDir

func openT(t testing.TB, path string, opt Options) *File {
	t.Helper()
	f, err := Open(path, opt)
	if err != nil {
		t.Fatalf("Open(%s): %v", path, err)
	}
	t.Cleanup(func() { f.Close() })
	return f
}

func hasWarning(info Info, sub string) bool {
	for _, w := range info.Warnings {
		if strings.Contains(w, sub) {
			return true
		}
	}
	return false
}

// base3D is segytest.Base3D: 3 inlines x 4 crosslines of 8 IEEE samples.
func base3D() segytest.File { return segytest.Base3D() }

func writeTemp(t testing.TB, data []byte) string {
	t.Helper()
	p := filepath.Join(t.TempDir(), "synthetic.sgy")
	if err := os.WriteFile(p, data, 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}
