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

// fileWriter is a Writer writing straight to a file: the tests' stand-in
// for the caller's file-system policy (app/outfile in quadtrace), which
// segy does not hold.
type fileWriter struct {
	*Writer
	fh *os.File
}

func createFile(dst string, src *File, opt WriteOptions) (*fileWriter, error) {
	return openFileWriter(dst, func(fh *os.File) (*Writer, error) { return NewWriter(fh, dst, src, opt) })
}

func createNewFile(dst string, spec NewSpec, opt WriteOptions) (*fileWriter, error) {
	return openFileWriter(dst, func(fh *os.File) (*Writer, error) { return NewWriterSpec(fh, dst, spec, opt) })
}

func openFileWriter(dst string, mk func(*os.File) (*Writer, error)) (*fileWriter, error) {
	fh, err := os.Create(dst)
	if err != nil {
		return nil, err
	}
	w, err := mk(fh)
	if err != nil {
		fh.Close()
		os.Remove(dst)
		return nil, err
	}
	return &fileWriter{w, fh}, nil
}

// Commit finishes the writer and closes the file.
func (w *fileWriter) Commit() error {
	err := w.Finish()
	if e := w.fh.Close(); err == nil {
		err = e
	}
	return err
}

// Abort stops the writer and removes the file.
func (w *fileWriter) Abort() error {
	w.Writer.Abort()
	w.fh.Close()
	return os.Remove(w.fh.Name())
}
