package viewer

import (
	"context"
	"fmt"
	"testing"

	"quadtrace/app/volume"
	"quadtrace/compute/synth"
)

// BenchmarkSwitchAttribute measures what the window does when the user picks
// another attribute on a 1000-trace x 1500-sample inline: compute the new
// attribute section (the amplitude is already in memory) and render it at
// the size of the section view in a 1440 x 900 window (1066 x 600 pixels),
// alone and co-rendered over the amplitude. It runs the viewer's own
// fetchData and renderSection, as the background jobs do. Goal: under
// 100 ms per switch.
//
//	go test -run '^$' -bench SwitchAttribute -benchtime 20x ./app/viewer
func BenchmarkSwitchAttribute(b *testing.B) {
	cfg := synth.DefaultConfig()
	cfg.Inlines, cfg.Crosslines, cfg.Samples = 4, 1000, 1500
	vol, err := volume.Demo(context.Background(), cfg, nil)
	if err != nil {
		b.Fatal(err)
	}
	defer vol.Close()
	const width, height = 1066, 600
	for _, c := range []struct {
		coRender, flipBack bool
	}{{false, false}, {true, false}, {true, true}} {
		coRender := c.coRender
		name := fmt.Sprintf("corender=%v", coRender)
		if c.flipBack {
			name += "/flip-back"
		}
		b.Run(name, func(b *testing.B) {
			ctx := context.Background()
			st := newViewState(vol.Info())
			st.AttributeID, st.CoRender = amplitudeID, false
			amp, err := fetchData(ctx, vol, dataRequestFor(&st), shown{}, nil, nil)
			if err != nil {
				b.Fatal(err)
			}
			if n := len(amp.amp.Traces); n != 1000 || len(amp.amp.Traces[0]) != 1500 {
				b.Fatalf("section is %d x %d, want 1000 x 1500", n, len(amp.amp.Traces[0]))
			}
			// The amplitude's display range is known from before the switch.
			ranges := renderSection(renderRequest{state: st, plan: st.plan(), data: amp, width: width, height: height}, st.paletteFor(lookup(amplitudeID), false), nil).newRanges
			st.CoRender = coRender
			ids := []string{"envelope", "instantaneous-frequency"}
			n, m := len(amp.amp.Traces), len(amp.amp.Traces[0])
			st.fit(n, m)
			// flip-back: both attributes were shown a moment ago and sit
			// in the viewer's section cache; only the render remains.
			var cached map[string]*volume.Section
			if c.flipBack {
				cache := newSectionCache(sectionCacheBytes)
				for _, id := range ids {
					st.AttributeID = id
					d, err := fetchData(ctx, vol, dataRequestFor(&st), amp, nil, nil)
					if err != nil {
						b.Fatal(err)
					}
					cache.put(d.overKey, d.over)
					for k, r := range renderSection(renderRequest{state: st, plan: st.plan(), data: d, ranges: ranges, width: width, height: height}, st.paletteFor(lookup(amplitudeID), false), st.paletteFor(lookup(id), true)).newRanges {
						ranges[k] = r
					}
				}
				cached = cache.snapshot()
			}
			b.ResetTimer()
			for i := 0; b.Loop(); i++ {
				st.AttributeID = ids[i%len(ids)]
				req := dataRequestFor(&st)
				d, err := fetchData(ctx, vol, req, amp, cached, nil)
				if err != nil {
					b.Fatal(err)
				}
				pl := st.plan()
				var ovPal = st.paletteFor(pl.Base, false)
				if pl.Overlay != nil {
					ovPal = st.paletteFor(pl.Overlay, true)
				}
				res := renderSection(renderRequest{state: st, plan: pl, data: d, ranges: ranges, width: width, height: height}, st.paletteFor(pl.Base, false), ovPal)
				if res.img.Bounds().Dx() != width {
					b.Fatal("wrong image size")
				}
			}
		})
	}
}
