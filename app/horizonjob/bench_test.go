package horizonjob

import (
	"context"
	"testing"

	"quadtrace/compute"
	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
)

// BenchmarkMapAttributeDemo maps the envelope's RMS over 20 ms along the
// demo's tracked seafloor, computing the envelope inline by inline from
// the amplitude traces (what `quadtrace map` does); compare with
// compute/horizon's BenchmarkMapDemo, which maps from an envelope volume
// already computed.
func BenchmarkMapAttributeDemo(b *testing.B) {
	s, err := synth.Generate(context.Background(), synth.DefaultConfig(), nil)
	if err != nil {
		b.Fatal(err)
	}
	src, _, err := SurveySource(s)
	if err != nil {
		b.Fatal(err)
	}
	sf, _ := s.Surface(synth.SurfaceSeafloor)
	h, err := horizon.Track(context.Background(), src, []horizon.Seed{{Inline: 75, Crossline: 100, TimeMS: float64(sf.PeakMS[75*200+100])}}, horizon.Options{Event: horizon.Peak, WindowMS: 4}, nil)
	if err != nil {
		b.Fatal(err)
	}
	a, _ := compute.Lookup("envelope")
	p, _ := a.Resolve(nil)
	spec := horizon.MapSpec{Stat: horizon.RMS, FromMS: -10, ToMS: 10}
	for b.Loop() {
		if _, err := MapAttribute(context.Background(), src, h, a, p, spec, nil); err != nil {
			b.Fatal(err)
		}
	}
}
