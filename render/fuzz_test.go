package render

import (
	"encoding/binary"
	"image"
	"image/color"
	"math"
	"testing"

	"quadtrace/palettes"
)

// fuzzSection turns fuzz bytes into a section of arbitrary float32 bit
// patterns (denormals, zeros, NaN, Inf, extremes), nh traces by nv samples.
func fuzzSection(data []byte, nh, nv int) [][]float32 {
	out := make([][]float32, nh)
	k := 0
	for i := range out {
		out[i] = make([]float32, nv)
		for j := range out[i] {
			if len(data) >= 4 {
				out[i][j] = math.Float32frombits(binary.LittleEndian.Uint32(data[(4*k)%(len(data)-3):]))
			}
			k++
		}
	}
	return out
}

// fuzzSeeds are value patterns that broke or could break the drawing: the
// denormal range of issue 18 (render/section.go:440 indexed with
// math.MinInt64), a constant section, NaN and Inf, the float32 extremes.
func fuzzSeeds(f *testing.F) {
	le := func(vs ...float32) []byte {
		b := make([]byte, 4*len(vs))
		for i, v := range vs {
			binary.LittleEndian.PutUint32(b[4*i:], math.Float32bits(v))
		}
		return b
	}
	inf := float32(math.Inf(1))
	f.Add(le(1e-40, 2e-40, -3e-41, 0), uint8(7), uint8(9), uint16(300), uint16(200), uint8(0), 99.0, true)
	f.Add(le(5, 5, 5, 5), uint8(3), uint8(3), uint16(50), uint16(40), uint8(1), 99.0, false)
	f.Add(le(float32(math.NaN()), inf, -inf, 1), uint8(4), uint8(4), uint16(64), uint16(64), uint8(2), 100.0, true)
	f.Add(le(math.MaxFloat32, -math.MaxFloat32, math.SmallestNonzeroFloat32, 0), uint8(5), uint8(2), uint16(1), uint16(1), uint8(3), 50.0, false)
	f.Add(le(7.4e-37, 7.6e-37, 0, 1e-38), uint8(6), uint8(8), uint16(33), uint16(17), uint8(4), 98.0, true)
}

// FuzzDrawSection draws arbitrary sections with every palette family, an
// overlay, wiggles and arbitrary sizes and windows: no panic, and every
// pixel is opaque.
func FuzzDrawSection(f *testing.F) {
	fuzzSeeds(f)
	all := palettes.All()
	f.Fuzz(func(t *testing.T, data []byte, nh, nv uint8, w, h uint16, pal uint8, pct float64, overlay bool) {
		w, h = w%700, h%500
		sec := fuzzSection(data, int(nh%40), int(nv%60))
		p := all[int(pal)%len(all)]
		lo, hi := PercentileRange(sec, pct, p.Family == palettes.Diverging)
		base := Layer{Data: sec, Palette: p, Lo: lo, Hi: hi}
		var over *Layer
		if overlay {
			q := all[(int(pal)+1)%len(all)]
			olo, ohi := PercentileRange(sec, 100, false)
			over = &Layer{Data: sec, Palette: q, Lo: olo, Hi: ohi, Opacity: 0.7, OpacityFollowsValue: pal%2 == 0}
		}
		wig := &WiggleStyle{Color: color.RGBA{0, 0, 0, 255}, Fill: pal%3 == 0}
		img := image.NewRGBA(image.Rect(0, 0, int(w), int(h)))
		var vp Viewport
		if pal%4 == 1 && len(sec) > 0 {
			vp = Viewport{-0.5, float64(len(sec)) * 1.5, 0.25, float64(int(nv%60)) + 3}
		}
		DrawSection(img, base, over, wig, vp)
		DrawMap(img, base, over, float64(pct)/50)
		for i := 3; i < len(img.Pix); i += 4 {
			if img.Pix[i] != 255 && sec != nil && len(sec) > 0 && int(nv%60) > 0 {
				t.Fatalf("pixel %d not opaque (alpha %d)", i/4, img.Pix[i])
			}
		}
	})
}

// FuzzFigure composes whole figures (axes, legends, scale bar, title) from
// arbitrary sections, axis values and sizes: Draw either returns an error
// or an image of the asked size, never panics.
func FuzzFigure(f *testing.F) {
	f.Add([]byte{0, 0, 128, 0, 1, 0, 0, 0}, uint8(10), uint8(20), uint16(800), uint16(600), 0.0, 100.0, 12.5, "Inline 1075", false)
	f.Add([]byte{1, 0, 0, 0, 255, 255, 127, 127}, uint8(1), uint8(1), uint16(240), uint16(180), math.Inf(1), math.NaN(), 0.0, "", true)
	f.Add([]byte{0, 0, 0x80, 0x7f}, uint8(3), uint8(3), uint16(10), uint16(10), -1e308, 1e308, -5.0, "x", false)
	all := palettes.All()
	f.Fuzz(func(t *testing.T, data []byte, nh, nv uint8, w, h uint16, first, last, spacing float64, title string, asMap bool) {
		w, h = w%900, h%700
		sec := fuzzSection(data, int(nh%50), int(nv%50))
		p := all[int(nh)%len(all)]
		lo, hi := PercentileRange(sec, 99, false)
		fig := Figure{Title: title, Base: Layer{Data: sec, Palette: p, Lo: lo, Hi: hi},
			Horizontal: Axis{Title: "Crossline", First: first, Last: last},
			Vertical:   Axis{Title: "Time (ms)", First: last, Last: first},
			Scale:      ScaleBar{MetresPerTrace: spacing},
			Legends:    []Legend{{Name: "envelope", Unit: "", Palette: p, Lo: float64(lo), Hi: float64(hi), Cyclic: nv%2 == 0}},
			Width:      int(w), Height: int(h)}
		if asMap {
			fig.MapAspect = math.Abs(spacing) + 0.1
		} else {
			fig.Wiggle = &WiggleStyle{Color: color.RGBA{0, 0, 0, 255}, Fill: true, Gain: spacing}
		}
		img, err := fig.Draw()
		if err == nil && (img.Bounds().Dx() != int(w) || img.Bounds().Dy() != int(h)) {
			t.Fatalf("image %v, want %dx%d", img.Bounds(), w, h)
		}
	})
}

// TestTinyRangesDraw is the crash of issue 18 as a plain test: value
// ranges below about 7.5e-37 overflowed the float32 colour scale and
// indexed the palette with math.MinInt64. The section must draw, and a
// ramp of denormal values must still use more than one colour (the range
// is tiny, not empty); a constant section draws as one colour.
func TestTinyRangesDraw(t *testing.T) {
	p := palettes.Default(palettes.Sequential)
	ramp := make([][]float32, 16)
	for i := range ramp {
		ramp[i] = []float32{float32(i) * 1e-44, float32(i) * 1e-44}
	}
	for _, c := range []struct {
		name    string
		data    [][]float32
		lo, hi  float32
		colours int // at least
	}{
		{"denormal ramp", ramp, 0, 15e-44, 8},
		{"near 1e-38", [][]float32{{1e-38, 1.5e-38}, {2e-38, 3e-38}}, 1e-38, 3e-38, 2},
		{"constant", [][]float32{{4, 4}, {4, 4}}, 4, 4, 1},
	} {
		img := image.NewRGBA(image.Rect(0, 0, 64, 8))
		DrawSection(img, Layer{Data: c.data, Palette: p, Lo: c.lo, Hi: c.hi}, nil, nil, Viewport{})
		seen := map[color.RGBA]bool{}
		for y := 0; y < 8; y++ {
			for x := 0; x < 64; x++ {
				seen[img.RGBAAt(x, y)] = true
			}
		}
		if len(seen) < c.colours || (c.colours == 1 && len(seen) != 1) {
			t.Errorf("%s: %d colours, want %d", c.name, len(seen), c.colours)
		}
	}
}
