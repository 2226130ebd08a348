package volume

import (
	"context"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"testing"
	"time"

	"quadtrace/app/indexcache"
	"quadtrace/segy"
	"quadtrace/segy/segytest"
)

// The geometry tests build their files with segytest.Grid, whose sample
// values encode each trace's inline and crossline, so a section read
// through a wrong index shows it.

func writeSEGY(t *testing.T, dir string, g segytest.File) string {
	t.Helper()
	p := filepath.Join(dir, "grid.sgy")
	if err := os.WriteFile(p, g.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	return p
}

func openFastT(t *testing.T, p string, c *indexcache.Cache) *Volume {
	t.Helper()
	v, err := OpenFast(context.Background(), p, segy.Options{}, c)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { v.Close() })
	return v
}

func openFullT(t *testing.T, p string) *Volume {
	t.Helper()
	v, err := Open(p, segy.Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { v.Close() })
	return v
}

// sampledByOpen reports whether trace i is among the headers segy.OpenFast
// samples in a file of n traces with lines of nx traces (the default
// sample of 4000 spread evenly, the first line, the last trace and the
// first of the last line).
func sampledByOpen(i, n, nx int) bool {
	return i < nx || i == n-1 || i == (n-1)/nx*nx || segytest.SampledByFastOpen(i, n)
}

// A regular file opens from the sample; its check changes nothing and
// fills the cache; the second open takes the index from the cache and
// gives the Info of a full open.
func TestFastOpenCachedSecondOpen(t *testing.T) {
	dir := t.TempDir()
	c := indexcache.New(filepath.Join(dir, "cache"))
	p := writeSEGY(t, dir, segytest.Grid(100, 90, 2)) // 9000 traces: sampled
	v := openFastT(t, p, c)
	if v.IndexSource() != segy.IndexSampled {
		t.Fatalf("first open: index from %v, want the sample", v.IndexSource())
	}
	nv, ch, err := v.Check(context.Background(), nil)
	if err != nil {
		t.Fatal(err)
	}
	if nv != nil || ch.Geometry || ch.Refined {
		t.Fatalf("check of a regular file changed something: %+v", ch.Summary)
	}
	w := openFastT(t, p, c)
	if w.IndexSource() != segy.IndexSaved {
		t.Fatalf("second open: index from %v, want the cache", w.IndexSource())
	}
	if full := openFullT(t, p); !reflect.DeepEqual(w.Info(), full.Info()) {
		t.Errorf("cached open differs from the full open")
	}
}

// An irregular file whose irregularity the sample sees is read in full at
// once, and the index is cached then: the second open is instant too.
func TestFastOpenIrregularCachedAtOpen(t *testing.T) {
	dir := t.TempDir()
	c := indexcache.New(filepath.Join(dir, "cache"))
	g := segytest.Grid(100, 90, 2)
	for _, irr := range segytest.Irregulars() {
		if irr.Name == "gaps-spread" {
			g.Traces = irr.Change(g.Traces, 90)
		}
	}
	p := writeSEGY(t, dir, g)
	if v := openFastT(t, p, c); v.IndexSource() != segy.IndexFull {
		t.Fatalf("first open: index from %v, want every header", v.IndexSource())
	}
	w := openFastT(t, p, c)
	if w.IndexSource() != segy.IndexSaved {
		t.Fatalf("second open: index from %v, want the cache", w.IndexSource())
	}
	if full := openFullT(t, p); !reflect.DeepEqual(w.Info(), full.Info()) {
		t.Errorf("cached open differs from the full open")
	}
}

// A duplicate the sample does not see: the hypothesis draws the wrong
// trace at one position; Check returns a new volume with the full open's
// Info and sections, says what changed, and the first volume is left as
// it was (its readers finish on it).
func TestFastOpenWrongHypothesisVolume(t *testing.T) {
	dir := t.TempDir()
	c := indexcache.New(filepath.Join(dir, "cache"))
	const nil_, nx = 100, 90
	g := segytest.Grid(nil_, nx, 2)
	n := nil_ * nx
	k := n / 2
	for sampledByOpen(k, n, nx) || sampledByOpen(k-1, n, nx) {
		k++
	}
	g.Traces[k].Inline, g.Traces[k].Crossline = g.Traces[k-1].Inline, g.Traces[k-1].Crossline // a duplicate; k's own position empty
	il, xl := 100+k/nx, 20+2*(k%nx)
	p := writeSEGY(t, dir, g)
	v := openFastT(t, p, c)
	if v.IndexSource() != segy.IndexSampled {
		t.Fatalf("index from %v: the test needs the sampled hypothesis", v.IndexSource())
	}
	ctx := context.Background()
	before, err := v.Read(ctx, Slice{Orientation: Inline, Number: il})
	if err != nil {
		t.Fatal(err)
	}
	nv, ch, err := v.Check(ctx, nil)
	if err != nil {
		t.Fatal(err)
	}
	if nv == nil || !ch.Geometry || ch.Summary == "" {
		t.Fatalf("the duplicate was not reported: new volume %v, %+v", nv != nil, ch)
	}
	defer nv.Close()
	t.Logf("note: %s", ch.Summary)
	full := openFullT(t, p)
	if !reflect.DeepEqual(nv.Info(), full.Info()) {
		t.Errorf("checked volume's Info differs from the full open's")
	}
	after, err := nv.Read(ctx, Slice{Orientation: Inline, Number: il})
	if err != nil {
		t.Fatal(err)
	}
	want, _ := full.Read(ctx, Slice{Orientation: Inline, Number: il})
	j := slices.Index(after.Keys, xl)
	if !sameFloats(after.Traces[j], want.Traces[j]) {
		t.Errorf("checked volume reads %v at crossline %d, full open %v", after.Traces[j][0], xl, want.Traces[j][0])
	}
	if sameFloats(before.Traces[j], want.Traces[j]) {
		t.Errorf("the hypothesis already read the full open's trace at crossline %d: the test proves nothing", xl)
	}
	if v.Info().DuplicateTraces != 0 || nv.Info().DuplicateTraces != 1 {
		t.Errorf("duplicates: hypothesis %d (want 0, unchanged), checked %d (want 1)", v.Info().DuplicateTraces, nv.Info().DuplicateTraces)
	}
	if w := openFastT(t, p, c); w.IndexSource() != segy.IndexSaved || !reflect.DeepEqual(w.Info(), full.Info()) {
		t.Errorf("open after the check: index from %v, want the cache with the full Info", w.IndexSource())
	}
}

func sameFloats(a, b []float32) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] && !(a[i] != a[i] && b[i] != b[i]) {
			return false
		}
	}
	return true
}

// The cache is ignored when the file changes: its modification time
// alone, its size, its header bytes at the same size and time; a damaged
// entry too. Each time the entry is rewritten and used by the next open.
func TestCacheIgnoredWhenFileChanges(t *testing.T) {
	dir := t.TempDir()
	c := indexcache.New(filepath.Join(dir, "cache"))
	g := segytest.Grid(100, 90, 2)
	p := writeSEGY(t, dir, g)
	warm := func(what string) {
		t.Helper()
		v := openFastT(t, p, c)
		if _, _, err := v.Check(context.Background(), nil); err != nil {
			t.Fatal(err)
		}
		if w := openFastT(t, p, c); w.IndexSource() != segy.IndexSaved {
			t.Fatalf("%s: after a check the cache was not used (%v)", what, w.IndexSource())
		}
	}
	notUsed := func(what string) {
		t.Helper()
		v := openFastT(t, p, c)
		if v.IndexSource() == segy.IndexSaved {
			t.Errorf("%s: the cached index was used", what)
		}
		if full := openFullT(t, p); !reflect.DeepEqual(v.Info().Inline, full.Info().Inline) || v.Info().Traces != full.Info().Traces {
			t.Errorf("%s: open disagrees with the file", what)
		}
	}
	warm("new file")

	// modification time only
	st, _ := os.Stat(p)
	later := st.ModTime().Add(3 * time.Second)
	if err := os.Chtimes(p, later, later); err != nil {
		t.Fatal(err)
	}
	notUsed("time changed")
	warm("time changed")

	// size: one more inline
	g2 := segytest.Grid(101, 90, 2)
	if err := os.WriteFile(p, g2.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	notUsed("size changed")
	warm("size changed")

	// bytes: the first trace's inline number, same size, time put back
	st, _ = os.Stat(p)
	b, _ := os.ReadFile(p)
	b[3600+191] ^= 1 // trace 0, byte 192 of 189-192 (SEG-Y rev 1 table 3)
	if err := os.WriteFile(p, b, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := os.Chtimes(p, st.ModTime(), st.ModTime()); err != nil {
		t.Fatal(err)
	}
	notUsed("header bytes changed at the same size and time")
	warm("header bytes changed")

	// a damaged entry
	entries, _ := filepath.Glob(filepath.Join(c.Dir(), "*.idx"))
	if len(entries) != 1 {
		t.Fatalf("cache entries: %v, want one per file and options", entries)
	}
	e, _ := os.ReadFile(entries[0])
	e[len(e)/2] ^= 0xff
	if err := os.WriteFile(entries[0], e, 0o644); err != nil {
		t.Fatal(err)
	}
	notUsed("damaged entry")
	warm("damaged entry rewritten")
}
