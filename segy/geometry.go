package segy

import (
	"fmt"
	"math"
	"slices"
	"sort"
)

// geometry is the trace index built by the scan.
type geometry struct {
	il, xl, off []int32 // numbering of every trace, as used for the grid
	ilR, xlR    Range
	offsets     []int // grid offsets; nil for post-stack
	grid        []int32
	index       map[[3]int32]int32 // lookups when there is no grid
}

// gridLimit bounds the grid allocation: a numbering spanning more cells
// than this is not treated as a grid (it would be mostly holes, and a
// hostile header could otherwise make us allocate for billions of cells).
func gridLimit(traces int) int { return 4*traces + 1024 }

func (f *File) traceHeaderBytes(i int, buf []byte) ([]byte, error) {
	off := f.dataStart + int64(i)*f.traceSize
	h, err := f.bytesAt(off, TraceHeaderSize, buf)
	if err != nil {
		return nil, f.errf(i, off+1, "reading trace header: %v", err)
	}
	return h, nil
}

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
	var buf []byte
	if f.data == nil {
		buf = make([]byte, TraceHeaderSize)
	}
	o := f.order
	coordUnits := 0
	for i := 0; i < n; i++ {
		h, err := f.traceHeaderBytes(i, buf)
		if err != nil {
			return err
		}
		il[i] = int32(o.Uint32(h[f.ilByte-1:]))
		xl[i] = int32(o.Uint32(h[f.xlByte-1:]))
		off[i] = int32(o.Uint32(h[f.offByte-1:]))
		sc := i16(h, thCoordScalar, 1, o)
		cx[i] = applyScalar(float64(int32(o.Uint32(h[f.cxByte-1:]))), sc)
		cy[i] = applyScalar(float64(int32(o.Uint32(h[f.cyByte-1:]))), sc)
		if i == 0 {
			coordUnits = i16(h, thCoordUnits, 1, o)
		}
	}
	userBytes := f.ilByte != thInline || f.xlByte != thCrossline
	fromRecords := false
	if n > 1 && allSame(il) && allSame(xl) && !userBytes {
		// Read the fallback numbering.
		cdp := make([]int32, n)
		ffid := make([]int32, n)
		chn := make([]int32, n)
		for i := 0; i < n; i++ {
			h, err := f.traceHeaderBytes(i, buf)
			if err != nil {
				return err
			}
			ffid[i] = int32(o.Uint32(h[thFieldRecord-1:]))
			chn[i] = int32(o.Uint32(h[thChannel-1:]))
			cdp[i] = int32(o.Uint32(h[thCDP-1:]))
		}
		switch {
		case !allSame(cdp) && allSame(ffid):
			il, xl = ffid, cdp
			f.warnf("inline/crossline bytes %d/%d hold no numbering: fell back to bytes 9/21 (field record / CDP ensemble number)", f.ilByte, f.xlByte)
		case !allSame(cdp):
			il, xl = make([]int32, n), cdp
			f.warnf("inline/crossline bytes %d/%d hold no numbering: fell back to byte 21 (CDP ensemble number) as one line; field records (byte 9) vary", f.ilByte, f.xlByte)
		case !allSame(ffid) || !allSame(chn):
			il, xl = ffid, chn
			fromRecords = true
			f.warnf("inline/crossline bytes %d/%d hold no numbering: fell back to bytes 9/13 (field record / trace number within record); inlines are field records", f.ilByte, f.xlByte)
		case !allSame(off):
			// one location with several offsets (a single gather): keep
		default:
			for i := range xl {
				il[i] = 0
				xl[i] = int32(i + 1)
			}
			f.warnf("no inline/crossline numbering in bytes %d/%d, 9, 13 or 21: traces numbered 1..%d by position", f.ilByte, f.xlByte, n)
			f.buildGrid(il, xl, off)
			f.info.Layout = LayoutUnstructured
			f.finishGeometry(cx, cy, coordUnits, bin)
			return nil
		}
	}
	f.buildGrid(il, xl, off)
	if fromRecords && f.info.Layout != LayoutUnstructured {
		f.info.Layout = LayoutPrestack
	}
	f.finishGeometry(cx, cy, coordUnits, bin)
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

func (f *File) buildGrid(il, xl, off []int32) {
	g := &f.geo
	g.il, g.xl, g.off = il, xl, off
	n := len(il)
	g.ilR = rangeOf(distinctSorted(il))
	g.xlR = rangeOf(distinctSorted(xl))
	f.info.Inline, f.info.Crossline = g.ilR, g.xlR
	limit := gridLimit(n)
	cells := int64(g.ilR.Count) * int64(g.xlR.Count)
	if g.ilR.Count > limit || g.xlR.Count > limit || cells > int64(limit) { // the first two guard the product against overflow
		f.unstructured(fmtCells(cells, n))
		return
	}
	// One offset per location, or several (pre-stack)?
	loc := make([]int32, cells)
	for i := range loc {
		loc[i] = -1
	}
	prestack := false
	for i := 0; i < n; i++ {
		c := f.cell2(il[i], xl[i])
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
			f.unstructured(fmtCells(cells*int64(noff), n))
			f.info.Layout = LayoutPrestack
			return
		}
	}
	g.grid = make([]int32, cells*int64(noff))
	for i := range g.grid {
		g.grid[i] = -1
	}
	dup := 0
	for i := 0; i < n; i++ {
		c := f.cell2(il[i], xl[i])*noff + f.offIndex(int(off[i]))
		if g.grid[c] >= 0 {
			dup++
			continue
		}
		g.grid[c] = int32(i)
	}
	f.info.DuplicateTraces = dup
	f.info.MissingTraces = len(g.grid) - (n - dup)
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

func fmtCells(cells int64, n int) string {
	return fmt.Sprintf("numbering spans %d grid positions for %d traces: not a regular grid", cells, n)
}

func (f *File) unstructured(why string) {
	g := &f.geo
	g.grid = nil
	g.index = make(map[[3]int32]int32, len(g.il))
	dup := 0
	for i := range g.il {
		k := [3]int32{g.il[i], g.xl[i], 0}
		if g.offsets != nil {
			k[2] = g.off[i]
		}
		if _, ok := g.index[k]; ok {
			dup++
			continue
		}
		g.index[k] = int32(i)
	}
	f.info.DuplicateTraces = dup
	f.info.Layout = LayoutUnstructured
	f.warnf("%s", why)
	if dup > 0 {
		f.warnf("%d duplicate traces (same inline, crossline and offset as an earlier trace): the first one is used", dup)
	}
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

func (f *File) cell2(il, xl int32) int {
	g := &f.geo
	return ((int(il)-g.ilR.Min)/g.ilR.Step)*g.xlR.Count + (int(xl)-g.xlR.Min)/g.xlR.Step
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

// finishGeometry computes the coordinate extent and bin spacing.
func (f *File) finishGeometry(cx, cy []float64, coordUnits int, bin []byte) {
	hasCoords := false
	minX, maxX, minY, maxY := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for i := range cx {
		if cx[i] != 0 || cy[i] != 0 {
			hasCoords = true
		}
		minX, maxX = math.Min(minX, cx[i]), math.Max(maxX, cx[i])
		minY, maxY = math.Min(minY, cy[i]), math.Max(maxY, cy[i])
	}
	if !hasCoords {
		return
	}
	f.info.MinX, f.info.MaxX, f.info.MinY, f.info.MaxY = minX, maxX, minY, maxY
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
	// spacing along one line: distance between its first and last traces
	// over the number of steps between them; median over up to 256 lines.
	along := func(lines, positions int, get func(line, pos int) int) float64 {
		var est []float64
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
			if a < 0 || b < 0 {
				continue
			}
			est = append(est, math.Hypot(cx[b]-cx[a], cy[b]-cy[a])/float64(pb-pa))
		}
		if len(est) == 0 {
			return 0
		}
		slices.Sort(est)
		return est[len(est)/2] * unit
	}
	f.info.InlineSpacingM = along(nIl, nxl, func(l, p int) int { return at(l, p) })
	f.info.CrosslineSpacingM = along(nxl, nIl, func(l, p int) int { return at(p, l) })
}

// sampleAmplitudes fills the amplitude summary from at most 1000 traces
// spread evenly through the file.
func (f *File) sampleAmplitudes() error {
	n := f.ntraces
	k := min(n, 1000)
	buf := make([]float32, f.samples)
	lo, hi := math.Inf(1), math.Inf(-1)
	var sum2 float64
	count, bad := 0, 0
	for j := 0; j < k; j++ {
		i := int(int64(j) * int64(n) / int64(k))
		var err error
		buf, err = f.ReadTrace(i, buf)
		if err != nil {
			return err
		}
		for _, v := range buf {
			x := float64(v)
			if math.IsNaN(x) || math.IsInf(x, 0) {
				bad++
				continue
			}
			lo, hi = math.Min(lo, x), math.Max(hi, x)
			sum2 += x * x
			count++
		}
	}
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
