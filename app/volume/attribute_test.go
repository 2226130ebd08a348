package volume

import (
	"context"
	"fmt"
	"math"
	"path/filepath"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"quadtrace/app/apptest"
	"quadtrace/app/bricks"
	"quadtrace/compute"
	"quadtrace/compute/synth"
	"quadtrace/segy"
)

// directAttribute computes a section from its traces, never through a
// store: the reference the stores are checked against.
func directAttribute(ctx context.Context, v *Volume, s Slice, a *compute.Attribute, p compute.Params, cond compute.Conditioning) (Section, error) {
	sec, err := v.Read(ctx, s)
	if err != nil {
		return Section{}, err
	}
	return v.apply(ctx, sec, a, p, cond, nil)
}

func smallSurvey(t testing.TB, ni, nx, ns int) *synth.Survey {
	t.Helper()
	cfg := synth.DefaultConfig()
	cfg.Inlines, cfg.Crosslines, cfg.Samples = ni, nx, ns
	s, err := synth.Generate(context.Background(), cfg, nil)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

func resolved(t testing.TB, id string, params map[string]string) (*compute.Attribute, compute.Params) {
	t.Helper()
	a, err := compute.Lookup(id)
	if err != nil {
		t.Fatal(err)
	}
	p, err := a.Resolve(params)
	if err != nil {
		t.Fatal(err)
	}
	return a, p
}

// TestStoreEverySampleEqualsDirect: with bricks of 8 samples (so tiles
// end inside the survey on every axis), every
// sample of every envelope and band-passed phase time slice equals the
// attribute computed directly on the inline sections, and every inline and
// crossline read back from the store equals its direct computation.
func TestStoreEverySampleEqualsDirect(t *testing.T) {
	s := smallSurvey(t, 13, 21, 70)
	ctx := context.Background()
	for _, c := range []struct {
		id   string
		cond compute.Conditioning
	}{{"envelope", compute.Conditioning{}}, {"instantaneous-phase", compute.Conditioning{LowCutHz: 8, HighCutHz: 60}}} {
		v := FromSurvey(s)
		v.SetBrickOptions(bricks.Options{Dir: t.TempDir(), Edge: 8}, 1<<20, 0) // every brick resident
		a, p := resolved(t, c.id, nil)
		inlines := make([]Section, 0, 13)
		for _, il := range Numbers(v.Info().Inline) {
			sec, err := directAttribute(ctx, v, Slice{Orientation: Inline, Number: il}, a, p, c.cond)
			if err != nil {
				t.Fatal(err)
			}
			inlines = append(inlines, sec)
		}
		for k := range v.Info().Samples {
			ts, err := v.Attribute(ctx, Slice{Orientation: TimeSlice, Number: k}, a, p, c.cond, nil)
			if err != nil {
				t.Fatal(err)
			}
			if ts.Pending != nil {
				t.Fatalf("%s sample %d: pending cells after the wait", c.id, k)
			}
			for i := range ts.Traces {
				for j, got := range ts.Traces[i] {
					if want := inlines[i].Traces[j][k]; got != want {
						t.Fatalf("%s sample %d inline %d crossline %d: store %v, direct %v", c.id, k, ts.InlineKeys[i], ts.Keys[j], got, want)
					}
				}
			}
		}
		for i, il := range Numbers(v.Info().Inline) {
			sec, ok := v.sectionFromStore(Slice{Orientation: Inline, Number: il}, a, p, c.cond)
			if !ok {
				t.Fatalf("%s inline %d not read from the filled store", c.id, il)
			}
			for j := range sec.Traces {
				for k, got := range sec.Traces[j] {
					if want := inlines[i].Traces[j][k]; got != want {
						t.Fatalf("%s inline %d trace %d sample %d: store %v, direct %v", c.id, il, j, k, got, want)
					}
				}
			}
		}
		xl := Numbers(v.Info().Crossline)[17]
		got, err := v.Attribute(ctx, Slice{Orientation: Crossline, Number: xl}, a, p, c.cond, nil)
		if err != nil {
			t.Fatal(err)
		}
		for i := range got.Traces {
			for k, g := range got.Traces[i] {
				if want := inlines[i].Traces[17][k]; g != want {
					t.Fatalf("%s crossline %d inline %d sample %d: %v, direct %v", c.id, xl, i, k, g, want)
				}
			}
		}
		if used, _ := v.BrickMemory(); v.attrs.cache.Used() > used {
			t.Errorf("%d bytes resident, bound %d", v.attrs.cache.Used(), used)
		}
		v.Close()
	}
}

// TestStoreSharedAndDistinct: equal requests (same attribute, parameters
// and conditioning) share one store, computed once; other parameters or
// conditioning get their own, with other values.
func TestStoreSharedAndDistinct(t *testing.T) {
	s := smallSurvey(t, 9, 10, 120)
	v := FromSurvey(s)
	v.SetBrickOptions(bricks.Options{Dir: t.TempDir(), Edge: 4}, 0, 0)
	defer v.Close()
	ctx := context.Background()
	a, p := resolved(t, "weighted-frequency", nil)
	_, p2 := resolved(t, "weighted-frequency", map[string]string{"window": "80"})
	var wg sync.WaitGroup
	slices := make([]Section, 6)
	for k := range slices {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var err error
			if slices[k], err = v.Attribute(ctx, Slice{Orientation: TimeSlice, Number: 60 + k%2}, a, p, compute.Conditioning{}, nil); err != nil {
				t.Error(err)
			}
		}()
	}
	wg.Wait()
	if n := len(v.attrs.stores); n != 1 {
		t.Fatalf("six equal requests made %d stores", n)
	}
	other, err := v.Attribute(ctx, Slice{Orientation: TimeSlice, Number: 60}, a, p2, compute.Conditioning{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	cond, err := v.Attribute(ctx, Slice{Orientation: TimeSlice, Number: 60}, a, p, compute.Conditioning{AGCWindowMS: 100}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if n := len(v.attrs.stores); n != 3 {
		t.Fatalf("three distinct requests made %d stores", n)
	}
	if same(slices[0], other) || same(slices[0], cond) {
		t.Error("other parameters or conditioning gave the same time slice")
	}
	if !same(slices[0], slices[2]) || !same(slices[1], slices[3]) {
		t.Error("equal requests gave different time slices")
	}
}

func same(a, b Section) bool {
	for i := range a.Traces {
		for j := range a.Traces[i] {
			if a.Traces[i][j] != b.Traces[i][j] && !(math.IsNaN(float64(a.Traces[i][j])) && math.IsNaN(float64(b.Traces[i][j]))) {
				return false
			}
		}
	}
	return true
}

// TestStoresBoundedInNumber: asking for more attributes than maxStores
// releases the least recently used store, so the cache folder never holds
// more than maxStores volumes.
func TestStoresBoundedInNumber(t *testing.T) {
	v := FromSurvey(smallSurvey(t, 5, 6, 64))
	v.SetBrickOptions(bricks.Options{Dir: t.TempDir(), Edge: 4}, 0, 0)
	defer v.Close()
	for _, id := range []string{"envelope", "instantaneous-phase", "instantaneous-frequency", "cosine-phase", "sweetness", "envelope"} {
		a, p := resolved(t, id, nil)
		if _, err := v.Attribute(context.Background(), Slice{Orientation: TimeSlice, Number: 3}, a, p, compute.Conditioning{}, nil); err != nil {
			t.Fatal(err)
		}
		if n := len(v.attrs.stores); n > maxStores {
			t.Fatalf("after %s: %d stores, at most %d", id, n, maxStores)
		}
	}
}

// TestProgressiveSoFar: while a time slice is being filled, AttributeSoFar
// gives the filled cells with their final values and marks the rest
// pending; before any request it has nothing.
func TestProgressiveSoFar(t *testing.T) {
	v := FromSurvey(smallSurvey(t, 40, 40, 80))
	v.SetBrickOptions(bricks.Options{Dir: t.TempDir(), Edge: 8, Workers: 1}, 0, 0)
	defer v.Close()
	a, p := resolved(t, "envelope", nil)
	sl := Slice{Orientation: TimeSlice, Number: 40}
	if _, ok := v.AttributeSoFar(sl, a, p, compute.Conditioning{}); ok {
		t.Fatal("a time slice so far before any request")
	}
	v.SetFocus(v.Info().Inline.Min, v.Info().Crossline.Min, 0)
	ctx, cancel := context.WithCancel(context.Background())
	var partial Section
	var seen bool
	_, err := v.Attribute(ctx, sl, a, p, compute.Conditioning{}, func(done, total int) {
		if done >= 2 && done < total && !seen {
			partial, seen = v.AttributeSoFar(sl, a, p, compute.Conditioning{})
			cancel()
		}
	})
	if err == nil || !seen {
		t.Fatalf("cancelled after two columns: %v, seen %v", err, seen)
	}
	if partial.Pending == nil {
		t.Fatal("a partial slice without pending cells")
	}
	full, err := v.Attribute(context.Background(), sl, a, p, compute.Conditioning{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	var computed, pending int
	for i := range partial.Traces {
		for j, x := range partial.Traces[i] {
			if partial.Pending[i][j] {
				pending++
				if !math.IsNaN(float64(x)) {
					t.Fatalf("pending cell (%d,%d) holds %v", i, j, x)
				}
				continue
			}
			computed++
			if x != full.Traces[i][j] {
				t.Fatalf("cell (%d,%d) shown as %v before, %v when complete", i, j, x, full.Traces[i][j])
			}
		}
	}
	if computed < 2*64 || pending == 0 || !partialHasCorner(partial) {
		t.Errorf("partial slice: %d computed, %d pending; corner at the focus computed: %v", computed, pending, partialHasCorner(partial))
	}
}

func partialHasCorner(s Section) bool { return s.Pending != nil && !s.Pending[0][0] }

// countingStore counts the reads of each trace.
type countingStore struct {
	store
	reads []atomic.Int32
}

func (c *countingStore) readTrace(i int, dst []float32) ([]float32, error) {
	c.reads[i].Add(1)
	return c.store.readTrace(i, dst)
}

// TestAmplitudeBricksReadOnce: for a file that uses amplitude bricks, time
// slices at samples in different bricks read each trace of the file once
// in all, and equal the file's values read directly (segy's TimeSlice).
func TestAmplitudeBricksReadOnce(t *testing.T) {
	path := filepath.Join(t.TempDir(), "a.sgy")
	if err := WriteSurvey(context.Background(), path, smallSurvey(t, 11, 13, 90), segy.WriteOptions{}); err != nil {
		t.Fatal(err)
	}
	v, err := Open(path, segy.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer v.Close()
	direct, err := Open(path, segy.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer direct.Close()
	v.SetBrickOptions(bricks.Options{Dir: t.TempDir(), Edge: 8}, 0, 1)
	direct.SetBrickOptions(bricks.Options{}, 0, -1)
	if !v.UsesAmplitudeBricks() || direct.UsesAmplitudeBricks() {
		t.Fatal("amplitude bricks setting not applied")
	}
	cs := &countingStore{store: v.store, reads: make([]atomic.Int32, v.Info().Traces)}
	v.store = cs
	for _, k := range []int{5, 70, 6, 89, 0} {
		got, err := v.Read(context.Background(), Slice{Orientation: TimeSlice, Number: k})
		if err != nil {
			t.Fatal(err)
		}
		want, err := direct.Read(context.Background(), Slice{Orientation: TimeSlice, Number: k})
		if err != nil {
			t.Fatal(err)
		}
		if !same(got, want) || len(got.Traces) != len(want.Traces) {
			t.Fatalf("sample %d: bricked amplitude differs from the file", k)
		}
	}
	for i := range cs.reads {
		if n := cs.reads[i].Load(); n != 1 {
			t.Fatalf("trace %d read %d times for five time slices, want once", i, n)
		}
	}
}

// TestCancelAnyMomentNoLeftovers cancels envelope time slices at moments
// spread over the filling and closes the volume at others: afterwards the
// cache folder is empty and no file of the process points into it.
func TestCancelAnyMomentNoLeftovers(t *testing.T) {
	dir := t.TempDir()
	s := smallSurvey(t, 40, 40, 100)
	a, p := resolved(t, "envelope", nil)
	for k := range 10 {
		v := FromSurvey(s)
		v.SetBrickOptions(bricks.Options{Dir: dir, Edge: 8}, 1<<16, 0)
		ctx, cancel := context.WithCancel(context.Background())
		done := make(chan error, 1)
		go func() {
			_, err := v.Attribute(ctx, Slice{Orientation: TimeSlice, Number: 50}, a, p, compute.Conditioning{}, nil)
			done <- err
		}()
		time.Sleep(time.Duration(k) * 2 * time.Millisecond)
		if k%2 == 0 {
			cancel()
		} else {
			v.Close()
		}
		select {
		case <-done:
		case <-time.After(20 * time.Second):
			t.Fatal("a request hung after cancel or close")
		}
		cancel()
		v.Close()
	}
	apptest.NoLeftovers(t, dir)
}

// TestRepeatedSurveyFile: a survey written three times over has three
// times the inlines, numbered on, each copy's traces equal to the model's.
func TestRepeatedSurveyFile(t *testing.T) {
	s := smallSurvey(t, 5, 7, 40)
	path := filepath.Join(t.TempDir(), "r.sgy")
	if err := WriteSurveyRepeated(context.Background(), path, s, segy.WriteOptions{}, 3); err != nil {
		t.Fatal(err)
	}
	v, err := Open(path, segy.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer v.Close()
	in := v.Info()
	if in.Inline.Min != s.FirstInline || in.Inline.Count != 15 || in.Crossline.Count != 7 || in.Traces != 105 {
		t.Fatalf("inlines %+v crosslines %+v traces %d", in.Inline, in.Crossline, in.Traces)
	}
	for r := range 3 {
		for il := s.FirstInline; il < s.FirstInline+5; il++ {
			for xl := s.FirstCrossline; xl < s.FirstCrossline+7; xl++ {
				got, err := v.Trace(il+5*r, xl, 0)
				if err != nil {
					t.Fatal(err)
				}
				if fmt.Sprint(got) != fmt.Sprint(s.Trace(il, xl)) {
					t.Fatalf("copy %d, inline %d crossline %d differs from the model", r, il, xl)
				}
			}
		}
	}
	if err := WriteSurveyRepeated(context.Background(), path, s, segy.WriteOptions{}, 0); err == nil {
		t.Error("repeat 0 accepted")
	}
}
