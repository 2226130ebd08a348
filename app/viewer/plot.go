package viewer

import (
	"image"
	"image/color"
	"image/draw"
	"math"

	"golang.org/x/image/vector"
)

// Curve drawing for the trace panel and the spectrum: anti-aliased strokes
// and fills rasterised with golang.org/x/image/vector into an image.RGBA.
// These run in background jobs, never on the UI goroutine.

// strokePolyline draws the polyline through (xs[i], ys[i]) (pixel
// coordinates) with the given width and colour. Points with a NaN coordinate
// break the line.
func strokePolyline(dst *image.RGBA, xs, ys []float64, width float64, c color.RGBA) {
	b := dst.Bounds()
	z := vector.NewRasterizer(b.Dx(), b.Dy())
	hw := width / 2
	for i := 1; i < len(xs) && i < len(ys); i++ {
		x0, y0, x1, y1 := xs[i-1], ys[i-1], xs[i], ys[i]
		if math.IsNaN(x0+y0+x1+y1) || math.IsInf(x0+y0+x1+y1, 0) {
			continue
		}
		dx, dy := x1-x0, y1-y0
		l := math.Hypot(dx, dy)
		if l == 0 {
			continue
		}
		// A quad around the segment, extended by half the width at both
		// ends so consecutive segments join without gaps.
		nx, ny := -dy/l*hw, dx/l*hw
		ex, ey := dx/l*hw, dy/l*hw
		z.MoveTo(f32(x0-ex+nx), f32(y0-ey+ny))
		z.LineTo(f32(x1+ex+nx), f32(y1+ey+ny))
		z.LineTo(f32(x1+ex-nx), f32(y1+ey-ny))
		z.LineTo(f32(x0-ex-nx), f32(y0-ey-ny))
		z.ClosePath()
	}
	z.Draw(dst, b, image.NewUniform(c), image.Point{})
}

// fillPositive fills the area between a vertical wiggle and its zero line
// where the wiggle lies right of it (variable area): xs are the wiggle's
// pixel columns at rows ys, zero the column of the zero line.
func fillPositive(dst *image.RGBA, xs, ys []float64, zero float64, c color.RGBA) {
	b := dst.Bounds()
	z := vector.NewRasterizer(b.Dx(), b.Dy())
	for i := 1; i < len(xs); i++ {
		x0, y0, x1, y1 := xs[i-1], ys[i-1], xs[i], ys[i]
		if math.IsNaN(x0 + x1) {
			continue
		}
		// Clip the segment to the positive side of the zero line.
		if x0 <= zero && x1 <= zero {
			continue
		}
		ox0, oy0, ox1, oy1 := x0, y0, x1, y1
		if ox0 < zero {
			t := (zero - ox0) / (ox1 - ox0)
			x0, y0 = zero, oy0+t*(oy1-oy0)
		}
		if ox1 < zero {
			t := (zero - ox0) / (ox1 - ox0)
			x1, y1 = zero, oy0+t*(oy1-oy0)
		}
		z.MoveTo(f32(zero), f32(y0))
		z.LineTo(f32(x0), f32(y0))
		z.LineTo(f32(x1), f32(y1))
		z.LineTo(f32(zero), f32(y1))
		z.ClosePath()
	}
	z.Draw(dst, b, image.NewUniform(c), image.Point{})
}

// fillRect paints r in colour c.
func fillRect(dst *image.RGBA, r image.Rectangle, c color.RGBA) {
	draw.Draw(dst, r, image.NewUniform(c), image.Point{}, draw.Src)
}

// niceStep returns a step of 1, 2 or 5 times a power of ten that splits span
// into about n intervals (common practice for axis ticks).
func niceStep(span float64, n int) float64 {
	if span <= 0 || n <= 0 {
		return 1
	}
	raw := span / float64(n)
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	for _, m := range []float64{1, 2, 5, 10} {
		if m*p >= raw {
			return m * p
		}
	}
	return 10 * p
}

// ticks returns the multiples of a nice step inside [lo, hi].
func ticks(lo, hi float64, n int) []float64 {
	if hi < lo {
		lo, hi = hi, lo
	}
	step := niceStep(hi-lo, n)
	var out []float64
	for v := math.Ceil(lo/step) * step; v <= hi+step*1e-9; v += step {
		out = append(out, v)
	}
	return out
}

func f32(v float64) float32 { return float32(v) }
