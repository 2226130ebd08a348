package viewer

import (
	"context"
	"math"
	"math/rand"
	"testing"

	"quadtrace/compute/horizon"
)

// stripCase is a grid of random traces with a horizon (and a deeper base)
// that runs off the top and the bottom of the traces in places and is empty
// in others.
func stripCase(t *testing.T) (horizon.Grid, [][]float32, *horizon.Horizon, *horizon.Horizon) {
	t.Helper()
	rng := rand.New(rand.NewSource(7))
	g := horizon.Grid{Inlines: 9, Crosslines: 11, Samples: 120, DT: 0.004, T0: 0.1}
	data := make([][]float32, g.Inlines*g.Crosslines)
	for k := range data {
		data[k] = make([]float32, g.Samples)
		for j := range data[k] {
			data[k][j] = float32(rng.NormFloat64())
		}
		if k%17 == 3 {
			data[k][60] = float32(math.NaN()) // a gap inside the trace
		}
	}
	top, base := horizon.New(g.Inlines, g.Crosslines), horizon.New(g.Inlines, g.Crosslines)
	for k := range top.TimeMS {
		if k%7 == 0 {
			continue // empty
		}
		// From above the first sample (100 ms) to below the last (576 ms).
		tt := 60 + rng.Float64()*540
		top.TimeMS[k], top.State[k], top.Quality[k] = tt, horizon.Tracked, 1
		if k%5 != 0 {
			base.TimeMS[k], base.State[k], base.Quality[k] = tt+rng.Float64()*80, horizon.Tracked, 1
		}
	}
	return g, data, top, base
}

// A map made from the kept strips equals horizon.Map over the whole traces
// (compute/horizon's own map, checked there against numpy), for every
// statistic, windows above, around and below the horizon and between two
// horizons, including traces where the window leaves the trace.
func TestStripsMapLikeWholeTraces(t *testing.T) {
	g, data, top, base := stripCase(t)
	whole, err := horizon.NewTraces(data, g.Inlines, g.Crosslines, g.DT, g.T0)
	if err != nil {
		t.Fatal(err)
	}
	read := func(_ context.Context, il int) ([][]float32, error) {
		return data[il*g.Crosslines : (il+1)*g.Crosslines], nil
	}
	ctx := context.Background()
	for _, b := range []*horizon.Horizon{nil, base} {
		strips, err := computeStrips(ctx, g, "k", top, b, -12, 20, read, nil)
		if err != nil {
			t.Fatal(err)
		}
		for _, w := range [][2]float64{{-12, 20}, {-40, 0}, {0, 40}, {8, 30}, {-3.3, 7.9}, {0, 0}} {
			for stat := horizon.Value; stat <= horizon.MinAbs; stat++ {
				spec := horizon.MapSpec{Stat: stat, FromMS: w[0], ToMS: w[1], Base: b}
				if stat == horizon.Value {
					spec = horizon.MapSpec{Stat: stat}
					if b != nil {
						continue
					}
				}
				if !strips.serves("k", top, spec) {
					t.Fatalf("strips kept for -12..20 ms do not serve %v %v", stat, w)
				}
				got, err := strips.mapOf(ctx, spec)
				if err != nil {
					t.Fatal(err)
				}
				want, err := horizon.Map(ctx, whole, top, spec, nil)
				if err != nil {
					t.Fatal(err)
				}
				for k := range want.Values {
					a, e := float64(got.Values[k]), float64(want.Values[k])
					if math.IsNaN(a) != math.IsNaN(e) || !math.IsNaN(e) && math.Abs(a-e) > 1e-6*math.Max(1, math.Abs(e)) {
						t.Fatalf("base %v, %v over %v: trace %d (time %v) maps %v from the strips, %v from the whole trace", b != nil, stat, w, k, top.TimeMS[k], a, e)
					}
				}
			}
		}
		if strips.serves("k", top, horizon.MapSpec{Stat: horizon.RMS, FromMS: -60, ToMS: 0, Base: b}) {
			t.Errorf("strips kept for -40..40 ms claim to serve a window from -60 ms")
		}
		if strips.serves("other", top, horizon.MapSpec{Stat: horizon.Value}) {
			t.Errorf("strips serve another attribute")
		}
	}
}

// Cancelling stops the strips' computation with the context's error.
func TestStripsCancel(t *testing.T) {
	g, data, top, _ := stripCase(t)
	ctx, cancel := context.WithCancel(context.Background())
	read := func(_ context.Context, il int) ([][]float32, error) {
		if il == 3 {
			cancel()
		}
		return data[il*g.Crosslines : (il+1)*g.Crosslines], nil
	}
	if _, err := computeStrips(ctx, g, "k", top, nil, 0, 0, read, nil); err != context.Canceled {
		t.Fatalf("cancelled computation: %v", err)
	}
}
