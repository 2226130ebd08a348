package render

import (
	"image"
	"image/color"
	"math"
	"testing"

	"golang.org/x/image/vector"
)

// TestDrawTrack draws one period of a sine down a track: the zero line is
// at the middle column, the positive half (the first half period, above the
// middle row) is filled right of it and the negative half is not, and the
// curve reaches the track's right margin at the positive peak. Geometry of
// the sine is the check (a quarter period at the peak), no outside values.
func TestDrawTrack(t *testing.T) {
	const n = 100
	vals := make([]float32, n)
	for i := range vals {
		vals[i] = float32(math.Sin(2 * math.Pi * (float64(i) + 0.5) / n))
	}
	img := image.NewRGBA(image.Rect(0, 0, 200, 400))
	r := image.Rect(50, 0, 150, 400) // a track inside a wider picture
	black, red, grey := color.RGBA{0, 0, 0, 255}, color.RGBA{255, 0, 0, 255}, color.RGBA{128, 128, 128, 255}
	DrawTrack(img, r, Track{Values: vals, Lo: -1, Hi: 1, Colour: black, Wiggle: true, Fill: red, Grid: grey}, 0, n)
	if c := img.RGBAAt(110, 100); c != red { // quarter period: filled right of zero (x=100)
		t.Errorf("positive lobe at (110,100): %v, want fill", c)
	}
	if c := img.RGBAAt(90, 300); c == red { // negative lobe: not filled
		t.Errorf("negative lobe at (90,300) is filled")
	}
	if c := img.RGBAAt(100, 300); c != grey { // the negative lobe lies left of it
		t.Errorf("zero line at (100,300): %v", c)
	}
	// The peak (sample 25, row 102) reaches the right margin (150-6 = 144).
	if c := img.RGBAAt(143, 102); c.A == 0 || c == red {
		t.Errorf("curve at its peak (143,102): %v, want the stroke", c)
	}
	// Nothing outside the track's rectangle.
	for y := range 400 {
		for _, x := range []int{10, 45, 155, 190} {
			if img.RGBAAt(x, y).A != 0 {
				t.Fatalf("pixel (%d,%d) outside the track drawn", x, y)
			}
		}
	}
}

// TestTimeTicks: the same Heckbert (1990) ticks as the figures' axes.
func TestTimeTicks(t *testing.T) {
	got := TimeTicks(0, 1000, 400, 50)
	want := NiceTicks(0, 1000, 8)
	if len(got) != len(want) || len(got) == 0 {
		t.Fatalf("TimeTicks %v, NiceTicks %v", got, want)
	}
	for i := range got {
		if got[i] != want[i] {
			t.Errorf("tick %d: %v, want %v", i, got[i], want[i])
		}
	}
}

// StrokePolyline rasterises only the polyline's bounding box: the pixels
// equal those of golang.org/x/image/vector rasterising the same quads over
// the whole image (the reference: the library itself, as StrokePolyline
// did before), within one level of 255 for the rounding of coordinates
// moved to the box, for short and long strokes, strokes crossing the
// image's edges, NaN breaks, and an image whose bounds do not start at 0.
func TestStrokePolylineMatchesWholeImage(t *testing.T) {
	nan := math.NaN()
	cases := []struct {
		name   string
		bounds image.Rectangle
		xs, ys []float64
		width  float64
	}{
		{"short", image.Rect(0, 0, 300, 200), []float64{40, 52.5}, []float64{30, 61.25}, 2},
		{"long", image.Rect(0, 0, 300, 200), []float64{3, 150, 297, 20}, []float64{4, 190, 10.5, 100}, 1},
		{"across the edges", image.Rect(0, 0, 300, 200), []float64{-40, 120, 350}, []float64{50, -30, 260}, 3},
		{"broken", image.Rect(0, 0, 300, 200), []float64{10, 60, nan, 100, 140}, []float64{10, 40, 50, 20, 90}, 1.5},
		{"offset bounds", image.Rect(50, 30, 250, 180), []float64{60, 90, 240}, []float64{170, 40, 100}, 2.5},
	}
	ink := color.RGBA{20, 40, 200, 255}
	for _, c := range cases {
		got := image.NewRGBA(c.bounds)
		StrokePolyline(got, c.xs, c.ys, c.width, ink)
		want := image.NewRGBA(c.bounds)
		b := want.Bounds()
		z := vector.NewRasterizer(b.Dx(), b.Dy())
		hw := c.width / 2
		for i := 1; i < len(c.xs); i++ {
			x0, y0, x1, y1 := c.xs[i-1]-float64(b.Min.X), c.ys[i-1]-float64(b.Min.Y), c.xs[i]-float64(b.Min.X), c.ys[i]-float64(b.Min.Y)
			if math.IsNaN(x0 + y0 + x1 + y1) {
				continue
			}
			dx, dy := x1-x0, y1-y0
			l := math.Hypot(dx, dy)
			nx, ny, ex, ey := -dy/l*hw, dx/l*hw, dx/l*hw, dy/l*hw
			z.MoveTo(float32(x0-ex+nx), float32(y0-ey+ny))
			z.LineTo(float32(x1+ex+nx), float32(y1+ey+ny))
			z.LineTo(float32(x1+ex-nx), float32(y1+ey-ny))
			z.LineTo(float32(x0-ex-nx), float32(y0-ey-ny))
			z.ClosePath()
		}
		z.Draw(want, b, image.NewUniform(ink), b.Min)
		inked := 0
		for i := range want.Pix {
			d := int(got.Pix[i]) - int(want.Pix[i])
			if d < -1 || d > 1 {
				t.Fatalf("%s: byte %d (pixel %d, %d): %d, the whole-image rasteriser gives %d", c.name, i, b.Min.X+i/4%b.Dx(), b.Min.Y+i/4/b.Dx(), got.Pix[i], want.Pix[i])
			}
			if want.Pix[i] != 0 {
				inked++
			}
		}
		if inked == 0 {
			t.Fatalf("%s: nothing drawn", c.name)
		}
	}
}
