package viewer

import (
	"image"
	"image/color"
	"math"

	"quadtrace/render"
)

// histogramBins is the number of bars of the colour control's histogram.
const histogramBins = 96

// valueHistogram is the histogram of a layer's values (finite ones) drawn
// as a small picture, with the layer's colour range marked on it.
type valueHistogram struct {
	img      *image.RGBA
	min, max float64 // the values' extent (the picture's horizontal axis)
	lo, hi   float32 // the colour range drawn on it
}

// histogramOf counts l's finite values in histogramBins bins between their
// minimum and maximum and draws the counts (square-root scaled, so a few
// strong values still show beside the mass around zero) as bars on a w x h
// picture, with the colour range [l.Lo, l.Hi] drawn as two lines and the
// part between them shaded. It runs in the render job.
func histogramOf(l render.Layer, w, h int) valueHistogram {
	hs := valueHistogram{min: math.Inf(1), max: math.Inf(-1), lo: l.Lo, hi: l.Hi}
	// Plain comparisons, not math.Min and math.Max: those are calls on
	// amd64 (for their NaN and signed-zero rules, moot here), and made
	// this loop a fifth of BenchmarkSwitchAttribute.
	for _, tr := range l.Data {
		for _, x := range tr {
			f := float64(x)
			if math.IsNaN(f) || math.IsInf(f, 0) {
				continue
			}
			if f < hs.min {
				hs.min = f
			}
			if f > hs.max {
				hs.max = f
			}
		}
	}
	hs.img = image.NewRGBA(image.Rect(0, 0, w, h))
	if !(hs.max > hs.min) {
		return hs
	}
	var counts [histogramBins]int
	// One multiplication per value, not a division (the division was half
	// of this loop): a value on a bin edge may fall one bin over, which
	// the picture cannot show.
	scale := histogramBins / (hs.max - hs.min)
	for _, tr := range l.Data {
		for _, x := range tr {
			f := float64(x)
			if f-f != 0 { // NaN or ±Inf
				continue
			}
			k := min(int((f-hs.min)*scale), histogramBins-1)
			counts[k]++
		}
	}
	top := 0
	for _, c := range counts {
		top = max(top, c)
	}
	xOf := func(v float64) int { return int(math.Round((v - hs.min) / (hs.max - hs.min) * float64(w-1))) }
	lo, hi := xOf(float64(l.Lo)), xOf(float64(l.Hi))
	fillRect(hs.img, image.Rect(max(lo, 0), 0, min(hi, w-1)+1, h), color.RGBA{90, 140, 220, 60})
	bar := color.RGBA{150, 150, 150, 255}
	for k, c := range counts {
		if c == 0 {
			continue
		}
		bh := int(math.Ceil(math.Sqrt(float64(c)/float64(top)) * float64(h-2)))
		x0, x1 := k*w/histogramBins, (k+1)*w/histogramBins
		fillRect(hs.img, image.Rect(x0, h-bh, max(x1-1, x0+1), h), bar)
	}
	edge := color.RGBA{230, 70, 40, 255}
	for _, x := range []int{lo, hi} {
		if x >= 0 && x < w {
			fillRect(hs.img, image.Rect(max(x-1, 0), 0, min(x+1, w-1)+1, h), edge)
		}
	}
	return hs
}
