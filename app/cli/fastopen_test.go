package cli

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"quadtrace/app/indexcache"
	"quadtrace/segy/segytest"
)

// figureOf runs the figure command on one inline with the geometry cache
// in cache, and returns the PNG and stderr.
func figureOf(t *testing.T, in, cache string, inline string) ([]byte, string) {
	t.Helper()
	t.Setenv(indexcache.EnvDir, cache)
	out := filepath.Join(t.TempDir(), "f.png")
	var stdout, stderr bytes.Buffer
	if code := Figure([]string{in, "--inline", inline, "--size", "600x400", "--out", out}, &stdout, &stderr); code != exitOK {
		t.Fatalf("figure: exit %d: %s", code, stderr.String())
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	return b, stderr.String()
}

// The figure command opens fast (a sampled geometry) and still draws the
// exact line: on an inline holding a trace of the neighbouring position
// (a duplicate the sample does not read), the drawn traces are confirmed
// against their headers, the mismatch sends the figure through the full
// check, stderr says what changed, and the figure equals the one drawn
// from the exact index (the cache the check filled). segytest.Grid's
// samples encode each trace's position, so a wrong trace shows.
func TestFigureFastOpenExactLine(t *testing.T) {
	const nil_, nx = 100, 90 // 9000 traces: the open samples
	g := segytest.Grid(nil_, nx, 8)
	// inline 150: a trace carries its left neighbour's crossline; one the
	// open's sample (segy.OpenFast: 4096 spread evenly) does not read
	k := nil_/2*nx + 41
	for sampled(k, nil_*nx) {
		k++
	}
	g.Traces[k].Crossline = g.Traces[k-1].Crossline
	dir := t.TempDir()
	in := filepath.Join(dir, "dup.sgy")
	if err := os.WriteFile(in, g.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	cache := filepath.Join(dir, "cache")
	first, note := figureOf(t, in, cache, "150")
	if !strings.Contains(note, "1 trace repeats the position of an earlier one") {
		t.Errorf("stderr %q does not report the duplicate", note)
	}
	second, note2 := figureOf(t, in, cache, "150")
	if note2 != "" {
		t.Errorf("second figure (cached index) wrote to stderr: %q", note2)
	}
	if !bytes.Equal(first, second) {
		t.Error("the figure drawn after the check differs from the one drawn from the cached exact index")
	}
	// a regular file: confirmed at once, nothing on stderr, same figure warm
	reg := filepath.Join(dir, "regular.sgy")
	if err := os.WriteFile(reg, segytest.Grid(nil_, nx, 8).Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	a, n1 := figureOf(t, reg, cache, "120")
	b, n2 := figureOf(t, reg, cache, "120")
	if n1 != "" || n2 != "" || !bytes.Equal(a, b) {
		t.Errorf("regular file: notes %q %q, figures equal %v", n1, n2, bytes.Equal(a, b))
	}
}

// sampled reports whether segy.OpenFast's default sample (4096 headers
// spread evenly through n traces) reads trace i.
func sampled(i, n int) bool {
	for j := 0; j < 4096; j++ {
		if int(int64(j)*int64(n)/4096) == i {
			return true
		}
	}
	return false
}

// exportOf exports the envelope of in with the geometry cache in cache and
// returns the output's bytes.
func exportOf(t *testing.T, in, cache string) []byte {
	t.Helper()
	t.Setenv(indexcache.EnvDir, cache)
	out := filepath.Join(t.TempDir(), "env.sgy")
	var stderr strings.Builder
	if code := Export([]string{in, "--attribute", "envelope", "--out", out, "--quiet"}, &strings.Builder{}, &stderr); code != exitOK {
		t.Fatalf("export: exit %d: %s", code, stderr.String())
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// The export's contract with the geometry cache: its textual header
// records the source's exact grid, whether the index comes from the cache
// (a second export), from every header (the first), or the cache holds a
// stale or foreign entry (ignored): all three outputs equal an export with
// an empty cache, byte for byte.
func TestExportGeometryCache(t *testing.T) {
	dir := t.TempDir()
	cache := filepath.Join(dir, "cache")
	in := filepath.Join(dir, "grid.sgy")
	write := func(g segytest.File) {
		if err := os.WriteFile(in, g.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	write(segytest.Grid(20, 30, 16))
	first := exportOf(t, in, cache)
	entries, _ := filepath.Glob(filepath.Join(cache, "geometry", "*.idx"))
	if len(entries) != 1 {
		t.Fatalf("cache entries after the first export: %v, want one", entries)
	}
	if second := exportOf(t, in, cache); !bytes.Equal(first, second) {
		t.Error("the export from the cached index differs from the first")
	}
	// the file changes to one inline more (with a gap): the stale entry is ignored
	g := segytest.Grid(21, 30, 16)
	g.Traces = append(g.Traces[:100], g.Traces[101:]...)
	write(g)
	stale := exportOf(t, in, cache)
	fresh := exportOf(t, in, filepath.Join(t.TempDir(), "empty"))
	if !bytes.Equal(stale, fresh) {
		t.Error("with a stale cache entry the export differs from one with an empty cache")
	}
	if bytes.Equal(stale, first) {
		t.Error("the changed file exported as the old one")
	}
	// a foreign entry (another file's index) under this file's name
	other := filepath.Join(dir, "other.sgy")
	if err := os.WriteFile(other, segytest.Grid(20, 30, 16).Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	exportOf(t, other, cache)
	after, _ := filepath.Glob(filepath.Join(cache, "geometry", "*.idx"))
	for _, e := range after {
		b, _ := os.ReadFile(e)
		for _, f := range after {
			if f != e {
				os.WriteFile(f, b, 0o644)
			}
		}
		break
	}
	if got := exportOf(t, in, cache); !bytes.Equal(got, fresh) {
		t.Error("with another file's entry the export differs from one with an empty cache")
	}
}
