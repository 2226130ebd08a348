package render

import (
	"image"
	"image/color"
	"math"

	"golang.org/x/image/vector"
)

// WiggleStyle draws each trace as a curve over its baseline.
type WiggleStyle struct {
	Color color.RGBA
	// Fill shades the positive lobes between curve and baseline (variable
	// area).
	Fill bool
	// Gain scales the deflection: at Gain 1 a value of Clip deflects by one
	// drawn-trace spacing. Gain <= 0 means 1.
	Gain float64
	// Data, if not nil, are the traces drawn as wiggles (Data[trace][sample],
	// on the same grid as the base layer), e.g. amplitude wiggles over a
	// phase display; nil draws the base layer's own data.
	Data [][]float32
	// Clip is the value that deflects one trace spacing at Gain 1; 0 takes
	// max(|Lo|, |Hi|) of the base layer when Data is nil, else the largest
	// |value| of Data.
	Clip float64
}

// minWigglePixels is the least spacing in pixels between drawn wiggles;
// denser traces are thinned to every k-th trace (common practice: wiggles
// closer than a few pixels merge into a solid mass).
const minWigglePixels = 4

// WiggleStride returns k such that every k-th trace is drawn as a wiggle
// when traces are pixelsPerTrace apart.
func WiggleStride(pixelsPerTrace float64) int {
	if !(pixelsPerTrace > 0) {
		return 1
	}
	return max(1, int(math.Ceil(minWigglePixels/pixelsPerTrace)))
}

// drawWiggles draws anti-aliased wiggles (and variable-area fill) of the
// base layer's traces over r of dst, with golang.org/x/image/vector.
func drawWiggles(dst *image.RGBA, r image.Rectangle, base Layer, st WiggleStyle, vp Viewport) {
	w, h := r.Dx(), r.Dy()
	pxPerTrace := float64(w) / (vp.Trace1 - vp.Trace0)
	pxPerSample := float64(h) / (vp.Sample1 - vp.Sample0)
	stride := WiggleStride(pxPerTrace)
	gain := st.Gain
	if !(gain > 0) {
		gain = 1
	}
	traces := base.Data
	clip := st.Clip
	if st.Data != nil {
		traces = st.Data
	} else if !(clip > 0) {
		clip = math.Max(math.Abs(float64(base.Lo)), math.Abs(float64(base.Hi)))
	}
	if !(clip > 0) {
		clip = maxAbs(traces)
	}
	if !(clip > 0) {
		clip = 1
	}
	deflect := gain * float64(stride) * pxPerTrace / clip // pixels per unit value
	reach := gain * float64(stride)                       // traces a wiggle can reach sideways

	// Samples per drawn point: about one point per pixel row.
	sampleStep := max(1, int(1/pxPerSample))
	first := max(0, int(math.Floor(vp.Trace0-reach)))
	first -= first % stride
	last := min(len(traces)-1, int(math.Ceil(vp.Trace1+reach)))
	s0 := max(0, int(math.Floor(vp.Sample0))-1)

	line := vector.NewRasterizer(w, h)
	var fill *vector.Rasterizer
	if st.Fill {
		fill = vector.NewRasterizer(w, h)
	}
	const halfWidth = 0.55 // pixels: a line about 1.1 px wide
	xs := make([]float32, 0, 1024)
	ys := make([]float32, 0, 1024)
	for tr := first; tr <= last; tr += stride {
		trace := traces[tr]
		x0 := keepNear((float64(tr)+0.5-vp.Trace0)*pxPerTrace, w)
		s1 := min(len(trace)-1, int(math.Ceil(vp.Sample1))+1)
		xs, ys = xs[:0], ys[:0]
		for s := s0; s <= s1; s += sampleStep {
			v := float64(trace[s])
			if math.IsNaN(v) || math.IsInf(v, 0) {
				v = 0 // gaps draw on the baseline
			}
			xs = append(xs, keepNear(float64(x0)+v*deflect, w))
			ys = append(ys, keepNear((float64(s)+0.5-vp.Sample0)*pxPerSample, h))
		}
		if len(xs) < 2 {
			continue
		}
		for i := 1; i < len(xs); i++ {
			segment(line, xs[i-1], ys[i-1], xs[i], ys[i], halfWidth)
		}
		if fill != nil {
			positiveLobes(fill, x0, xs, ys)
		}
	}
	src := image.NewUniform(st.Color)
	if fill != nil {
		fill.Draw(dst, r, src, image.Point{})
	}
	line.Draw(dst, r, src, image.Point{})
}

// farPixels bounds drawing coordinates to this far outside the plot:
// x/image/vector's fixed-point rasteriser divides by zero on coordinates
// of about 1e10 (found by FuzzDrawSection), and nothing that far off shows.
// A curve cut there keeps the visible part's direction to within a
// fraction of a pixel.
const farPixels = 1 << 16

// keepNear clamps a pixel coordinate along an extent of n pixels to
// [-farPixels, n+farPixels]; NaN becomes 0.
func keepNear(v float64, n int) float32 {
	if !(v > -farPixels) {
		if v != v {
			return 0
		}
		return -farPixels
	}
	return float32(min(v, float64(n)+farPixels))
}

// segment adds a thick line from (ax, ay) to (bx, by) as a quadrilateral.
// Its winding depends only on the direction of the segment's normal, so
// overlapping segments add up instead of cancelling.
func segment(z *vector.Rasterizer, ax, ay, bx, by, hw float32) {
	dx, dy := bx-ax, by-ay
	l := float32(math.Hypot(float64(dx), float64(dy)))
	if l == 0 {
		return
	}
	nx, ny := -dy/l*hw, dx/l*hw
	// Extend by half the width along the segment so joints have no notch.
	ex, ey := dx/l*hw*0.5, dy/l*hw*0.5
	z.MoveTo(ax+nx-ex, ay+ny-ey)
	z.LineTo(bx+nx+ex, by+ny+ey)
	z.LineTo(bx-nx+ex, by-ny+ey)
	z.LineTo(ax-nx-ex, ay-ny-ey)
	z.ClosePath()
}

// positiveLobes adds the region between the baseline x0 and the curve where
// the curve lies right of the baseline, with exact zero crossings.
func positiveLobes(z *vector.Rasterizer, x0 float32, xs, ys []float32) {
	z.MoveTo(x0, ys[0])
	for i := range xs {
		if i > 0 {
			a, b := xs[i-1]-x0, xs[i]-x0
			if (a > 0) != (b > 0) && a != b {
				t := a / (a - b)
				z.LineTo(x0, ys[i-1]+t*(ys[i]-ys[i-1]))
			}
		}
		z.LineTo(max(xs[i], x0), ys[i])
	}
	z.LineTo(x0, ys[len(ys)-1])
	z.ClosePath()
}

// maxAbs returns the largest finite |v| in data.
func maxAbs(data [][]float32) float64 {
	m := 0.0
	for _, tr := range data {
		for _, v := range tr {
			if a := math.Abs(float64(v)); a > m && !math.IsInf(a, 0) {
				m = a
			}
		}
	}
	return m
}
