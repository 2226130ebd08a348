// Package bricks keeps a volume of float32 samples (inlines x crosslines x
// samples) as cubic bricks in one temporary file, so that a time slice or a
// section reads few of them, and fills it progressively in the background,
// the part nearest the view first.
//
// The unit of work is a column: the Edge x Edge traces of one tile, over the
// whole trace length (complex-trace attributes need the whole trace: the
// analytic trace is a transform of all of it). A filled column is written as
// its Edge-sample-deep bricks, one after another, at a fixed place in the
// file; a brick holds its samples time-slowest ([sample][inline][crossline]),
// so one time slice is one contiguous Edge x Edge plane of each brick of a
// layer. The file is an outfile.ScratchIn file in the cache folder: unnamed
// where the system allows, so no kill leaves it behind; Close releases it.
// Samples are stored in the machine's own byte order: the file is read only
// by the process that wrote it.
//
// The bricks just filled stay resident in a Cache shared by the stores of
// a survey and bounded in bytes (least recently used first out); sections
// are read from resident bricks only. Time slices read only their planes,
// from resident bricks or from the file, and keep nothing.
package bricks

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"sync"
	"sync/atomic"
	"unsafe"

	"quadtrace/app/outfile"
)

// Edge is the default brick edge, in samples (a 64 x 64 x 64 brick of
// float32 is 1 MiB).
const Edge = 64

// Shape is a volume's size: Inlines rows by Crosslines columns of traces of
// Samples samples.
type Shape struct{ Inlines, Crosslines, Samples int }

// Tile is a rectangle of traces: inline indices [I0, I1) by crossline
// indices [X0, X1) (indices from 0, not line numbers).
type Tile struct{ I0, I1, X0, X1 int }

// Traces is the number of traces in t.
func (t Tile) Traces() int { return (t.I1 - t.I0) * (t.X1 - t.X0) }

// FillFunc computes the traces of one tile, inline-major: trace
// (i, x) of the tile at index (i-I0)*(X1-X0)+(x-X0), each Samples long (NaN
// where the survey has no trace). dst is scratch it may fill and return
// (t.Traces() traces of Samples each, owned by the calling filler and
// reused for its next column, so a fill touches no fresh memory), or it
// returns traces of its own; either way it keeps no reference to what it
// returns. It must honour ctx and may be called from several goroutines at
// once.
type FillFunc func(ctx context.Context, t Tile, dst [][]float32) ([][]float32, error)

// Options set where a store keeps its file and how it fills.
type Options struct {
	// Dir is the folder of the temporary file; "" means DefaultDir().
	Dir string
	// Edge is the brick edge in samples; 0 means Edge (tests use small ones).
	Edge int
	// Workers is how many columns are filled at once; 0 means 2, so one
	// column is read while another is computed (the compute itself uses
	// every core).
	Workers int
}

// DefaultDir is the folder stores use: $QUADTRACE_CACHE_DIR when set, else
// quadtrace in the user's cache folder (os.UserCacheDir), else in the
// system's temporary folder.
func DefaultDir() string {
	if d := os.Getenv("QUADTRACE_CACHE_DIR"); d != "" {
		return d
	}
	if d, err := os.UserCacheDir(); err == nil {
		return filepath.Join(d, "quadtrace")
	}
	return filepath.Join(os.TempDir(), "quadtrace")
}

// tile states
const (
	empty = iota
	filling
	filled
)

// Store is one volume of bricks and its background filling. Its methods
// are safe for concurrent use.
type Store struct {
	shape          Shape
	edge           int
	nti, ntx, ntz  int   // tiles along inline and crossline, bricks down a column
	brickFloats    int   // edge^3
	columnBytes    int64 // ntz bricks
	fill           FillFunc
	workers        int
	cache          *Cache
	name           string // for errors: what the store holds
	file           *os.File
	fileMu         sync.RWMutex // held for reading by every file access; Close takes it for writing
	fillCtx        context.Context
	stopFill       context.CancelFunc
	fillersRunning sync.WaitGroup

	mu      sync.Mutex
	state   []uint8 // per tile, ti*ntx+tx
	done    int
	demand  int // requests waiting for the store
	running int // filler goroutines
	focusI  float64
	focusX  float64
	err     error         // the first fill error; the store is then dead
	changed chan struct{} // closed (and replaced) whenever a tile is filled or an error is set
	closed  bool
}

// New makes a store of the given shape whose columns fill computes, with
// its file in opt.Dir. name says what it holds (it prefixes errors). Bricks
// resident in memory are accounted in cache (NewCache).
func New(name string, shape Shape, fill FillFunc, cache *Cache, opt Options) (*Store, error) {
	if shape.Inlines <= 0 || shape.Crosslines <= 0 || shape.Samples <= 0 {
		return nil, fmt.Errorf("%s: empty volume %d x %d x %d", name, shape.Inlines, shape.Crosslines, shape.Samples)
	}
	edge := opt.Edge
	if edge <= 0 {
		edge = Edge
	}
	workers := opt.Workers
	if workers <= 0 {
		workers = 2
	}
	dir := opt.Dir
	if dir == "" {
		dir = DefaultDir()
	}
	s := &Store{
		shape: shape, edge: edge, fill: fill, workers: workers, cache: cache, name: name,
		nti: ceilDiv(shape.Inlines, edge), ntx: ceilDiv(shape.Crosslines, edge), ntz: ceilDiv(shape.Samples, edge),
		brickFloats: edge * edge * edge,
		changed:     make(chan struct{}),
		focusI:      math.NaN(), focusX: math.NaN(),
	}
	s.columnBytes = int64(s.ntz) * int64(s.brickFloats) * 4
	s.state = make([]uint8, s.nti*s.ntx)
	need := int64(s.nti*s.ntx) * s.columnBytes
	if err := os.MkdirAll(dir, 0o700); err != nil {
		return nil, fmt.Errorf("%s: cache folder: %w", name, err)
	}
	if free, ok := freeBytes(dir); ok && free < need {
		return nil, fmt.Errorf("%s: cache folder %s has %.2f GiB free, the store needs %.2f GiB", name, dir, float64(free)/(1<<30), float64(need)/(1<<30))
	}
	f, err := outfile.ScratchIn(dir, "quadtrace-bricks-*.f32")
	if err != nil {
		return nil, fmt.Errorf("%s: brick file in %s: %w", name, dir, err)
	}
	s.file = f
	s.fillCtx, s.stopFill = context.WithCancel(context.Background())
	return s, nil
}

// Shape returns the volume's size.
func (s *Store) Shape() Shape { return s.shape }

// Progress returns how many columns are filled, of how many.
func (s *Store) Progress() (done, total int) {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.done, len(s.state)
}

// Complete reports whether every column is filled.
func (s *Store) Complete() bool {
	done, total := s.Progress()
	return done == total
}

// Err returns the error that stopped the filling, if any.
func (s *Store) Err() error {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.err
}

// SetFocus says where the view is, in inline and crossline indices (NaN:
// no preference along that axis, e.g. the crossline of an inline
// section). Columns are filled nearest first, by distance from that point
// (or line). Time does not order the work: a column covers every sample.
func (s *Store) SetFocus(inline, crossline float64) {
	s.mu.Lock()
	s.focusI, s.focusX = inline, crossline
	s.mu.Unlock()
}

// Wait fills the store until every column is filled (nil), the fill fails
// (its error) or ctx ends (ctx.Err(), even when the store is full by then). progress, when not nil, gets the
// columns filled so far after each one, from the caller's goroutine.
// Concurrent waiters share one filling; when the last one leaves, the
// columns in progress are finished and no new ones are started, so a later
// Wait goes on where this one stopped.
func (s *Store) Wait(ctx context.Context, progress func(done, total int)) error {
	s.mu.Lock()
	if s.closed {
		s.mu.Unlock()
		return fmt.Errorf("%s: %w", s.name, os.ErrClosed)
	}
	s.demand++
	s.startFillers()
	defer func() {
		s.mu.Lock()
		s.demand--
		s.mu.Unlock()
	}()
	last := -1
	for {
		done, total, err, ch := s.done, len(s.state), s.err, s.changed
		s.mu.Unlock()
		if progress != nil && done != last {
			progress(done, total)
			last = done
		}
		if err != nil {
			return err
		}
		// A cancel wins over a fill that finished meanwhile: the filler
		// goes on between the caller's cancel (from progress, say) and
		// this check, and a caller that gave up must not get a result.
		if err := ctx.Err(); err != nil {
			return err
		}
		if done == total {
			return nil
		}
		select {
		case <-ctx.Done():
			return ctx.Err()
		case <-ch:
		}
		s.mu.Lock()
		if s.closed && s.err == nil {
			s.mu.Unlock()
			return fmt.Errorf("%s: %w", s.name, os.ErrClosed)
		}
	}
}

// startFillers starts filler goroutines up to s.workers. s.mu is held.
func (s *Store) startFillers() {
	for s.running < s.workers && s.err == nil && !s.closed && s.done < len(s.state) {
		s.running++
		s.fillersRunning.Add(1)
		go s.filler()
	}
}

// filler fills columns, nearest the focus first, while anyone waits.
func (s *Store) filler() {
	defer s.fillersRunning.Done()
	var scratch []float32 // this filler's columns, one after another
	for {
		s.mu.Lock()
		t := -1
		if s.demand > 0 && s.err == nil && !s.closed {
			t = s.nearestEmpty()
		}
		if t < 0 {
			s.running--
			s.mu.Unlock()
			return
		}
		s.state[t] = filling
		s.mu.Unlock()

		if scratch == nil {
			scratch = make([]float32, s.edge*s.edge*s.shape.Samples)
		}
		err := s.fillColumn(t, scratch)

		s.mu.Lock()
		switch {
		case err == nil:
			s.state[t] = filled
			s.done++
		case s.fillCtx.Err() != nil: // closing: not an error of the data
			s.state[t] = empty
		default:
			s.state[t] = empty
			if s.err == nil {
				s.err = err
			}
		}
		close(s.changed)
		s.changed = make(chan struct{})
		s.mu.Unlock()
	}
}

// nearestEmpty returns the empty tile nearest the focus (the first in
// order without one), or -1. s.mu is held.
func (s *Store) nearestEmpty() int {
	best, bestD := -1, math.Inf(1)
	for t, st := range s.state {
		if st != empty {
			continue
		}
		ti, tx := t/s.ntx, t%s.ntx
		var d float64
		if !math.IsNaN(s.focusI) {
			d += sq(s.axisDistance(ti, s.focusI, s.shape.Inlines))
		}
		if !math.IsNaN(s.focusX) {
			d += sq(s.axisDistance(tx, s.focusX, s.shape.Crosslines))
		}
		if d < bestD {
			best, bestD = t, d
		}
	}
	return best
}

// axisDistance is the distance in traces from index at to tile k's span
// along an axis of n traces (0 inside it).
func (s *Store) axisDistance(k int, at float64, n int) float64 {
	lo, hi := float64(k*s.edge), float64(min(n, (k+1)*s.edge)-1)
	switch {
	case at < lo:
		return lo - at
	case at > hi:
		return at - hi
	}
	return 0
}

// tile returns tile t's rectangle.
func (s *Store) tile(t int) Tile {
	ti, tx := t/s.ntx, t%s.ntx
	return Tile{I0: ti * s.edge, I1: min(s.shape.Inlines, (ti+1)*s.edge), X0: tx * s.edge, X1: min(s.shape.Crosslines, (tx+1)*s.edge)}
}

// fillColumn computes tile t, with scratch (edge*edge*Samples floats) as
// the fill's dst, and writes its bricks.
func (s *Store) fillColumn(t int, scratch []float32) error {
	tl := s.tile(t)
	traces, err := s.fill(s.fillCtx, tl, rows(scratch[:tl.Traces()*s.shape.Samples], tl.Traces(), s.shape.Samples))
	if err != nil {
		return err
	}
	if len(traces) != tl.Traces() {
		return fmt.Errorf("%s: column of inlines %d-%d, crosslines %d-%d: %d traces computed, want %d", s.name, tl.I0, tl.I1-1, tl.X0, tl.X1-1, len(traces), tl.Traces())
	}
	nx := tl.X1 - tl.X0
	e := s.edge
	for k, tr := range traces {
		if len(tr) != s.shape.Samples {
			return fmt.Errorf("%s: column of inlines %d-%d, crosslines %d-%d: trace %d has %d samples, want %d", s.name, tl.I0, tl.I1-1, tl.X0, tl.X1-1, k, len(tr), s.shape.Samples)
		}
	}
	// Each brick is its own allocation, so a brick kept resident holds
	// only itself (a sub-slice of one column-wide array would keep the
	// whole column alive: measured 1.2 GB held for 192 MB of resident
	// bricks).
	bricks := make([][]float32, s.ntz)
	for z := range bricks {
		if s.cache != nil {
			bricks[z] = s.cache.newBrick(s.brickFloats)
		} else {
			bricks[z] = make([]float32, s.brickFloats)
		}
	}
	transpose(bricks, traces, nx, e, s.shape.Samples)
	s.fileMu.RLock()
	defer s.fileMu.RUnlock()
	if s.file == nil {
		return fmt.Errorf("%s: %w", s.name, os.ErrClosed)
	}
	for z, brick := range bricks {
		off := int64(t)*s.columnBytes + int64(z)*int64(s.brickFloats)*4
		if _, err := s.file.WriteAt(floatBytes(brick), off); err != nil {
			return fmt.Errorf("%s: writing column %d to the brick file: %w", s.name, t, err)
		}
	}
	if s.cache != nil {
		for z, brick := range bricks {
			s.cache.put(s, t*s.ntz+z, brick)
		}
	}
	return nil
}

// transposeBlock is how many traces of one inline transpose copies
// together: one 64-byte cache line of each brick plane is written whole
// while the block's traces are read forwards, 16 streams at once.
const transposeBlock = 16

// transpose writes a column's traces into its bricks: trace k (inline-major,
// nx traces to an inline of the tile) at sample z lands in brick z/e at
// (z%e)*e*e + (k/nx)*e + k%nx (time-slowest). It works in blocks of
// transposeBlock neighbouring traces of one inline so every write fills a
// cache line of one plane and every read walks its trace forwards (the
// trace-by-trace scatter it replaced wrote 4-byte values 16 KiB apart:
// BenchmarkFillColumn). Cells of a brick outside the tile or beyond the
// last sample are left as they are.
func transpose(bricks, traces [][]float32, nx, e, ns int) {
	e2 := e * e
	for k0 := 0; k0 < len(traces); k0 += nx {
		row := traces[k0 : k0+nx]
		at0 := (k0 / nx) * e // first cell of this inline in a plane
		for x0 := 0; x0 < nx; x0 += transposeBlock {
			block := row[x0:min(nx, x0+transposeBlock)]
			for z, brick := range bricks {
				z0, z1 := z*e, min(ns, (z+1)*e)
				for zk := z0; zk < z1; zk++ {
					off := (zk-z0)*e2 + at0 + x0
					dst := brick[off : off+len(block) : off+len(block)]
					for j, tr := range block {
						dst[j] = tr[zk]
					}
				}
			}
		}
	}
}

// TimeSlice returns the values at sample k, [inline][crossline], and the
// cells not yet computed: pending is nil when every column is filled, else
// pending[i][x] is true where the value is not computed yet (the value is
// then NaN). It never waits for the filling.
func (s *Store) TimeSlice(k int) (grid [][]float32, pending [][]bool, err error) {
	if k < 0 || k >= s.shape.Samples {
		return nil, nil, fmt.Errorf("%s: sample %d is outside 0 to %d", s.name, k, s.shape.Samples-1)
	}
	s.mu.Lock()
	state := append([]uint8(nil), s.state...)
	complete := s.done == len(s.state)
	s.mu.Unlock()
	ni, nx := s.shape.Inlines, s.shape.Crosslines
	grid = rows(make([]float32, ni*nx), ni, nx)
	if !complete {
		pending = make([][]bool, ni)
		flags := make([]bool, ni*nx)
		for i := range pending {
			pending[i] = flags[i*nx : (i+1)*nx : (i+1)*nx]
		}
	}
	z := k / s.edge
	nan := float32(math.NaN())
	s.fileMu.RLock()
	defer s.fileMu.RUnlock()
	if s.file == nil {
		return nil, nil, fmt.Errorf("%s: %w", s.name, os.ErrClosed)
	}
	var todo []int
	for t, st := range state {
		if st == filled {
			todo = append(todo, t)
			continue
		}
		tl := s.tile(t)
		for i := tl.I0; i < tl.I1; i++ {
			for x := tl.X0; x < tl.X1; x++ {
				grid[i][x] = nan
				pending[i][x] = true
			}
		}
	}
	// Planes not resident are read by several goroutines at once, so the
	// disk has many requests in flight when the brick file is not cached;
	// each tile fills its own cells of grid.
	var next atomic.Int64
	errs := make([]error, min(planeReaders, len(todo)))
	var wg sync.WaitGroup
	for w := range errs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			plane := make([]float32, s.edge*s.edge)
			for {
				n := int(next.Add(1) - 1)
				if n >= len(todo) {
					return
				}
				if err := s.copyPlane(grid, todo[n], z, k%s.edge, plane); err != nil {
					errs[w] = err
					return
				}
			}
		}()
	}
	wg.Wait()
	if err := errors.Join(errs...); err != nil {
		return nil, nil, err
	}
	return grid, pending, nil
}

// planeReaders is how many goroutines read the planes of a time slice.
const planeReaders = 8

// copyPlane copies plane zk of brick layer z of filled tile t into grid,
// from the resident brick or the file (through buf). s.fileMu is held.
func (s *Store) copyPlane(grid [][]float32, t, z, zk int, buf []float32) error {
	e, e2 := s.edge, s.edge*s.edge
	tl := s.tile(t)
	src := buf
	if b, pin := s.resident(t*s.ntz + z); b != nil {
		defer s.cache.unpin(pin)
		src = b[zk*e2 : (zk+1)*e2]
	} else {
		// only the rows of the plane the tile uses
		n := ((tl.I1-tl.I0-1)*e + (tl.X1 - tl.X0)) * 4
		off := int64(t)*s.columnBytes + (int64(z)*int64(s.brickFloats)+int64(zk*e2))*4
		if _, err := s.file.ReadAt(floatBytes(buf)[:n], off); err != nil {
			return fmt.Errorf("%s: reading the brick file at byte %d: %w", s.name, off, err)
		}
	}
	for i := tl.I0; i < tl.I1; i++ {
		copy(grid[i][tl.X0:tl.X1], src[(i-tl.I0)*e:(i-tl.I0)*e+tl.X1-tl.X0])
	}
	return nil
}

// Inline returns the traces of inline index i (one per crossline), from
// resident bricks; ok is false when a brick it crosses is not filled or
// not resident (the caller computes the section instead).
func (s *Store) Inline(i int) (traces [][]float32, ok bool, err error) {
	if i < 0 || i >= s.shape.Inlines {
		return nil, false, fmt.Errorf("%s: inline index %d is outside 0 to %d", s.name, i, s.shape.Inlines-1)
	}
	ti := i / s.edge
	return s.section(s.shape.Crosslines, func(k int) int { return ti*s.ntx + k/s.edge }, func(k int) int { return (i-ti*s.edge)*s.edge + k%s.edge })
}

// Crossline returns the traces of crossline index x (one per inline), from
// resident bricks; ok is false when a brick it crosses is not filled or
// not resident.
func (s *Store) Crossline(x int) (traces [][]float32, ok bool, err error) {
	if x < 0 || x >= s.shape.Crosslines {
		return nil, false, fmt.Errorf("%s: crossline index %d is outside 0 to %d", s.name, x, s.shape.Crosslines-1)
	}
	tx := x / s.edge
	return s.section(s.shape.Inlines, func(k int) int { return (k/s.edge)*s.ntx + tx }, func(k int) int { return (k%s.edge)*s.edge + x - tx*s.edge })
}

// section gathers n traces; trace k lies in tile tileOf(k) at position
// at(k) of each brick plane. Only resident bricks are read: one row of a
// brick is 1/64 of it, so reading bricks from the file for a section would
// cost more than computing the section from its traces.
func (s *Store) section(n int, tileOf, at func(k int) int) ([][]float32, bool, error) {
	s.mu.Lock()
	for k := 0; k < n; k += s.edge {
		if s.state[tileOf(k)] != filled {
			s.mu.Unlock()
			return nil, false, nil
		}
	}
	s.mu.Unlock()
	var bricks [][]float32 // tile-major, then depth
	var pins []*entry      // unpinned when the traces are copied
	defer func() {
		for _, pin := range pins {
			s.cache.unpin(pin)
		}
	}()
	for k0 := 0; k0 < n; k0 += s.edge {
		t := tileOf(k0)
		for z := range s.ntz {
			b, pin := s.resident(t*s.ntz + z)
			if b == nil {
				return nil, false, nil
			}
			bricks = append(bricks, b)
			pins = append(pins, pin)
		}
	}
	ns, e2 := s.shape.Samples, s.edge*s.edge
	traces := rows(make([]float32, n*ns), n, ns)
	for k0 := 0; k0 < n; k0 += s.edge {
		for z := range s.ntz {
			b := bricks[(k0/s.edge)*s.ntz+z]
			for k := k0; k < min(n, k0+s.edge); k++ {
				p, tr := at(k), traces[k]
				for zk := z * s.edge; zk < min(ns, (z+1)*s.edge); zk++ {
					tr[zk] = b[(zk-z*s.edge)*e2+p]
				}
			}
		}
	}
	return traces, true, nil
}

// resident returns brick b when it is in the cache, pinned: the caller
// calls s.cache.unpin(pin) when it has copied what it needs.
func (s *Store) resident(b int) (data []float32, pin *entry) {
	if s.cache == nil {
		return nil, nil
	}
	return s.cache.pin(s, b)
}

// Close stops the filling (columns in progress are abandoned), drops the
// store's resident bricks and releases its file. Waiters get an error.
func (s *Store) Close() error {
	s.mu.Lock()
	if s.closed {
		s.mu.Unlock()
		return nil
	}
	s.closed = true
	close(s.changed)
	s.changed = make(chan struct{})
	s.mu.Unlock()
	s.stopFill()
	s.fillersRunning.Wait()
	if s.cache != nil {
		s.cache.drop(s)
	}
	s.fileMu.Lock()
	defer s.fileMu.Unlock()
	f := s.file
	s.file = nil
	if f == nil {
		return nil
	}
	name := f.Name()
	err := f.Close()
	if _, statErr := os.Stat(name); statErr == nil {
		os.Remove(name) // a named scratch file (systems without unnamed files)
	}
	return err
}

// ErrClosed reports whether err comes from using a closed store.
func ErrClosed(err error) bool { return errors.Is(err, os.ErrClosed) }

func rows(flat []float32, n, m int) [][]float32 {
	out := make([][]float32, n)
	for i := range out {
		out[i] = flat[i*m : (i+1)*m : (i+1)*m]
	}
	return out
}

// floatBytes views xs as bytes in the machine's order (the brick file is
// read only by the process that wrote it).
func floatBytes(xs []float32) []byte {
	if len(xs) == 0 {
		return nil
	}
	return unsafe.Slice((*byte)(unsafe.Pointer(&xs[0])), len(xs)*4)
}

func ceilDiv(a, b int) int { return (a + b - 1) / b }

func sq(x float64) float64 { return x * x }

// Evict drops the store's file from the page cache and its bricks from
// memory, so the next reads come from the disk: for benchmarks of a cold
// cache (posix_fadvise POSIX_FADV_DONTNEED on Linux; an error elsewhere).
func (s *Store) Evict() error {
	if s.cache != nil {
		s.cache.drop(s)
	}
	s.fileMu.RLock()
	defer s.fileMu.RUnlock()
	if s.file == nil {
		return fmt.Errorf("%s: %w", s.name, os.ErrClosed)
	}
	return evict(s.file)
}
