package render

import (
	"image"
	"math"
	"testing"

	"quadtrace/palettes"
)

// TestCaptionAndNorthArrow: a caption takes a line under the footer (the
// plot gets shorter, the caption box lies below the legends); a map with
// Geo gets a north arrow whose head points the way asked: ink on the
// north side of the arrow's centre and page colour opposite it, for north
// up and for north to the right (90 degrees clockwise); a section never
// gets one.
func TestCaptionAndNorthArrow(t *testing.T) {
	f := testFigure()
	plain, err := f.Layout()
	if err != nil {
		t.Fatal(err)
	}
	f.Caption = "line7.sgy: envelope (pad=fast, taper=0 ms)"
	lay, err := f.Layout()
	if err != nil {
		t.Fatal(err)
	}
	if lay.Caption.Empty() || lay.Plot.Dy() >= plain.Plot.Dy() || lay.Caption.Min.Y < lay.Legends[0].Max.Y {
		t.Errorf("caption %v, plot %v (was %v), legend %v", lay.Caption, lay.Plot, plain.Plot, lay.Legends[0])
	}
	f.Geo = &MapGeo{NorthDegrees: 0}
	if lay, _ := f.Layout(); !lay.North.Empty() {
		t.Error("a section got a north arrow")
	}
	m := syntheticSection(60, 40) // [inline][crossline] as a map
	for _, c := range []struct {
		deg    float64
		dx, dy float64 // page direction of north
	}{{0, 0, -1}, {90, 1, 0}} {
		mf := Figure{
			Base:       Layer{Data: m, Palette: palettes.Default(palettes.Diverging), Lo: -1, Hi: 1},
			Horizontal: Axis{"crossline", 1, 40}, Vertical: Axis{"inline", 1, 60},
			MapAspect: 1, Width: 900, Height: 700,
			Geo: &MapGeo{NorthDegrees: c.deg, Corners: [4]string{"X 1 Y 2", "", "", "X 3 Y 4"}},
		}
		lay, err := mf.Layout()
		if err != nil {
			t.Fatal(err)
		}
		if lay.North.Empty() || !lay.North.In(lay.Plot) {
			t.Fatalf("north square %v not inside the map %v", lay.North, lay.Plot)
		}
		img, err := mf.Draw()
		if err != nil {
			t.Fatal(err)
		}
		r := float64(lay.North.Dx()) / 2
		cx, cy := float64(lay.North.Min.X)+r, float64(lay.North.Min.Y)+r
		at := func(f float64) image.Point {
			return image.Pt(int(math.Round(cx+c.dx*f*r)), int(math.Round(cy+c.dy*f*r)))
		}
		head, tail := at(0.35), at(-0.85)
		if p := img.RGBAAt(head.X, head.Y); p == pageColour {
			t.Errorf("north %g: no ink at the head %v", c.deg, head)
		}
		if p := img.RGBAAt(tail.X, tail.Y); p != pageColour {
			t.Errorf("north %g: ink past the tail %v: %v", c.deg, tail, p)
		}
	}
}
