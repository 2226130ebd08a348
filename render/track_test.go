package render

import (
	"image"
	"image/color"
	"math"
	"testing"
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
