package render

import (
	"image"
	"math"
	"testing"

	"quadtrace/palettes"
)

// syntheticSection returns ntr traces of ns samples: a few dipping
// reflections with a smooth amplitude field (invented test data).
func syntheticSection(ntr, ns int) [][]float32 {
	data := make([][]float32, ntr)
	for i := range data {
		tr := make([]float32, ns)
		for j := range tr {
			x, t := float64(i), float64(j)
			tr[j] = float32(math.Sin(0.21*t+0.003*x*x/float64(ntr)) * (1 + 0.5*math.Cos(0.01*x)) * math.Exp(-t/float64(4*ns)))
		}
		data[i] = tr
	}
	return data
}

// BenchmarkDrawSection: a 2000 x 1500 section into a 1600 x 1000 image,
// variable density plus a value-weighted overlay (the target:
// under 20 ms per frame on 2 cores).
func BenchmarkDrawSection(b *testing.B) {
	data := syntheticSection(2000, 1500)
	env := make([][]float32, len(data))
	for i, tr := range data {
		env[i] = make([]float32, len(tr))
		for j, v := range tr {
			env[i][j] = float32(math.Abs(float64(v)))
		}
	}
	base := Layer{Data: data, Palette: palettes.Default(palettes.Diverging), Lo: -1, Hi: 1}
	over := &Layer{Data: env, Palette: palettes.Default(palettes.Overlay), Lo: 0, Hi: 1, Opacity: 0.7, OpacityFollowsValue: true}
	dst := image.NewRGBA(image.Rect(0, 0, 1600, 1000))
	b.ResetTimer()
	for b.Loop() {
		DrawSection(dst, base, over, nil, Viewport{})
	}
	b.ReportMetric(float64(b.Elapsed().Milliseconds())/float64(b.N), "ms/frame")
}
