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
	// open's sample (segy.OpenFast: 4000 spread evenly) does not read
	k := nil_/2*nx + 41
	for segytest.SampledByFastOpen(k, nil_*nx) {
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
