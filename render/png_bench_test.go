package render

import (
	"bytes"
	"image"
	"image/color"
	"image/png"
	"testing"
)

// figureImage draws a 1200x800 figure of an inline-sized section (800
// traces of 751 samples, invented test data), optionally with wiggles.
func figureImage(tb testing.TB, wiggle bool) *image.RGBA {
	tb.Helper()
	f := testFigure()
	f.Base.Data = syntheticSection(800, 751)
	f.Width, f.Height = 1200, 800
	if wiggle {
		f.Wiggle = &WiggleStyle{Data: f.Base.Data, Color: color.RGBA{A: 255}, Fill: true, Gain: 1}
	}
	img, err := f.Draw()
	if err != nil {
		tb.Fatal(err)
	}
	return img
}

// TestEncodePNGLossless: a drawn figure written by EncodePNG and read back
// by the standard library's decoder (image/png) has every pixel of the
// image drawn, with and without wiggles.
func TestEncodePNGLossless(t *testing.T) {
	for _, wiggle := range []bool{false, true} {
		img := figureImage(t, wiggle)
		var buf bytes.Buffer
		if err := EncodePNG(&buf, img, 150); err != nil {
			t.Fatal(err)
		}
		dec, err := png.Decode(&buf)
		if err != nil {
			t.Fatal(err)
		}
		if dec.Bounds() != img.Bounds() {
			t.Fatalf("wiggle %v: decoded %v, drew %v", wiggle, dec.Bounds(), img.Bounds())
		}
		bad := 0
		for y := img.Rect.Min.Y; y < img.Rect.Max.Y; y++ {
			for x := img.Rect.Min.X; x < img.Rect.Max.X; x++ {
				r0, g0, b0, a0 := img.At(x, y).RGBA()
				r1, g1, b1, a1 := dec.At(x, y).RGBA()
				if r0 != r1 || g0 != g1 || b0 != b1 || a0 != a1 {
					if bad++; bad <= 3 {
						t.Errorf("wiggle %v: pixel (%d,%d) decoded %v, drew %v", wiggle, x, y, dec.At(x, y), img.At(x, y))
					}
				}
			}
		}
		if bad > 0 {
			t.Errorf("wiggle %v: %d pixels differ", wiggle, bad)
		}
	}
}

// BenchmarkEncodePNG: EncodePNG of a 1200x800 figure of one inline (and
// the same with wiggles) at pngLevel beside image/png's default level, in
// one run, with the bytes written; the choice of pngLevel rests on it.
//
// Run: go test -run '^$' -bench EncodePNG -count 3 ./render/
func BenchmarkEncodePNG(b *testing.B) {
	for _, wiggle := range []bool{false, true} {
		img := figureImage(b, wiggle)
		name := "section"
		if wiggle {
			name = "wiggles"
		}
		for _, lv := range []struct {
			name  string
			level png.CompressionLevel
		}{{"default", png.DefaultCompression}, {"pngLevel", pngLevel}} {
			b.Run(name+"/"+lv.name, func(b *testing.B) {
				var buf bytes.Buffer
				for b.Loop() {
					buf.Reset()
					if err := encodePNG(&buf, img, 150, lv.level); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(buf.Len()), "bytes")
			})
		}
	}
}
