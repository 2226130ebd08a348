package cli

import (
	"bytes"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"quadtrace/compute/horizon"
)

func trackCmd(a []string, o, e *bytes.Buffer) int { return Track(a, o, e) }
func mapCmd(a []string, o, e *bytes.Buffer) int   { return Map(a, o, e) }

// seafloorFile tracks the demo's seafloor with `quadtrace track --demo`
// into dir and returns the horizon file's path.
func seafloorFile(t *testing.T, dir string) string {
	t.Helper()
	out := filepath.Join(dir, "seafloor.txt")
	code, stdout, stderr := run(trackCmd, "--demo", "--seed", "1075,2100,91", "--event", "peak", "--max-phase-jump", "30", "--min-envelope", "0.5", "--out", out)
	if code != 0 {
		t.Fatalf("track: exit %d: %s", code, stderr)
	}
	if !strings.Contains(stdout, "30000 of 30000 traces picked") {
		t.Errorf("track said %q", stdout)
	}
	return out
}

// `quadtrace track` writes a horizon file that reads back with every demo
// trace picked and the seed marked; `quadtrace map` writes the envelope
// along it as a text grid (one row per trace, the header first) and as a
// PNG figure.
func TestTrackAndMapCommands(t *testing.T) {
	dir := t.TempDir()
	hpath := seafloorFile(t, dir)
	f, err := os.Open(hpath)
	if err != nil {
		t.Fatal(err)
	}
	picks, err := horizon.Read(f)
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	seeds := 0
	for _, p := range picks {
		if p.Seed {
			seeds++
			if p.Inline != 1075 || p.Crossline != 2100 || p.TimeMS < 87 || p.TimeMS > 95 {
				t.Errorf("seed row %+v", p)
			}
		}
	}
	if len(picks) != 30000 || seeds != 1 {
		t.Errorf("%d picks, %d seeds; want 30000 and 1", len(picks), seeds)
	}

	txt := filepath.Join(dir, "maps", "rms.txt")
	if code, _, stderr := run(mapCmd, "--demo", "--horizon", hpath, "--attribute", "envelope", "--window", "-10:10", "--out", txt); code != 0 {
		t.Fatalf("map txt: exit %d: %s", code, stderr)
	}
	b, err := os.ReadFile(txt)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(b)), "\n")
	if lines[0] != horizon.MapHeader || len(lines) != 30001 {
		t.Errorf("map file: first line %q, %d lines; want the header and 30000 rows", lines[0], len(lines))
	}

	// Between two horizons (here the seafloor and itself, 4 ms below).
	between := filepath.Join(dir, "between.txt")
	if code, _, stderr := run(mapCmd, "--demo", "--horizon", hpath, "--base", hpath, "--window", "0:4", "--stat", "max-abs", "--attribute", "envelope", "--out", between); code != 0 {
		t.Fatalf("map --base: exit %d: %s", code, stderr)
	}
	if b, err := os.ReadFile(between); err != nil || strings.Count(string(b), "\n") != 30001 {
		t.Errorf("map --base: %d lines, %v", strings.Count(string(b), "\n"), err)
	}

	// The map may not replace its own horizon.
	before, _ := os.ReadFile(hpath)
	if code, _, stderr := run(mapCmd, "--demo", "--horizon", hpath, "--attribute", "envelope", "--out", hpath); code != 1 || !strings.Contains(stderr, "seafloor.txt") {
		t.Errorf("map onto its own horizon: exit %d, %q", code, stderr)
	}
	if after, _ := os.ReadFile(hpath); !bytes.Equal(before, after) {
		t.Error("map onto its own horizon changed the horizon file")
	}

	pngPath := filepath.Join(dir, "value.png")
	if code, _, stderr := run(mapCmd, "--demo", "--horizon", hpath, "--attribute", "envelope", "--out", pngPath, "--size", "800x600"); code != 0 {
		t.Fatalf("map png: exit %d: %s", code, stderr)
	}
	pf, err := os.Open(pngPath)
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(pf)
	pf.Close()
	if err != nil || img.Bounds().Dx() != 800 || img.Bounds().Dy() != 600 {
		t.Errorf("map png: %v, bounds %v", err, img.Bounds())
	}
}

// Wrong calls exit 2 with one line saying what is wrong; work that fails
// exits 1 with a message naming the file (and the line of a malformed
// horizon file); nothing is written either way.
func TestHorizonCommandErrors(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "bad.txt")
	os.WriteFile(bad, []byte(horizon.Header+"\n1000 2000 0 0 90 0.9 tracked\n1000 2001 0 0 9O 0.9 tracked\n"), 0o644)
	off := filepath.Join(dir, "off.txt")
	os.WriteFile(off, []byte(horizon.Header+"\n999 2000 0 0 90 0.9 tracked\n"), 0o644)
	out := filepath.Join(dir, "out.txt")
	for _, tc := range []struct {
		name string
		cmd  func([]string, *bytes.Buffer, *bytes.Buffer) int
		args []string
		code int
		want string
	}{
		{"track without out", trackCmd, []string{"--demo", "--seed", "1075,2100,91"}, 2, "--out HORIZON.txt is required"},
		{"track without seed", trackCmd, []string{"--demo", "--out", out}, 2, "at least one --seed"},
		{"track bad seed", trackCmd, []string{"--demo", "--seed", "1075,2100", "--out", out}, 2, "INLINE,CROSSLINE,MS"},
		{"track fractional line", trackCmd, []string{"--demo", "--seed", "1075.5,2100,91", "--out", out}, 2, "whole line numbers"},
		{"track bad event", trackCmd, []string{"--demo", "--seed", "1075,2100,91", "--event", "crest", "--out", out}, 2, "--event"},
		{"track file and demo", trackCmd, []string{"x.sgy", "--demo", "--seed", "1075,2100,91", "--out", out}, 2, "usage"},
		{"track seed off the grid", trackCmd, []string{"--demo", "--seed", "999,2100,91", "--out", out}, 2, "not on the survey's grid"},
		{"track bad window", trackCmd, []string{"--demo", "--seed", "1075,2100,91", "--window", "-1", "--out", out}, 2, "search window"},
		{"track correlation above one", trackCmd, []string{"--demo", "--seed", "1075,2100,91", "--min-correlation", "2", "--out", out}, 2, "minimum correlation 2"},
		{"track negative separation", trackCmd, []string{"--demo", "--seed", "1075,2100,91", "--min-separation", "-1", "--out", out}, 2, "minimum separation -1 ms"},
		{"track separation on a zero crossing", trackCmd, []string{"--demo", "--seed", "1075,2100,91", "--event", "zero-falling", "--min-separation", "14", "--out", out}, 2, "peak and trough events, not zero-falling"},
		{"track missing file", trackCmd, []string{filepath.Join(dir, "none.sgy"), "--seed", "1,1,1", "--out", out}, 1, "none.sgy"},
		{"track onto a directory", trackCmd, []string{"--demo", "--seed", "1075,2100,91", "--out", dir}, 1, ""},
		{"map without horizon", mapCmd, []string{"--demo", "--out", out}, 2, "--horizon"},
		{"map bad extension", mapCmd, []string{"--demo", "--horizon", bad, "--out", filepath.Join(dir, "m.jpg")}, 2, ".png or .txt"},
		{"map bad window", mapCmd, []string{"--demo", "--horizon", bad, "--window", "10", "--out", out}, 2, "FROM:TO"},
		{"map value with window", mapCmd, []string{"--demo", "--horizon", bad, "--window", "-5:5", "--stat", "value", "--out", out}, 2, "--stat value takes no --window"},
		{"map reversed window", mapCmd, []string{"--demo", "--horizon", bad, "--window", "5:-5", "--out", out}, 2, "ends before it starts"},
		{"map bad stat", mapCmd, []string{"--demo", "--horizon", bad, "--stat", "median", "--out", out}, 2, "--stat"},
		{"map unknown attribute", mapCmd, []string{"--demo", "--horizon", bad, "--attribute", "nope", "--out", out}, 2, "--attribute"},
		{"map malformed horizon", mapCmd, []string{"--demo", "--horizon", bad, "--out", out}, 1, "bad.txt: line 3: column 5 (time_ms): \"9O\" is not a number"},
		{"map horizon off the grid", mapCmd, []string{"--demo", "--horizon", off, "--out", out}, 1, "off.txt: line 2: inline 999 crossline 2000 is not on the survey's grid"},
	} {
		code, _, stderr := run(tc.cmd, tc.args...)
		if code != tc.code || !strings.Contains(stderr, tc.want) {
			t.Errorf("%s: exit %d, stderr %q; want exit %d saying %q", tc.name, code, stderr, tc.code, tc.want)
		}
		if _, err := os.Stat(out); err == nil {
			t.Fatalf("%s: wrote %s", tc.name, out)
		}
	}
}
