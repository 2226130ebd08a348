package cli

import (
	"bytes"
	"context"
	"encoding/binary"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"testing"

	"quadtrace/app/figure"
	"quadtrace/app/volume"
	"quadtrace/segy"
	"quadtrace/segy/segytest"
)

// pngPhys returns the pHYs chunk's pixels per unit (x, y) and unit byte
// (PNG specification, 11.3.5.3: unit 1 is the metre).
func pngPhys(t *testing.T, b []byte) (uint32, uint32, byte) {
	t.Helper()
	i := bytes.Index(b, []byte("pHYs"))
	if i < 4 || len(b) < i+13 {
		t.Fatal("no pHYs chunk")
	}
	d := b[i+4:]
	return binary.BigEndian.Uint32(d[0:4]), binary.BigEndian.Uint32(d[4:8]), d[8]
}

// TestFigureCommand draws an inline of the corpus file normal-small.sgy,
// whose CDP coordinates the corpus README gives (10 m between neighbouring
// traces after the coordinate scalar of the SEG-Y revision 1 standard,
// trace header bytes 71-72), and checks the PNG's size, its recorded
// resolution (200 dpi = 7874 pixels per metre, 1 inch = 0.0254 m) and the
// scale bar's pixels per metre against the plot width over 5 traces of 10 m.
func TestFigureCommand(t *testing.T) {
	file := segytest.CorpusFile(t, "normal-small.sgy")
	out := filepath.Join(t.TempDir(), "fig.png")
	code, stdout, errs := run(figureCmd, file, "--inline", "3", "--attribute", "envelope", "--overlay", "instantaneous-phase", "--size", "800x500", "--dpi", "200", "--out", out)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if stdout != out+"\n" {
		t.Errorf("stdout %q, want the output path", stdout)
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	if img.Bounds().Dx() != 800 || img.Bounds().Dy() != 500 {
		t.Errorf("figure is %v, want 800x500", img.Bounds())
	}
	if x, y, unit := pngPhys(t, b); x != 7874 || y != 7874 || unit != 1 {
		t.Errorf("pHYs %d x %d unit %d, want 7874 x 7874 per metre", x, y, unit)
	}

	v, err := volume.Open(file, segy.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer v.Close()
	fig, err := figure.Build(context.Background(), v, figure.Request{Orientation: volume.Inline, Inline: 3, Attribute: "envelope", Clip: 99, Width: 800, Height: 500})
	if err != nil {
		t.Fatal(err)
	}
	lay, err := fig.Layout()
	if err != nil {
		t.Fatal(err)
	}
	want := float64(lay.Plot.Dx()) / (5 * 10)
	if got := lay.ScaleBar.PixelsPerMetre; math.Abs(got-want) > 0.01*want {
		t.Errorf("scale bar %.3f px/m, want %.3f (plot %d px over 5 traces of 10 m)", got, want, lay.Plot.Dx())
	}
	if d := lay.ScaleBar.Bar.Dx() - int(math.Round(lay.ScaleBar.Metres*want)); d < -1 || d > 1 {
		t.Errorf("bar of %g m is %d px, want %.1f within 1 px", lay.ScaleBar.Metres, lay.ScaleBar.Bar.Dx(), lay.ScaleBar.Metres*want)
	}
	if len(fig.Legends) != 1 || fig.Legends[0].Name == "" {
		t.Errorf("legends %+v, want one named legend", fig.Legends)
	}
}

// TestFigureWrongCalls: wrong calls exit 2 and write nothing.
func TestFigureWrongCalls(t *testing.T) {
	file := segytest.CorpusFile(t, "small.sgy")
	dir := t.TempDir()
	out := filepath.Join(dir, "fig.png")
	for _, args := range [][]string{
		{file, "--attribute", "envelope", "--out", out},                                          // no line chosen
		{file, "--inline", "2", "--crossline", "21", "--out", out},                               // two lines
		{file, "--inline", "2", "--size", "10x10", "--out", out},                                 // too small
		{file, "--inline", "two", "--out", out},                                                  // not a number
		{file, "--inline", "2", "--attribute", "no-such-thing", "--out", out},                    // unknown attribute
		{file, "--inline", "2", "--attribute", "envelope", "--param", "windw=100", "--out", out}, // unknown parameter
		{file, "--inline", "2", "--out", filepath.Join(dir, "fig.svg")},                          // no SVG writer
		{file, "--inline", "2", "--out", filepath.Join(dir, "fig")},                              // no extension
		{file, "--inline", "2"}, // no output
		{file, "--inline", "2", "--opacity", "3", "--overlay", "envelope", "--out", out}, // opacity out of range
	} {
		if code, _, _ := run(figureCmd, args...); code != 2 {
			t.Errorf("figure %v: exit %d, want 2", args, code)
		}
	}
	for _, args := range [][]string{
		{file, "--inline", "99", "--out", out},                 // no such inline
		{file, "--time", "999", "--out", out},                  // after the last sample (196 ms)
		{file, "--inline", "2", "--offset", "5", "--out", out}, // no such offset
	} {
		if code, _, _ := run(figureCmd, args...); code != 1 {
			t.Errorf("figure %v: exit %d, want 1", args, code)
		}
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 0 {
		t.Errorf("failed calls left files: %v", entries)
	}
}
