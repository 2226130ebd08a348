package horizon_test

import (
	"context"
	"testing"

	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
)

// BenchmarkTrackDemo tracks the seafloor of the 150 x 200 demo survey
// from one seed with all constraints on.
func BenchmarkTrackDemo(b *testing.B) {
	s := demo(b, synth.DefaultConfig())
	src := source(b, s)
	f := surface(b, s, synth.SurfaceSeafloor)
	nx := s.Config.Crosslines
	seed := horizon.Seed{Inline: 75, Crossline: 100, TimeMS: float64(f.TimesMS[75*nx+100])}
	opt := horizon.Options{Event: horizon.Peak, WindowMS: 6, MinCorrelation: 0.8, MaxPhaseJumpDeg: 30, MinEnvelope: 0.5}
	b.ResetTimer()
	for b.Loop() {
		if _, err := horizon.Track(context.Background(), src, []horizon.Seed{seed}, opt, nil); err != nil {
			b.Fatal(err)
		}
	}
}
