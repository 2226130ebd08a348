package horizon

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"sync"
	"sync/atomic"

	"quadtrace/compute"
)

// SlabSpec says how much of each trace a Slab keeps around a horizon.
type SlabSpec struct {
	// AboveMS and BelowMS bound the slab's window: from the horizon's time
	// minus AboveMS to its time plus BelowMS. Maps of the slab take their
	// statistics inside it. Both at least 0.
	AboveMS, BelowMS float64
	// MarginMS is the extra trace kept on each side of the window for
	// computing attributes: an analytic attribute at a sample depends on
	// the trace around it (the Hilbert transform's kernel falls off as
	// 1/t), a windowed one on half its window besides. 0 means
	// DefaultSlabMarginMS; SlabMarginMS gives what an attribute needs;
	// +Inf keeps whole traces.
	MarginMS float64
}

// DefaultSlabMarginMS is the margin a slab keeps by default: 64 ms each
// side of the window, the half-length of the tracker's 128 ms analytic
// stretches (TestAnalyticStretchMatchesWholeTrace).
const DefaultSlabMarginMS = 64.0

// SlabMarginMS returns the margin a slab needs for attribute a with
// parameters p to agree with the attribute of whole traces inside the
// window (TestSlabMatchesWholeTraces checks every registered attribute):
// DefaultSlabMarginMS plus half the attribute's "window" parameter when
// it has one, and +Inf (whole traces) for attributes with a "low-cut"
// parameter, whose filters reach far along the trace (relative impedance's
// running integral, the band-pass).
func SlabMarginMS(a *compute.Attribute, p compute.Params) float64 {
	if !math.IsNaN(p.Float("low-cut")) {
		return math.Inf(1)
	}
	m := DefaultSlabMarginMS
	if w := p.Float("window"); w > 0 {
		m += w / 2
	}
	return m
}

// Slab is the amplitude along a horizon, read once: on each picked trace,
// the stretch from the window's start less the margin to its end plus the
// margin (cut short at the trace's ends). An attribute of the slab is
// computed on those stretches only, and a map of it (any statistic, any
// window inside the slab's) needs no trace at all: the window's map
// redraws in milliseconds when the statistic or window changes, and in
// the time of the stretches' attribute when the attribute changes
// (BenchmarkSlabDemo).
//
// The slab keeps a copy of the horizon it was built on: later changes to
// that horizon do not reach it (build a new slab). It is safe for
// concurrent use once built.
type Slab struct {
	grid   Grid
	top    *Horizon
	spec   SlabSpec
	span   int     // samples per stretch
	core   int     // samples per window part of a stretch
	slot   []int32 // slot[k]: index of trace k's stretch, -1 for an empty trace
	start  []int32 // start[slot]: first sample of the stretch in its trace
	coreAt []int32 // coreAt[slot]: first sample of the window part in its trace
	amp    [][]float32

	mu    sync.Mutex
	spare [][]float32 // an attribute's stretches given back by AttributeSlab.Release, for the next Attribute
}

// NewSlab reads the stretches of src's traces around horizon top (see
// Slab). It reads the picked traces once, in grid order; progress (may be
// nil) gets inlines done. Cancelling ctx stops it with ctx.Err().
func NewSlab(ctx context.Context, src Source, top *Horizon, spec SlabSpec, progress func(done, total int)) (*Slab, error) {
	g := src.Grid()
	if err := g.validate(); err != nil {
		return nil, fmt.Errorf("slab: %w", err)
	}
	if top == nil || top.Inlines != g.Inlines || top.Crosslines != g.Crosslines {
		return nil, fmt.Errorf("slab: the horizon's grid does not match the survey's %d x %d traces", g.Inlines, g.Crosslines)
	}
	if !(spec.AboveMS >= 0) || !(spec.BelowMS >= 0) || math.IsInf(spec.AboveMS, 0) || math.IsInf(spec.BelowMS, 0) {
		return nil, fmt.Errorf("slab: window %v ms above to %v ms below: want two finite numbers of 0 or more", spec.AboveMS, spec.BelowMS)
	}
	if spec.MarginMS == 0 {
		spec.MarginMS = DefaultSlabMarginMS
	}
	if !(spec.MarginMS > 0) {
		return nil, fmt.Errorf("slab: margin %v ms: want a positive number", spec.MarginMS)
	}
	dt := g.dtMS()
	// The window part: every sample a window inside the slab's can reach,
	// from floor(time - above) to ceil(time + below) plus one (the second
	// sample of Value's interpolation).
	core := min(g.Samples, int(math.Ceil((spec.AboveMS+spec.BelowMS)/dt))+3)
	span := g.Samples
	if m := spec.MarginMS / dt; m < float64(g.Samples) {
		span = min(g.Samples, core+2*int(math.Ceil(m)))
	}
	s := &Slab{grid: g, spec: spec, span: span, core: core, slot: make([]int32, len(top.State)),
		top: &Horizon{Inlines: top.Inlines, Crosslines: top.Crosslines,
			TimeMS: append([]float64(nil), top.TimeMS...), Quality: append([]float32(nil), top.Quality...), State: append([]State(nil), top.State...)}}
	n := 0
	for k, st := range top.State {
		s.slot[k] = -1
		if st != Empty && !math.IsNaN(top.TimeMS[k]) {
			s.slot[k] = int32(n)
			n++
		}
	}
	back := make([]float32, n*span)
	s.amp = make([][]float32, n)
	s.start = make([]int32, n)
	s.coreAt = make([]int32, n)
	buf := make([]float32, g.Samples)
	nx := g.Crosslines
	// The outer half of the default margin is tapered, beyond what an
	// attribute's window reaches (see SlabMarginMS).
	taper := int(math.Round(DefaultSlabMarginMS / 2 / dt))
	for il := range g.Inlines {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		for xl := range nx {
			k := il*nx + xl
			j := s.slot[k]
			if j < 0 {
				continue
			}
			a, err := src.Trace(il, xl, buf)
			if err != nil {
				return nil, fmt.Errorf("slab: %w", err)
			}
			x := g.sampleAt(s.top.TimeMS[k] - spec.AboveMS)
			c0 := min(max(0, int(math.Max(-1, math.Min(float64(g.Samples), math.Floor(x))))), g.Samples-core)
			st := min(max(0, c0-(span-core)/2), g.Samples-span)
			s.coreAt[j], s.start[j] = int32(c0), int32(st)
			s.amp[j] = back[int(j)*span : (int(j)+1)*span : (int(j)+1)*span]
			copy(s.amp[j], a[st:st+span])
			taperInterior(s.amp[j], st > 0, st+span < g.Samples, taper)
		}
		if progress != nil {
			progress(il+1, g.Inlines)
		}
	}
	return s, nil
}

// Spec returns the slab's window and margin (the margin resolved).
func (s *Slab) Spec() SlabSpec { return s.spec }

// Bytes returns the memory the slab's amplitude holds, in bytes.
func (s *Slab) Bytes() int { return 4 * s.span * len(s.amp) }

// AttributeSlab is an attribute along a horizon: its values in the window
// part of each of a Slab's stretches. Map makes maps of it.
//
// Its memory (the stretches' attribute) goes back to the slab for the next
// Attribute when the last holder calls Release: computing into memory
// already touched, instead of fresh pages, more than halved the CPU of an
// attribute change on the demo (BenchmarkMapAttributeChange). A holder
// that never calls Release leaves the memory to the garbage collector.
type AttributeSlab struct {
	slab    *Slab
	values  [][]float32 // values[slot]: the window part, core samples (slices of stretches)
	stretch [][]float32 // the stretches' attribute, compute's output
	refs    atomic.Int32
}

// Retain adds a holder: the attribute slab stays valid until each holder
// (the one Slab.Attribute returned to, and one per Retain) has called
// Release.
func (as *AttributeSlab) Retain() { as.refs.Add(1) }

// Release drops a holder; when it was the last, the attribute's memory
// goes back to the slab, and the next Slab.Attribute overwrites it: the
// caller must not use the attribute slab (Map) after its Release.
func (as *AttributeSlab) Release() {
	if as.refs.Add(-1) != 0 || as.stretch == nil {
		return
	}
	s := as.slab
	s.mu.Lock()
	if s.spare == nil {
		s.spare = as.stretch
	}
	s.mu.Unlock()
}

// stretches returns memory for an attribute of the slab's stretches: the
// one the last Release gave back, else fresh.
func (s *Slab) stretches() [][]float32 {
	s.mu.Lock()
	st := s.spare
	s.spare = nil
	s.mu.Unlock()
	if st != nil {
		return st
	}
	back := make([]float32, len(s.amp)*s.span)
	st = make([][]float32, len(s.amp))
	for j := range st {
		st[j] = back[j*s.span : (j+1)*s.span : (j+1)*s.span]
	}
	return st
}

// Attribute computes attribute a (parameters p, from a.Resolve) on the
// slab's stretches with all cores (compute's registry: the same code as on
// whole traces) and keeps the window part of each (it holds the
// stretches' attribute: as much memory as the slab, Slab.Bytes; see
// Release). The caller holds it once (Retain, Release). Inside the window it
// agrees with the attribute of whole traces when the slab's margin is at
// least SlabMarginMS(a, p) (TestSlabMatchesWholeTraces); with a shorter
// margin it is an error naming the margin needed, so a caller can build a
// slab with that margin (or map whole traces, horizonjob.MapAttribute).
func (s *Slab) Attribute(ctx context.Context, a *compute.Attribute, p compute.Params) (*AttributeSlab, error) {
	if need := SlabMarginMS(a, p); s.span < s.grid.Samples && need > s.spec.MarginMS {
		return nil, fmt.Errorf("slab: %s needs a margin of %g ms each side of the window, the slab keeps %g ms", a.ID, need, s.spec.MarginMS)
	}
	out := &AttributeSlab{slab: s, values: make([][]float32, len(s.amp))}
	out.refs.Store(1)
	if len(s.amp) == 0 {
		return out, nil
	}
	attr := compute.Section{Traces: s.stretches(), DT: s.grid.DT}
	if err := a.ComputeInto(ctx, compute.Section{Traces: s.amp, DT: s.grid.DT}, attr, p, nil); err != nil {
		s.mu.Lock()
		s.spare = attr.Traces
		s.mu.Unlock()
		return nil, fmt.Errorf("slab: %w", err)
	}
	out.stretch = attr.Traces
	// The window parts are kept as slices of compute's output (no copy:
	// copying them cost more than the map).
	for j, tr := range attr.Traces {
		off := int(s.coreAt[j] - s.start[j])
		out.values[j] = tr[off : off+s.core : off+s.core]
	}
	return out, nil
}

// Map computes the map spec asks for from the attribute slab, as
// horizon.Map would from the whole traces of the attribute (same
// statistics, same window rule, same values where the slab's attribute
// equals the whole traces'). The window must lie inside the slab's: a
// window reaching beyond it on any picked trace (relative to the horizon,
// or down to spec.Base) is an error naming the slab's window, and the
// caller builds a wider slab. It reads no trace and runs on
// runtime.GOMAXPROCS(0) goroutines: a few milliseconds for the demo's
// 30 000 traces.
func (as *AttributeSlab) Map(spec MapSpec) (*AttributeMap, error) {
	s := as.slab
	g := s.grid
	if err := spec.Validate(); err != nil {
		return nil, err
	}
	if spec.Base != nil && (spec.Base.Inlines != g.Inlines || spec.Base.Crosslines != g.Crosslines) {
		return nil, fmt.Errorf("map: the base horizon's grid does not match the survey's %d x %d traces", g.Inlines, g.Crosslines)
	}
	if spec.Base == nil && spec.Stat != Value && (spec.FromMS < -s.spec.AboveMS || spec.ToMS > s.spec.BelowMS) {
		return nil, fmt.Errorf("map: window %g to %g ms reaches beyond the slab's %g to %g ms", spec.FromMS, spec.ToMS, -s.spec.AboveMS, s.spec.BelowMS)
	}
	out := &AttributeMap{Inlines: g.Inlines, Crosslines: g.Crosslines, Values: make([]float32, len(s.slot))}
	// Chunks of traces on runtime.GOMAXPROCS(0) goroutines; the error
	// reported is that of the first trace in grid order, whatever the
	// timing.
	const chunk = 4096
	chunks := (len(s.slot) + chunk - 1) / chunk
	errs := make([]error, chunks)
	var next atomic.Int64
	var wg sync.WaitGroup
	for range max(1, min(runtime.GOMAXPROCS(0), chunks)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				c := int(next.Add(1) - 1)
				if c >= chunks {
					return
				}
				errs[c] = as.mapTraces(spec, out.Values, c*chunk, min(len(s.slot), (c+1)*chunk))
			}
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	return out, nil
}

// mapTraces fills dst[from:to] with the map's values at those traces, and
// stops at the first trace whose window lies outside the slab.
func (as *AttributeSlab) mapTraces(spec MapSpec, dst []float32, from, to int) error {
	s := as.slab
	g := s.grid
	nan := float32(math.NaN())
	for k := from; k < to; k++ {
		j := s.slot[k]
		dst[k] = nan
		if j < 0 {
			continue
		}
		w, ok := mapWindow(g, s.top, spec, k)
		if !ok {
			continue
		}
		c0 := int(s.coreAt[j])
		vals := as.values[j]
		if w.value {
			i := int(math.Floor(w.x))
			if i < c0 || min(i+1, g.Samples-1) >= c0+s.core {
				return fmt.Errorf("map: the horizon at trace (%d, %d) lies outside the slab", k/g.Crosslines, k%g.Crosslines)
			}
			dst[k] = float32(w.interpolate(vals[i-c0:]))
			continue
		}
		if w.lo < c0 || w.hi >= c0+s.core {
			return fmt.Errorf("map: the window at trace (%d, %d), %g to %g ms, reaches beyond the slab's %g ms above the horizon to %g ms below",
				k/g.Crosslines, k%g.Crosslines, g.msAt(float64(w.lo)), g.msAt(float64(w.hi)), s.spec.AboveMS, s.spec.BelowMS)
		}
		dst[k] = float32(windowStat(vals[w.lo-c0:w.hi-c0+1], spec.Stat))
	}
	return nil
}

// taperInterior weights the first (when start) and last (when end) n
// samples of stretch with a half-Hann taper, sin^2(pi (j+1/2) / (2n)) at
// j samples from the end: the ends of a stretch cut out of a trace are
// brought to zero smoothly, as compute's end taper does at a trace's ends
// (compute.EndTreatment), so that the cut does not ring into the window
// through the Hilbert transform's 1/t kernel. The ends of the trace itself
// are left as they are, as on whole traces.
func taperInterior(stretch []float32, start, end bool, n int) {
	n = min(n, len(stretch)/2)
	for j := range n {
		s := math.Sin(math.Pi * (float64(j) + 0.5) / float64(2*n))
		w := float32(s * s)
		if start {
			stretch[j] *= w
		}
		if end {
			stretch[len(stretch)-1-j] *= w
		}
	}
}
