package indexcache

import (
	"bytes"
	"context"
	"os"
	"path/filepath"
	"testing"

	"quadtrace/segy"
	"quadtrace/segy/segytest"
)

// Default follows QUADTRACE_CACHE_DIR, so tests (and users) can move the
// cache away from os.UserCacheDir.
func TestDefaultFollowsEnv(t *testing.T) {
	dir := t.TempDir()
	t.Setenv(EnvDir, dir)
	if got, want := Default().Dir(), filepath.Join(dir, "geometry"); got != want {
		t.Errorf("Default().Dir() = %q, want %q", got, want)
	}
	var none *Cache
	if none.Dir() != "" || none.Store("x", segy.Options{}, []byte{1}) != nil {
		t.Error("a nil cache should hold and store nothing")
	}
	if fo := none.Lookup("x", segy.Options{}); fo.Saved != nil {
		t.Error("a nil cache returned an entry")
	}
}

// Store then Lookup gives the entry back for the same path and options,
// none for other options; the stamp names the file's path, size and time.
func TestStoreLookup(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "g.sgy")
	if err := os.WriteFile(p, segytest.Grid(10, 12, 2).Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	c := New(filepath.Join(dir, "cache", "geometry"))
	f, err := segy.OpenFast(context.Background(), p, segy.Options{}, c.Lookup(p, segy.Options{}))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	ch, err := f.Check(context.Background(), nil)
	if err != nil {
		t.Fatal(err)
	}
	if err := c.Store(p, segy.Options{}, ch.Index); err != nil {
		t.Fatal(err)
	}
	fo := c.Lookup(p, segy.Options{})
	if !bytes.Equal(fo.Saved, ch.Index) {
		t.Error("the stored entry did not come back")
	}
	if stamp, ok := Stamp(p); !ok || fo.Stamp != stamp {
		t.Errorf("stamp %q, want %q", fo.Stamp, stamp)
	}
	if c.Lookup(p, segy.Options{InlineByte: 9}).Saved != nil {
		t.Error("an entry came back for other options")
	}
	g, err := segy.OpenFast(context.Background(), p, segy.Options{}, fo)
	if err != nil {
		t.Fatal(err)
	}
	defer g.Close()
	if g.IndexSource() != segy.IndexSaved {
		t.Errorf("the cached index was not used: %v", g.IndexSource())
	}
}

// A folder where the entry belongs, or a cache folder that cannot be
// made, is no entry and a failed Store: an error, never a panic or a
// partial file.
func TestUnusableCacheFolder(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "g.sgy")
	if err := os.WriteFile(p, segytest.Grid(10, 12, 2).Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	c := New(filepath.Join(dir, "cache"))
	entry, _ := c.entryPath(p, segy.Options{})
	if err := os.MkdirAll(entry, 0o755); err != nil {
		t.Fatal(err)
	}
	if c.Lookup(p, segy.Options{}).Saved != nil {
		t.Error("a folder was read as an entry")
	}
	if err := c.Store(p, segy.Options{}, []byte("x")); err == nil {
		t.Error("storing over a folder succeeded")
	}
	blocker := filepath.Join(dir, "file")
	os.WriteFile(blocker, nil, 0o644)
	if err := New(filepath.Join(blocker, "sub")).Store(p, segy.Options{}, []byte("x")); err == nil {
		t.Error("storing under a regular file succeeded")
	}
}
