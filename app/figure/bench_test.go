package figure

import (
	"bytes"
	"context"
	"testing"

	"quadtrace/app/volume"
	"quadtrace/compute/synth"
	"quadtrace/render"
)

// BenchmarkFigurePipeline times the pieces of `quadtrace figure` of one
// inline (1200x800, 800 traces of 751 samples, a generated survey) side
// by side in one run: build (read and compute the section, compose the
// figure), draw (render.Figure.Draw), encode-png (render.EncodePNG into
// memory) and all three in a row.
//
// Run: go test -run '^$' -bench FigurePipeline -benchtime 20x ./app/figure/
func BenchmarkFigurePipeline(b *testing.B) {
	ctx := context.Background()
	cfg := synth.DefaultConfig()
	cfg.Inlines, cfg.Crosslines = 4, 800
	v, err := volume.Demo(ctx, cfg, nil)
	if err != nil {
		b.Fatal(err)
	}
	defer v.Close()
	info := v.Info()
	r := Request{Orientation: volume.Inline, Inline: info.Inline.Min + info.Inline.Step, Attribute: "amplitude", Width: 1200, Height: 800, DPI: 100, Clip: 99}
	fig, err := Build(ctx, v, r)
	if err != nil {
		b.Fatal(err)
	}
	img, err := fig.Draw()
	if err != nil {
		b.Fatal(err)
	}
	var buf bytes.Buffer
	b.Run("build", func(b *testing.B) {
		for b.Loop() {
			if _, err := Build(ctx, v, r); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("draw", func(b *testing.B) {
		for b.Loop() {
			if _, err := fig.Draw(); err != nil {
				b.Fatal(err)
			}
		}
	})
	b.Run("encode-png", func(b *testing.B) {
		for b.Loop() {
			buf.Reset()
			if err := render.EncodePNG(&buf, img, r.DPI); err != nil {
				b.Fatal(err)
			}
		}
		b.ReportMetric(float64(buf.Len()), "bytes")
	})
	b.Run("all", func(b *testing.B) {
		for b.Loop() {
			img, err := Draw(ctx, v, r)
			if err != nil {
				b.Fatal(err)
			}
			buf.Reset()
			if err := render.EncodePNG(&buf, img, r.DPI); err != nil {
				b.Fatal(err)
			}
		}
	})
}
