package bricks

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"strings"
	"sync"
	"testing"
	"time"

	"quadtrace/app/apptest"
	"quadtrace/segy/segytest"
)

// value is the test volume's sample (i, x, z): every sample distinct, so
// any misplaced one shows.
func value(i, x, z int) float32 { return float32(i*1000000 + x*1000 + z) }

// valueFill computes tiles of value, counting calls and recording tiles.
type valueFill struct {
	mu    sync.Mutex
	shape Shape
	tiles []Tile
	gate  chan struct{} // when not nil, each tile waits for one receive
	began chan Tile     // when not nil, told of each tile before the gate
}

func (f *valueFill) fill(ctx context.Context, t Tile, dst [][]float32) ([][]float32, error) {
	if f.began != nil {
		f.began <- t
	}
	if f.gate != nil {
		select {
		case <-f.gate:
		case <-ctx.Done():
			return nil, ctx.Err()
		}
	}
	f.mu.Lock()
	f.tiles = append(f.tiles, t)
	f.mu.Unlock()
	// into the filler's scratch (reused from column to column, partial
	// tiles included), so the tests check that reuse
	for i := t.I0; i < t.I1; i++ {
		for x := t.X0; x < t.X1; x++ {
			tr := dst[(i-t.I0)*(t.X1-t.X0)+x-t.X0]
			if len(tr) != f.shape.Samples {
				return nil, errors.New("scratch trace of the wrong length")
			}
			for z := range tr {
				tr[z] = value(i, x, z)
			}
		}
	}
	return dst, nil
}

func newTestStore(t *testing.T, shape Shape, f *valueFill, cache *Cache, opt Options) *Store {
	t.Helper()
	f.shape = shape
	if opt.Dir == "" {
		opt.Dir = t.TempDir()
	}
	s, err := New("test volume", shape, f.fill, cache, opt)
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { s.Close() })
	return s
}

// checkAll reads every time slice, inline and crossline of a filled store
// and compares each sample with value; sections must come back when
// resident is true (every brick fits the cache), else they may be refused.
func checkAll(t *testing.T, s *Store, resident bool) {
	t.Helper()
	sh := s.Shape()
	for z := range sh.Samples {
		grid, pending, err := s.TimeSlice(z)
		if err != nil {
			t.Fatal(err)
		}
		if pending != nil {
			t.Fatalf("sample %d: pending cells in a filled store", z)
		}
		for i := range sh.Inlines {
			for x := range sh.Crosslines {
				if grid[i][x] != value(i, x, z) {
					t.Fatalf("time slice %d at (%d,%d) = %v, want %v", z, i, x, grid[i][x], value(i, x, z))
				}
			}
		}
	}
	for i := range sh.Inlines {
		traces, ok, err := s.Inline(i)
		if err != nil || (resident && !ok) {
			t.Fatalf("inline %d: ok %v, %v", i, ok, err)
		}
		if err := inlineMismatch(i, traces); err != nil {
			t.Fatal(err)
		}
	}
	for x := range sh.Crosslines {
		traces, ok, err := s.Crossline(x)
		if err != nil || (resident && !ok) {
			t.Fatalf("crossline %d: ok %v, %v", x, ok, err)
		}
		if err := crosslineMismatch(x, traces); err != nil {
			t.Fatal(err)
		}
	}
}

// inlineMismatch names the first sample of inline i's traces that is not
// value, or returns nil.
func inlineMismatch(i int, traces [][]float32) error {
	for x, tr := range traces {
		for z, v := range tr {
			if v != value(i, x, z) {
				return fmt.Errorf("inline %d crossline %d sample %d = %v, want %v", i, x, z, v, value(i, x, z))
			}
		}
	}
	return nil
}

// crosslineMismatch is inlineMismatch for crossline x.
func crosslineMismatch(x int, traces [][]float32) error {
	for i, tr := range traces {
		for z, v := range tr {
			if v != value(i, x, z) {
				return fmt.Errorf("crossline %d inline %d sample %d = %v, want %v", x, i, z, v, value(i, x, z))
			}
		}
	}
	return nil
}

// TestEverySampleInItsPlace fills stores whose sizes are and are not
// multiples of the brick edge and reads back every sample through time
// slices, inlines and crosslines.
func TestEverySampleInItsPlace(t *testing.T) {
	for _, c := range []struct {
		shape Shape
		edge  int
	}{
		{Shape{16, 24, 32}, 8},
		{Shape{13, 29, 37}, 8},
		{Shape{1, 1, 5}, 4},
		{Shape{3, 70, 9}, 64},
	} {
		s := newTestStore(t, c.shape, &valueFill{}, NewCache(64<<20), Options{Edge: c.edge})
		if err := s.Wait(context.Background(), nil); err != nil {
			t.Fatal(err)
		}
		checkAll(t, s, true)
	}
}

// TestTinyMemoryBound: a cache bound of two bricks holds at most two
// bricks while the store fills and is read, every time slice (planes read
// from the file) is right, and sections crossing bricks no longer resident
// are refused, never wrong.
func TestTinyMemoryBound(t *testing.T) {
	const edge = 8
	brick := int64(edge * edge * edge * 4)
	cache := NewCache(2 * brick)
	s := newTestStore(t, Shape{20, 30, 40}, &valueFill{}, cache, Options{Edge: edge})
	if err := s.Wait(context.Background(), nil); err != nil {
		t.Fatal(err)
	}
	if cache.Used() > 2*brick {
		t.Fatalf("after filling, %d bytes resident, bound %d", cache.Used(), 2*brick)
	}
	checkAll(t, s, false)
	if _, ok, _ := s.Inline(0); ok {
		t.Error("inline 0 read from bricks that cannot all be resident")
	}
	if cache.Used() > 2*brick || cache.Used() == 0 {
		t.Fatalf("after reading, %d bytes resident, bound %d", cache.Used(), 2*brick)
	}
	s.Close()
	if cache.Used() != 0 {
		t.Errorf("closed store left %d bytes resident", cache.Used())
	}
}

// TestNearestFirst: with one worker the columns are filled in order of
// distance from the focus, for a point (time slice) and for a line (an
// inline section: distance along inlines only).
func TestNearestFirst(t *testing.T) {
	const edge = 4
	shape := Shape{40, 36, 8}
	for _, focus := range [][2]float64{{21, 9}, {0, 35}, {17, math.NaN()}} {
		f := &valueFill{}
		s := newTestStore(t, shape, f, nil, Options{Edge: edge, Workers: 1})
		s.SetFocus(focus[0], focus[1])
		if err := s.Wait(context.Background(), nil); err != nil {
			t.Fatal(err)
		}
		dist := func(tl Tile) float64 {
			d := func(lo, hi int, at float64) float64 {
				if math.IsNaN(at) {
					return 0
				}
				return math.Max(0, math.Max(float64(lo)-at, at-float64(hi-1)))
			}
			return math.Hypot(d(tl.I0, tl.I1, focus[0]), d(tl.X0, tl.X1, focus[1]))
		}
		if len(f.tiles) != 10*9 {
			t.Fatalf("%d columns filled, want 90", len(f.tiles))
		}
		if d := dist(f.tiles[0]); d != 0 {
			t.Errorf("focus %v: first column %+v is %g traces away", focus, f.tiles[0], d)
		}
		for k := 1; k < len(f.tiles); k++ {
			if dist(f.tiles[k]) < dist(f.tiles[k-1]) {
				t.Fatalf("focus %v: column %d %+v (distance %g) after %+v (distance %g)", focus, k, f.tiles[k], dist(f.tiles[k]), f.tiles[k-1], dist(f.tiles[k-1]))
			}
		}
	}
}

// TestProgressiveSliceMarksPending: while only some columns are filled,
// a time slice has their values and marks every other cell pending (NaN);
// a moved focus changes which column comes next.
func TestProgressiveSliceMarksPending(t *testing.T) {
	const edge = 8
	f := &valueFill{gate: make(chan struct{}), began: make(chan Tile, 100)}
	shape := Shape{20, 30, 12}
	s := newTestStore(t, shape, f, NewCache(1<<20), Options{Edge: edge, Workers: 1})
	s.SetFocus(0, 0)
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	waited := make(chan error, 1)
	go func() { waited <- s.Wait(ctx, nil) }()
	if tl := <-f.began; tl != (Tile{0, 8, 0, 8}) {
		t.Fatalf("first column %+v, want the one at the focus", tl)
	}
	s.SetFocus(19, 29)
	f.gate <- struct{}{} // column (0,0) completes
	if tl := <-f.began; tl != (Tile{16, 20, 24, 30}) {
		t.Fatalf("after the focus moved, column %+v, want the far corner's", tl)
	}
	f.gate <- struct{}{}
	waitDone(t, s, 2)
	grid, pending, err := s.TimeSlice(5)
	if err != nil {
		t.Fatal(err)
	}
	if pending == nil {
		t.Fatal("a partly filled store gave no pending cells")
	}
	filledCell := func(i, x int) bool { return (i < 8 && x < 8) || (i >= 16 && x >= 24) }
	for i := range shape.Inlines {
		for x := range shape.Crosslines {
			switch {
			case filledCell(i, x) && (pending[i][x] || grid[i][x] != value(i, x, 5)):
				t.Fatalf("filled cell (%d,%d): pending %v value %v, want %v", i, x, pending[i][x], grid[i][x], value(i, x, 5))
			case !filledCell(i, x) && (!pending[i][x] || !math.IsNaN(float64(grid[i][x]))):
				t.Fatalf("unfilled cell (%d,%d): pending %v value %v", i, x, pending[i][x], grid[i][x])
			}
		}
	}
	if _, ok, err := s.Inline(3); ok || err != nil {
		t.Errorf("inline 3 crosses unfilled columns but came back ok %v, %v", ok, err)
	}
	cancel()
	if err := <-waited; !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled wait returned %v", err)
	}
	close(f.gate)
	if err := s.Wait(context.Background(), nil); err != nil {
		t.Fatal(err)
	}
	checkAll(t, s, false)
}

func waitDone(t *testing.T, s *Store, n int) {
	t.Helper()
	deadline := time.Now().Add(10 * time.Second)
	for {
		if done, _ := s.Progress(); done >= n {
			return
		}
		if time.Now().After(deadline) {
			t.Fatalf("no %d columns filled in 10 s", n)
		}
		time.Sleep(time.Millisecond)
	}
}

// TestSharedWaiters: several waiters at once share one filling (each
// column computed once) and all see it complete.
func TestSharedWaiters(t *testing.T) {
	f := &valueFill{}
	s := newTestStore(t, Shape{30, 30, 10}, f, nil, Options{Edge: 4, Workers: 3})
	var wg sync.WaitGroup
	errs := make([]error, 8)
	for k := range errs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			errs[k] = s.Wait(context.Background(), func(done, total int) {})
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			t.Fatal(err)
		}
	}
	if len(f.tiles) != 64 {
		t.Errorf("%d columns computed for 8 waiters, want 64 (each once)", len(f.tiles))
	}
	checkAll(t, s, false)
}

// TestFillErrorStops: a failing column stops the store with an error that
// names what failed, and every waiter gets it.
func TestFillErrorStops(t *testing.T) {
	fail := func(ctx context.Context, tl Tile, dst [][]float32) ([][]float32, error) {
		return nil, errors.New("disk on fire at trace 7")
	}
	s, err := New("envelope", Shape{10, 10, 10}, fail, nil, Options{Dir: t.TempDir(), Edge: 4})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	if err := s.Wait(context.Background(), nil); err == nil || !strings.Contains(err.Error(), "disk on fire") {
		t.Errorf("wait returned %v", err)
	}
	short := func(ctx context.Context, tl Tile, dst [][]float32) ([][]float32, error) {
		return make([][]float32, 1), nil
	}
	s2, err := New("envelope", Shape{10, 10, 10}, short, nil, Options{Dir: t.TempDir(), Edge: 4})
	if err != nil {
		t.Fatal(err)
	}
	defer s2.Close()
	if err := s2.Wait(context.Background(), nil); err == nil || !strings.Contains(err.Error(), "want 16") {
		t.Errorf("wrong trace count: wait returned %v", err)
	}
}

// TestCancelAnyMomentLeavesNothing closes stores at moments spread over
// their filling: the cache folder stays empty, no open file of the process
// points into it, and a waiter gets an error, never a hang.
func TestCancelAnyMomentLeavesNothing(t *testing.T) {
	dir := t.TempDir()
	for k := range 12 {
		f := &valueFill{}
		s, err := New("test", Shape{40, 40, 50}, func(ctx context.Context, tl Tile, dst [][]float32) ([][]float32, error) {
			return f.fill(ctx, tl, dst)
		}, NewCache(1<<16), Options{Dir: dir, Edge: 4})
		f.shape = s.Shape()
		if err != nil {
			t.Fatal(err)
		}
		ctx, cancel := context.WithCancel(context.Background())
		waited := make(chan error, 1)
		go func() { waited <- s.Wait(ctx, nil) }()
		time.Sleep(time.Duration(k) * 300 * time.Microsecond)
		if k%2 == 0 {
			cancel()
		}
		s.Close()
		select {
		case <-waited:
		case <-time.After(10 * time.Second):
			t.Fatal("a waiter hung after Close")
		}
		cancel()
		if _, _, err := s.TimeSlice(0); !ErrClosed(err) {
			t.Errorf("time slice of a closed store: %v", err)
		}
	}
	apptest.NoLeftovers(t, dir)
}

// TestNoRoomRefused: a store larger than the cache folder's free space is
// refused before anything is written, naming the folder and both sizes.
func TestNoRoomRefused(t *testing.T) {
	free, ok := freeBytes(t.TempDir())
	if !ok {
		segytest.SkipOutsideCI(t, "free space unknown on this system")
	}
	n := int(math.Sqrt(float64(free/(64*4)))) + 1000 // far more than free
	_, err := New("envelope", Shape{n, n, 64}, (&valueFill{}).fill, nil, Options{Dir: t.TempDir()})
	if err == nil || !strings.Contains(err.Error(), "free") {
		t.Errorf("store of %d x %d traces in a folder with %d bytes free: %v", n, n, free, err)
	}
}

// TestParseBytes reads the memory setting's forms.
func TestParseBytes(t *testing.T) {
	for s, want := range map[string]int64{"1024": 1024, "512M": 512 << 20, "2G": 2 << 30, "2GiB": 2 << 30, "64k": 64 << 10, "3 MB": 3 << 20} {
		if got, err := ParseBytes(s); err != nil || got != want {
			t.Errorf("ParseBytes(%q) = %d, %v; want %d", s, got, err, want)
		}
	}
	for _, s := range []string{"", "lots", "-5M", "1.5G", "99999999999G"} {
		if _, err := ParseBytes(s); err == nil {
			t.Errorf("ParseBytes(%q) accepted", s)
		}
	}
	t.Setenv("QUADTRACE_BRICK_MEMORY", "many")
	if _, err := DefaultMemory(); err == nil || !strings.Contains(err.Error(), "QUADTRACE_BRICK_MEMORY") {
		t.Errorf("bad setting: %v", err)
	}
	t.Setenv("QUADTRACE_BRICK_MEMORY", "")
	if n, err := DefaultMemory(); err != nil || n <= 0 {
		t.Errorf("default memory %d, %v", n, err)
	}
}

// TestResidentBrickHoldsOnlyItself: time slices read while the store fills
// keep the first brick of each column recently used while the second is
// dropped; the memory held must stay near the bound (each brick its own
// array), not grow by whole columns.
func TestResidentBrickHoldsOnlyItself(t *testing.T) {
	const brick = 64 * 64 * 64 * 4
	budget := int64(10 * brick)
	cache := NewCache(budget)
	shape := Shape{64 * 32, 64, 128} // 32 columns of 2 bricks of 1 MiB
	f := &valueFill{shape: shape}
	var s *Store
	touch := func(ctx context.Context, tl Tile, dst [][]float32) ([][]float32, error) {
		if _, _, err := s.TimeSlice(0); err != nil { // layer 0 becomes recently used
			return nil, err
		}
		return f.fill(ctx, tl, dst)
	}
	s, err := New("test", shape, touch, cache, Options{Dir: t.TempDir(), Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	defer s.Close()
	runtime.GC()
	var before runtime.MemStats
	runtime.ReadMemStats(&before)
	if err := s.Wait(context.Background(), nil); err != nil {
		t.Fatal(err)
	}
	runtime.GC()
	var after runtime.MemStats
	runtime.ReadMemStats(&after)
	held := int64(after.HeapAlloc) - int64(before.HeapAlloc)
	if held > budget*13/10 {
		t.Errorf("%d MiB held after filling with resident bricks bounded to %d MiB", held>>20, budget>>20)
	}
}

// TestTransposeEqualsDirect: the cache-blocked transposition puts every
// sample where the direct formula says (brick z/e, cell
// (z%e)*e*e + (k/nx)*e + k%nx), for tiles narrower than a block, wider than
// one, partial tiles and a partial last brick; cells it must not touch keep
// their value.
func TestTransposeEqualsDirect(t *testing.T) {
	for _, c := range []struct{ ni, nx, e, ns int }{
		{1, 1, 1, 1}, {3, 5, 8, 11}, {8, 8, 8, 16}, {7, 20, 32, 33}, {64, 64, 64, 751}, {2, 17, 17, 40},
	} {
		traces := make([][]float32, c.ni*c.nx)
		for k := range traces {
			traces[k] = make([]float32, c.ns)
			for z := range traces[k] {
				traces[k][z] = float32(k*1000 + z + 1)
			}
		}
		ntz := (c.ns + c.e - 1) / c.e
		const untouched = -7
		bricks := make([][]float32, ntz)
		for z := range bricks {
			bricks[z] = make([]float32, c.e*c.e*c.e)
			for i := range bricks[z] {
				bricks[z][i] = untouched
			}
		}
		transpose(bricks, traces, c.nx, c.e, c.ns)
		want := make([][]float32, ntz)
		for z := range want {
			want[z] = make([]float32, c.e*c.e*c.e)
			for i := range want[z] {
				want[z][i] = untouched
			}
		}
		for k, tr := range traces {
			for z, v := range tr {
				want[z/c.e][(z%c.e)*c.e*c.e+(k/c.nx)*c.e+k%c.nx] = v
			}
		}
		for z := range want {
			for i := range want[z] {
				if bricks[z][i] != want[z][i] {
					t.Fatalf("%+v: brick %d cell %d = %v, want %v", c, z, i, bricks[z][i], want[z][i])
				}
			}
		}
	}
}

// TestPinnedBrickNotRecycled: a brick evicted while pinned is not handed
// out again until unpinned; one evicted unpinned is (the free list), and
// the free list stays within its bound.
func TestPinnedBrickNotRecycled(t *testing.T) {
	const n = 1024 // floats: 4 KiB bricks
	c := NewCache(16 * n * 4)
	s := &Store{}
	a := make([]float32, n)
	c.put(s, 0, a)
	got, pin := c.pin(s, 0)
	if &got[0] != &a[0] {
		t.Fatal("pin returned another brick")
	}
	for b := 1; b <= 16; b++ { // evicts brick 0 (least recently used)
		c.put(s, b, make([]float32, n))
	}
	if d, _ := c.pin(s, 0); d != nil {
		t.Fatal("brick 0 still resident")
	}
	for range 3 {
		if nb := c.newBrick(n); &nb[0] == &a[0] {
			t.Fatal("a pinned brick was handed out for a new column")
		}
	}
	c.unpin(pin)
	if nb := c.newBrick(n); &nb[0] != &a[0] {
		t.Error("the unpinned evicted brick was not reused")
	}
	for b := 17; b < 200; b++ {
		c.put(s, b, make([]float32, n))
	}
	if c.freeBytes > c.maxFreeBytes() {
		t.Errorf("free list holds %d bytes, bound %d", c.freeBytes, c.maxFreeBytes())
	}
}

// TestReadersWhileBricksRecycle: time slices, inlines and crosslines read
// over and over while a store fills through a cache small enough that
// bricks are evicted and their memory reused all along: every value a
// reader gets is right (run with -race too).
func TestReadersWhileBricksRecycle(t *testing.T) {
	const edge = 8
	brick := int64(edge * edge * edge * 4)
	shape := Shape{40, 40, 50}
	cache := NewCache(32 * brick)
	s := newTestStore(t, shape, &valueFill{}, cache, Options{Edge: edge})
	done := make(chan struct{})
	errs := make(chan error, 3)
	read := func(r int) {
		for k := 0; ; k++ {
			select {
			case <-done:
				errs <- nil
				return
			default:
			}
			var err error
			switch r {
			case 0:
				z := (k * 7) % shape.Samples
				grid, pending, e := s.TimeSlice(z)
				err = e
				for i := range grid {
					for x, v := range grid[i] {
						if (pending == nil || !pending[i][x]) && v != value(i, x, z) {
							err = fmt.Errorf("time slice %d at (%d,%d) = %v, want %v", z, i, x, v, value(i, x, z))
						}
					}
				}
			case 1:
				i := k % shape.Inlines
				traces, _, e := s.Inline(i)
				err = cmp.Or(e, inlineMismatch(i, traces))
			case 2:
				x := k % shape.Crosslines
				traces, _, e := s.Crossline(x)
				err = cmp.Or(e, crosslineMismatch(x, traces))
			}
			if err != nil {
				errs <- err
				return
			}
		}
	}
	for r := range 3 {
		go read(r)
	}
	werr := s.Wait(context.Background(), nil)
	close(done)
	for range 3 {
		if err := <-errs; err != nil {
			t.Error(err)
		}
	}
	if werr != nil {
		t.Fatal(werr)
	}
	checkAll(t, s, false)
}

// TestCancelWinsOverFinishedFill: a caller that cancels (here from its
// progress callback) gets ctx's error even when the filling goes on and
// finishes before Wait looks again; this fill finishes every column while
// the callback still runs, the worst case of a loaded machine.
func TestCancelWinsOverFinishedFill(t *testing.T) {
	gate := make(chan struct{})
	f := &valueFill{gate: gate}
	s := newTestStore(t, Shape{12, 12, 10}, f, nil, Options{Edge: 4, Workers: 1})
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	go func() { gate <- struct{}{} }() // one column through the gate
	opened := false
	err := s.Wait(ctx, func(done, total int) {
		if done >= 1 && done < total && !opened {
			cancel()
			// Open the gate and let the filler finish every column
			// before Wait goes on.
			opened = true
			close(gate)
			if err := s.Wait(context.Background(), nil); err != nil {
				t.Error(err)
			}
		}
	})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("Wait after a cancel and a finished fill: %v, want context.Canceled", err)
	}
	checkAll(t, s, false)
}
