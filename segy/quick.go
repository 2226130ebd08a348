package segy

import (
	"context"
	"fmt"
	"io"
	"reflect"
	"slices"
	"strings"
)

// FastOptions tune OpenFast.
type FastOptions struct {
	// Saved is an index written earlier (Checked.Index), e.g. from a
	// cache. It is used when it matches this file (same Stamp, size,
	// options, headers before the first trace and a spread of trace
	// headers, intact checksum) and ignored otherwise, never trusted.
	Saved []byte
	// Stamp is the caller's identity of the file's version (its path and
	// modification time, say); a saved index is used only with the same
	// stamp, and Checked.Index records it.
	Stamp string
	// ReadAll reads every trace header when the saved index is not used,
	// as Open does (an exact index at once, recorded under Stamp): for a
	// caller that needs the exact geometry before anything else.
	ReadAll bool
	// scatter, when set, serves the sample's scattered reads (see
	// openScattered)
	scatter io.ReaderAt
	// sample is the number of trace headers sampled through the file
	// (0: defaultSample); tests lower it to exercise the sampled path on
	// small files.
	sample int
}

// defaultSample is how many trace headers spread through the file the
// sampled open reads (besides the first line and the last trace): trace
// j*n/4000 for j = 0..3999, a multiple of the amplitude summary's 1000
// traces (amplitudeTraces), which are therefore among them.
const defaultSample = 4000

// maxLineSearch bounds the headers read to find the length of the first
// line; a longer first line is not guessed (every header is read).
const maxLineSearch = 1 << 16

func (o *FastOptions) sampleSize() int {
	if o.sample > 0 {
		return o.sample
	}
	return defaultSample
}

// OpenFast opens a SEG-Y file as Open does, but without reading every
// trace header when it need not:
//
//   - with a saved index that matches the file (FastOptions.Saved), the
//     index is exact at once;
//   - else the first line, the last trace and a few thousand trace
//     headers spread evenly through the file are read; when every one of
//     them agrees with a regular grid (traces in the order of one number
//     within lines of the other, equal steps, the same offset; a last
//     line may be partial), that grid is the hypothesis. The hypothesis
//     goes through the same geometry decision as a full scan (buildGrid),
//     so when it is right its Info equals Open's, except the coordinate
//     extent and the count of traces declaring another sample count,
//     which come from the sample;
//   - else (the sample refutes a regular grid, or the file has few
//     traces) every header is read, as Open does.
//
// Exact reports which it was. Check reads every header and returns the
// exact index (the Info Open gives) with what differs from the
// hypothesis; the File itself never changes, so a caller reopens with
// Checked.Index to use the exact index.
func OpenFast(ctx context.Context, path string, opt Options, fo FastOptions) (*File, error) {
	return openPath(ctx, path, opt, &fo)
}

// OpenReaderAtFast is OpenFast over data read through r (see
// OpenReaderAt); Close does not close r.
func OpenReaderAtFast(ctx context.Context, r io.ReaderAt, size int64, name string, opt Options, fo FastOptions) (*File, error) {
	return openMode(ctx, name, r, nil, size, opt, &fo)
}

// IndexSource says where a File's geometry index came from.
type IndexSource int

const (
	// IndexFull: every trace header was read (Open; OpenFast when the
	// sample did not support a regular grid or the file is small).
	IndexFull IndexSource = iota
	// IndexSaved: a saved index that matched the file (FastOptions.Saved).
	IndexSaved
	// IndexSampled: a sampled hypothesis, not yet checked (see Check).
	IndexSampled
)

// IndexSource says where the geometry index came from.
func (f *File) IndexSource() IndexSource { return f.source }

// Exact reports whether the geometry index was made from every trace
// header (Open, or OpenFast when it read every header) or from a verified
// saved index; false means a sampled hypothesis that Check has yet to
// confirm.
func (f *File) Exact() bool { return f.exact }

// sampleGeometry builds the sampled hypothesis (see OpenFast). ok is false,
// with nothing recorded, when the sample does not support a regular grid
// or the file is too small for sampling to pay.
func (f *File) sampleGeometry(bin []byte, sample int) (ok bool, err error) {
	n := f.ntraces
	if n <= 2*sample {
		return false, nil
	}
	// The headers of the first lines, the last trace and the spread
	// sample are read at once, many reads in flight (on a cold cache the
	// disk serves them together instead of one page fault at a time), and
	// the traces of the amplitude summary are brought into the page cache
	// the same way.
	var traces [][2]int64
	for _, i := range amplitudeTraces(n) {
		traces = append(traces, [2]int64{f.dataStart + int64(i)*f.traceSize, f.traceSize})
	}
	fetched := make(chan struct{})
	go func() {
		defer close(fetched)
		prefetch(f.scatterReader(), traces)
	}()
	want := make([]int, 0, sample+1)
	for j := 0; j < sample; j++ {
		want = append(want, int(int64(j)*int64(n)/int64(sample)))
	}
	want = append(want, n-1)
	got, err := f.readHeaders(want)
	if err == nil {
		err = f.firstHeaders(got, min(n, 1024))
	}
	<-fetched
	if err != nil {
		return false, err
	}
	var buf []byte
	if f.data == nil {
		buf = make([]byte, f.hdrSize)
	}
	type key struct{ il, xl, off int32 }
	read := func(i int) (key, []byte, error) {
		h, ok := got[i]
		if !ok {
			var err error
			if h, err = f.traceHeaderBytes(i, buf); err != nil {
				return key{}, nil, err
			}
		}
		o := f.order
		return key{int32(o.Uint32(h[f.ilByte-1:])), int32(o.Uint32(h[f.xlByte-1:])), int32(o.Uint32(h[f.offByte-1:]))}, h, nil
	}
	k0, h0, err := read(0)
	if err != nil {
		return false, err
	}
	coordUnits := i16(h0, thCoordUnits, 1, f.order)
	ext := newCoordExtent()
	ext.add(f.headerCoords(h0))
	k1, h1, err := read(1)
	if err != nil {
		return false, err
	}
	ext.add(f.headerCoords(h1))
	// slow, fast: which number is constant along a line, which steps
	var slowOf, fastOf func(k key) int32
	inlineSorted := k1.il == k0.il && k1.xl != k0.xl
	switch {
	case inlineSorted:
		slowOf, fastOf = func(k key) int32 { return k.il }, func(k key) int32 { return k.xl }
	case k1.xl == k0.xl && k1.il != k0.il:
		slowOf, fastOf = func(k key) int32 { return k.xl }, func(k key) int32 { return k.il }
	default:
		return false, nil
	}
	slow0, fast0 := int64(slowOf(k0)), int64(fastOf(k0))
	fstep := int64(fastOf(k1)) - fast0
	// the first line: same slow number, fast numbers in equal steps
	line := n
	for i := 2; i < n; i++ {
		if i > maxLineSearch {
			return false, nil
		}
		if err := f.scanCancelled(i); err != nil {
			return false, err
		}
		k, h, err := read(i)
		if err != nil {
			return false, err
		}
		if int64(slowOf(k)) != slow0 {
			line = i
			break
		}
		if int64(fastOf(k)) != fast0+int64(i)*fstep || k.off != k0.off {
			return false, nil
		}
		ext.add(f.headerCoords(h))
	}
	var sstep int64
	if line < n {
		k, _, err := read(line)
		if err != nil {
			return false, err
		}
		sstep = int64(slowOf(k)) - slow0
	}
	model := func(i int) (slow, fast int64) {
		return slow0 + int64(i/line)*sstep, fast0 + int64(i%line)*fstep
	}
	// the model's numbers must fit the header fields
	if s, fa := model(n - 1); s != int64(int32(s)) || fa != int64(int32(fa)) || fast0+int64(line-1)*fstep != int64(int32(fast0+int64(line-1)*fstep)) {
		return false, nil
	}
	// the sample: the last trace, the first of the last line, and
	// `sample` traces spread evenly
	idx := []int{n - 1, (n - 1) / line * line}
	for j := 0; j < sample; j++ {
		idx = append(idx, int(int64(j)*int64(n)/int64(sample)))
	}
	varying, firstVarying, firstNs := 0, -1, 0
	seen := make(map[int]bool, len(idx))
	for j, i := range idx {
		if seen[i] {
			continue
		}
		seen[i] = true
		if err := f.scanCancelled(j); err != nil {
			return false, err
		}
		k, h, err := read(i)
		if err != nil {
			return false, err
		}
		s, fa := model(i)
		if int64(slowOf(k)) != s || int64(fastOf(k)) != fa || k.off != k0.off {
			return false, nil
		}
		if ns := int(f.order.Uint16(h[thSamples-1:])); ns != 0 && ns != f.samples && f.extraHeaders == 0 {
			if varying++; firstVarying < 0 || i < firstVarying {
				firstVarying, firstNs = i, ns
			}
		}
		ext.add(f.headerCoords(h))
	}
	// The sample supports the grid: the same decision as a full scan, on
	// the numbers the grid predicts for every trace.
	il, xl, off := make([]int32, n), make([]int32, n), make([]int32, n)
	for i := range n {
		s, fa := model(i)
		if inlineSorted {
			il[i], xl[i] = int32(s), int32(fa)
		} else {
			il[i], xl[i] = int32(fa), int32(s)
		}
		off[i] = k0.off
	}
	if varying > 0 {
		f.warnf("%d traces declare a sample count other than the file's %d (first: trace %d, byte %d: %d); every trace is read with %d samples (fixed-length traces)",
			varying, f.samples, firstVarying, f.dataStart+int64(firstVarying)*f.traceSize+thSamples, firstNs, f.samples)
	}
	f.geoBytes = [2]int{f.ilByte, f.xlByte}
	f.buildGrid(il, xl, off)
	// the headers the bin spacing is measured between, read at once
	var ends []int
	if ext.has {
		a, b := f.spacingPairs()
		for _, p := range append(a, b...) {
			ends = append(ends, p.a, p.b)
		}
	}
	more, err := f.readHeaders(ends)
	if err != nil {
		return false, err
	}
	coord := func(i int) (float64, float64) {
		h, ok := more[i]
		if !ok {
			var err error
			if h, err = f.traceHeaderBytes(i, buf); err != nil {
				return 0, 0
			}
		}
		return f.headerCoords(h)
	}
	f.finishGeometry(ext, coord, coordUnits, bin)
	return true, nil
}

// headerCoords reads the CDP coordinates of one trace's header block as
// the scan does (scalar applied; extension 1 when set).
func (f *File) headerCoords(h []byte) (x, y float64) {
	o := f.order
	sc := i16(h, thCoordScalar, 1, o)
	x = applyScalar(float64(int32(o.Uint32(h[f.cxByte-1:]))), sc)
	y = applyScalar(float64(int32(o.Uint32(h[f.cyByte-1:]))), sc)
	if ex, ey, ok := f.ext1Coords(h[TraceHeaderSize:]); ok {
		x, y = ex, ey
	}
	return x, y
}

// Checked is the outcome of Check: the exact index and how it differs from
// the hypothesis the file was opened with.
type Checked struct {
	// Info is what Open gives for the file (every header read).
	Info Info
	// Index is the exact index, for OpenFast (FastOptions.Saved) and a cache.
	Index []byte
	// Geometry is true when the exact trace index differs from the
	// hypothesis (traces elsewhere, other line ranges, gaps, duplicates,
	// another layout): sections drawn from the hypothesis were wrong.
	Geometry bool
	// Refined is true when Info differs at all from the file's Info (the
	// geometry, or facts the sample could only estimate: the coordinate
	// extent, traces declaring another sample count).
	Refined bool
	// Summary says in plain words what the full check changed in the
	// geometry; "" when nothing.
	Summary string
}

// Check reads every trace header and returns the exact index, the Info
// that Open gives for the file, and what differs from the sampled
// hypothesis. For a file whose index is already exact it returns at once.
// progress (may be nil) is called with traces done and the total every
// 1024 traces. Check may run in its own goroutine while other goroutines
// read the file; Close waits at most for the current batch of 1024
// headers, after which Check fails with an error wrapping os.ErrClosed.
// ctx stops it (the error wraps ctx.Err()). The File is not changed.
func (f *File) Check(ctx context.Context, progress func(done, total int)) (*Checked, error) {
	if f.exact {
		idx, err := f.saveIndex()
		if err != nil {
			return nil, err
		}
		return &Checked{Info: f.info, Index: idx}, nil
	}
	if err := f.hold(-1); err != nil {
		return nil, err
	}
	held := true
	defer func() {
		if held {
			f.mu.RUnlock()
		}
	}()
	c := &File{path: f.path, r: f.r, data: f.data, size: f.fileSize, fileSize: f.fileSize, opt: f.opt, stamp: f.stamp}
	c.info.Warnings = []string{}
	c.onScan = func(i int) error {
		if progress != nil && c.ntraces > 0 {
			progress(min(i, c.ntraces), c.ntraces)
		}
		if err := ctx.Err(); err != nil {
			return fmt.Errorf("%s: check stopped at trace %d: %w", f.path, i, err)
		}
		// let a waiting Close in between batches
		f.mu.RUnlock()
		held = false
		if err := f.hold(i); err != nil {
			return err
		}
		held = true
		return nil
	}
	if err := c.guardFault(-1, 0, func() error { return c.parse(c.opt, nil) }); err != nil {
		return nil, err
	}
	c.onScan = nil
	if progress != nil {
		progress(c.ntraces, c.ntraces)
	}
	idx, err := c.saveIndex()
	if err != nil {
		return nil, err
	}
	out := &Checked{Info: c.info, Index: idx}
	out.Geometry = !sameGeometry(f, c)
	out.Refined = out.Geometry || !infoEqual(f.info, c.info)
	if out.Geometry {
		out.Summary = describeChange(f, c)
	}
	return out, nil
}

// infoEqual reports whether two Infos are the same in every field.
func infoEqual(a, b Info) bool { return reflect.DeepEqual(a, b) }

// sameGeometry reports whether two opens of one file index the traces
// alike.
func sameGeometry(a, b *File) bool {
	ia, ib := a.info, b.info
	return ia.Layout == ib.Layout && ia.Inline == ib.Inline && ia.Crossline == ib.Crossline &&
		slices.Equal(ia.Offsets, ib.Offsets) && ia.MissingTraces == ib.MissingTraces &&
		ia.DuplicateTraces == ib.DuplicateTraces && ia.OutlierTraces == ib.OutlierTraces &&
		slices.Equal(a.geo.grid, b.geo.grid)
}

// describeChange says in plain words how the exact geometry (b) differs
// from the hypothesis (a).
func describeChange(a, b *File) string {
	ia, ib := a.info, b.info
	var parts []string
	if ia.Layout != ib.Layout {
		parts = append(parts, fmt.Sprintf("the traces are %s, not %s", layoutWords(ib.Layout), layoutWords(ia.Layout)))
	}
	lines := func(what string, ra, rb Range) {
		if ra != rb {
			parts = append(parts, fmt.Sprintf("%ss %s (not %s)", what, rangeWords(rb), rangeWords(ra)))
		}
	}
	lines("inline", ia.Inline, ib.Inline)
	lines("crossline", ia.Crossline, ib.Crossline)
	if ib.MissingTraces != ia.MissingTraces {
		parts = append(parts, plural(ib.MissingTraces, "grid position has no trace", "grid positions have no trace"))
	}
	if ib.DuplicateTraces != ia.DuplicateTraces {
		parts = append(parts, plural(ib.DuplicateTraces, "trace repeats the position of an earlier one (the first is shown)", "traces repeat the position of earlier ones (the first is shown)"))
	}
	if ib.OutlierTraces != ia.OutlierTraces {
		parts = append(parts, plural(ib.OutlierTraces, "trace with far-off numbers is left out", "traces with far-off numbers are left out"))
	}
	if len(a.geo.grid) == len(b.geo.grid) {
		moved := 0
		for i := range a.geo.grid {
			if a.geo.grid[i] != b.geo.grid[i] {
				moved++
			}
		}
		if moved > 0 {
			parts = append(parts, plural(moved, "position shows another trace than first assumed", "positions show other traces than first assumed"))
		}
	}
	if len(parts) == 0 {
		parts = append(parts, "the trace order differs from what the sample suggested")
	}
	return fmt.Sprintf("Checked all %d trace headers: %s.", ib.Traces, strings.Join(parts, "; "))
}

func plural(n int, one, many string) string {
	if n == 1 {
		return "1 " + one
	}
	return fmt.Sprintf("%d %s", n, many)
}

func rangeWords(r Range) string {
	if r.Step > 1 {
		return fmt.Sprintf("%d to %d in steps of %d", r.Min, r.Max, r.Step)
	}
	return fmt.Sprintf("%d to %d", r.Min, r.Max)
}

func layoutWords(l Layout) string {
	switch l {
	case Layout3DInlineSorted:
		return "a 3D grid sorted by inline"
	case Layout3DCrosslineSorted:
		return "a 3D grid sorted by crossline"
	case Layout2D:
		return "one line"
	case LayoutPrestack:
		return "pre-stack (several offsets per position)"
	case LayoutUnstructured:
		return "without a usable grid (shown in file order)"
	}
	return string(l)
}
