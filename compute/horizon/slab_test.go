package horizon_test

import (
	"context"
	"errors"
	"math"
	"strings"
	"sync"
	"testing"

	"quadtrace/compute"
	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
)

// slabDemo returns a 40 x 50 demo survey (the full record length) and its
// tracked seafloor and reservoir top.
func slabDemo(t testing.TB) (*synth.Survey, *horizon.Traces, []*horizon.Horizon) {
	t.Helper()
	cfg := synth.DefaultConfig()
	cfg.Inlines, cfg.Crosslines = 40, 50
	s := demo(t, cfg)
	src := source(t, s)
	var hs []*horizon.Horizon
	for _, name := range []string{synth.SurfaceSeafloor, synth.SurfaceReservoirTop} {
		f := surface(t, s, name)
		h, err := horizon.Track(context.Background(), src, seedsFor(s, f, [2]int{5, 5}, [2]int{5, 45}),
			horizon.Options{Event: eventOf(f), WindowMS: 3, MinCorrelation: 0.9, CorrelationMS: 48}, nil)
		if err != nil {
			t.Fatal(err)
		}
		hs = append(hs, h)
	}
	return s, src, hs
}

// Maps from a horizon slab agree with maps from the attribute of whole
// traces (horizon.Map over compute's attribute of the whole section, the
// reference the slab is an optimisation of), for every registered
// attribute with its default parameters, on the demo's seafloor and
// reservoir top, for the value on the horizon and the RMS and mean over
// -20..+20 ms. On at least 99 % of the traces the difference is at most
// 2 % of the attribute's size there (the largest absolute value of the
// whole-trace attribute within 20 ms of the horizon; 180 degrees for
// phases, whose differences are wrapped): the tracker's tolerance for its
// analytic stretches (TestAnalyticStretchMatchesWholeTrace). The few
// traces beyond lie where the envelope nearly vanishes (the water above
// the seafloor), where instantaneous phase and frequency and the lobes of
// the response attributes are ill-defined (Barnes 1992, "The calculation
// of instantaneous frequency and instantaneous bandwidth", Geophysics 57:
// spikes at envelope minima): at most 15 of 2000 measured. The maps are
// empty on the same traces, and for the amplitude itself (no transform)
// they are identical.
func TestSlabMatchesWholeTraces(t *testing.T) {
	s, src, hs := slabDemo(t)
	whole := compute.Section{Traces: s.Traces, DT: s.IntervalMS() / 1000}
	specs := []horizon.MapSpec{{Stat: horizon.Value}, {Stat: horizon.RMS, FromMS: -20, ToMS: 20}, {Stat: horizon.Mean, FromMS: -20, ToMS: 20}}
	for _, a := range compute.Attributes() {
		p, err := a.Resolve(nil)
		if err != nil {
			t.Fatal(err)
		}
		ref, err := a.Compute(context.Background(), whole, p, nil)
		if err != nil {
			t.Fatal(err)
		}
		refSrc, err := horizon.NewTraces(ref.Traces, s.Config.Inlines, s.Config.Crosslines, whole.DT, 0)
		if err != nil {
			t.Fatal(err)
		}
		for hi, h := range hs {
			slab, err := horizon.NewSlab(context.Background(), src, h, horizon.SlabSpec{AboveMS: 25, BelowMS: 25, MarginMS: horizon.SlabMarginMS(a, p)}, nil)
			if err != nil {
				t.Fatal(err)
			}
			as, err := slab.Attribute(context.Background(), a, p)
			if err != nil {
				t.Fatalf("%s: %v", a.ID, err)
			}
			size, err := horizon.Map(context.Background(), refSrc, h, horizon.MapSpec{Stat: horizon.MaxAbs, FromMS: -20, ToMS: 20}, nil)
			if err != nil {
				t.Fatal(err)
			}
			for _, spec := range specs {
				want, err := horizon.Map(context.Background(), refSrc, h, spec, nil)
				if err != nil {
					t.Fatal(err)
				}
				got, err := as.Map(spec)
				if err != nil {
					t.Fatalf("%s: %v", a.ID, err)
				}
				scale := 180.0
				if a.Kind != compute.Cyclic {
					scale = 0
					for _, v := range size.Values {
						if !math.IsNaN(float64(v)) {
							scale = math.Max(scale, float64(v))
						}
					}
				}
				worst, mismatch, beyond, n := 0.0, 0, 0, 0
				for k := range want.Values {
					w, g := float64(want.Values[k]), float64(got.Values[k])
					if math.IsNaN(w) != math.IsNaN(g) {
						mismatch++
						continue
					}
					if math.IsNaN(w) {
						continue
					}
					d := math.Abs(g - w)
					if a.Kind == compute.Cyclic && spec.Stat == horizon.Value {
						d = math.Abs(math.Remainder(g-w, 360))
					}
					worst = math.Max(worst, d)
					n++
					if d > 0.02*scale {
						beyond++
					}
				}
				t.Logf("%-32s horizon %d %-8v worst %.3g (%.2f %% of %.3g), %d of %d traces beyond 2 %%", a.ID, hi, spec.Stat, worst, 100*worst/scale, scale, beyond, n)
				if mismatch > 0 || beyond > n/100 || n < 1000 {
					t.Errorf("%s, horizon %d, %v: %d traces empty on one map only; %d of %d traces differ by more than 2 %% of %.3g (want at most 1 %%), worst %.3g",
						a.ID, hi, spec.Stat, mismatch, beyond, n, scale, worst)
				}
				if a.ID == "amplitude" && worst != 0 {
					t.Errorf("amplitude, horizon %d, %v: the slab's map differs from the whole traces' by up to %g", hi, spec.Stat, worst)
				}
			}
		}
	}
}

// A slab refuses what it cannot answer, with a one-line error: a window
// beyond its own (relative, or down to a base horizon), an attribute whose
// reach is longer than its margin, bad windows and margins, and a horizon
// on another grid.
func TestSlabRefusals(t *testing.T) {
	_, src, hs := slabDemo(t)
	ctx := context.Background()
	slab, err := horizon.NewSlab(ctx, src, hs[0], horizon.SlabSpec{AboveMS: 10, BelowMS: 30}, nil)
	if err != nil {
		t.Fatal(err)
	}
	env, _ := compute.Lookup("envelope")
	pe, _ := env.Resolve(nil)
	as, err := slab.Attribute(ctx, env, pe)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := as.Map(horizon.MapSpec{Stat: horizon.RMS, FromMS: -10, ToMS: 30}); err != nil {
		t.Errorf("the slab's own window: %v", err)
	}
	agc, _ := compute.Lookup("agc")
	pa, _ := agc.Resolve(nil)
	other := horizon.New(3, 3)
	for _, tc := range []struct {
		name string
		err  func() error
		want string
	}{
		{"window above the slab", func() error { _, err := as.Map(horizon.MapSpec{Stat: horizon.RMS, FromMS: -11, ToMS: 0}); return err }, "beyond the slab's -10 to 30 ms"},
		{"window below the slab", func() error { _, err := as.Map(horizon.MapSpec{Stat: horizon.MaxAbs, FromMS: 0, ToMS: 31}); return err }, "beyond the slab's"},
		{"base below the slab", func() error {
			_, err := as.Map(horizon.MapSpec{Stat: horizon.Mean, Base: hs[1]})
			return err
		}, "reaches beyond the slab's 10 ms above the horizon to 30 ms below"},
		{"no statistic", func() error { _, err := as.Map(horizon.MapSpec{}); return err }, "no statistic"},
		{"long attribute", func() error { _, err := slab.Attribute(ctx, agc, pa); return err }, "agc needs a margin of 314 ms"},
		{"negative window", func() error {
			_, err := horizon.NewSlab(ctx, src, hs[0], horizon.SlabSpec{AboveMS: -1}, nil)
			return err
		}, "want two finite numbers"},
		{"NaN margin", func() error {
			_, err := horizon.NewSlab(ctx, src, hs[0], horizon.SlabSpec{MarginMS: math.NaN()}, nil)
			return err
		}, "margin NaN ms"},
		{"other grid", func() error { _, err := horizon.NewSlab(ctx, src, other, horizon.SlabSpec{}, nil); return err }, "does not match"},
	} {
		err := tc.err()
		if err == nil || !strings.Contains(err.Error(), tc.want) || strings.Contains(err.Error(), "\n") {
			t.Errorf("%s: %v, want a one-line error saying %q", tc.name, err, tc.want)
		}
	}
	// Cancelled before it starts.
	cctx, cancel := context.WithCancel(ctx)
	cancel()
	if _, err := horizon.NewSlab(cctx, src, hs[0], horizon.SlabSpec{}, nil); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: %v", err)
	}
	// A slab keeps its own copy of the horizon.
	h := *hs[0]
	h.TimeMS = append([]float64(nil), hs[0].TimeMS...)
	s2, err := horizon.NewSlab(ctx, src, &h, horizon.SlabSpec{AboveMS: 5, BelowMS: 5}, nil)
	if err != nil {
		t.Fatal(err)
	}
	a2, err := s2.Attribute(ctx, env, pe)
	if err != nil {
		t.Fatal(err)
	}
	before, _ := a2.Map(horizon.MapSpec{Stat: horizon.Value})
	for k := range h.TimeMS {
		h.TimeMS[k] += 3
	}
	after, _ := a2.Map(horizon.MapSpec{Stat: horizon.Value})
	for k := range before.Values {
		if b, a := before.Values[k], after.Values[k]; b != a && !(math.IsNaN(float64(a)) && math.IsNaN(float64(b))) {
			t.Fatalf("trace %d: the map changed with the horizon the slab was built on (%g, then %g)", k, b, a)
		}
	}
}

// A slab serves several goroutines at once (the window may recompute an
// attribute while the map of the last one is redrawn): attributes and maps
// computed concurrently equal those computed one at a time (run with
// -race). A horizon with no picks gives a slab whose maps are all empty.
func TestSlabConcurrentAndEmpty(t *testing.T) {
	_, src, hs := slabDemo(t)
	ctx := context.Background()
	slab, err := horizon.NewSlab(ctx, src, hs[1], horizon.SlabSpec{AboveMS: 20, BelowMS: 20, MarginMS: 84}, nil)
	if err != nil {
		t.Fatal(err)
	}
	spec := horizon.MapSpec{Stat: horizon.RMS, FromMS: -20, ToMS: 20}
	ids := []string{"envelope", "sweetness", "instantaneous-frequency", "cosine-phase"}
	want := make([]*horizon.AttributeMap, len(ids))
	for i, id := range ids {
		a, _ := compute.Lookup(id)
		p, _ := a.Resolve(nil)
		as, err := slab.Attribute(ctx, a, p)
		if err != nil {
			t.Fatal(err)
		}
		if want[i], err = as.Map(spec); err != nil {
			t.Fatal(err)
		}
	}
	got := make([]*horizon.AttributeMap, len(ids))
	errs := make([]error, len(ids))
	var wg sync.WaitGroup
	for i, id := range ids {
		wg.Add(1)
		go func() {
			defer wg.Done()
			a, _ := compute.Lookup(id)
			p, _ := a.Resolve(nil)
			as, err := slab.Attribute(ctx, a, p)
			if err != nil {
				errs[i] = err
				return
			}
			got[i], errs[i] = as.Map(spec)
		}()
	}
	wg.Wait()
	for i := range ids {
		if errs[i] != nil {
			t.Fatalf("%s: %v", ids[i], errs[i])
		}
		for k := range want[i].Values {
			w, g := want[i].Values[k], got[i].Values[k]
			if w != g && !(math.IsNaN(float64(w)) && math.IsNaN(float64(g))) {
				t.Fatalf("%s, trace %d: %g concurrently, %g alone", ids[i], k, g, w)
			}
		}
	}

	empty := horizon.New(hs[0].Inlines, hs[0].Crosslines)
	es, err := horizon.NewSlab(ctx, src, empty, horizon.SlabSpec{AboveMS: 10, BelowMS: 10}, nil)
	if err != nil {
		t.Fatal(err)
	}
	a, _ := compute.Lookup("envelope")
	p, _ := a.Resolve(nil)
	eas, err := es.Attribute(ctx, a, p)
	if err != nil {
		t.Fatal(err)
	}
	m, err := eas.Map(horizon.MapSpec{Stat: horizon.Value})
	if err != nil {
		t.Fatal(err)
	}
	for k, v := range m.Values {
		if !math.IsNaN(float64(v)) {
			t.Fatalf("trace %d: %g on the map of an empty horizon", k, v)
		}
	}
}

// An attribute slab's memory goes back to its slab only on the last
// Release: an attribute computed while another holder keeps the first
// leaves the first's maps as they were, and an attribute computed into
// memory given back equals the same attribute computed into fresh memory
// (on a second slab of the same traces), sample for sample.
func TestSlabReleaseReusesMemory(t *testing.T) {
	_, src, hs := slabDemo(t)
	ctx := context.Background()
	ss := horizon.SlabSpec{AboveMS: 20, BelowMS: 20, MarginMS: 84}
	spec := horizon.MapSpec{Stat: horizon.RMS, FromMS: -20, ToMS: 20}
	attrMap := func(slab *horizon.Slab, id string) (*horizon.AttributeSlab, *horizon.AttributeMap) {
		t.Helper()
		a, _ := compute.Lookup(id)
		p, _ := a.Resolve(nil)
		as, err := slab.Attribute(ctx, a, p)
		if err != nil {
			t.Fatal(err)
		}
		m, err := as.Map(spec)
		if err != nil {
			t.Fatal(err)
		}
		return as, m
	}
	same := func(what string, got, want *horizon.AttributeMap) {
		t.Helper()
		for k := range want.Values {
			w, g := want.Values[k], got.Values[k]
			if w != g && !(math.IsNaN(float64(w)) && math.IsNaN(float64(g))) {
				t.Fatalf("%s, trace %d: %g, want %g", what, k, g, w)
			}
		}
	}
	slab, err := horizon.NewSlab(ctx, src, hs[0], ss, nil)
	if err != nil {
		t.Fatal(err)
	}
	fresh, err := horizon.NewSlab(ctx, src, hs[0], ss, nil)
	if err != nil {
		t.Fatal(err)
	}
	env, envMap := attrMap(slab, "envelope")
	env.Retain()
	env.Release() // one holder left
	sw, swMap := attrMap(slab, "sweetness")
	again, err := env.Map(spec)
	if err != nil {
		t.Fatal(err)
	}
	same("envelope, still held, after sweetness", again, envMap)
	env.Release()
	sw.Release()
	for _, id := range []string{"instantaneous-frequency", "envelope", "sweetness"} {
		as, got := attrMap(slab, id)
		_, want := attrMap(fresh, id)
		same(id+" in memory given back", got, want)
		as.Release()
	}
	_, sw2 := attrMap(fresh, "sweetness")
	same("sweetness, twice", sw2, swMap)
}
