package cli

import (
	"bytes"
	"context"
	"fmt"
	"image"
	"image/draw"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"quadtrace/app/horizonjob"
	"quadtrace/compute"
	"quadtrace/compute/horizon"
	"quadtrace/segy"
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

// inkedIn counts the dark pixels (all channels below 128) of img in r.
func inkedIn(img image.Image, r image.Rectangle) int {
	n := 0
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			cr, cg, cb, _ := img.At(x, y).RGBA()
			if cr < 0x8000 && cg < 0x8000 && cb < 0x8000 {
				n++
			}
		}
	}
	return n
}

// The figure `quadtrace map --out MAP.png` writes of the demo survey (the
// same figure mapFigure lays out) has a north arrow pointing where grid
// north lies on the page (ink at its head, none past its tail: the demo's
// grid from its corner coordinates, figure.MapGeo), a scale bar whose
// length in pixels is the metres it is labelled with at the map's scale
// (the demo's crossline spacing from its CDP coordinates) with its "0" and
// length labels drawn above its ends and nothing above its middle, the
// attribute's legend, and the survey's outline along the map's edge (the
// demo has every trace). The text grid holds the same values as the map
// the figure draws, row by row.
func TestMapFigureParts(t *testing.T) {
	dir := t.TempDir()
	hpath := seafloorFile(t, dir)
	pngPath := filepath.Join(dir, "env.png")
	txtPath := filepath.Join(dir, "env.txt")
	for _, out := range []string{pngPath, txtPath} {
		if code, _, stderr := run(mapCmd, "--demo", "--horizon", hpath, "--attribute", "envelope", "--window", "-8:8", "--out", out, "--size", "1000x800"); code != 0 {
			t.Fatalf("map %s: exit %d: %s", out, code, stderr)
		}
	}
	ctx := context.Background()
	sv, err := openSurvey(ctx, true, "", segy.Options{})
	if err != nil {
		t.Fatal(err)
	}
	h, err := readHorizon(hpath, sv.layout)
	if err != nil {
		t.Fatal(err)
	}
	attr, _ := compute.Lookup("envelope")
	p, _ := attr.Resolve(nil)
	spec := horizon.MapSpec{Stat: horizon.RMS, FromMS: -8, ToMS: 8}
	m, err := horizonjob.MapAttribute(ctx, sv.src, h, attr, p, spec, nil)
	if err != nil {
		t.Fatal(err)
	}
	fig, err := mapFigure(m, sv, attr, spec, 1000, 800, filepath.Base(hpath))
	if err != nil {
		t.Fatal(err)
	}
	lay, err := fig.Layout()
	if err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(pngPath)
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(f)
	f.Close()
	if err != nil {
		t.Fatal(err)
	}

	// North arrow.
	if fig.Geo == nil || math.IsNaN(fig.Geo.NorthDegrees) || lay.North.Empty() {
		t.Fatalf("no north arrow laid out (geo %+v, square %v)", fig.Geo, lay.North)
	}
	r := float64(lay.North.Dx()) / 2
	cx, cy := float64(lay.North.Min.X)+r, float64(lay.North.Min.Y)+r
	a := fig.Geo.NorthDegrees * math.Pi / 180
	ux, uy := math.Sin(a), -math.Cos(a)
	at := func(f float64) image.Point {
		return image.Pt(int(math.Round(cx+ux*f*r)), int(math.Round(cy+uy*f*r)))
	}
	if head := at(0.35); inkedIn(img, image.Rectangle{head, head.Add(image.Pt(1, 1))}) == 0 {
		t.Errorf("north arrow (%.1f degrees): no ink at its head %v", fig.Geo.NorthDegrees, head)
	}
	if tail := at(-0.85); inkedIn(img, image.Rectangle{tail, tail.Add(image.Pt(1, 1))}) != 0 {
		t.Errorf("north arrow (%.1f degrees): ink past its tail %v", fig.Geo.NorthDegrees, tail)
	}
	// Expected direction from the demo's corner coordinates: grid north is
	// where the Y coordinate grows; on the page crosslines run right and
	// inlines down.
	l := sv.layout
	x0, y0 := l.XY(0, 0)
	x1, y1 := l.XY(0, l.Crosslines-1)
	x2, y2 := l.XY(l.Inlines-1, 0)
	right := [2]float64{x1 - x0, y1 - y0}
	down := [2]float64{x2 - x0, y2 - y0}
	// Page direction (px, py) of ground north solves px*right + py*down = (0, 1) (unit vectors).
	nr, nd := math.Hypot(right[0], right[1]), math.Hypot(down[0], down[1])
	right, down = [2]float64{right[0] / nr, right[1] / nr}, [2]float64{down[0] / nd, down[1] / nd}
	det := right[0]*down[1] - right[1]*down[0]
	px, py := -down[0]/det, right[0]/det
	if got := ux*px + uy*py; got < 0.99*math.Hypot(px, py) {
		t.Errorf("north arrow points (%.2f, %.2f) on the page, ground north lies along (%.2f, %.2f)", ux, uy, px, py)
	}

	// Scale bar: pixels per metre from the demo's crossline spacing.
	sb := lay.ScaleBar
	if sb.Metres <= 0 || sb.Bar.Empty() {
		t.Fatalf("no scale bar laid out: %+v", sb)
	}
	wantPPM := float64(lay.Plot.Dx()) / (float64(l.Crosslines) * nr / float64(l.Crosslines-1))
	if math.Abs(sb.PixelsPerMetre-wantPPM) > 0.01*wantPPM || math.Abs(float64(sb.Bar.Dx())-sb.Metres*wantPPM) > 1.5 {
		t.Errorf("scale bar %q: %d px for %g m at %.4f px/m; the map is drawn at %.4f px/m", sb.Label, sb.Bar.Dx(), sb.Metres, sb.PixelsPerMetre, wantPPM)
	}
	if !strings.HasSuffix(sb.Label, " m") && !strings.HasSuffix(sb.Label, " km") {
		t.Errorf("scale bar label %q: want metres or kilometres", sb.Label)
	}
	b := sb.Bar
	above := func(x, half int) image.Rectangle { return image.Rect(x-half, b.Min.Y-28, x+half, b.Min.Y-2) }
	if n := inkedIn(img, above(b.Min.X, 8)); n < 10 {
		t.Errorf("no \"0\" above the scale bar's left end (%d dark pixels)", n)
	}
	if n := inkedIn(img, above(b.Max.X, 20)); n < 20 {
		t.Errorf("no length label above the scale bar's right end (%d dark pixels)", n)
	}
	if n := inkedIn(img, above((b.Min.X+b.Max.X)/2, 4)); n != 0 {
		t.Errorf("%d dark pixels above the scale bar's middle", n)
	}
	if n := inkedIn(img, b); n < b.Dx() {
		t.Errorf("the scale bar itself is not drawn (%d dark pixels)", n)
	}

	// Legend: drawn, with the attribute's name laid out.
	if len(lay.Legends) != 1 || lay.Legends[0].Empty() || inkedIn(img, lay.LegendText[0]) == 0 {
		t.Errorf("legend %v, heading %v not drawn", lay.Legends, lay.LegendText)
	}

	// Outline: the map's edge is inked on the inside of the frame (the
	// frame itself lies one pixel outside the map).
	pl := lay.Plot
	mid := (pl.Min.Y + pl.Max.Y) / 2
	if n := inkedIn(img, image.Rect(pl.Min.X, mid-20, pl.Min.X+1, mid+20)); n < 40 {
		t.Errorf("survey outline: %d of 40 pixels inked along the map's left edge", n)
	}

	// Text grid: the same values as the map, row by row.
	txt, err := os.ReadFile(txtPath)
	if err != nil {
		t.Fatal(err)
	}
	rows := strings.Split(strings.TrimSpace(string(txt)), "\n")[1:]
	n := 0
	for k, v := range m.Values {
		if math.IsNaN(float64(v)) {
			continue
		}
		if n >= len(rows) {
			t.Fatalf("the text grid ends after %d rows", len(rows))
		}
		var il, xl int
		var x, y, got float64
		if _, err := fmt.Sscan(rows[n], &il, &xl, &x, &y, &got); err != nil {
			t.Fatalf("row %d %q: %v", n+2, rows[n], err)
		}
		wantIL, wantXL := l.FirstInline+k/l.Crosslines, l.FirstCrossline+k%l.Crosslines
		wx, wy := l.XY(k/l.Crosslines, k%l.Crosslines)
		if il != wantIL || xl != wantXL || math.Abs(x-wx) > 0.01 || math.Abs(y-wy) > 0.01 || math.Abs(got-float64(v)) > 1e-6*math.Abs(float64(v)) {
			t.Fatalf("row %d %q: want %d %d %.2f %.2f %g", n+2, rows[n], wantIL, wantXL, wx, wy, v)
		}
		n++
	}
	if n != len(rows) {
		t.Errorf("the text grid has %d rows, the map %d values", len(rows), n)
	}
}

// drawOutline follows the traces a survey has: on a 10 x 10 grid without
// its last five inlines' last five crosslines, the edges of the missing
// corner are inked and the middles of present and missing parts are not.
func TestDrawOutline(t *testing.T) {
	img := image.NewRGBA(image.Rect(0, 0, 120, 120))
	draw.Draw(img, img.Bounds(), image.White, image.Point{}, draw.Src)
	plot := image.Rect(10, 10, 110, 110) // 10 px per cell
	drawOutline(img, plot, 10, 10, func(il, xl int) bool { return il < 5 || xl < 5 })
	px := func(x, y int) image.Rectangle { return image.Rect(x, y, x+1, y+1) }
	for _, c := range []struct {
		name string
		at   image.Rectangle
		ink  bool
	}{
		{"the corner's upper edge", px(85, 60), true},
		{"the corner's left edge", px(60, 85), true},
		{"the grid's top edge", px(50, 10), true},
		{"the grid's left edge", px(10, 90), true},
		{"the present part's middle", px(35, 35), false},
		{"the missing corner's middle", px(85, 85), false},
		{"the grid's right edge beside the missing corner", px(109, 85), false},
	} {
		if got := inkedIn(img, c.at) > 0; got != c.ink {
			t.Errorf("%s at %v: ink %v, want %v", c.name, c.at.Min, got, c.ink)
		}
	}
}
