package horizon_test

import (
	"context"
	"fmt"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"quadtrace/compute"
	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
)

// envelopeVolume returns the envelope of every trace of s (compute's
// registry attribute with its default parameters).
func envelopeVolume(t testing.TB, s *synth.Survey) compute.Section {
	t.Helper()
	a, err := compute.Lookup("envelope")
	if err != nil {
		t.Fatal(err)
	}
	p, err := a.Resolve(nil)
	if err != nil {
		t.Fatal(err)
	}
	env, err := a.Compute(context.Background(), compute.Section{Traces: s.Traces, DT: s.IntervalMS() / 1000}, p, nil)
	if err != nil {
		t.Fatal(err)
	}
	return env
}

// trackReservoir tracks the top (trough) and base (peak) of the demo's
// reservoir sand from seeds on inline 20 either side of the fault.
func trackReservoir(t testing.TB, s *synth.Survey) (top, base *horizon.Horizon) {
	t.Helper()
	src := source(t, s)
	for _, name := range []string{synth.SurfaceReservoirTop, "reservoir-base"} {
		f := surface(t, s, name)
		opt := horizon.Options{Event: eventOf(f), WindowMS: 3, MinCorrelation: 0.9, CorrelationMS: 48}
		h, err := horizon.Track(context.Background(), src, seedsFor(s, f, [2]int{20, 20}, [2]int{20, 180}), opt, nil)
		if err != nil {
			t.Fatal(err)
		}
		if top == nil {
			top = h
		} else {
			base = h
		}
	}
	return top, base
}

// Maps along horizons agree with numpy (Debian's python3-numpy, script
// testdata/horizon/map_stats.py: numpy.interp for the value on the
// horizon, masked sums, sqrt, max and min over the window) on the demo's
// envelope volume with gaps put in (every third inline), along its
// tracked reservoir top and base: every statistic, windows relative to one horizon and between the
// two, to float32 precision, and NaN on the same traces.
func TestMapsAgreeWithNumpy(t *testing.T) {
	needPython(t, "numpy")
	s := demo(t, synth.DefaultConfig())
	env := envelopeVolume(t, s)
	// Gaps: a dead trace, a stretch of NaN across the reservoir, one
	// sample at the top of another.
	nan := float32(math.NaN())
	for j := range env.Traces[3] {
		env.Traces[3][j] = nan
	}
	for j := 500; j < 560; j++ {
		env.Traces[40*200+60][j] = nan
	}
	top, base := trackReservoir(t, s)
	for k := 0; k < len(env.Traces); k += 997 {
		if top.State[k] != horizon.Empty {
			env.Traces[k][int(top.TimeMS[k]/2)] = nan
		}
	}
	// Every third inline keeps numpy's part short.
	const ni, nx = 50, 200
	env.Traces = everyThirdInline(env.Traces, nx)
	top, base = thin(top), thin(base)
	src, err := horizon.NewTraces(env.Traces, ni, nx, env.DT, 0)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	writeVolume(t, filepath.Join(dir, "vol"), env.Traces, s.IntervalMS(), 0)
	writeFloat64s(t, filepath.Join(dir, "top"), top.TimeMS)
	writeFloat64s(t, filepath.Join(dir, "base"), base.TimeMS)

	type spec struct {
		stat     horizon.Stat
		from, to float64
	}
	relative := []spec{{horizon.Value, 0, 0}}
	between := []spec{}
	for _, st := range []horizon.Stat{horizon.Mean, horizon.MeanAbs, horizon.RMS, horizon.MaxAbs, horizon.MinAbs} {
		relative = append(relative, spec{st, -10.3, 14.7}, spec{st, 0, 0.5}, spec{st, 3000, 3100})
		between = append(between, spec{st, -4.1, 6.2}, spec{st, 20, -30})
	}
	for _, set := range []struct {
		base  string
		h     *horizon.Horizon
		specs []spec
	}{{"-", nil, relative}, {filepath.Join(dir, "base"), base, between}} {
		args := []string{script("map_stats.py"), filepath.Join(dir, "vol"), filepath.Join(dir, "top"), set.base, filepath.Join(dir, "out")}
		for _, sp := range set.specs {
			args = append(args, sp.stat.String(), fmt.Sprint(sp.from), fmt.Sprint(sp.to))
		}
		run(t, args...)
		want := readFloat64s(t, filepath.Join(dir, "out"))
		n := ni * nx
		if len(want) != n*len(set.specs) {
			t.Fatalf("numpy gave %d values, want %d", len(want), n*len(set.specs))
		}
		for i, sp := range set.specs {
			m, err := horizon.Map(context.Background(), src, top, horizon.MapSpec{Stat: sp.stat, FromMS: sp.from, ToMS: sp.to, Base: set.h}, nil)
			if err != nil {
				t.Fatal(err)
			}
			bad, values := 0, 0
			for k, got := range m.Values {
				w := want[i*n+k]
				g := float64(got)
				if math.IsNaN(w) != math.IsNaN(g) || (!math.IsNaN(w) && math.Abs(g-w) > 1e-6*math.Max(1, math.Abs(w))) {
					if bad < 3 {
						t.Errorf("%v %g..%g ms (base %v): trace %d: %v, numpy %v", sp.stat, sp.from, sp.to, set.h != nil, k, g, w)
					}
					bad++
				}
				if !math.IsNaN(w) {
					values++
				}
			}
			t.Logf("%-8v %6g..%-6g ms base %-5v: %d values, %d differ", sp.stat, sp.from, sp.to, set.h != nil, values, bad)
			if values == 0 && sp.from < 1000 && sp.to > -20 {
				t.Errorf("%v %g..%g ms: no values at all", sp.stat, sp.from, sp.to)
			}
		}
	}
}

// everyThirdInline returns the traces of every third inline of an
// inline-major grid of nx crosslines.
func everyThirdInline[T any](v []T, nx int) []T {
	var out []T
	for k := 0; k+nx <= len(v); k += 3 * nx {
		out = append(out, v[k:k+nx]...)
	}
	return out
}

// thin returns the horizon on every third inline.
func thin(h *horizon.Horizon) *horizon.Horizon {
	out := horizon.New((h.Inlines+2)/3, h.Crosslines)
	out.TimeMS = everyThirdInline(h.TimeMS, h.Crosslines)
	out.Quality = everyThirdInline(h.Quality, h.Crosslines)
	out.State = everyThirdInline(h.State, h.Crosslines)
	return out
}

// Map refuses what it cannot compute, with errors that say so.
func TestMapRefusals(t *testing.T) {
	src, err := horizon.NewTraces([][]float32{{0, 1, 2, 3}, {0, 1, 2, 3}}, 1, 2, 0.002, 0)
	if err != nil {
		t.Fatal(err)
	}
	h := horizon.New(1, 2)
	for _, tc := range []struct {
		name string
		h    *horizon.Horizon
		spec horizon.MapSpec
		want string
	}{
		{"no stat", h, horizon.MapSpec{}, "no statistic"},
		{"reversed window", h, horizon.MapSpec{Stat: horizon.RMS, FromMS: 5, ToMS: -5}, "ends before it starts"},
		{"NaN window", h, horizon.MapSpec{Stat: horizon.RMS, FromMS: math.NaN()}, "not a pair of finite numbers"},
		{"other grid", horizon.New(2, 1), horizon.MapSpec{Stat: horizon.Value}, "does not match"},
		{"other base", h, horizon.MapSpec{Stat: horizon.Mean, Base: horizon.New(3, 3)}, "base horizon"},
		{"nil horizon", nil, horizon.MapSpec{Stat: horizon.Value}, "does not match"},
	} {
		if _, err := horizon.Map(context.Background(), src, tc.h, tc.spec, nil); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: %v, want an error saying %q", tc.name, err, tc.want)
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := horizon.Map(ctx, src, h, horizon.MapSpec{Stat: horizon.Value}, nil); err != context.Canceled {
		t.Errorf("cancelled: %v", err)
	}
}
