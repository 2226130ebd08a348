package segy

import (
	"fmt"
	"math"
	"runtime"
	"slices"
	"sort"
	"strings"
	"sync"
	"sync/atomic"
)

// geometry is the trace index built by the scan.
type geometry struct {
	il, xl, off []int32 // numbering of every trace, as used for the grid
	ilR, xlR    Range
	offsets     []int // grid offsets; nil for post-stack
	grid        []int32
}

// gridLimit bounds the grid allocation: a numbering spanning more cells
// than this is not treated as a grid (it would be mostly holes, and a
// hostile header could otherwise make us allocate for billions of cells).
func gridLimit(traces int) int { return 4*traces + 1024 }

// traceHeaderBytes returns the standard header of trace i followed by its
// additional headers (f.hdrSize bytes).
func (f *File) traceHeaderBytes(i int, buf []byte) ([]byte, error) {
	off := f.dataStart + int64(i)*f.traceSize
	h, err := f.bytesAt(off, int(f.hdrSize), buf)
	if err != nil {
		return nil, f.errf(i, off+1, "reading trace header: %v", err)
	}
	return h, nil
}

// eachHeader calls use(i, header block of trace i) for every trace, with
// the scan's cancellation (scanCancelled) before each. Through the mapping
// it reads each header where it lies, in file order; through a reader,
// runs of whole traces with one read each (see wholeTraceHeaderLimit;
// 40,000 headers of the export's benchmark volume cost 92 ms one read
// each, 50 ms in runs), else one read a header. A reader's runs are read
// by up to GOMAXPROCS goroutines, each over a contiguous part of the file
// (30-35 ms for those headers on two cores): use may then be called from
// several goroutines at once, never twice for one trace. Errors name the
// trace and the file byte, as traceHeaderBytes does; of several, the
// error of the earliest part is returned (the one a single pass meets
// first).
func (f *File) eachHeader(use func(i int, h []byte)) error {
	if f.data != nil || f.traceSize > wholeTraceHeaderLimit {
		var buf []byte
		if f.data == nil {
			buf = make([]byte, f.hdrSize)
		}
		for i := 0; i < f.ntraces; i++ {
			if err := f.scanCancelled(i); err != nil {
				return err
			}
			h, err := f.traceHeaderBytes(i, buf)
			if err != nil {
				return err
			}
			use(i, h)
		}
		return nil
	}
	per := f.runTraces()
	// Parts of at least scanPartRuns runs, so that a small file is read
	// by one goroutine; Check's scan (onScan: the parent file's hold is
	// released and taken between batches) stays in one goroutine.
	parts := max(1, min(runtime.GOMAXPROCS(0), f.ntraces/(scanPartRuns*per)))
	if f.onScan != nil {
		parts = 1
	}
	// failed is the earliest part that failed: later parts stop, earlier
	// ones go on, so the error returned is the one a single pass meets.
	var failed atomic.Int64
	failed.Store(int64(parts))
	scanPart := func(part, lo, hi int) error {
		buf := make([]byte, int64(per)*f.traceSize)
		for first := lo; first < hi; first += per {
			if failed.Load() < int64(part) {
				return nil
			}
			c := min(per, hi-first)
			for i := first; i < first+c; i++ {
				if err := f.scanCancelled(i); err != nil {
					return err
				}
			}
			err := f.eachRunRead(first, c, buf, func(k int, trace []byte) {
				use(first+k, trace[:f.hdrSize])
			})
			if err != nil {
				return err
			}
		}
		return nil
	}
	if parts == 1 {
		return scanPart(0, 0, f.ntraces)
	}
	errs := make([]error, parts)
	var wg sync.WaitGroup
	for p := range parts {
		// contiguous parts, each a whole number of runs but the last
		lo := f.ntraces / parts * p / per * per
		hi := f.ntraces
		if p < parts-1 {
			hi = f.ntraces / parts * (p + 1) / per * per
		}
		wg.Add(1)
		go func() {
			defer wg.Done()
			if errs[p] = scanPart(p, lo, hi); errs[p] != nil {
				for {
					f := failed.Load()
					if f <= int64(p) || failed.CompareAndSwap(f, int64(p)) {
						break
					}
				}
			}
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// scanPartRuns is the fewest run reads a goroutine of the scan covers.
const scanPartRuns = 16

// scanGeometry reads every trace header and classifies the file.
//
// Numbering: inline and crossline come from Options (default bytes 189 and
// 193, SEG-Y rev 1 table 3). When those bytes hold no numbering (every
// trace has the same pair) and were not overridden, the scan falls back to
// the 2D/field conventions of the same table and says so in Warnings:
// bytes 9 (field record) and 21 (CDP ensemble) when the CDP numbers vary
// (byte 21 alone, as one line, when the field records vary too), else bytes
// 9 and 13 (field record, trace number within the record); a
// single location with several offsets stays as it is; with no numbering at
// all traces are numbered by position as one line and the
// layout is "unstructured".
func (f *File) scanGeometry(bin []byte) error {
	n := f.ntraces
	il := make([]int32, n)
	xl := make([]int32, n)
	off := make([]int32, n)
	cx := make([]float64, n)
	cy := make([]float64, n)
	o := f.order
	coordUnits := 0
	varying, firstVarying, firstNs := 0, -1, 0
	var varyingMu sync.Mutex
	err := f.eachHeader(func(i int, h []byte) {
		if ns := int(o.Uint16(h[thSamples-1:])); ns != 0 && ns != f.samples && f.extraHeaders == 0 {
			varyingMu.Lock() // eachHeader may call from several goroutines
			if varying++; firstVarying < 0 || i < firstVarying {
				firstVarying, firstNs = i, ns
			}
			varyingMu.Unlock()
		}
		il[i] = int32(o.Uint32(h[f.ilByte-1:]))
		xl[i] = int32(o.Uint32(h[f.xlByte-1:]))
		off[i] = int32(o.Uint32(h[f.offByte-1:]))
		sc := i16(h, thCoordScalar, 1, o)
		cx[i] = applyScalar(float64(int32(o.Uint32(h[f.cxByte-1:]))), sc)
		cy[i] = applyScalar(float64(int32(o.Uint32(h[f.cyByte-1:]))), sc)
		if x, y, ok := f.ext1Coords(h[TraceHeaderSize:]); ok {
			cx[i], cy[i] = x, y
		}
		if i == 0 {
			coordUnits = i16(h, thCoordUnits, 1, o)
		}
	})
	if err != nil {
		return err
	}
	if varying > 0 {
		f.warnf("%d traces declare a sample count other than the file's %d (first: trace %d, byte %d: %d); every trace is read with %d samples (fixed-length traces)",
			varying, f.samples, firstVarying, f.dataStart+int64(firstVarying)*f.traceSize+thSamples, firstNs, f.samples)
	}
	userBytes := f.ilByte != thInline || f.xlByte != thCrossline
	fromRecords := false
	f.geoBytes = [2]int{f.ilByte, f.xlByte}
	if n > 1 && allSame(il) && allSame(xl) && !userBytes {
		// Read the fallback numbering.
		cdp := make([]int32, n)
		ffid := make([]int32, n)
		chn := make([]int32, n)
		err := f.eachHeader(func(i int, h []byte) {
			ffid[i] = int32(o.Uint32(h[thFieldRecord-1:]))
			chn[i] = int32(o.Uint32(h[thChannel-1:]))
			cdp[i] = int32(o.Uint32(h[thCDP-1:]))
		})
		if err != nil {
			return err
		}
		switch {
		case !allSame(cdp) && allSame(ffid):
			il, xl = ffid, cdp
			f.geoBytes = [2]int{thFieldRecord, thCDP}
			f.warnf("inline/crossline bytes %d/%d hold no numbering: fell back to bytes 9/21 (field record / CDP ensemble number)", f.ilByte, f.xlByte)
		case !allSame(cdp):
			il, xl = make([]int32, n), cdp
			f.geoBytes = [2]int{0, thCDP}
			f.warnf("inline/crossline bytes %d/%d hold no numbering: fell back to byte 21 (CDP ensemble number) as one line; field records (byte 9) vary", f.ilByte, f.xlByte)
		case !allSame(ffid) || !allSame(chn):
			il, xl = ffid, chn
			f.geoBytes = [2]int{thFieldRecord, thChannel}
			fromRecords = true
			f.warnf("inline/crossline bytes %d/%d hold no numbering: fell back to bytes 9/13 (field record / trace number within record); inlines are field records", f.ilByte, f.xlByte)
		case !allSame(off):
			// one location with several offsets (a single gather): keep
		default:
			f.info.HeaderInline, f.info.HeaderCrossline = extent(il), extent(xl)
			f.fileOrder(fmt.Sprintf("no inline/crossline numbering in bytes %d/%d, 9, 13 or 21: traces numbered 1..%d by position", f.ilByte, f.xlByte, n))
			f.finishGeometry(coordExtentOf(cx, cy), arrayCoords(cx, cy), coordUnits, bin)
			return nil
		}
	}
	f.buildGrid(il, xl, off)
	if fromRecords && f.info.Layout != LayoutUnstructured {
		f.info.Layout = LayoutPrestack
	}
	f.finishGeometry(coordExtentOf(cx, cy), arrayCoords(cx, cy), coordUnits, bin)
	return nil
}

func allSame(v []int32) bool {
	for _, x := range v {
		if x != v[0] {
			return false
		}
	}
	return true
}

func distinctSorted(v []int32) []int32 {
	d := slices.Clone(v)
	slices.Sort(d)
	return slices.Compact(d)
}

func gcd(a, b int) int {
	for b != 0 {
		a, b = b, a%b
	}
	if a < 0 {
		return -a
	}
	return a
}

// rangeOf describes sorted distinct values as a regular numbering whose step
// is the greatest common divisor of the gaps.
func rangeOf(d []int32) Range {
	if len(d) == 0 {
		return Range{}
	}
	step := 0
	for i := 1; i < len(d); i++ {
		step = gcd(step, int(d[i])-int(d[i-1]))
	}
	if step == 0 {
		step = 1
	}
	lo, hi := int(d[0]), int(d[len(d)-1])
	return Range{Min: lo, Max: hi, Step: step, Count: (hi-lo)/step + 1}
}

// buildGrid makes the geometry decision that every user of the file
// shares (scan, figure, export, the window), from the numbering of every
// trace:
//
//  1. The inline and crossline numbers form a grid of at most
//     gridLimit(traces) cells (holes allowed): that grid.
//  2. Otherwise, when a few traces (at most max(16, traces/100), and
//     fewer than half) carry numbers far from the others (outside the main
//     run of numbers, where a gap is more than 16 times the median gap) and
//     the rest form such a grid: that grid, with those traces left out and
//     listed in Info.Outliers and a warning (trace, file byte, value).
//  3. Otherwise the file is unstructured: its traces in file order as one
//     line (inline 0, crosslines 1..traces), with a warning.
//
// Nothing is allocated in proportion to a range of numbers, only to the
// number of traces.
func (f *File) buildGrid(il, xl, off []int32) {
	g := &f.geo
	n := len(il)
	f.info.HeaderInline, f.info.HeaderCrossline = extent(il), extent(xl)
	limit := gridLimit(n)
	ilR, xlR := rangeOf(distinctSorted(il)), rangeOf(distinctSorted(xl))
	if !fitsGrid(ilR, xlR, limit) {
		keepIl, keepXl := mainRun(il), mainRun(xl)
		var out []int
		for i := range il {
			if !keepIl(il[i]) || !keepXl(xl[i]) {
				out = append(out, i)
				if len(out) > max(16, n/100) || 2*len(out) >= n {
					break
				}
			}
		}
		ok := len(out) > 0 && len(out) <= max(16, n/100) && 2*len(out) < n
		if ok {
			kil, kxl := make([]int32, 0, n-len(out)), make([]int32, 0, n-len(out))
			for i := range il {
				if keepIl(il[i]) && keepXl(xl[i]) {
					kil, kxl = append(kil, il[i]), append(kxl, xl[i])
				}
			}
			ilR, xlR = rangeOf(distinctSorted(kil)), rangeOf(distinctSorted(kxl))
			ok = fitsGrid(ilR, xlR, limit)
		}
		if !ok {
			why := fmt.Sprintf("inline numbers %d to %d (bytes %s) and crossline numbers %d to %d (bytes %s) span %s grid positions for %d traces: not a regular grid; traces shown in file order",
				f.info.HeaderInline.Min, f.info.HeaderInline.Max, f.byteName(0), f.info.HeaderCrossline.Min, f.info.HeaderCrossline.Max, f.byteName(1),
				cellText(ilR, xlR), n)
			f.fileOrder(why)
			return
		}
		f.noteOutliers(out, il, xl, keepIl)
	}
	g.il, g.xl, g.off = il, xl, off
	g.ilR, g.xlR = ilR, xlR
	f.info.Inline, f.info.Crossline = g.ilR, g.xlR
	cells := int64(g.ilR.Count) * int64(g.xlR.Count)
	// One offset per location, or several (pre-stack)?
	loc := make([]int32, cells)
	for i := range loc {
		loc[i] = -1
	}
	prestack := false
	for i := 0; i < n; i++ {
		c := f.cell2(il[i], xl[i])
		if c < 0 {
			continue // an outlier
		}
		if loc[c] < 0 {
			loc[c] = int32(i)
		} else if off[loc[c]] != off[i] {
			prestack = true
			break
		}
	}
	noff := 1
	if prestack {
		d := distinctSorted(off)
		g.offsets = make([]int, len(d))
		for i, v := range d {
			g.offsets[i] = int(v)
		}
		noff = len(d)
		f.info.Offsets = g.offsets
		if cells*int64(noff) > int64(limit) {
			f.fileOrder(fmt.Sprintf("%d locations times %d offsets are %d grid positions for %d traces: not a regular pre-stack grid; traces shown in file order", cells, noff, cells*int64(noff), n))
			return
		}
	}
	g.grid = make([]int32, cells*int64(noff))
	for i := range g.grid {
		g.grid[i] = -1
	}
	dup := 0
	for i := 0; i < n; i++ {
		c := f.cell2(il[i], xl[i])
		if c < 0 {
			continue
		}
		c = c*noff + f.offIndex(int(off[i]))
		if g.grid[c] >= 0 {
			dup++
			continue
		}
		g.grid[c] = int32(i)
	}
	f.info.DuplicateTraces = dup
	f.info.MissingTraces = len(g.grid) - (n - len(f.info.Outliers) - dup)
	if dup > 0 {
		f.warnf("%d duplicate traces (same inline, crossline and offset as an earlier trace): the first one is used", dup)
	}
	if f.info.MissingTraces > 0 {
		f.warnf("%d grid positions have no trace", f.info.MissingTraces)
	}
	switch {
	case prestack:
		f.info.Layout = LayoutPrestack
	case g.ilR.Count == 1:
		f.info.Layout = Layout2D
	default:
		f.info.Layout = f.sortOrder(il, xl)
	}
}

// cellText is the number of cells of a grid over two ranges, or "over 2^62".
func cellText(a, b Range) string {
	if a.Count > 1<<31 || b.Count > 1<<31 {
		return "over 2^62"
	}
	return fmt.Sprint(int64(a.Count) * int64(b.Count))
}

// fitsGrid reports whether a grid over the ranges has at most limit cells
// (the first two tests guard the product against overflow).
func fitsGrid(a, b Range, limit int) bool {
	return a.Count <= limit && b.Count <= limit && int64(a.Count)*int64(b.Count) <= int64(limit)
}

// extent is the smallest and largest of v, as a Range with Step and Count 0.
func extent(v []int32) Range {
	if len(v) == 0 {
		return Range{}
	}
	lo, hi := slices.Min(v), slices.Max(v)
	return Range{Min: int(lo), Max: int(hi)}
}

// mainRun returns a test for whether a number belongs to the main run of
// numbers in v: the distinct values are split where the gap between
// neighbours exceeds 16 times the median gap (at least 16), and the run
// holding the most traces is the main one.
func mainRun(v []int32) func(int32) bool {
	d := distinctSorted(v)
	if len(d) < 3 {
		return func(int32) bool { return true }
	}
	gaps := make([]int64, len(d)-1)
	for i := range gaps {
		gaps[i] = int64(d[i+1]) - int64(d[i])
	}
	med := slices.Clone(gaps)
	slices.Sort(med)
	split := max(16, 16*med[len(med)/2])
	// traces per distinct value
	count := make(map[int32]int, len(d))
	for _, x := range v {
		count[x]++
	}
	bestLo, bestHi, best := d[0], d[0], -1
	lo, sum := d[0], 0
	for i, x := range d {
		if i > 0 && gaps[i-1] > split {
			lo, sum = x, 0
		}
		sum += count[x]
		if sum > best {
			bestLo, bestHi, best = lo, x, sum
		}
	}
	// (counts are positive, so the best sum ends at the end of its run)
	return func(x int32) bool { return x >= bestLo && x <= bestHi }
}

// maxListedOutliers bounds Info.Outliers and the warning's list.
const maxListedOutliers = 100

// noteOutliers records the traces left out of the grid and warns.
func (f *File) noteOutliers(out []int, il, xl []int32, keepIl func(int32) bool) {
	f.info.OutlierTraces = len(out)
	var list []string
	for _, i := range out {
		o := Outlier{Trace: i, Field: "crossline", Value: int(xl[i]), Byte: f.geoBytes[1]}
		if !keepIl(il[i]) {
			o.Field, o.Value, o.Byte = "inline", int(il[i]), f.geoBytes[0]
		}
		o.FileByte = f.dataStart + int64(i)*f.traceSize + int64(o.Byte)
		if len(f.info.Outliers) < maxListedOutliers {
			f.info.Outliers = append(f.info.Outliers, o)
		}
		if len(list) < 5 {
			list = append(list, fmt.Sprintf("trace %d (byte %d: %s %d)", i, o.FileByte, o.Field, o.Value))
		}
	}
	more := ""
	if len(out) > len(list) {
		more = fmt.Sprintf(" and %d more", len(out)-len(list))
	}
	f.warnf("%d traces have inline or crossline numbers far outside the others and are left out of the grid: %s%s", len(out), strings.Join(list, ", "), more)
}

// byteName names the trace-header byte used for the inline (k = 0) or
// crossline (k = 1) numbering.
func (f *File) byteName(k int) string {
	b := f.geoBytes[k]
	if b == 0 {
		return "none"
	}
	return fmt.Sprintf("%d-%d", b, b+3)
}

// fileOrder makes the file unstructured: its traces in file order as one
// line, inline 0 with crosslines 1..traces (no offsets), and warns why.
func (f *File) fileOrder(why string) {
	g := &f.geo
	n := f.ntraces
	g.il, g.xl = make([]int32, n), make([]int32, n)
	for i := range g.xl {
		g.xl[i] = int32(i + 1)
	}
	g.off = make([]int32, n)
	g.offsets, f.info.Offsets = nil, nil
	g.ilR, g.xlR = Range{0, 0, 1, 1}, Range{Min: 1, Max: n, Step: 1, Count: n}
	f.info.Inline, f.info.Crossline = g.ilR, g.xlR
	g.grid = make([]int32, n)
	for i := range g.grid {
		g.grid[i] = int32(i)
	}
	f.info.Outliers, f.info.OutlierTraces = nil, 0
	f.info.DuplicateTraces, f.info.MissingTraces = 0, 0
	f.info.Layout = LayoutUnstructured
	f.warnf("%s", why)
}

// sortOrder tells inline-sorted from crossline-sorted files by which number
// changes less often from one trace to the next, and warns when the traces
// follow neither order.
func (f *File) sortOrder(il, xl []int32) Layout {
	ilChanges, xlChanges := 0, 0
	byInline, byCrossline := true, true
	for i := 1; i < len(il); i++ {
		if il[i] != il[i-1] {
			ilChanges++
		}
		if xl[i] != xl[i-1] {
			xlChanges++
		}
		if il[i] < il[i-1] || (il[i] == il[i-1] && xl[i] < xl[i-1]) {
			byInline = false
		}
		if xl[i] < xl[i-1] || (xl[i] == xl[i-1] && il[i] < il[i-1]) {
			byCrossline = false
		}
	}
	if !byInline && !byCrossline {
		f.warnf("traces are sorted neither by inline nor by crossline")
	}
	if ilChanges <= xlChanges {
		return Layout3DInlineSorted
	}
	return Layout3DCrosslineSorted
}

// cell2 returns the grid cell (without offsets) of a numbering, or -1 when
// it lies off the grid (an outlier).
func (f *File) cell2(il, xl int32) int {
	g := &f.geo
	i, ok1 := rangeIndex(g.ilR, int(il))
	j, ok2 := rangeIndex(g.xlR, int(xl))
	if !ok1 || !ok2 {
		return -1
	}
	return i*g.xlR.Count + j
}

// offIndex returns the grid index of an offset (0 for post-stack), or -1.
func (f *File) offIndex(off int) int {
	g := &f.geo
	if g.offsets == nil {
		return 0
	}
	i := sort.SearchInts(g.offsets, off)
	if i < len(g.offsets) && g.offsets[i] == off {
		return i
	}
	return -1
}

// coordExtent is the extent of the CDP coordinates of a set of traces;
// has is false when every one is (0, 0).
type coordExtent struct {
	has                    bool
	minX, maxX, minY, maxY float64
}

func newCoordExtent() coordExtent {
	return coordExtent{minX: math.Inf(1), maxX: math.Inf(-1), minY: math.Inf(1), maxY: math.Inf(-1)}
}

// add takes one trace's coordinates into the extent.
func (e *coordExtent) add(x, y float64) {
	if x != 0 || y != 0 {
		e.has = true
	}
	e.minX, e.maxX = math.Min(e.minX, x), math.Max(e.maxX, x)
	e.minY, e.maxY = math.Min(e.minY, y), math.Max(e.maxY, y)
}

// coordExtentOf is the extent of every trace's coordinates.
func coordExtentOf(cx, cy []float64) coordExtent {
	e := newCoordExtent()
	for i := range cx {
		e.add(cx[i], cy[i])
	}
	return e
}

// arrayCoords gives trace i's coordinates from arrays of every trace.
func arrayCoords(cx, cy []float64) func(i int) (float64, float64) {
	return func(i int) (float64, float64) { return cx[i], cy[i] }
}

// finishGeometry records the coordinate extent and computes the bin
// spacing from the coordinates of the first and last traces of up to 256
// lines each way (coord gives trace i's coordinates: from the arrays of a
// full scan, or read on demand for a sampled hypothesis).
func (f *File) finishGeometry(ext coordExtent, coord func(i int) (x, y float64), coordUnits int, bin []byte) {
	if !ext.has {
		return
	}
	f.info.MinX, f.info.MaxX, f.info.MinY, f.info.MaxY = ext.minX, ext.maxX, ext.minY, ext.maxY
	g := &f.geo
	if g.grid == nil {
		return
	}
	switch coordUnits {
	case 2, 3, 4:
		f.warnf("coordinates are geographic (trace header byte 89 = %d): no bin spacing in metres", coordUnits)
		return
	}
	unit := 1.0
	if i16(bin, binMeasurement, 3201, f.order) == 2 {
		unit = 0.3048 // international foot
		f.warnf("measurement system is feet (binary header byte 3255 = 2): bin spacing converted to metres")
	}
	// spacing along one line: distance between its first and last traces
	// over the number of steps between them; median over up to 256 lines.
	along := func(pairs []spacingPair) float64 {
		var est []float64
		for _, p := range pairs {
			xa, ya := coord(p.a)
			xb, yb := coord(p.b)
			est = append(est, math.Hypot(xb-xa, yb-ya)/float64(p.steps))
		}
		if len(est) == 0 {
			return 0
		}
		slices.Sort(est)
		return est[len(est)/2] * unit
	}
	alongIl, alongXl := f.spacingPairs()
	f.info.InlineSpacingM = along(alongIl)
	f.info.CrosslineSpacingM = along(alongXl)
}

// spacingPair is a line's first and last traces and the grid steps
// between them.
type spacingPair struct{ a, b, steps int }

// spacingPairs picks the traces the bin spacing is measured between: on up
// to 256 inlines (alongIl) and crosslines (alongXl) spread evenly, the
// first and the last position holding a trace (the first offset that has
// one).
func (f *File) spacingPairs() (alongIl, alongXl []spacingPair) {
	g := &f.geo
	nIl, nxl := g.ilR.Count, g.xlR.Count
	at := func(ili, xli int) int {
		noff := max(1, len(g.offsets))
		base := (ili*nxl + xli) * noff
		for k := 0; k < noff; k++ {
			if t := g.grid[base+k]; t >= 0 {
				return int(t)
			}
		}
		return -1
	}
	pairs := func(lines, positions int, get func(line, pos int) int) []spacingPair {
		var out []spacingPair
		stride := max(1, lines/256)
		for l := 0; l < lines; l += stride {
			a, b := -1, -1
			pa, pb := 0, 0
			for p := 0; p < positions; p++ {
				if t := get(l, p); t >= 0 {
					a, pa = t, p
					break
				}
			}
			for p := positions - 1; p > pa; p-- {
				if t := get(l, p); t >= 0 {
					b, pb = t, p
					break
				}
			}
			if a >= 0 && b >= 0 {
				out = append(out, spacingPair{a, b, pb - pa})
			}
		}
		return out
	}
	return pairs(nIl, nxl, func(l, p int) int { return at(l, p) }), pairs(nxl, nIl, func(l, p int) int { return at(p, l) })
}

// amplitudeTraces lists the traces of the amplitude summary: at most 1000
// spread evenly through n.
func amplitudeTraces(n int) []int {
	k := min(n, 1000)
	out := make([]int, k)
	for j := range out {
		out[j] = amplitudeTrace(j, n)
	}
	return out
}

// amplitudeTrace is the j-th trace of amplitudeTraces(n).
func amplitudeTrace(j, n int) int { return int(int64(j) * int64(n) / int64(min(n, 1000))) }

// sampleAmplitudes fills the amplitude summary from at most 1000 traces
// spread evenly through the file.
func (f *File) sampleAmplitudes() error {
	n := f.ntraces
	k := len(amplitudeTraces(n))
	buf := make([]float32, f.samples)
	st := amplitudeStats{lo: math.Inf(1), hi: math.Inf(-1)}
	for j := 0; j < k; j++ {
		if err := f.scanCancelled(j * 16); err != nil { // every 64 sampled traces
			return err
		}
		i := amplitudeTrace(j, n)
		var err error
		buf, err = f.ReadTrace(i, buf)
		if err != nil {
			return err
		}
		st.add(buf)
	}
	lo, hi, sum2, count, bad := st.lo, st.hi, st.sum2, st.count, st.bad
	if count > 0 {
		f.info.AmplitudeMin, f.info.AmplitudeMax = lo, hi
		f.info.AmplitudeRMS = math.Sqrt(sum2 / float64(count))
	}
	if bad > 0 {
		f.warnf("%d NaN or infinite samples among %d sampled traces", bad, k)
	}
	if count > 0 && lo == 0 && hi == 0 {
		f.warnf("every sample of the %d sampled traces is zero", k)
	}
	return nil
}

// amplitudeStats accumulates the amplitude summary: least and greatest
// finite sample, sum of squares and count of the finite ones, count of
// NaN and infinite ones.
type amplitudeStats struct {
	lo, hi, sum2 float64
	count, bad   int
}

// add takes the samples of one trace. It gives what math.Min and math.Max
// over the finite samples give (-0 below +0), by plain comparisons: those
// functions' NaN and signed-zero cases cost ~9 ns a sample here, a fifth
// of a whole export's open (TestAmplitudeStatsMatchesMath).
func (s *amplitudeStats) add(tr []float32) {
	lo, hi, sum2 := s.lo, s.hi, s.sum2
	count, bad := s.count, s.bad
	for _, v := range tr {
		if v-v != 0 { // NaN or infinite
			bad++
			continue
		}
		x := float64(v)
		if x < lo || x == lo && math.Signbit(x) {
			lo = x
		}
		if x > hi || x == hi && !math.Signbit(x) {
			hi = x
		}
		sum2 += x * x
		count++
	}
	s.lo, s.hi, s.sum2, s.count, s.bad = lo, hi, sum2, count, bad
}
