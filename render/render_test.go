package render

import (
	"bytes"
	"encoding/binary"
	"hash/crc32"
	"image"
	"image/color"
	"image/png"
	"math"
	"testing"

	"quadtrace/palettes"
)

// constSection returns ntr x ns traces filled with v.
func constSection(ntr, ns int, v float32) [][]float32 {
	d := make([][]float32, ntr)
	for i := range d {
		d[i] = make([]float32, ns)
		for j := range d[i] {
			d[i][j] = v
		}
	}
	return d
}

// TestKnownValueLandsOnPaletteColour: a value set on a block of cells shows
// at the block's pixels as the palette colour Palette.At((v-Lo)/(Hi-Lo)),
// both at one pixel per cell (nearest cell) and magnified four times
// (bilinear, inside a block of equal values); values beyond the range clip
// to the ends and NaN shows the gap pattern.
func TestKnownValueLandsOnPaletteColour(t *testing.T) {
	pal := palettes.Default(palettes.Diverging)
	const lo, hi = -2, 2
	data := constSection(10, 10, 0)
	for i := 2; i <= 4; i++ {
		for j := 6; j <= 8; j++ {
			data[i][j] = 1.3
		}
	}
	data[7][2] = 50  // clips high
	data[8][2] = -50 // clips low
	data[6][5] = float32(math.NaN())
	base := Layer{Data: data, Palette: pal, Lo: lo, Hi: hi}
	want := pal.At((1.3 - lo) / (hi - lo))

	one := image.NewRGBA(image.Rect(0, 0, 10, 10))
	DrawSection(one, base, nil, nil, Viewport{})
	checks := []struct {
		name string
		x, y int
		want color.RGBA
	}{
		{"known value", 3, 7, want},
		{"zero", 0, 0, pal.At(0.5)},
		{"clipped high", 7, 2, pal.Table[255]},
		{"clipped low", 8, 2, pal.Table[0]},
		{"NaN gap", 6, 5, GapColor(6, 5)},
	}
	for _, c := range checks {
		if got := one.RGBAAt(c.x, c.y); got != c.want {
			t.Errorf("1:1 %s at (%d,%d) = %v, want %v", c.name, c.x, c.y, got, c.want)
		}
	}
	// Magnified x4: cell (3,7) spans pixels 12..15 x 28..31; its neighbours
	// hold the same value, so bilinear interpolation returns it exactly.
	big := image.NewRGBA(image.Rect(0, 0, 40, 40))
	DrawSection(big, base, nil, nil, Viewport{})
	for _, p := range []image.Point{{12, 28}, {14, 30}, {15, 31}} {
		if got := big.RGBAAt(p.X, p.Y); got != want {
			t.Errorf("x4: pixel %v = %v, want %v", p, got, want)
		}
	}
	// A viewport of cells 2..5 x 6..9 puts cell (3,7) at pixels 10..19 x 10..19 of a 30x30 image.
	zoom := image.NewRGBA(image.Rect(0, 0, 30, 30))
	DrawSection(zoom, base, nil, nil, Viewport{2, 5, 6, 9})
	if got := zoom.RGBAAt(15, 15); got != want {
		t.Errorf("viewport: centre pixel = %v, want %v", got, want)
	}
}

// TestOverlayOpacity: the overlay is blended as a*overlay + (1-a)*base in
// 8-bit fixed point, with a constant or proportional to |v|/max(|Lo|,|Hi|).
func TestOverlayOpacity(t *testing.T) {
	basePal, overPal := palettes.Default(palettes.Grey), palettes.Default(palettes.Overlay)
	base := Layer{Data: constSection(4, 4, 0.25), Palette: basePal, Lo: 0, Hi: 1}
	ov := constSection(4, 4, 0)
	ov[1][1], ov[2][2] = 1, 0.5
	tests := []struct {
		name    string
		opacity float64
		follows bool
		x, y    int
		alpha   float64
	}{
		{"constant opaque", 1, false, 1, 1, 1},
		{"constant half", 0.5, false, 1, 1, 0.5},
		{"follows value, full", 1, true, 1, 1, 1},
		{"follows value, half value", 1, true, 2, 2, 0.5},
		{"follows value, zero", 0.8, true, 0, 0, 0},
	}
	for _, tc := range tests {
		over := &Layer{Data: ov, Palette: overPal, Lo: 0, Hi: 1, Opacity: tc.opacity, OpacityFollowsValue: tc.follows}
		dst := image.NewRGBA(image.Rect(0, 0, 4, 4))
		DrawSection(dst, base, over, nil, Viewport{})
		b := basePal.At(0.25)
		o := overPal.At(float64(ov[tc.x][tc.y]))
		ai := uint32(tc.alpha*256 + 0.5)
		blend := func(oc, bc uint8) uint8 { return uint8((uint32(oc)*ai + uint32(bc)*(256-ai)) >> 8) }
		want := color.RGBA{blend(o.R, b.R), blend(o.G, b.G), blend(o.B, b.B), 255}
		if got := dst.RGBAAt(tc.x, tc.y); got != want {
			t.Errorf("%s: pixel = %v, want %v", tc.name, got, want)
		}
	}
}

// TestDrawMapEqualAspect: a grid of 50 inlines x 100 crosslines with
// crosslines twice as far apart as inlines is 200 x 50 inline spacings, so
// in a 400 x 400 image it fills 400 x 100 pixels centred vertically; the
// letterbox is left untouched.
func TestDrawMapEqualAspect(t *testing.T) {
	grid := make([][]float32, 50)
	for i := range grid {
		grid[i] = make([]float32, 100)
		for j := range grid[i] {
			grid[i][j] = float32(j) / 99
		}
	}
	pal := palettes.Default(palettes.Sequential)
	dst := image.NewRGBA(image.Rect(0, 0, 400, 400))
	DrawMap(dst, Layer{Data: grid, Palette: pal, Lo: 0, Hi: 1}, nil, 2)
	if r := MapRect(dst.Bounds(), 50, 100, 2); r != image.Rect(0, 150, 400, 250) {
		t.Errorf("MapRect = %v, want (0,150)-(400,250)", r)
	}
	if got := dst.RGBAAt(200, 149); got != (color.RGBA{}) {
		t.Errorf("letterbox touched: %v", got)
	}
	// Crossline 0 is at the left, crossline 99 (value 1) at the right.
	if got := dst.RGBAAt(0, 200); got != pal.Table[0] {
		t.Errorf("left edge = %v, want %v", got, pal.Table[0])
	}
	if got := dst.RGBAAt(399, 200); got != pal.Table[255] {
		t.Errorf("right edge = %v, want %v", got, pal.Table[255])
	}
}

// TestWiggleVariableArea: a trace that is positive in its upper half and
// negative in its lower half is filled right of its baseline in the upper
// half only; edges are anti-aliased (some pixels partly covered).
func TestWiggleVariableArea(t *testing.T) {
	data := constSection(3, 40, 0)
	for j := range 40 {
		if j < 20 {
			data[1][j] = 1
		} else {
			data[1][j] = -1
		}
	}
	dst := image.NewRGBA(image.Rect(0, 0, 60, 40))
	ink := color.RGBA{0, 0, 0, 255}
	DrawSection(dst, Layer{Data: data, Lo: -1, Hi: 1}, nil, &WiggleStyle{Color: ink, Fill: true, Gain: 0.5}, Viewport{})
	// Trace 1's baseline is at x = 30; 20 px per trace, deflection 10 px.
	if got := dst.RGBAAt(35, 10); got != ink {
		t.Errorf("positive lobe not filled: %v", got)
	}
	if got := dst.RGBAAt(25, 30); got != (color.RGBA{255, 255, 255, 255}) {
		t.Errorf("negative lobe filled: %v", got)
	}
	partial := 0
	for y := range 40 {
		for x := range 60 {
			if c := dst.RGBAAt(x, y); c.R > 0 && c.R < 255 {
				partial++
			}
		}
	}
	if partial == 0 {
		t.Error("no anti-aliased pixels")
	}
}

// TestPercentileRange uses definition 7 of Hyndman and Fan (1996): for the
// 101 values 0..100 the p-quantile is 100p exactly; NaN and Inf are ignored.
func TestPercentileRange(t *testing.T) {
	var tr []float32
	for v := 100; v >= 0; v-- {
		tr = append(tr, float32(v))
	}
	tr = append(tr, float32(math.NaN()), float32(math.Inf(1)))
	data := [][]float32{tr[:50], tr[50:]}
	if lo, hi := PercentileRange(data, 99, false); lo != 1 || hi != 99 {
		t.Errorf("99%%: %v..%v, want 1..99", lo, hi)
	}
	if lo, hi := PercentileRange(data, 97.5, false); math.Abs(float64(lo)-2.5) > 1e-5 || math.Abs(float64(hi)-97.5) > 1e-5 {
		t.Errorf("97.5%%: %v..%v, want 2.5..97.5", lo, hi)
	}
	signed := [][]float32{{-100, -50, 0, 10, 20, 30, 40, 60, 70, 80, 90}}
	// |v| sorted: 0 10 20 30 40 50 60 70 80 90 100; 90th percentile = 90.
	if lo, hi := PercentileRange(signed, 90, true); lo != -90 || hi != 90 {
		t.Errorf("symmetric 90%%: %v..%v, want -90..90", lo, hi)
	}
	if lo, hi := PercentileRange([][]float32{{float32(math.NaN())}}, 99, true); lo != 0 || hi != 0 {
		t.Errorf("all NaN: %v..%v", lo, hi)
	}
}

// TestHeckbertExamples: the worked examples in the text of Heckbert (1990),
// "Nice numbers for graph labels", Graphics Gems: data 105..543 are
// labelled 100..600 every 100, and 2.04..2.16 are labelled 2.00..2.20
// every 0.05 (the gem's program asks for 5 ticks, NTICK 5).
func TestHeckbertExamples(t *testing.T) {
	tests := []struct{ lo, hi, min, max, d float64 }{
		{105, 543, 100, 600, 100},
		{2.04, 2.16, 2.00, 2.20, 0.05},
	}
	for _, tc := range tests {
		gmin, gmax, d, ok := HeckbertLoose(tc.lo, tc.hi, 5)
		if !ok || math.Abs(gmin-tc.min) > 1e-9 || math.Abs(gmax-tc.max) > 1e-9 || math.Abs(d-tc.d) > 1e-12 {
			t.Errorf("HeckbertLoose(%v, %v, 5) = %v, %v, %v; want %v, %v, %v", tc.lo, tc.hi, gmin, gmax, d, tc.min, tc.max, tc.d)
		}
	}
}

// TestNiceTicksContract: at most maxTicks ticks, all inside the range,
// evenly spaced by 1, 2 or 5 times a power of ten.
func TestNiceTicksContract(t *testing.T) {
	tests := []struct {
		lo, hi float64
		max    int
		want   []float64
	}{
		{105, 543, 5, []float64{200, 300, 400, 500}},
		{-1.4, 1.4, 4, []float64{-1, 0, 1}},
		{0, 998, 10, []float64{0, 100, 200, 300, 400, 500, 600, 700, 800, 900}},
		{419, 20, 6, []float64{100, 200, 300, 400}},
		{7, 7, 5, []float64{7}},
	}
	for _, tc := range tests {
		got := NiceTicks(tc.lo, tc.hi, tc.max)
		if len(got) != len(tc.want) {
			t.Errorf("NiceTicks(%v, %v, %d) = %v, want %v", tc.lo, tc.hi, tc.max, got, tc.want)
			continue
		}
		for i := range got {
			if math.Abs(got[i]-tc.want[i]) > 1e-9 {
				t.Errorf("NiceTicks(%v, %v, %d) = %v, want %v", tc.lo, tc.hi, tc.max, got, tc.want)
				break
			}
		}
	}
	for _, r := range [][2]float64{{0.013, 0.0171}, {-3210, 88}, {1e6, 1.3e6}, {-180, 180}} {
		for m := 1; m <= 12; m++ {
			ticks := NiceTicks(r[0], r[1], m)
			if len(ticks) == 0 || len(ticks) > m {
				t.Errorf("NiceTicks(%v, %v, %d): %d ticks", r[0], r[1], m, len(ticks))
			}
			for i, v := range ticks {
				if v < r[0]-1e-12 || v > r[1]+1e-12 {
					t.Errorf("NiceTicks(%v, %v, %d): %v outside", r[0], r[1], m, v)
				}
				if i > 0 {
					d := ticks[i] - ticks[i-1]
					f := d / math.Pow(10, math.Floor(math.Log10(d)+1e-9))
					if math.Abs(f-1) > 1e-6 && math.Abs(f-2) > 1e-6 && math.Abs(f-5) > 1e-6 {
						t.Errorf("NiceTicks(%v, %v, %d): spacing %v not 1, 2 or 5 x 10^k", r[0], r[1], m, d)
					}
				}
			}
		}
	}
}

// testFigure is a 400-trace section figure with both legends and a scale bar.
func testFigure() Figure {
	data := syntheticSection(400, 300)
	return Figure{
		Title:      "Test line 7",
		Base:       Layer{Data: data, Palette: palettes.Default(palettes.Diverging), Lo: -1, Hi: 1},
		Horizontal: Axis{"crossline", 20, 419},
		Vertical:   Axis{"time (ms)", 0, 1196},
		Scale:      ScaleBar{MetresPerTrace: 12.5},
		Legends: []Legend{
			{Name: "amplitude", Palette: palettes.Default(palettes.Diverging), Lo: -1, Hi: 1},
			{Name: "phase", Unit: "deg", Palette: palettes.Default(palettes.Cyclic), Lo: -180, Hi: 180, Cyclic: true},
		},
		Width: 1000, Height: 700,
	}
}

// TestScaleBarLength: the drawn bar, measured in the image along its
// outline, is as long as its distance at the plot's scale, computed here
// from the plot width, the traces shown and the trace spacing, within one
// pixel; and the distance is a round number (1, 2 or 5 x 10^k metres).
func TestScaleBarLength(t *testing.T) {
	f := testFigure()
	img, err := f.Draw()
	if err != nil {
		t.Fatal(err)
	}
	lay, err := f.Layout()
	if err != nil {
		t.Fatal(err)
	}
	sb := lay.ScaleBar
	pxPerMetre := float64(lay.Plot.Dx()) / (400 * 12.5)
	wantPx := sb.Metres * pxPerMetre
	// Measure the dark run along the bar's top edge.
	y, x := sb.Bar.Min.Y, sb.Bar.Min.X
	if c := img.RGBAAt(x, y); c.R > 100 {
		t.Fatalf("no bar at %d,%d", x, y)
	}
	for img.RGBAAt(x, y).R < 100 {
		x++
	}
	if got := float64(x - sb.Bar.Min.X); math.Abs(got-wantPx) > 1 {
		t.Errorf("bar is %v px for %v m, want %.2f px", got, sb.Metres, wantPx)
	}
	f10 := sb.Metres / math.Pow(10, math.Floor(math.Log10(sb.Metres)))
	if f10 != 1 && f10 != 2 && f10 != 5 {
		t.Errorf("bar length %v m is not round", sb.Metres)
	}
	if sb.Label != "1 km" { // 400 traces x 12.5 m = 5 km wide; a quarter is 1.25 km -> 1 km
		t.Errorf("label %q, want 1 km", sb.Label)
	}
}

// inked counts pixels in r darker than mid grey.
func inked(img *image.RGBA, r image.Rectangle) int {
	n := 0
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := r.Min.X; x < r.Max.X; x++ {
			if c := img.RGBAAt(x, y); int(c.R)+int(c.G)+int(c.B) < 3*128 {
				n++
			}
		}
	}
	return n
}

// TestFigureText: the title and each legend's heading are drawn (their text
// boxes hold dark pixels) and the axes carry tick labels.
func TestFigureText(t *testing.T) {
	f := testFigure()
	img, err := f.Draw()
	if err != nil {
		t.Fatal(err)
	}
	lay, _ := f.Layout()
	if n := inked(img, lay.Title); n < 50 {
		t.Errorf("title region has %d dark pixels", n)
	}
	if len(lay.LegendText) != 2 {
		t.Fatalf("%d legend headings", len(lay.LegendText))
	}
	for i, r := range lay.LegendText {
		if n := inked(img, r); n < 30 {
			t.Errorf("legend %d heading %v has %d dark pixels", i, r, n)
		}
		if !r.In(img.Bounds()) {
			t.Errorf("legend %d heading %v clipped by the image", i, r)
		}
	}
	if len(lay.HorizontalTicks) < 3 || len(lay.VerticalTicks) < 3 {
		t.Errorf("ticks: %d horizontal, %d vertical", len(lay.HorizontalTicks), len(lay.VerticalTicks))
	}
	// Tick pixels: crossline 20 is at the centre of the first trace.
	for _, tk := range lay.HorizontalTicks {
		want := float64(lay.Plot.Min.X) + (tk.Value-20+0.5)/400*float64(lay.Plot.Dx())
		if math.Abs(tk.Pixel-want) > 1e-6 {
			t.Errorf("tick %v at %v px, want %v", tk.Value, tk.Pixel, want)
		}
	}
}

func TestFigureErrors(t *testing.T) {
	f := testFigure()
	f.Width = 100
	if _, err := f.Draw(); err == nil {
		t.Error("tiny figure accepted")
	}
	f = testFigure()
	f.Base.Data = nil
	if _, err := f.Draw(); err == nil {
		t.Error("empty figure accepted")
	}
	f = testFigure()
	f.Legends[0].Palette = nil
	if _, err := f.Draw(); err == nil {
		t.Error("legend without palette accepted")
	}
}

// TestEncodePNGPhys decodes the chunks back from the bytes: pHYs comes
// right after IHDR with 300 dpi as 11811 pixels per metre (300 / 0.0254,
// rounded) for x and y, unit 1 (metre), a valid CRC (PNG specification,
// 3rd ed., 11.3.5.3 and 5.5), and the image still decodes unchanged.
func TestEncodePNGPhys(t *testing.T) {
	img := image.NewRGBA(image.Rect(0, 0, 7, 5))
	img.SetRGBA(3, 2, color.RGBA{10, 200, 30, 255})
	var buf bytes.Buffer
	if err := EncodePNG(&buf, img, 300); err != nil {
		t.Fatal(err)
	}
	b := buf.Bytes()
	pos := 8
	var types []string
	for pos+12 <= len(b) {
		n := int(binary.BigEndian.Uint32(b[pos:]))
		typ := string(b[pos+4 : pos+8])
		data := b[pos+8 : pos+8+n]
		crc := binary.BigEndian.Uint32(b[pos+8+n:])
		if crc != crc32.ChecksumIEEE(b[pos+4:pos+8+n]) {
			t.Errorf("chunk %s: bad CRC", typ)
		}
		types = append(types, typ)
		if typ == "pHYs" {
			if n != 9 {
				t.Fatalf("pHYs length %d", n)
			}
			x, y, unit := binary.BigEndian.Uint32(data[0:]), binary.BigEndian.Uint32(data[4:]), data[8]
			if x != 11811 || y != 11811 || unit != 1 {
				t.Errorf("pHYs = %d x %d unit %d, want 11811 x 11811 unit 1", x, y, unit)
			}
		}
		pos += 12 + n
	}
	if len(types) < 3 || types[0] != "IHDR" || types[1] != "pHYs" {
		t.Errorf("chunks %v, want IHDR, pHYs, ...", types)
	}
	dec, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatal(err)
	}
	if r, g, bl, _ := dec.At(3, 2).RGBA(); r>>8 != 10 || g>>8 != 200 || bl>>8 != 30 {
		t.Errorf("decoded pixel %v", dec.At(3, 2))
	}
	if err := EncodePNG(&buf, img, 0); err == nil {
		t.Error("0 dpi accepted")
	}
}

// TestScaleBarLabels (issue 12 point 8): the scale bar is labelled in the
// picture, "0" above its left end and its length ("1 km" here) above its
// right end, with nothing drawn above its middle between the two. Checked
// on pixels: ink in a box above each end, none above the centre.
func TestScaleBarLabels(t *testing.T) {
	f := testFigure()
	img, err := f.Draw()
	if err != nil {
		t.Fatal(err)
	}
	lay, err := f.Layout()
	if err != nil {
		t.Fatal(err)
	}
	b := lay.ScaleBar.Bar
	if b.Empty() {
		t.Fatal("no scale bar laid out")
	}
	above := func(x, half int) image.Rectangle {
		return image.Rect(x-half, b.Min.Y-28, x+half, b.Min.Y-2)
	}
	if n := inked(img, above(b.Min.X, 8)); n < 10 {
		t.Errorf("no \"0\" above the bar's left end (%d dark pixels)", n)
	}
	if n := inked(img, above(b.Max.X, 20)); n < 20 {
		t.Errorf("no length label above the bar's right end (%d dark pixels)", n)
	}
	if n := inked(img, above((b.Min.X+b.Max.X)/2, 4)); n != 0 {
		t.Errorf("%d dark pixels above the bar's middle, where no label belongs", n)
	}
}
