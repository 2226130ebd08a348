package viewer

import (
	"image"
	"image/color"
	"image/draw"
	"math"

	"quadtrace/render"
)

// Curve drawing for the trace panel and the spectrum: anti-aliased strokes
// and fills rasterised with golang.org/x/image/vector into an image.RGBA.
// These run in background jobs, never on the UI goroutine.

// strokePolyline and fillPositive are render's (render.StrokePolyline,
// render.FillPositive), kept under these names for the trace panel.
func strokePolyline(dst *image.RGBA, xs, ys []float64, width float64, c color.RGBA) {
	render.StrokePolyline(dst, xs, ys, width, c)
}

func fillPositive(dst *image.RGBA, xs, ys []float64, zero float64, c color.RGBA) {
	render.FillPositive(dst, xs, ys, zero, c)
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
