package volume

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"slices"
	"sync"
	"sync/atomic"

	"quadtrace/app/bricks"
	"quadtrace/compute"
)

// maxStores is how many whole-volume stores (attributes, or amplitude of a
// large file) a volume keeps; beyond it the least recently used one not in
// use is released, so the cache folder holds at most this many volumes.
const maxStores = 4

// Attribute returns attribute a (with parameters p, after conditioning cond)
// on slice s.
//
// Inline and crossline sections come from the attribute's brick store when
// one is filled where the section lies, else they are computed from their
// traces. A time slice needs the attribute on every trace: it comes from a
// brick store (package bricks) shared by every request with the same
// attribute, parameters, conditioning and offset, which is filled,
// nearest the focus (SetFocus) first, while requests wait (progress is
// called per filled column, ctx ends the wait). AttributeSoFar gives the
// part filled so far. The amplitude time slice is read from the file
// directly, except for a file that uses amplitude bricks
// (UsesAmplitudeBricks): it then goes through a store too, so each page of
// the file is read once and later slices come from the bricks.
func (v *Volume) Attribute(ctx context.Context, s Slice, a *compute.Attribute, p compute.Params, cond compute.Conditioning, progress func(done, total int)) (Section, error) {
	amplitude := a.ID == "amplitude" && cond == (compute.Conditioning{})
	if s.Orientation != TimeSlice {
		if !amplitude {
			if sec, ok := v.sectionFromStore(s, a, p, cond); ok {
				return sec, nil
			}
		}
		sec, err := v.Read(ctx, s)
		if err != nil || amplitude {
			return sec, err
		}
		return v.apply(ctx, sec, a, p, cond, progress)
	}
	if s.Number < 0 || s.Number >= v.info.Samples {
		return Section{}, fmt.Errorf("%s: sample %d is outside 0 to %d", v.name, s.Number, v.info.Samples-1)
	}
	if amplitude && !v.UsesAmplitudeBricks() {
		return v.Read(ctx, s)
	}
	for try := 0; ; try++ {
		st, release, err := v.attrs.acquire(v, a, p, cond, v.offset(s.Offset))
		if err != nil {
			return Section{}, err
		}
		err = st.Wait(ctx, progress)
		if err == nil {
			var sec Section
			sec, err = v.timeSliceOf(st, s)
			release()
			return sec, err
		}
		release()
		if ctx.Err() != nil {
			return Section{}, ctx.Err()
		}
		// A failed store is dropped, so a later request starts afresh; a
		// store closed under us (the volume closing) is not retried.
		v.attrs.forget(st)
		if bricks.ErrClosed(err) && try == 0 && !v.attrs.isClosed() {
			continue
		}
		return Section{}, err
	}
}

// AttributeSoFar returns the time slice s of attribute a as far as its
// store is filled, without waiting or starting any work: ok is false when
// no request has made the store yet. Cells not yet computed are NaN and
// true in Section.Pending (nil when the slice is complete).
func (v *Volume) AttributeSoFar(s Slice, a *compute.Attribute, p compute.Params, cond compute.Conditioning) (Section, bool) {
	if s.Orientation != TimeSlice || s.Number < 0 || s.Number >= v.info.Samples {
		return Section{}, false
	}
	st := v.attrs.find(attributeKey(a, p, cond, v.offset(s.Offset)))
	if st == nil {
		return Section{}, false
	}
	sec, err := v.timeSliceOf(st, s)
	return sec, err == nil
}

// timeSliceOf reads time slice s from store st.
func (v *Volume) timeSliceOf(st *bricks.Store, s Slice) (Section, error) {
	grid, pending, err := st.TimeSlice(s.Number)
	if err != nil {
		return Section{}, err
	}
	dt, t0 := v.sampling()
	return Section{
		Section: compute.Section{Traces: grid, DT: dt, T0: t0}, Slice: s, Pending: pending,
		Keys: Numbers(v.info.Crossline), InlineKeys: Numbers(v.info.Inline), MapAspect: v.mapAspect(),
	}, nil
}

// sectionFromStore reads an inline or crossline section from the
// attribute's store when it exists and is filled where the section lies.
func (v *Volume) sectionFromStore(s Slice, a *compute.Attribute, p compute.Params, cond compute.Conditioning) (Section, bool) {
	st := v.attrs.find(attributeKey(a, p, cond, v.offset(s.Offset)))
	if st == nil {
		return Section{}, false
	}
	var traces [][]float32
	var ok bool
	var err error
	out := Section{Slice: s}
	switch s.Orientation {
	case Inline:
		k := slices.Index(Numbers(v.info.Inline), s.Number)
		if k < 0 {
			return Section{}, false
		}
		traces, ok, err = st.Inline(k)
		out.Keys, out.MetresPerTrace = Numbers(v.info.Crossline), v.info.InlineSpacingM
	case Crossline:
		k := slices.Index(Numbers(v.info.Crossline), s.Number)
		if k < 0 {
			return Section{}, false
		}
		traces, ok, err = st.Crossline(k)
		out.Keys, out.MetresPerTrace = Numbers(v.info.Inline), v.info.CrosslineSpacingM
	}
	if !ok || err != nil {
		return Section{}, false
	}
	out.DT, out.T0 = v.sampling()
	out.Traces = traces
	return out, true
}

// apply conditions and computes one section, keeping its axes.
func (v *Volume) apply(ctx context.Context, sec Section, a *compute.Attribute, p compute.Params, cond compute.Conditioning, progress func(done, total int)) (Section, error) {
	in := sec.Section
	var err error
	if cond != (compute.Conditioning{}) {
		if in, err = cond.Apply(ctx, in, nil); err != nil {
			return Section{}, err
		}
	}
	out, err := a.Compute(ctx, in, p, progress)
	if err != nil {
		return Section{}, fmt.Errorf("%s: %s %d: %s: %w", v.name, sec.Slice.Orientation, sec.Slice.Number, a.ID, err)
	}
	sec.Section = out
	return sec, nil
}

// TraceAttribute returns attribute a on the single trace at (inline,
// crossline, offset), for the trace panel.
func (v *Volume) TraceAttribute(ctx context.Context, inline, crossline, offset int, a *compute.Attribute, p compute.Params, cond compute.Conditioning) ([]float32, error) {
	tr, err := v.Trace(inline, crossline, offset)
	if err != nil {
		return nil, err
	}
	dt, t0 := v.sampling()
	sec := Section{Section: compute.Section{Traces: [][]float32{tr}, DT: dt, T0: t0}, Slice: Slice{Orientation: Inline, Number: inline, Offset: offset}}
	out, err := v.apply(ctx, sec, a, p, cond, nil)
	if err != nil {
		return nil, err
	}
	return out.Traces[0], nil
}

// SetFocus tells the volume where the view is (line numbers and a sample
// index; a number that is not on the survey means no preference along that
// axis): the stores fill the columns nearest it first. The sample does not
// order the work (a column covers every sample).
func (v *Volume) SetFocus(inline, crossline, sample int) {
	fi := lineIndex(Numbers(v.info.Inline), inline)
	fx := lineIndex(Numbers(v.info.Crossline), crossline)
	v.attrs.setFocus(fi, fx)
}

func lineIndex(lines []int, n int) float64 {
	if k := slices.Index(lines, n); k >= 0 {
		return float64(k)
	}
	return math.NaN()
}

// SetBrickOptions sets where and how this volume keeps its whole-volume
// stores: bricks.Options (folder, brick edge), the bound of resident bricks
// in bytes (0: bricks.DefaultMemory) and the file size from which the
// amplitude goes through bricks too (0: a quarter of the bound's default,
// see UsesAmplitudeBricks; negative: never). It applies to stores made
// afterwards; call it before the first time slice.
func (v *Volume) SetBrickOptions(opt bricks.Options, memory, amplitudeFrom int64) {
	v.attrs.mu.Lock()
	defer v.attrs.mu.Unlock()
	v.attrs.opt, v.attrs.memory, v.attrs.amplitudeFrom = opt, memory, amplitudeFrom
	v.attrs.cache = nil // made again with the new bound
}

// LimitBrickMemory lowers the bound of resident bricks to at most n bytes
// (the window keeps its own memory bounded; see app/viewer).
func (v *Volume) LimitBrickMemory(n int64) {
	v.attrs.mu.Lock()
	defer v.attrs.mu.Unlock()
	if cur, err := v.attrs.bound(); err != nil || n < cur {
		v.attrs.memory = n
		v.attrs.cache = nil
	}
}

// BrickMemoryUsed returns the bytes of resident bricks now.
func (v *Volume) BrickMemoryUsed() int64 {
	v.attrs.mu.Lock()
	c := v.attrs.cache
	v.attrs.mu.Unlock()
	if c == nil {
		return 0
	}
	return c.Used()
}

// BrickMemory returns the bound of resident bricks in bytes.
func (v *Volume) BrickMemory() (int64, error) {
	v.attrs.mu.Lock()
	defer v.attrs.mu.Unlock()
	return v.attrs.bound()
}

// UsesAmplitudeBricks reports whether amplitude time slices go through a
// brick store: for a SEG-Y file whose size reaches the threshold set by
// SetBrickOptions, by default a quarter of the machine's RAM
// (bricks.DefaultMemory), i.e. a file the page cache cannot be counted on
// to hold beside everything else. Below it the file's own pages are
// read directly, which is faster when they are cached.
func (v *Volume) UsesAmplitudeBricks() bool {
	if v.path == "" {
		return false
	}
	fi, err := os.Stat(v.path)
	if err != nil {
		return false
	}
	v.attrs.mu.Lock()
	from := v.attrs.amplitudeFrom
	v.attrs.mu.Unlock()
	if from < 0 {
		return false
	}
	if from == 0 {
		var err error
		if from, err = bricks.DefaultMemory(); err != nil {
			return false
		}
	}
	return fi.Size() >= from
}

// attributeStores holds a volume's brick stores by attribute key. The zero
// value is ready; its methods are safe for concurrent use.
type attributeStores struct {
	mu            sync.Mutex
	stores        map[string]*storeEntry
	tick          int64 // use counter for least-recently-used release
	cache         *bricks.Cache
	opt           bricks.Options
	memory        int64 // bound of resident bricks; 0: bricks.DefaultMemory
	amplitudeFrom int64
	focusI        float64
	focusX        float64
	focusSet      bool
	closed        bool
}

type storeEntry struct {
	st       *bricks.Store
	users    int
	lastUsed int64
}

// attributeKey names a store: attribute, parameters, conditioning, offset.
// The amplitude has no parameters: resolved or not, they name one store.
func attributeKey(a *compute.Attribute, p compute.Params, cond compute.Conditioning, offset int) string {
	if a.ID == "amplitude" {
		return fmt.Sprintf("amplitude||%s|%d", cond.String(), offset)
	}
	return fmt.Sprintf("%s|%v|%s|%d", a.ID, p, cond.String(), offset)
}

// bound returns the resident-brick bound. a.mu is held.
func (a *attributeStores) bound() (int64, error) {
	if a.memory > 0 {
		return a.memory, nil
	}
	return bricks.DefaultMemory()
}

// acquire returns the store for the key, made on first use, and a release
// to call when the request is done with it.
func (a *attributeStores) acquire(v *Volume, attr *compute.Attribute, p compute.Params, cond compute.Conditioning, offset int) (*bricks.Store, func(), error) {
	key := attributeKey(attr, p, cond, offset)
	a.mu.Lock()
	defer a.mu.Unlock()
	if a.closed {
		return nil, nil, fmt.Errorf("%s: %w", v.name, os.ErrClosed)
	}
	a.tick++
	e := a.stores[key]
	if e == nil {
		if a.cache == nil {
			n, err := a.bound()
			if err != nil {
				return nil, nil, err
			}
			// Half the bound for the bricks themselves: Go's collector lets
			// the heap grow to about twice what is live (GOGC=100) before it
			// collects, so the process holds up to the whole bound.
			a.cache = bricks.NewCache(n / 2)
		}
		a.releaseIdle(maxStores - 1)
		shape := bricks.Shape{Inlines: v.info.Inline.Count, Crosslines: v.info.Crossline.Count, Samples: v.info.Samples}
		name := fmt.Sprintf("%s: %s store", v.name, attr.ID)
		st, err := bricks.New(name, shape, v.fillFunc(attr, p, cond, offset), a.cache, a.opt)
		if err != nil {
			return nil, nil, err
		}
		if a.focusSet {
			st.SetFocus(a.focusI, a.focusX)
		}
		e = &storeEntry{st: st}
		if a.stores == nil {
			a.stores = map[string]*storeEntry{}
		}
		a.stores[key] = e
	}
	e.users++
	e.lastUsed = a.tick
	var once sync.Once
	return e.st, func() {
		once.Do(func() {
			a.mu.Lock()
			e.users--
			a.mu.Unlock()
		})
	}, nil
}

// releaseIdle closes the least recently used stores nobody uses until at
// most keep are left (or only used ones). a.mu is held.
func (a *attributeStores) releaseIdle(keep int) {
	for len(a.stores) > keep {
		oldKey, oldest := "", int64(math.MaxInt64)
		for k, e := range a.stores {
			if e.users == 0 && e.lastUsed < oldest {
				oldKey, oldest = k, e.lastUsed
			}
		}
		if oldKey == "" {
			return
		}
		a.stores[oldKey].st.Close()
		delete(a.stores, oldKey)
	}
}

// find returns the store for key, or nil.
func (a *attributeStores) find(key string) *bricks.Store {
	a.mu.Lock()
	defer a.mu.Unlock()
	if e := a.stores[key]; e != nil {
		a.tick++
		e.lastUsed = a.tick
		return e.st
	}
	return nil
}

// forget closes and drops st (after a failure).
func (a *attributeStores) forget(st *bricks.Store) {
	a.mu.Lock()
	defer a.mu.Unlock()
	for k, e := range a.stores {
		if e.st == st {
			delete(a.stores, k)
		}
	}
	st.Close()
}

func (a *attributeStores) setFocus(i, x float64) {
	a.mu.Lock()
	defer a.mu.Unlock()
	a.focusI, a.focusX, a.focusSet = i, x, true
	for _, e := range a.stores {
		e.st.SetFocus(i, x)
	}
}

func (a *attributeStores) isClosed() bool {
	a.mu.Lock()
	defer a.mu.Unlock()
	return a.closed
}

// close releases every store (their files and resident bricks).
func (a *attributeStores) close() {
	a.mu.Lock()
	a.closed = true
	stores := a.stores
	a.stores = nil
	a.mu.Unlock()
	for _, e := range stores {
		e.st.Close()
	}
}

// fillFunc computes the columns of a store: the traces of a tile read from
// the survey (NaN where it has none), conditioned and computed.
func (v *Volume) fillFunc(a *compute.Attribute, p compute.Params, cond compute.Conditioning, offset int) bricks.FillFunc {
	inlines, crosslines := Numbers(v.info.Inline), Numbers(v.info.Crossline)
	ns := v.info.Samples
	dt, t0 := v.sampling()
	amplitude := a.ID == "amplitude" && cond == (compute.Conditioning{})
	// an attribute's input traces, read into a buffer reused from column
	// to column (fresh memory costs a page fault per 4 KiB)
	var inputs sync.Pool
	return func(ctx context.Context, t bricks.Tile, dst [][]float32) ([][]float32, error) {
		in := dst // the amplitude is read straight into the store's scratch
		if !amplitude {
			buf, _ := inputs.Get().(*[]float32)
			if buf == nil || cap(*buf) < t.Traces()*ns {
				b := make([]float32, t.Traces()*ns)
				buf = &b
			}
			defer inputs.Put(buf)
			in = rowsOf((*buf)[:t.Traces()*ns], t.Traces(), ns)
		}
		if err := v.readTile(ctx, t, in, inlines, crosslines, offset); err != nil {
			return nil, err
		}
		if amplitude {
			return in, nil
		}
		sec := compute.Section{Traces: in, DT: dt, T0: t0}
		if cond != (compute.Conditioning{}) {
			var err error
			if sec, err = cond.Apply(ctx, sec, nil); err != nil {
				return nil, err
			}
		}
		out := compute.Section{Traces: dst, DT: dt, T0: t0}
		if err := a.ComputeInto(ctx, sec, out, p, nil); err != nil {
			return nil, fmt.Errorf("%s: inlines %d-%d, crosslines %d-%d: %s: %w", v.name, inlines[t.I0], inlines[t.I1-1], crosslines[t.X0], crosslines[t.X1-1], a.ID, err)
		}
		return dst, nil
	}
}

// tileReaders is how many goroutines read the inlines of one column: each
// inline's run of traces is a separate stretch of a file, and a cold
// file's pages come in by one synchronous fault at a time per reader, so
// several readers keep several reads in flight (as the file's own time
// slice keeps one per core on a file read straight through).
const tileReaders = 8

// readTile reads tile t's traces at the given offset into dst (inline-major,
// NaN where the survey has no trace), inline by inline over tileReaders
// goroutines.
func (v *Volume) readTile(ctx context.Context, t bricks.Tile, dst [][]float32, inlines, crosslines []int, offset int) error {
	nx := t.X1 - t.X0
	var next atomic.Int64
	errs := make([]error, min(tileReaders, t.I1-t.I0))
	var wg sync.WaitGroup
	for w := range errs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				i := t.I0 + int(next.Add(1)-1)
				if i >= t.I1 {
					return
				}
				if err := ctx.Err(); err != nil {
					errs[w] = err
					return
				}
				for x := t.X0; x < t.X1; x++ {
					buf := dst[(i-t.I0)*nx+x-t.X0]
					if idx := v.store.traceIndex(inlines[i], crosslines[x], offset); idx < 0 {
						fillNaN(buf)
					} else if _, err := v.store.readTrace(idx, buf); err != nil {
						errs[w] = err
						return
					}
				}
			}
		}()
	}
	wg.Wait()
	return errors.Join(errs...)
}

// rowsOf cuts flat into n rows of m.
func rowsOf(flat []float32, n, m int) [][]float32 {
	out := make([][]float32, n)
	for i := range out {
		out[i] = flat[i*m : (i+1)*m : (i+1)*m]
	}
	return out
}
