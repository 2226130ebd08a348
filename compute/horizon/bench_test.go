package horizon_test

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
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
	start := cpuTime()
	for b.Loop() {
		h, err := horizon.Track(context.Background(), src, seeds, trackOptions, nil)
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
	if d := cpuTime() - start; d > 0 {
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
	start := cpuTime()
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
			start := cpuTime()
			for b.Loop() {
				if _, err := horizon.Map(context.Background(), src, h, spec, nil); err != nil {
					b.Fatal(err)
				}
			}
			reportCPU(b, start)
		})
	}
}
