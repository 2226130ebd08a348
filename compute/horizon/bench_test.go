package horizon_test

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"quadtrace/compute"
	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
	"quadtrace/segy/segytest"
)

// trackOptions are the options the benchmarks track with: every
// constraint on, so the analytic trace is computed.
var trackOptions = horizon.Options{Event: horizon.Peak, WindowMS: 4, MinCorrelation: 0.8, MaxPhaseJumpDeg: 30, MinEnvelope: 0.5}

// BenchmarkTrackDemo tracks the seafloor over the 150 x 200 demo survey
// from one seed.
func BenchmarkTrackDemo(b *testing.B) {
	s := demo(b, synth.DefaultConfig())
	src := source(b, s)
	seeds := seedsFor(s, surface(b, s, synth.SurfaceSeafloor), [2]int{75, 100})
	start := segytest.ProcessCPU()
	for b.Loop() {
		h, err := horizon.Track(context.Background(), src, seeds, trackOptions, nil)
		if err != nil || h.Picked() < 29000 {
			b.Fatal(err, h.Picked())
		}
	}
	reportCPU(b, start)
}

// BenchmarkTrackDemoInterference is BenchmarkTrackDemo with the
// interference rule on besides (MinSeparationMS at the tuning thickness of
// the demo's 40 Hz source wavelet, 9.7 ms): its cost is the search for
// events of the opposite polarity around each proposal.
func BenchmarkTrackDemoInterference(b *testing.B) {
	s := demo(b, synth.DefaultConfig())
	src := source(b, s)
	seeds := seedsFor(s, surface(b, s, synth.SurfaceSeafloor), [2]int{75, 100})
	opt := trackOptions
	opt.MinSeparationMS = horizon.TuningThicknessMS(synth.SourcePeakHz)
	start := segytest.ProcessCPU()
	for b.Loop() {
		h, err := horizon.Track(context.Background(), src, seeds, opt, nil)
		if err != nil || h.Picked() < 29000 {
			b.Fatal(err, h.Picked())
		}
	}
	reportCPU(b, start)
}

// reportCPU reports the process's CPU seconds per iteration since start:
// on a shared machine the wall time depends on the load, the CPU time
// much less; on two free cores the wall time lies between half of it and
// all of it.
func reportCPU(b *testing.B, start time.Duration) {
	if d := segytest.ProcessCPU() - start; d > 0 {
		b.ReportMetric(d.Seconds()/float64(b.N), "cpu-s/op")
	}
}

// layered returns a synthetic grid for speed runs only (invented data, not
// a reference): ni x nx traces of ns samples at 4 ms, six gently dipping,
// undulating reflectors convolved with a 30 Hz Ricker, plus 5 % noise. It
// returns the first reflector's time on trace (0, 0).
func layered(ni, nx, ns int) (*horizon.Traces, float64) {
	const dtMS = 4.0
	back := make([]float32, ni*nx*ns)
	data := make([][]float32, ni*nx)
	rng := rand.New(rand.NewPCG(1, 2))
	half := 12
	w := make([]float32, 2*half+1)
	for i := range w {
		w[i] = float32(ricker(float64(i-half)*dtMS/1000, 0, 30))
	}
	r := []float64{0.1, -0.07, 0.08, 0.06, -0.09, 0.07}
	for il := range ni {
		for xl := range nx {
			k := il*nx + xl
			tr := back[k*ns : (k+1)*ns : (k+1)*ns]
			u, v := float64(xl)/float64(nx), float64(il)/float64(ni)
			for j, rc := range r {
				tms := 60 + float64(j)*70 + 40*u + 25*v + 6*math.Sin(2*math.Pi*(2*u+float64(j)*0.3)+3*v)
				c := int(math.Round(tms / dtMS))
				for i, x := range w {
					if n := c + i - half; n >= 0 && n < ns {
						tr[n] += float32(rc) * x
					}
				}
			}
			for i := range tr {
				tr[i] += float32(0.005 * rng.NormFloat64())
			}
			data[k] = tr
		}
	}
	src, err := horizon.NewTraces(data, ni, nx, dtMS/1000, 0)
	if err != nil {
		panic(err)
	}
	return src, 60 + 6*math.Sin(0)
}

// BenchmarkTrack1000x1000 tracks one horizon over a 1000 x 1000 grid of
// 128-sample traces (512 MB in memory) from one seed in a corner.
func BenchmarkTrack1000x1000(b *testing.B) {
	src, t0 := layered(1000, 1000, 128)
	seeds := []horizon.Seed{{Inline: 0, Crossline: 0, TimeMS: t0}}
	start := segytest.ProcessCPU()
	for b.Loop() {
		h, err := horizon.Track(context.Background(), src, seeds, trackOptions, nil)
		if err != nil || h.Picked() < 990000 {
			b.Fatal(err, h.Picked())
		}
	}
	reportCPU(b, start)
}

// BenchmarkMapDemo maps the demo's envelope along its tracked seafloor:
// the value on the horizon, and the RMS over 20 ms around it.
func BenchmarkMapDemo(b *testing.B) {
	s := demo(b, synth.DefaultConfig())
	h, err := horizon.Track(context.Background(), source(b, s), seedsFor(s, surface(b, s, synth.SurfaceSeafloor), [2]int{75, 100}), trackOptions, nil)
	if err != nil {
		b.Fatal(err)
	}
	env := envelopeVolume(b, s)
	src, err := horizon.NewTraces(env.Traces, 150, 200, env.DT, 0)
	if err != nil {
		b.Fatal(err)
	}
	for _, spec := range []horizon.MapSpec{{Stat: horizon.Value}, {Stat: horizon.RMS, FromMS: -10, ToMS: 10}} {
		b.Run(spec.Stat.String(), func(b *testing.B) {
			start := segytest.ProcessCPU()
			for b.Loop() {
				if _, err := horizon.Map(context.Background(), src, h, spec, nil); err != nil {
					b.Fatal(err)
				}
			}
			reportCPU(b, start)
		})
	}
}

// BenchmarkSlabDemo measures what the window's map waits for on the
// 150 x 200 demo survey with its seafloor tracked, from a slab read once
// with the margin the default windowed attributes need (84 ms: SlabMarginMS
// of sweetness's 40 ms window), 30 ms or 50 ms above and below the horizon
// (stretches of 117 and 137 samples at 2 ms: FFTs of 128 and 256):
// "attribute/ID" is an attribute change (the attribute on the slab's
// stretches, then the RMS map over -20..+20 ms), "stat" a change of
// statistic or window (the map alone), and "whole-trace/ID" the same
// attribute change done on whole traces (compute's attribute of the whole
// survey, then horizon.Map: what horizonjob.MapAttribute does, inline by
// inline). The target for an attribute change is under 100 ms.
func BenchmarkSlabDemo(b *testing.B) {
	s := demo(b, synth.DefaultConfig())
	src := source(b, s)
	h, err := horizon.Track(context.Background(), src, seedsFor(s, surface(b, s, synth.SurfaceSeafloor), [2]int{75, 100}), trackOptions, nil)
	if err != nil {
		b.Fatal(err)
	}
	ctx := context.Background()
	lookup := func(id string) (*compute.Attribute, compute.Params) {
		a, err := compute.Lookup(id)
		if err != nil {
			b.Fatal(err)
		}
		p, err := a.Resolve(nil)
		if err != nil {
			b.Fatal(err)
		}
		return a, p
	}
	sweet, sp := lookup("sweetness")
	spec := horizon.MapSpec{Stat: horizon.RMS, FromMS: -20, ToMS: 20}
	ids := []string{"envelope", "instantaneous-frequency", "sweetness"}
	for _, half := range []float64{30, 50} {
		slab, err := horizon.NewSlab(ctx, src, h, horizon.SlabSpec{AboveMS: half, BelowMS: half, MarginMS: horizon.SlabMarginMS(sweet, sp)}, nil)
		if err != nil {
			b.Fatal(err)
		}
		b.Logf("slab of +-%g ms on %d traces: %.1f MB", half, h.Picked(), float64(slab.Bytes())/1e6)
		for _, id := range ids {
			a, p := lookup(id)
			b.Run(fmt.Sprintf("%gms/attribute/%s", half, id), func(b *testing.B) {
				start := segytest.ProcessCPU()
				for b.Loop() {
					as, err := slab.Attribute(ctx, a, p)
					if err != nil {
						b.Fatal(err)
					}
					if _, err := as.Map(spec); err != nil {
						b.Fatal(err)
					}
				}
				reportCPU(b, start)
			})
		}
		a, p := lookup("envelope")
		as, err := slab.Attribute(ctx, a, p)
		if err != nil {
			b.Fatal(err)
		}
		b.Run(fmt.Sprintf("%gms/stat", half), func(b *testing.B) {
			start := segytest.ProcessCPU()
			for b.Loop() {
				if _, err := as.Map(horizon.MapSpec{Stat: horizon.MaxAbs, FromMS: -30, ToMS: 10}); err != nil {
					b.Fatal(err)
				}
			}
			reportCPU(b, start)
		})
	}
	for _, id := range ids {
		a, p := lookup(id)
		b.Run("whole-trace/"+id, func(b *testing.B) {
			start := segytest.ProcessCPU()
			for b.Loop() {
				attr, err := a.Compute(ctx, compute.Section{Traces: s.Traces, DT: s.IntervalMS() / 1000}, p, nil)
				if err != nil {
					b.Fatal(err)
				}
				asrc, err := horizon.NewTraces(attr.Traces, 150, 200, attr.DT, 0)
				if err != nil {
					b.Fatal(err)
				}
				if _, err := horizon.Map(ctx, asrc, h, spec, nil); err != nil {
					b.Fatal(err)
				}
			}
			reportCPU(b, start)
		})
	}
}
