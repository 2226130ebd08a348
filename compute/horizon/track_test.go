package horizon_test

import (
	"context"
	"errors"
	"math"
	"runtime"
	"strings"
	"sync"
	"testing"

	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
)

// smallDemo returns a small demo survey for the behaviour tests.
func smallDemo(t testing.TB) *synth.Survey {
	cfg := synth.DefaultConfig()
	cfg.Inlines, cfg.Crosslines, cfg.Samples = 30, 40, 300
	return demo(t, cfg)
}

// The same seeds and options give the same horizon with one worker and
// with several (the batches are taken in a fixed order).
func TestTrackingDoesNotDependOnWorkers(t *testing.T) {
	s := smallDemo(t)
	f := surface(t, s, synth.SurfaceSeafloor)
	opt := horizon.Options{Event: horizon.Peak, WindowMS: 4, MinCorrelation: 0.9, MaxPhaseJumpDeg: 30, MinEnvelope: 0.5}
	seeds := seedsFor(s, f, [2]int{3, 4}, [2]int{25, 30})
	var got []*horizon.Horizon
	for _, procs := range []int{1, 4} {
		old := runtime.GOMAXPROCS(procs)
		h, err := horizon.Track(context.Background(), source(t, s), seeds, opt, nil)
		runtime.GOMAXPROCS(old)
		if err != nil {
			t.Fatal(err)
		}
		got = append(got, h)
	}
	for k := range got[0].State {
		a, b := got[0], got[1]
		if a.State[k] != b.State[k] || !(a.TimeMS[k] == b.TimeMS[k] || math.IsNaN(a.TimeMS[k]) && math.IsNaN(b.TimeMS[k])) {
			t.Fatalf("trace %d: %v %v with one worker, %v %v with four", k, a.State[k], a.TimeMS[k], b.State[k], b.TimeMS[k])
		}
	}
	if n := got[0].Picked(); n < len(got[0].State)*9/10 {
		t.Errorf("only %d of %d traces picked", n, len(got[0].State))
	}
	if got[0].State[3*40+4] != horizon.Seeded || got[0].Quality[3*40+4] != 1 {
		t.Errorf("seed trace: %v quality %v", got[0].State[3*40+4], got[0].Quality[3*40+4])
	}
}

// Progress rises to the number of traces and ends there; cancelling stops
// the run with the context's error.
func TestTrackingProgressAndCancel(t *testing.T) {
	s := smallDemo(t)
	f := surface(t, s, synth.SurfaceSeafloor)
	opt := horizon.Options{Event: horizon.Peak, WindowMS: 4, MinCorrelation: 0.5}
	seeds := seedsFor(s, f, [2]int{15, 20})
	var calls [][2]int
	if _, err := horizon.Track(context.Background(), source(t, s), seeds, opt, func(done, total int) {
		calls = append(calls, [2]int{done, total})
	}); err != nil {
		t.Fatal(err)
	}
	if len(calls) < 2 || calls[len(calls)-1] != [2]int{1200, 1200} {
		t.Fatalf("progress calls %v, want several ending with 1200 of 1200", calls)
	}
	for i := 1; i < len(calls); i++ {
		if calls[i][0] < calls[i-1][0] {
			t.Errorf("progress went back: %v", calls)
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	n := 0
	_, err := horizon.Track(ctx, source(t, s), seeds, opt, func(done, total int) {
		if n++; n == 2 {
			cancel()
		}
	})
	if !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled mid-run: %v, want context.Canceled", err)
	}
	_, err = horizon.Track(ctx, source(t, s), seeds, opt, nil)
	if !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled before: %v, want context.Canceled", err)
	}
}

// Bad options and seeds are refused with errors that say what is wrong.
func TestTrackingRefusals(t *testing.T) {
	s := smallDemo(t)
	src := source(t, s)
	f := surface(t, s, synth.SurfaceSeafloor)
	good := horizon.Options{Event: horizon.Peak, WindowMS: 4}
	seeds := seedsFor(s, f, [2]int{15, 20})
	with := func(change func(*horizon.Options)) horizon.Options { o := good; change(&o); return o }
	for _, tc := range []struct {
		name  string
		opt   horizon.Options
		seeds []horizon.Seed
		want  string
	}{
		{"no event", with(func(o *horizon.Options) { o.Event = 0 }), seeds, "no event"},
		{"no window", with(func(o *horizon.Options) { o.WindowMS = 0 }), seeds, "search window 0 ms"},
		{"NaN window", with(func(o *horizon.Options) { o.WindowMS = math.NaN() }), seeds, "search window NaN ms"},
		{"tiny window", with(func(o *horizon.Options) { o.WindowMS = 0.5 }), seeds, "less than half"},
		{"negative phase", with(func(o *horizon.Options) { o.MaxPhaseJumpDeg = -1 }), seeds, "phase jump"},
		{"NaN envelope", with(func(o *horizon.Options) { o.MinEnvelope = math.NaN() }), seeds, "envelope"},
		{"correlation above one", with(func(o *horizon.Options) { o.MinCorrelation = 1.5 }), seeds, "correlation 1.5"},
		{"negative radius", with(func(o *horizon.Options) { o.LevelRadius = -2 }), seeds, "level radius"},
		{"negative correlation window", with(func(o *horizon.Options) { o.CorrelationMS = -3 }), seeds, "correlation window"},
		{"negative separation", with(func(o *horizon.Options) { o.MinSeparationMS = -1 }), seeds, "minimum separation -1 ms"},
		{"infinite separation", with(func(o *horizon.Options) { o.MinSeparationMS = math.Inf(1) }), seeds, "minimum separation"},
		{"separation on a zero crossing", with(func(o *horizon.Options) { o.Event, o.MinSeparationMS = horizon.ZeroRising, 10 }), seeds, "peak and trough events, not zero-rising"},
		{"no seeds", good, nil, "no seed"},
		{"seed off the grid", good, []horizon.Seed{{Inline: 30, Crossline: 0, TimeMS: 100}}, "seed 1 at grid index (30, 0): outside"},
		{"negative seed", good, []horizon.Seed{{Inline: 0, Crossline: -1, TimeMS: 100}}, "outside"},
		{"two seeds on a trace", good, append(seeds, seeds[0]), "seed 2 at grid index (15, 20): a seed on that trace already"},
		{"seed below the record", good, []horizon.Seed{{Inline: 1, Crossline: 1, TimeMS: 1e6}}, "no peak"},
		{"seed NaN time", good, []horizon.Seed{{Inline: 1, Crossline: 1, TimeMS: math.NaN()}}, "no peak"},
	} {
		_, err := horizon.Track(context.Background(), src, tc.seeds, tc.opt, nil)
		if err == nil || !strings.Contains(err.Error(), tc.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: %v, want a one-line error saying %q", tc.name, err, tc.want)
		}
	}
}

// gappy is a Source whose traces are NaN in places, and fails on one
// trace.
type gappy struct {
	*horizon.Traces
	failAt [2]int
}

func (g gappy) Trace(il, xl int, buf []float32) ([]float32, error) {
	if [2]int{il, xl} == g.failAt {
		return nil, errors.New("trace unreadable: byte 1234")
	}
	return g.Traces.Trace(il, xl, buf)
}

// Dead traces (all NaN) and gaps stay empty without stopping the run; a
// source error ends it with that error.
func TestTrackingAroundGapsAndErrors(t *testing.T) {
	s := smallDemo(t)
	f := surface(t, s, synth.SurfaceSeafloor)
	traces := make([][]float32, len(s.Traces))
	for k, tr := range s.Traces {
		traces[k] = append([]float32(nil), tr...)
	}
	nan := float32(math.NaN())
	dead := 10*40 + 10
	for j := range traces[dead] {
		traces[dead][j] = nan
	}
	gap := 10*40 + 12
	at := int(f.PeakMS[gap] / 2)
	for j := at - 3; j <= at+3; j++ {
		traces[gap][j] = nan
	}
	src, err := horizon.NewTraces(traces, 30, 40, s.IntervalMS()/1000, 0)
	if err != nil {
		t.Fatal(err)
	}
	opt := horizon.Options{Event: horizon.Peak, WindowMS: 4, MinCorrelation: 0.8, MaxPhaseJumpDeg: 30, MinEnvelope: 0.5}
	seeds := seedsFor(s, f, [2]int{2, 2})
	h, err := horizon.Track(context.Background(), gappy{Traces: src, failAt: [2]int{-1, -1}}, seeds, opt, nil)
	if err != nil {
		t.Fatal(err)
	}
	if h.State[dead] != horizon.Empty || h.State[gap] != horizon.Empty {
		t.Errorf("dead trace %v, gap trace %v: want both empty", h.State[dead], h.State[gap])
	}
	if h.Picked() < 1200-10 {
		t.Errorf("%d traces picked, want all but the gaps", h.Picked())
	}
	_, err = horizon.Track(context.Background(), gappy{Traces: src, failAt: [2]int{20, 20}}, seeds, opt, nil)
	if err == nil || !strings.Contains(err.Error(), "byte 1234") {
		t.Errorf("source error: %v", err)
	}
}

// Tiny grids and short traces track without trouble.
func TestTrackingTinyGrids(t *testing.T) {
	peak := []float32{0, 0.5, 1, 0.5, 0}
	for _, g := range [][2]int{{1, 1}, {1, 5}, {5, 1}, {2, 2}} {
		data := make([][]float32, g[0]*g[1])
		for k := range data {
			data[k] = peak
		}
		src, err := horizon.NewTraces(data, g[0], g[1], 0.004, 0)
		if err != nil {
			t.Fatal(err)
		}
		h, err := horizon.Track(context.Background(), src, []horizon.Seed{{TimeMS: 8}}, horizon.Options{Event: horizon.Peak, WindowMS: 4, MaxPhaseJumpDeg: 10, MinEnvelope: 0.9, MinCorrelation: 0.9}, nil)
		if err != nil {
			t.Fatalf("%v: %v", g, err)
		}
		if h.Picked() != len(data) {
			t.Errorf("%v: %d of %d picked", g, h.Picked(), len(data))
		}
		for k, v := range h.TimeMS {
			if math.Abs(v-8) > 1e-9 {
				t.Errorf("%v: trace %d at %v ms, want 8", g, k, v)
			}
		}
	}
	flat, err := horizon.NewTraces([][]float32{make([]float32, 50)}, 1, 1, 0.004, 0)
	if err != nil {
		t.Fatal(err)
	}
	_, err = horizon.Track(context.Background(), flat, []horizon.Seed{{TimeMS: 20}}, horizon.Options{Event: horizon.Trough, WindowMS: 4}, nil)
	if err == nil || err.Error() != "tracking: seed 1 at grid index (0, 0): no trough within 4 ms of 20 ms" {
		t.Errorf("seed on a flat trace: %v", err)
	}
	if _, err := horizon.NewTraces([][]float32{{1, 2}}, 1, 1, 0.004, 0); err == nil {
		t.Error("a grid of two-sample traces was accepted")
	}
	if _, err := horizon.NewTraces([][]float32{{1, 2, 3}, {1, 2}}, 1, 2, 0.004, 0); err == nil {
		t.Error("traces of two lengths were accepted")
	}
}

// Tracks run at once from several goroutines on one source do not
// disturb each other (run with -race).
func TestConcurrentTracks(t *testing.T) {
	s := smallDemo(t)
	src := source(t, s)
	f := surface(t, s, synth.SurfaceSeafloor)
	opt := horizon.Options{Event: horizon.Peak, WindowMS: 4, MinCorrelation: 0.9, MinEnvelope: 0.5}
	want, err := horizon.Track(context.Background(), src, seedsFor(s, f, [2]int{5, 5}), opt, nil)
	if err != nil {
		t.Fatal(err)
	}
	var wg sync.WaitGroup
	for range 3 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			h, err := horizon.Track(context.Background(), src, seedsFor(s, f, [2]int{5, 5}), opt, nil)
			if err != nil || h.Picked() != want.Picked() {
				t.Errorf("concurrent track: %v, %d picked, want %d", err, h.Picked(), want.Picked())
			}
		}()
	}
	wg.Wait()
}
