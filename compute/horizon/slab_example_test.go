package horizon_test

import (
	"context"
	"fmt"

	"quadtrace/compute"
	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
)

// How a map view uses a slab: read it once per horizon (in a background
// job: it reads every picked trace), compute an attribute on it when the
// attribute changes (in a background job too: tens of milliseconds on the
// demo), and make the map from the attribute slab when the statistic or
// window changes (a few milliseconds; it reads no trace). Build the slab
// with the largest window the view offers and the margin of the most
// demanding attribute offered (SlabMarginMS); Attribute says when the
// margin is too short, Map when the window is too wide, and the view then
// builds a new slab (or maps whole traces with horizonjob.MapAttribute).
func ExampleNewSlab() {
	ctx := context.Background()
	cfg := synth.DefaultConfig()
	cfg.Inlines, cfg.Crosslines = 20, 30
	s, _ := synth.Generate(ctx, cfg, nil)
	src, _ := horizon.NewTraces(s.Traces, cfg.Inlines, cfg.Crosslines, s.IntervalMS()/1000, 0)
	sea, _ := s.Surface(synth.SurfaceSeafloor)
	seed := horizon.Seed{Inline: 10, Crossline: 15, TimeMS: float64(sea.PeakMS[10*cfg.Crosslines+15])}
	h, _ := horizon.Track(ctx, src, []horizon.Seed{seed}, horizon.Options{Event: horizon.Peak, WindowMS: 4}, nil)

	sweetness, _ := compute.Lookup("sweetness")
	sp, _ := sweetness.Resolve(nil)
	slab, err := horizon.NewSlab(ctx, src, h, horizon.SlabSpec{AboveMS: 30, BelowMS: 30, MarginMS: horizon.SlabMarginMS(sweetness, sp)}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	envelope, _ := compute.Lookup("envelope")
	ep, _ := envelope.Resolve(nil)
	env, _ := slab.Attribute(ctx, envelope, ep) // the attribute changed
	rms, _ := env.Map(horizon.MapSpec{Stat: horizon.RMS, FromMS: -10, ToMS: 20})
	peak, _ := env.Map(horizon.MapSpec{Stat: horizon.MaxAbs, FromMS: 0, ToMS: 30}) // the statistic changed
	_, err = env.Map(horizon.MapSpec{Stat: horizon.RMS, FromMS: -40, ToMS: 0})     // wider than the slab
	fmt.Println(len(rms.Values), len(peak.Values), err != nil)
	// Output: 600 600 true
}
