// Package indexcache keeps the geometry indices of SEG-Y files between
// runs, so that a second open of a file, regular or not, is instant: a
// folder of entries, one per file path and header-byte options, each the
// exact index segy.File.Check returned (segy's saved-index format).
//
// An entry is never trusted: segy.OpenFast uses it only when it matches
// the file being opened (the stamp this package makes of the file's
// absolute path, size and modification time; the file size and options
// again; the bytes before the first trace and 64 trace headers spread
// through the file; a SHA-256 checksum over the entry). Anything else is
// ignored, and the next Store rewrites it. Entries are written through
// app/outfile (an unnamed temporary file linked into place when
// complete), so a kill at any moment leaves the old entry or the new one,
// never half of one.
//
// The folder is os.UserCacheDir()/quadtrace/geometry, or the folder named
// by the environment variable QUADTRACE_CACHE_DIR (tests point it at a
// temporary folder, so no test touches the user's cache). A nil *Cache is
// a cache that holds nothing.
package indexcache

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"path/filepath"

	"quadtrace/app/outfile"
	"quadtrace/segy"
)

// EnvDir names the environment variable that overrides the cache folder:
// entries go to $QUADTRACE_CACHE_DIR/geometry.
const EnvDir = "QUADTRACE_CACHE_DIR"

// maxEntry bounds the size of an entry read back (a grid of 2^28 cells of
// 4 bytes, plus the Info): a larger file there is not ours.
const maxEntry = 1<<30 + 1<<20

// Cache is a folder of geometry index entries. Its methods are safe for
// concurrent use (each entry is replaced whole).
type Cache struct{ dir string }

// New returns the cache in folder dir (made when the first entry is
// stored).
func New(dir string) *Cache { return &Cache{dir: dir} }

// Default returns the user's cache: $QUADTRACE_CACHE_DIR/geometry when that
// variable is set, else os.UserCacheDir()/quadtrace/geometry; nil (no
// cache) when neither is known.
func Default() *Cache {
	if d := os.Getenv(EnvDir); d != "" {
		return New(filepath.Join(d, "geometry"))
	}
	d, err := os.UserCacheDir()
	if err != nil {
		return nil
	}
	return New(filepath.Join(d, "quadtrace", "geometry"))
}

// Dir is the cache's folder ("" for a nil cache).
func (c *Cache) Dir() string {
	if c == nil {
		return ""
	}
	return c.dir
}

// Stamp identifies the version of the file at path: its absolute path,
// size and modification time (nanoseconds). ok is false when the file
// cannot be examined.
func Stamp(path string) (stamp string, ok bool) {
	abs, err := filepath.Abs(path)
	if err != nil {
		return "", false
	}
	st, err := os.Stat(abs)
	if err != nil {
		return "", false
	}
	return fmt.Sprintf("%s\x00%d\x00%d", abs, st.Size(), st.ModTime().UnixNano()), true
}

// entryPath is the entry of a file and options: a hash of the absolute
// path and the options, so a new version of the file replaces the entry
// of the old one.
func (c *Cache) entryPath(path string, opt segy.Options) (string, bool) {
	abs, err := filepath.Abs(path)
	if err != nil {
		return "", false
	}
	h := sha256.Sum256([]byte(fmt.Sprintf("%s\x00%+v", abs, opt)))
	return filepath.Join(c.dir, hex.EncodeToString(h[:16])+".idx"), true
}

// Lookup returns the options for segy.OpenFast of path: the file's stamp,
// and the saved index when the cache has an entry for the path and
// options (segy checks that it matches the file; a stale or damaged entry
// is ignored there). Nothing is an error: without a cache, entry or
// stamp, the open samples the file.
func (c *Cache) Lookup(path string, opt segy.Options) segy.FastOptions {
	stamp, _ := Stamp(path)
	fo := segy.FastOptions{Stamp: stamp}
	if c == nil || stamp == "" {
		return fo
	}
	p, ok := c.entryPath(path, opt)
	if !ok {
		return fo
	}
	fh, err := os.Open(p)
	if err != nil {
		return fo
	}
	defer fh.Close()
	st, err := fh.Stat()
	if err != nil || !st.Mode().IsRegular() || st.Size() > maxEntry {
		return fo
	}
	// read in one buffer of the entry's size (io.ReadAll's growing buffer
	// cost a warm figure tens of ms on a 2.5 MB entry); an entry changed
	// meanwhile fails segy's checksum and is not used
	b := make([]byte, st.Size())
	if _, err := io.ReadFull(fh, b); err == nil {
		fo.Saved = b
	}
	return fo
}

// Store writes index (segy.Checked.Index) as the entry of path and
// options, replacing any entry there, all or nothing (app/outfile). A nil
// cache stores nothing.
func (c *Cache) Store(path string, opt segy.Options, index []byte) error {
	if c == nil || len(index) == 0 {
		return nil
	}
	p, ok := c.entryPath(path, opt)
	if !ok {
		return fmt.Errorf("%s: no absolute path for the geometry cache", path)
	}
	of, err := outfile.Create(p, outfile.Options{Inputs: []string{path}})
	if err != nil {
		return fmt.Errorf("geometry cache: %w", err)
	}
	if _, err := of.Write(index); err != nil {
		of.Abort()
		return fmt.Errorf("geometry cache: %s: %w", p, err)
	}
	if err := of.Commit(); err != nil {
		return fmt.Errorf("geometry cache: %w", err)
	}
	return nil
}
