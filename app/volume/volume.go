// Package volume is the glue between a survey's storage (a SEG-Y file through
// segy, or the built-in demo survey from compute/synth) and the views and
// jobs that read it: inline, crossline and time-slice sections of amplitude
// or of any attribute, single traces, and whole-volume attribute caches for
// time slices. It imports no fyne; the viewer and the batch commands share it.
package volume

import (
	"context"
	"fmt"
	"math"
	"slices"
	"sync/atomic"

	"quadtrace/app/indexcache"
	"quadtrace/compute"
	"quadtrace/compute/synth"
	"quadtrace/segy"
)

// Orientation says which way a Slice cuts the volume.
type Orientation int

const (
	// Inline is a vertical section at one inline number, traces ordered by crossline.
	Inline Orientation = iota
	// Crossline is a vertical section at one crossline number, traces ordered by inline.
	Crossline
	// TimeSlice is a horizontal map at one sample, inlines by crosslines.
	TimeSlice
)

// String returns the trade term for the orientation.
func (o Orientation) String() string {
	switch o {
	case Inline:
		return "inline"
	case Crossline:
		return "crossline"
	case TimeSlice:
		return "time slice"
	}
	return fmt.Sprintf("orientation(%d)", int(o))
}

// Slice names one section of a volume.
type Slice struct {
	Orientation Orientation
	// Number is the inline or crossline number; for a TimeSlice it is the
	// sample index (0 is the first sample).
	Number int
	// Offset selects the offset of a pre-stack file; it is ignored for a
	// post-stack one.
	Offset int
}

// Section is a slice's data with the numbers its axes need.
type Section struct {
	// Section holds the samples. For Inline and Crossline it has one trace
	// per position along the line (all NaN where the file lacks the trace);
	// for a TimeSlice, Traces[i][j] is the value at inline InlineKeys[i] and
	// crossline Keys[j], NaN where missing, and DT, T0 describe the volume.
	compute.Section
	Slice Slice
	// Keys are the numbers along the horizontal axis: crosslines of an
	// inline, inlines of a crossline, crosslines of a time slice.
	Keys []int
	// InlineKeys are the inline numbers of a TimeSlice's rows.
	InlineKeys []int
	// MetresPerTrace is the distance between neighbouring traces of an
	// Inline or Crossline section (0 when the survey has no coordinates).
	MetresPerTrace float64
	// MapAspect is, for a TimeSlice, the metres per crossline step over the
	// metres per inline step (1 when unknown).
	MapAspect float64
	// Pending, for a TimeSlice still being computed (Volume.AttributeSoFar),
	// is true at the cells not computed yet (their values are NaN); nil when
	// every cell is computed.
	Pending [][]bool
}

// store is what a Volume reads from: a SEG-Y file or an in-memory survey.
type store interface {
	// traceIndex returns the position of the trace at (inline, crossline,
	// offset), or -1 where there is none.
	traceIndex(inline, crossline, offset int) int
	// coordinates returns the CDP X and Y of trace i (scaled, in the
	// survey's units).
	coordinates(i int) (x, y float64, err error)
	// traceHeader returns trace i's header.
	traceHeader(i int) (segy.TraceHeader, error)
	// readTrace reads trace i into dst (reused when large enough).
	readTrace(i int, dst []float32) ([]float32, error)
	// timeSlice returns values at one sample on the inline x crossline grid.
	timeSlice(sample, offset int) ([][]float32, error)
	close() error
}

// Volume is an opened survey. Its methods are safe for concurrent use: the
// viewer's background jobs read sections while an export runs.
type Volume struct {
	name  string
	path  string // "" for the demo survey
	info  segy.Info
	store store

	attrs attributeStores // whole-volume brick stores (attribute.go)

	// fast is set for a file opened with OpenFast: what Check needs to
	// reopen it with the exact index
	fast *fastOpen
}

// fastOpen is how a Volume was opened by OpenFast.
type fastOpen struct {
	file    *segy.File
	opt     segy.Options
	indices *indexcache.Cache
	stamp   string
	// checked is set when Check found the hypothesis exact
	checked atomic.Bool
}

// Open opens a SEG-Y file read-only.
func Open(path string, opt segy.Options) (*Volume, error) {
	return OpenContext(context.Background(), path, opt)
}

// OpenContext is Open that stops when ctx ends, also during the header
// scan (segy.OpenContext).
func OpenContext(ctx context.Context, path string, opt segy.Options) (*Volume, error) {
	f, err := segy.OpenContext(ctx, path, opt)
	if err != nil {
		return nil, err
	}
	return &Volume{name: path, path: path, info: f.Info(), store: fileStore{f}}, nil
}

// OpenFast opens a SEG-Y file without reading every trace header when it
// need not (segy.OpenFast): with the geometry index saved in indices for
// this file version, exact at once; else from a sample of trace headers
// when they support a regular grid (Exact is then false until Check), or
// from every header, whose exact index is then saved in indices. indices
// may be nil (no cache). ctx stops the open.
func OpenFast(ctx context.Context, path string, opt segy.Options, indices *indexcache.Cache) (*Volume, error) {
	return openFast(ctx, path, opt, indices, indices.Lookup(path, opt))
}

func openFast(ctx context.Context, path string, opt segy.Options, indices *indexcache.Cache, fo segy.FastOptions) (*Volume, error) {
	f, err := segy.OpenFast(ctx, path, opt, fo)
	if err != nil {
		return nil, err
	}
	v := &Volume{name: path, path: path, info: f.Info(), store: fileStore{f},
		fast: &fastOpen{file: f, opt: opt, indices: indices, stamp: fo.Stamp}}
	if f.IndexSource() == segy.IndexFull && indices != nil {
		// every header was read: keep the index for the next open (a
		// cache that cannot be written only costs that next open time)
		if ch, err := f.Check(ctx, nil); err == nil {
			indices.Store(path, opt, ch.Index)
		}
	}
	return v, nil
}

// Exact reports whether the volume's geometry index is exact: the demo
// survey, a file opened with Open, or with OpenFast from every header or
// a matching saved index. False means a sampled hypothesis (see Check).
func (v *Volume) Exact() bool {
	return v.fast == nil || v.fast.file.Exact() || v.fast.checked.Load()
}

// IndexSource says where a file's geometry index came from (segy.IndexFull
// for the demo survey and Open).
func (v *Volume) IndexSource() segy.IndexSource {
	if v.fast == nil {
		return segy.IndexFull
	}
	return v.fast.file.IndexSource()
}

// Check reads every trace header of a volume opened by OpenFast from a
// sampled hypothesis (segy.File.Check: cancellable with ctx, progress
// every 1024 traces, safe beside reads and Close of v) and saves the
// exact index in the cache. When the exact Info differs from v's in
// anything, it returns a new Volume over the same file with the exact
// index (v is unchanged: the caller shows the new one and closes v when
// its readers are done), and checked says what changed (checked.Geometry:
// the sections drawn from v were wrong; checked.Summary in plain words).
// For an exact volume it returns (nil, checked with nothing changed, nil)
// at once; for the demo survey (nil, nil, nil).
func (v *Volume) Check(ctx context.Context, progress func(done, total int)) (exact *Volume, checked *segy.Checked, err error) {
	if v.fast == nil {
		return nil, nil, nil
	}
	fo := v.fast
	if fo.file.Exact() || fo.checked.Load() {
		return nil, &segy.Checked{Info: v.info}, nil
	}
	ch, err := fo.file.Check(ctx, progress)
	if err != nil {
		return nil, nil, err
	}
	fo.indices.Store(v.path, fo.opt, ch.Index) // best effort, as at open
	if !ch.Refined {
		fo.checked.Store(true)
		return nil, ch, nil
	}
	nv, err := openFast(ctx, v.path, fo.opt, fo.indices, segy.FastOptions{Saved: ch.Index, Stamp: fo.stamp})
	if err != nil {
		return nil, nil, err
	}
	if !nv.Exact() {
		nv.Close()
		return nil, nil, fmt.Errorf("%s: the file changed while its headers were checked; open it again", v.path)
	}
	return nv, ch, nil
}

// Confirm reports whether the traces of section s are where the geometry
// index puts them, reading the header of each (next to the samples a
// section reads anyway): true for an exact volume; for a hypothesis, true
// when every position of an inline or crossline holds a trace whose
// header carries that position's numbers. False for a time slice, or a
// line with a position the hypothesis leaves empty (a trace for it may
// lie anywhere): the caller then checks the whole file (Check). It cannot
// see a trace elsewhere in the file that repeats a position of the line
// (the full check would show the earlier of the two); Check can.
func (v *Volume) Confirm(ctx context.Context, s Slice) (bool, error) {
	if v.Exact() {
		return true, nil
	}
	var positions []int
	var at func(k int) (il, xl int)
	switch s.Orientation {
	case Inline:
		positions = Numbers(v.info.Crossline)
		at = func(k int) (int, int) { return s.Number, k }
	case Crossline:
		positions = Numbers(v.info.Inline)
		at = func(k int) (int, int) { return k, s.Number }
	default:
		return false, nil
	}
	off := v.offset(s.Offset)
	for j, k := range positions {
		if j%256 == 0 && ctx.Err() != nil {
			return false, ctx.Err()
		}
		il, xl := at(k)
		i := v.store.traceIndex(il, xl, off)
		if i < 0 {
			return false, nil
		}
		h, err := v.store.traceHeader(i)
		if err != nil {
			return false, err
		}
		if h.Inline != il || h.Crossline != xl {
			return false, nil
		}
	}
	return true, nil
}

// Demo generates the built-in demo survey in memory with cfg
// (synth.DefaultConfig() for the usual one).
func Demo(ctx context.Context, cfg synth.Config, progress func(done, total int)) (*Volume, error) {
	s, err := synth.Generate(ctx, cfg, progress)
	if err != nil {
		return nil, err
	}
	return FromSurvey(s), nil
}

// FromSurvey wraps an already generated demo survey.
func FromSurvey(s *synth.Survey) *Volume {
	return &Volume{name: s.Name + " (demo survey)", info: surveyInfo(s), store: surveyStore{s}}
}

// Info returns what the survey holds, as `quadtrace scan` reports it.
func (v *Volume) Info() segy.Info { return v.info }

// Name is the file path, or the demo survey's name.
func (v *Volume) Name() string { return v.name }

// Path is the SEG-Y file's path, or "" for the in-memory demo survey.
func (v *Volume) Path() string { return v.path }

// Close releases the whole-volume stores (their temporary files) and the
// file mapping.
func (v *Volume) Close() error {
	v.attrs.close()
	return v.store.close()
}

// sampling returns the volume's sample interval and first-sample time in seconds.
func (v *Volume) sampling() (dt, t0 float64) {
	return float64(v.info.IntervalUS) * 1e-6, v.info.StartMS * 1e-3
}

// offset maps a requested offset to one the survey has: the request when
// present, else the first offset (post-stack files have one).
func (v *Volume) offset(want int) int {
	for _, o := range v.info.Offsets {
		if o == want {
			return want
		}
	}
	if len(v.info.Offsets) > 0 {
		return v.info.Offsets[0]
	}
	return want
}

// Numbers returns the line numbers of a Range, Min to Max by Step.
func Numbers(r segy.Range) []int {
	if r.Count <= 0 {
		return nil
	}
	step := r.Step
	if step == 0 {
		step = 1
	}
	out := make([]int, 0, r.Count)
	for n, i := r.Min, 0; i < r.Count; n, i = n+step, i+1 {
		out = append(out, n)
	}
	return out
}

// Trace reads the trace at (inline, crossline, offset); a missing one is an error.
func (v *Volume) Trace(inline, crossline, offset int) ([]float32, error) {
	i := v.store.traceIndex(inline, crossline, v.offset(offset))
	if i < 0 {
		return nil, fmt.Errorf("%s: no trace at inline %d, crossline %d", v.name, inline, crossline)
	}
	return v.store.readTrace(i, nil)
}

// Coordinates returns the CDP X and Y of the trace at (inline, crossline)
// of the first offset; ok is false where there is no trace, or the survey
// has no coordinates (both zero).
func (v *Volume) Coordinates(inline, crossline int) (x, y float64, ok bool) {
	i := v.store.traceIndex(inline, crossline, v.offset(0))
	if i < 0 {
		return 0, 0, false
	}
	x, y, err := v.store.coordinates(i)
	if err != nil || (x == 0 && y == 0) || math.IsNaN(x+y) || math.IsInf(x+y, 0) {
		return 0, 0, false
	}
	return x, y, true
}

// TraceHeader returns the header of trace i in storage order (0 to
// Info().Traces-1): as read from the file, or for the demo survey one with
// its inline, crossline and CDP coordinates. With ReadTrace it makes a
// Volume a trace source for the export (export.Source).
func (v *Volume) TraceHeader(i int) (segy.TraceHeader, error) { return v.store.traceHeader(i) }

// ReadTrace reads trace i in storage order into dst (reused when large
// enough).
func (v *Volume) ReadTrace(i int, dst []float32) ([]float32, error) { return v.store.readTrace(i, dst) }

// Read returns the amplitude section s.
func (v *Volume) Read(ctx context.Context, s Slice) (Section, error) {
	dt, t0 := v.sampling()
	off := v.offset(s.Offset)
	out := Section{Section: compute.Section{DT: dt, T0: t0}, Slice: s}
	inlines, crosslines := Numbers(v.info.Inline), Numbers(v.info.Crossline)
	switch s.Orientation {
	case Inline, Crossline:
		var positions []int
		var at func(k int) int
		if s.Orientation == Inline {
			if !slices.Contains(inlines, s.Number) {
				return Section{}, fmt.Errorf("%s: no inline %d (inlines %d to %d)", v.name, s.Number, v.info.Inline.Min, v.info.Inline.Max)
			}
			positions, out.MetresPerTrace = crosslines, v.info.InlineSpacingM
			at = func(k int) int { return v.store.traceIndex(s.Number, k, off) }
		} else {
			if !slices.Contains(crosslines, s.Number) {
				return Section{}, fmt.Errorf("%s: no crossline %d (crosslines %d to %d)", v.name, s.Number, v.info.Crossline.Min, v.info.Crossline.Max)
			}
			positions, out.MetresPerTrace = inlines, v.info.CrosslineSpacingM
			at = func(k int) int { return v.store.traceIndex(k, s.Number, off) }
		}
		out.Keys = positions
		out.Traces = make([][]float32, len(positions))
		for j, k := range positions {
			if j%64 == 0 && ctx.Err() != nil {
				return Section{}, ctx.Err()
			}
			buf := make([]float32, v.info.Samples)
			i := at(k)
			if i < 0 {
				fillNaN(buf)
			} else if _, err := v.store.readTrace(i, buf); err != nil {
				return Section{}, err
			}
			out.Traces[j] = buf
		}
		return out, nil
	case TimeSlice:
		if s.Number < 0 || s.Number >= v.info.Samples {
			return Section{}, fmt.Errorf("%s: sample %d is outside 0 to %d", v.name, s.Number, v.info.Samples-1)
		}
		if v.UsesAmplitudeBricks() {
			a, err := compute.Lookup("amplitude")
			if err != nil {
				return Section{}, err
			}
			return v.Attribute(ctx, s, a, compute.Params{}, compute.Conditioning{}, nil)
		}
		grid, err := v.store.timeSlice(s.Number, off)
		if err != nil {
			return Section{}, err
		}
		out.Traces, out.Keys, out.InlineKeys, out.MapAspect = grid, crosslines, inlines, v.mapAspect()
		return out, nil
	}
	return Section{}, fmt.Errorf("unknown orientation %d", int(s.Orientation))
}

// mapAspect is the metres per crossline step over the metres per inline step.
func (v *Volume) mapAspect() float64 {
	if v.info.InlineSpacingM > 0 && v.info.CrosslineSpacingM > 0 {
		return v.info.InlineSpacingM / v.info.CrosslineSpacingM
	}
	return 1
}

// SampleIndex returns the sample nearest to time ms, clamped to the trace.
func (v *Volume) SampleIndex(ms float64) int {
	if v.info.IntervalUS <= 0 || v.info.Samples == 0 {
		return 0
	}
	k := int(math.Round((ms - v.info.StartMS) * 1000 / float64(v.info.IntervalUS)))
	return max(0, min(v.info.Samples-1, k))
}

func fillNaN(xs []float32) {
	nan := float32(math.NaN())
	for i := range xs {
		xs[i] = nan
	}
}
