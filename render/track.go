package render

import (
	"image"
	"image/color"
	"math"

	"golang.org/x/image/vector"
)

// Curve drawing for trace tracks (a trace drawn down the time axis, as in
// the window's trace panel) and other plots: anti-aliased strokes and fills
// rasterised with golang.org/x/image/vector into an image.RGBA.

// StrokePolyline draws the polyline through (xs[i], ys[i]) (pixel
// coordinates of dst) with the given width and colour. A point with a NaN
// or infinite coordinate breaks the line. Only the polyline's bounding box
// (widened by the stroke) is rasterised: a short stroke on a large image
// (a north arrow, a scale bar) costs its own size, not the image's.
func StrokePolyline(dst *image.RGBA, xs, ys []float64, width float64, c color.RGBA) {
	n := min(len(xs), len(ys))
	hw := width / 2
	x0, y0, x1, y1 := math.Inf(1), math.Inf(1), math.Inf(-1), math.Inf(-1)
	for i := range n {
		if s := xs[i] + ys[i]; math.IsNaN(s) || math.IsInf(s, 0) {
			continue
		}
		x0, x1 = math.Min(x0, xs[i]), math.Max(x1, xs[i])
		y0, y1 = math.Min(y0, ys[i]), math.Max(y1, ys[i])
	}
	if !(x1 >= x0) {
		return
	}
	// The quads below reach hw along and across a segment past its ends:
	// at most hw*sqrt(2) from an end; one pixel more for anti-aliasing.
	m := hw*math.Sqrt2 + 1
	b := dst.Bounds()
	if x0-m > float64(b.Min.X) {
		b.Min.X = int(math.Floor(x0 - m))
	}
	if y0-m > float64(b.Min.Y) {
		b.Min.Y = int(math.Floor(y0 - m))
	}
	if x1+m < float64(b.Max.X) {
		b.Max.X = int(math.Ceil(x1 + m))
	}
	if y1+m < float64(b.Max.Y) {
		b.Max.Y = int(math.Ceil(y1 + m))
	}
	if b.Empty() {
		return
	}
	z := vector.NewRasterizer(b.Dx(), b.Dy())
	for i := 1; i < n; i++ {
		x0, y0, x1, y1 := xs[i-1]-float64(b.Min.X), ys[i-1]-float64(b.Min.Y), xs[i]-float64(b.Min.X), ys[i]-float64(b.Min.Y)
		if s := x0 + y0 + x1 + y1; math.IsNaN(s) || math.IsInf(s, 0) {
			continue
		}
		dx, dy := x1-x0, y1-y0
		l := math.Hypot(dx, dy)
		if l == 0 {
			continue
		}
		// A quad around the segment, extended by half the width at both
		// ends so that consecutive segments join without gaps.
		nx, ny := -dy/l*hw, dx/l*hw
		ex, ey := dx/l*hw, dy/l*hw
		z.MoveTo(float32(x0-ex+nx), float32(y0-ey+ny))
		z.LineTo(float32(x1+ex+nx), float32(y1+ey+ny))
		z.LineTo(float32(x1+ex-nx), float32(y1+ey-ny))
		z.LineTo(float32(x0-ex-nx), float32(y0-ey-ny))
		z.ClosePath()
	}
	z.Draw(dst, b, image.NewUniform(c), b.Min)
}

// FillPositive fills the area between a vertical wiggle and its zero line
// where the wiggle lies right of it (variable area, common practice): xs
// are the wiggle's pixel columns at rows ys, zero the column of the zero
// line. NaN columns are gaps.
func FillPositive(dst *image.RGBA, xs, ys []float64, zero float64, c color.RGBA) {
	b := dst.Bounds()
	z := vector.NewRasterizer(b.Dx(), b.Dy())
	ox, oy := float64(b.Min.X), float64(b.Min.Y)
	for i := 1; i < len(xs) && i < len(ys); i++ {
		x0, y0, x1, y1 := xs[i-1], ys[i-1], xs[i], ys[i]
		if math.IsNaN(x0+x1+y0+y1) || (x0 <= zero && x1 <= zero) {
			continue
		}
		// Clip the segment to the positive side of the zero line.
		px0, py0, px1, py1 := x0, y0, x1, y1
		if px0 < zero {
			t := (zero - x0) / (x1 - x0)
			px0, py0 = zero, y0+t*(y1-y0)
		}
		if px1 < zero {
			t := (zero - x0) / (x1 - x0)
			px1, py1 = zero, y0+t*(y1-y0)
		}
		z.MoveTo(float32(zero-ox), float32(py0-oy))
		z.LineTo(float32(px0-ox), float32(py0-oy))
		z.LineTo(float32(px1-ox), float32(py1-oy))
		z.LineTo(float32(zero-ox), float32(py1-oy))
		z.ClosePath()
	}
	z.Draw(dst, b, image.NewUniform(c), b.Min)
}

// Track is one curve of a trace panel: Values per sample drawn down the
// time axis, scaled so that Lo..Hi spans the track's width (less a margin).
// A Wiggle track also gets its zero line and its positive side filled in
// Fill (variable area); other tracks are curves only.
type Track struct {
	Values []float32
	Lo, Hi float64
	Colour color.RGBA
	Wiggle bool
	Fill   color.RGBA
	Grid   color.RGBA // the zero line's colour
	Width  float64    // stroke width in pixels (0 means 1.5)
}

// DrawTrack draws tr into the rectangle r of dst for the samples s0..s1
// (fractional sample positions at r's top and bottom edges; sample i is
// drawn at its centre, i+0.5). Values beyond Lo..Hi are clipped a little
// past the track's edges; NaN and infinite samples are gaps.
func DrawTrack(dst *image.RGBA, r image.Rectangle, tr Track, s0, s1 float64) {
	if !(s1 > s0) || !(tr.Hi > tr.Lo) || r.Empty() {
		return
	}
	pad := math.Min(6, float64(r.Dx())/8)
	col := func(v float64) float64 {
		f := math.Max(-0.05, math.Min(1.05, (v-tr.Lo)/(tr.Hi-tr.Lo)))
		return float64(r.Min.X) + pad + f*(float64(r.Dx())-2*pad)
	}
	row := func(s float64) float64 { return float64(r.Min.Y) + (s-s0)/(s1-s0)*float64(r.Dy()) }
	i0 := max(int(math.Floor(s0)), 0)
	i1 := min(int(math.Ceil(s1))+1, len(tr.Values))
	if i1 <= i0 {
		return
	}
	xs := make([]float64, 0, i1-i0)
	ys := make([]float64, 0, i1-i0)
	for i := i0; i < i1; i++ {
		v := float64(tr.Values[i])
		if math.IsNaN(v) || math.IsInf(v, 0) {
			xs, ys = append(xs, math.NaN()), append(ys, math.NaN())
			continue
		}
		xs, ys = append(xs, col(v)), append(ys, row(float64(i)+0.5))
	}
	sub := dst.SubImage(r).(*image.RGBA)
	if tr.Wiggle {
		zero := col(0)
		z := int(zero)
		fillRect(sub, image.Rect(z, r.Min.Y, z+1, r.Max.Y).Intersect(r), tr.Grid)
		FillPositive(sub, xs, ys, zero, tr.Fill)
	}
	w := tr.Width
	if w == 0 {
		w = 1.5
	}
	StrokePolyline(sub, xs, ys, w, tr.Colour)
}

// TimeTicks returns tick times for an axis from lo to hi ms drawn over
// length pixels with labels at least spacing pixels apart, by the same
// rule as figures' axes: Heckbert's (1990) nice numbers (NiceTicks).
func TimeTicks(lo, hi, length, spacing float64) []float64 {
	if !(spacing > 0) || !(length > 0) {
		return nil
	}
	return NiceTicks(lo, hi, max(1, int(length/spacing)))
}
