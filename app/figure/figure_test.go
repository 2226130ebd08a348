package figure

import (
	"bytes"
	"context"
	"image"
	"image/color"
	"image/jpeg"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"quadtrace/app/apptest"
	"quadtrace/app/outfile"
	"quadtrace/app/style"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/palettes"
	"quadtrace/render"
	"quadtrace/segy"
)

// TestFormatOf: the extension (any case) decides the format; others,
// SVG included, are refused with the ones that work named.
func TestFormatOf(t *testing.T) {
	for _, c := range []struct {
		path string
		want Format
	}{{"a.png", PNG}, {"A.PNG", PNG}, {"b.jpg", JPEG}, {"c.JPEG", JPEG}, {"d.svg", ""}, {"e", ""}, {"f.png.gz", ""}} {
		got, err := FormatOf(c.path)
		if got != c.want || (c.want == "") != (err != nil) {
			t.Errorf("FormatOf(%q) = %q, %v; want %q", c.path, got, err, c.want)
		}
		if err != nil && !strings.Contains(err.Error(), ".png, .jpg or .jpeg") {
			t.Errorf("FormatOf(%q): %v does not name the formats that work", c.path, err)
		}
	}
}

// TestWrite writes a small image as PNG and as JPEG and decodes both with
// the standard library's decoders (image/png, image/jpeg): the PNG exactly,
// the JPEG within the loss of quality 92 on flat colours. The file mode is
// 0644 and the input named is refused as the output.
func TestWrite(t *testing.T) {
	img := image.NewRGBA(image.Rect(0, 0, 64, 48))
	for y := range 48 {
		for x := range 64 {
			c := color.RGBA{200, 30, 40, 255}
			if x >= 32 {
				c = color.RGBA{20, 90, 220, 255}
			}
			img.SetRGBA(x, y, c)
		}
	}
	dir := t.TempDir()
	pngPath := filepath.Join(dir, "sub", "fig.png")
	if err := Write(context.Background(), pngPath, img, 150, outfile.Options{}); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(pngPath)
	if err != nil {
		t.Fatal(err)
	}
	got, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	if got.At(5, 5) != (color.NRGBA{200, 30, 40, 255}) && got.At(5, 5) != (color.RGBA{200, 30, 40, 255}) {
		t.Errorf("PNG pixel %v", got.At(5, 5))
	}
	if st, _ := os.Stat(pngPath); st.Mode().Perm() != 0o644 {
		t.Errorf("mode %v, want 0644", st.Mode().Perm())
	}
	jpgPath := filepath.Join(dir, "fig.jpg")
	if err := Write(context.Background(), jpgPath, img, 150, outfile.Options{}); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(jpgPath)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	j, err := jpeg.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	r, g, bl, _ := j.At(48, 24).RGBA()
	if d := absDiff(r>>8, 20) + absDiff(g>>8, 90) + absDiff(bl>>8, 220); d > 24 {
		t.Errorf("JPEG pixel %d,%d,%d, want about 20,90,220", r>>8, g>>8, bl>>8)
	}
	if err := Write(context.Background(), jpgPath, img, 150, outfile.Options{Inputs: []string{jpgPath}}); err == nil {
		t.Error("writing over an input: no error")
	}
	if err := Write(context.Background(), filepath.Join(dir, "fig.svg"), img, 150, outfile.Options{}); err == nil {
		t.Error("SVG: no error")
	}
}

func absDiff(a, b uint32) uint32 {
	if a > b {
		return a - b
	}
	return b - a
}

// TestMapGeoAndCaption builds a time-slice figure of an invented volume
// whose CDP X grows east with the crossline (12.5 m) and Y north with the
// inline (apptest.WriteVolume): inlines run down the page, so grid north
// points straight down (180 degrees clockwise from up), and the top-left
// corner (inline 1, crossline 1) is at X 612013, Y 7130013 (612000.5 +
// 12.5, 7130000.25 + 12.5, rounded). The caption names the file, the
// attribute and its parameters as resolved.
func TestMapGeoAndCaption(t *testing.T) {
	path := filepath.Join(t.TempDir(), "grid.sgy")
	apptest.WriteVolume(t, path, apptest.VolumeSpec{Inlines: [2]int{1, 6}, Crosslines: [2]int{1, 9}, Samples: 60, IntervalUS: 4000})
	v, err := volume.Open(path, segy.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer v.Close()
	fig, err := Build(context.Background(), v, Request{Orientation: volume.TimeSlice, TimeMS: 100, Attribute: "envelope",
		Params: map[string]string{"taper": "8"}, Clip: 99, Width: 800, Height: 600})
	if err != nil {
		t.Fatal(err)
	}
	if fig.Geo == nil || math.Abs(fig.Geo.NorthDegrees-180) > 1e-6 {
		t.Fatalf("geo %+v, want north at 180 degrees", fig.Geo)
	}
	if fig.Geo.Corners[0] != "X 612013  Y 7130013" {
		t.Errorf("top-left corner %q", fig.Geo.Corners[0])
	}
	for _, want := range []string{"grid.sgy", "Envelope", "taper=8 ms", "pad="} {
		if !strings.Contains(fig.Caption, want) {
			t.Errorf("caption %q lacks %q", fig.Caption, want)
		}
	}
	if _, err := fig.Draw(); err != nil {
		t.Fatal(err)
	}
	sec, err := Build(context.Background(), v, Request{Orientation: volume.Inline, Inline: 2, Attribute: "amplitude", Clip: 99, Width: 800, Height: 600})
	if err != nil || sec.Geo != nil {
		t.Errorf("inline figure: geo %+v, error %v; want none", sec.Geo, err)
	}
}

// TestComposeView: a section shown through a window is labelled at the
// centres of the first and last trace and sample in view (traces 1 to 3 of
// crosslines 20-24; samples 10 to 19 at 4 ms from 100 ms), and the wiggles
// draw the amplitude given beside an attribute base.
func TestComposeView(t *testing.T) {
	traces := make([][]float32, 5)
	for i := range traces {
		traces[i] = make([]float32, 50)
		for k := range traces[i] {
			traces[i][k] = float32(i + k%7)
		}
	}
	sec := &volume.Section{Section: compute.Section{Traces: traces, DT: 0.004, T0: 0.1},
		Slice: volume.Slice{Orientation: volume.Inline, Number: 3}, Keys: []int{20, 21, 22, 23, 24}, MetresPerTrace: 25}
	amp := &volume.Section{Section: sec.Section, Slice: sec.Slice, Keys: sec.Keys}
	env, _ := compute.Lookup("envelope")
	p, _ := env.Resolve(nil)
	pal, err := style.Palette(env, "")
	if err != nil {
		t.Fatal(err)
	}
	fig, err := Compose(Content{Name: "t.sgy", Attrs: []*compute.Attribute{env}, Params: []compute.Params{p},
		Sections: []*volume.Section{sec}, Palettes: []*palettes.Palette{pal}, Amplitude: amp, Wiggle: true,
		Clip: 99, Width: 800, Height: 600, View: render.Viewport{Trace0: 1, Trace1: 4, Sample0: 10, Sample1: 20}})
	if err != nil {
		t.Fatal(err)
	}
	if fig.Horizontal.First != 21 || fig.Horizontal.Last != 23 || fig.Vertical.First != 140 || fig.Vertical.Last != 176 {
		t.Errorf("axes %+v %+v, want crosslines 21..23 and 140..176 ms", fig.Horizontal, fig.Vertical)
	}
	if fig.Wiggle == nil || &fig.Wiggle.Data[0][0] != &amp.Traces[0][0] {
		t.Error("wiggles do not draw the amplitude given")
	}
	if !strings.HasPrefix(fig.Title, "t.sgy: inline 3, Envelope") || fig.Scale.MetresPerTrace != 25 {
		t.Errorf("title %q, scale %+v", fig.Title, fig.Scale)
	}
}
