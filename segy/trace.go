package segy

import (
	"encoding/binary"
	"math"
	"runtime"
	"sync"
)

// TraceHeader is one 240-byte trace header with the fields quadtrace uses
// decoded.
type TraceHeader struct {
	Inline, Crossline, Offset int // from the byte locations of the Options used at Open
	// CDPX and CDPY are scaled by the coordinate scalar (bytes 71-72) per
	// SEG-Y rev 1 table 3, or taken from trace header extension 1 (bytes
	// 161-176, IEEE doubles, rev 2.0 table 4) when the file has one and
	// they are set there.
	CDPX, CDPY float64
	Raw        [240]byte // in the file's byte order
	// Extra holds the additional 240-byte trace headers of a SEG-Y rev 2
	// file (Info().ExtraTraceHeaders of them, extension 1 first), in the
	// file's byte order; nil without them.
	Extra  []byte
	little bool // Raw and Extra are little-endian
}

// Ext1 reads trace header extension 1 (SEG-Y rev 2.0 table 4) from
// h.Extra: the 64-bit trace sequence numbers within line and file (bytes
// 1-8, 9-16), the extended sample count (137-140), the extended sample
// interval in microseconds (145-152), the CDP coordinates (161-176). ok is
// false when the trace has no additional header.
func (h TraceHeader) Ext1() (e Ext1, ok bool) {
	if len(h.Extra) < TraceHeaderSize {
		return e, false
	}
	var o binary.ByteOrder = binary.BigEndian
	if h.little {
		o = binary.LittleEndian
	}
	x := h.Extra[:TraceHeaderSize]
	e.SeqLine = o.Uint64(x[ext1SeqLine-1:])
	e.SeqFile = o.Uint64(x[ext1SeqFile-1:])
	e.Samples = o.Uint32(x[ext1Samples-1:])
	e.IntervalUS = math.Float64frombits(o.Uint64(x[ext1Interval-1:]))
	e.CDPX = math.Float64frombits(o.Uint64(x[ext1CDPX-1:]))
	e.CDPY = math.Float64frombits(o.Uint64(x[ext1CDPY-1:]))
	e.Name = string(x[ext1Name-1 : ext1Name+7])
	return e, true
}

// Ext1 is the part of trace header extension 1 quadtrace reads.
type Ext1 struct {
	SeqLine, SeqFile uint64
	Samples          uint32
	IntervalUS       float64
	CDPX, CDPY       float64
	Name             string // bytes 233-240, "SEG00001" when named
}

// Little reports whether Raw is in little-endian byte order.
func (h TraceHeader) Little() bool { return h.little }

// Int reads the two's-complement integer of width 2 or 4 bytes starting at
// 1-based byte pos of Raw, in Raw's byte order. It returns 0 for positions
// outside the header.
func (h TraceHeader) Int(pos, width int) int {
	if pos < 1 || pos+width-1 > TraceHeaderSize {
		return 0
	}
	var o binary.ByteOrder = binary.BigEndian
	if h.little {
		o = binary.LittleEndian
	}
	switch width {
	case 2:
		return int(int16(o.Uint16(h.Raw[pos-1:])))
	case 4:
		return int(int32(o.Uint32(h.Raw[pos-1:])))
	}
	return 0
}

func (f *File) checkTrace(i int) error {
	if i < 0 || i >= f.ntraces {
		return f.errf(i, 0, "no such trace: the file has %d traces", f.ntraces)
	}
	return nil
}

// ReadTrace decodes the samples of trace i (0-based) into dst, which is
// reused when its capacity suffices, and returns it with length
// Info().Samples.
func (f *File) ReadTrace(i int, dst []float32) ([]float32, error) {
	if err := f.checkTrace(i); err != nil {
		return dst, err
	}
	if err := f.hold(i); err != nil {
		return dst, err
	}
	defer f.mu.RUnlock()
	if cap(dst) < f.samples {
		dst = make([]float32, f.samples)
	}
	dst = dst[:f.samples]
	off := f.dataStart + int64(i)*f.traceSize + f.hdrSize
	n := f.samples * f.sf.size
	if f.data != nil {
		err := f.guardFault(i, off, func() error {
			f.sf.decode(dst, f.data[off:off+int64(n)], f.order)
			return nil
		})
		return dst, err
	}
	bp := f.getBuf()
	defer f.bufPool.Put(bp)
	b, err := f.bytesAt(off, n, *bp)
	if err != nil {
		return dst, f.errf(i, off+1, "reading samples: %v", err)
	}
	*bp = b[:cap(b)]
	f.sf.decode(dst, b, f.order)
	return dst, nil
}

// TraceHeader returns the header of trace i (0-based).
func (f *File) TraceHeader(i int) (TraceHeader, error) {
	var h TraceHeader
	if err := f.checkTrace(i); err != nil {
		return h, err
	}
	if err := f.hold(i); err != nil {
		return h, err
	}
	defer f.mu.RUnlock()
	err := f.guardFault(i, f.dataStart+int64(i)*f.traceSize, func() error {
		off := f.dataStart + int64(i)*f.traceSize
		raw, err := f.bytesAt(off, int(f.hdrSize), nil)
		if err != nil {
			return f.errf(i, off+1, "reading trace header: %v", err)
		}
		copy(h.Raw[:], raw)
		if f.extraHeaders > 0 {
			h.Extra = append([]byte(nil), raw[TraceHeaderSize:]...)
		}
		return nil
	})
	if err != nil {
		return h, err
	}
	raw := h.Raw[:]
	h.little = f.order == binary.ByteOrder(binary.LittleEndian)
	o := f.order
	h.Inline = int(int32(o.Uint32(raw[f.ilByte-1:])))
	h.Crossline = int(int32(o.Uint32(raw[f.xlByte-1:])))
	h.Offset = int(int32(o.Uint32(raw[f.offByte-1:])))
	sc := i16(raw, thCoordScalar, 1, o)
	h.CDPX = applyScalar(float64(int32(o.Uint32(raw[f.cxByte-1:]))), sc)
	h.CDPY = applyScalar(float64(int32(o.Uint32(raw[f.cyByte-1:]))), sc)
	if x, y, ok := f.ext1Coords(h.Extra); ok {
		h.CDPX, h.CDPY = x, y
	}
	return h, nil
}

// ext1Coords reads the CDP coordinates of trace header extension 1 from
// the additional headers of one trace, when they are set (not both zero)
// and finite, and the user did not choose other coordinate bytes.
func (f *File) ext1Coords(extra []byte) (x, y float64, ok bool) {
	if len(extra) < TraceHeaderSize || f.cxByte != thCDPX || f.cyByte != thCDPY {
		return 0, 0, false
	}
	x = math.Float64frombits(f.order.Uint64(extra[ext1CDPX-1:]))
	y = math.Float64frombits(f.order.Uint64(extra[ext1CDPY-1:]))
	if (x == 0 && y == 0) || math.IsNaN(x+y) || math.IsInf(x+y, 0) {
		return 0, 0, false
	}
	return x, y, true
}

// TraceIndex returns the index of the trace at (inline, crossline, offset)
// in the numbering of Info (which may come from fallback bytes, see
// Info().Warnings). For post-stack files the offset is ignored.
func (f *File) TraceIndex(inline, crossline, offset int) (int, bool) {
	g := &f.geo
	if f.ntraces == 0 {
		return -1, false
	}
	if g.grid == nil {
		return -1, false
	}
	ili, ok1 := rangeIndex(g.ilR, inline)
	xli, ok2 := rangeIndex(g.xlR, crossline)
	oi := f.offIndex(offset)
	if !ok1 || !ok2 || oi < 0 {
		return -1, false
	}
	t := g.grid[(ili*g.xlR.Count+xli)*max(1, len(g.offsets))+oi]
	return int(t), t >= 0
}

func rangeIndex(r Range, v int) (int, bool) {
	if r.Count == 0 || v < r.Min || v > r.Max || (v-r.Min)%r.Step != 0 {
		return 0, false
	}
	return (v - r.Min) / r.Step, true
}

// InlineTraces returns the trace indices of one inline ordered by crossline
// over Info().Crossline (Min..Max by Step), -1 where a trace is missing, or
// nil when the inline is not in the survey or the layout has no grid. For
// post-stack files the offset is ignored.
func (f *File) InlineTraces(inline, offset int) []int {
	g := &f.geo
	ili, ok := rangeIndex(g.ilR, inline)
	oi := f.offIndex(offset)
	if g.grid == nil || !ok || oi < 0 {
		return nil
	}
	noff := max(1, len(g.offsets))
	out := make([]int, g.xlR.Count)
	for j := range out {
		out[j] = int(g.grid[(ili*g.xlR.Count+j)*noff+oi])
	}
	return out
}

// CrosslineTraces returns the trace indices of one crossline ordered by
// inline over Info().Inline, -1 where missing; nil as for InlineTraces.
func (f *File) CrosslineTraces(crossline, offset int) []int {
	g := &f.geo
	xli, ok := rangeIndex(g.xlR, crossline)
	oi := f.offIndex(offset)
	if g.grid == nil || !ok || oi < 0 {
		return nil
	}
	noff := max(1, len(g.offsets))
	out := make([]int, g.ilR.Count)
	for i := range out {
		out[i] = int(g.grid[(i*g.xlR.Count+xli)*noff+oi])
	}
	return out
}

// TimeSlice returns sample number sample (0-based) of every trace at the
// given offset as [inline index][crossline index] over Info().Inline and
// Info().Crossline, NaN where a trace is missing. It reads only the bytes
// of that one sample from each trace (through the mapping, or one small
// read per trace without it), never whole traces; work is split over
// runtime.GOMAXPROCS goroutines.
func (f *File) TimeSlice(sample, offset int) ([][]float32, error) {
	g := &f.geo
	if sample < 0 || sample >= f.samples {
		return nil, f.errf(-1, 0, "time slice: sample %d outside 0..%d", sample, f.samples-1)
	}
	oi := f.offIndex(offset)
	if g.grid == nil {
		return nil, f.errf(-1, 0, "time slice: layout %q has no inline/crossline grid", f.info.Layout)
	}
	if oi < 0 {
		return nil, f.errf(-1, 0, "time slice: no offset %d in the file", offset)
	}
	if err := f.hold(-1); err != nil {
		return nil, err
	}
	defer f.mu.RUnlock()
	nIl, nXl := g.ilR.Count, g.xlR.Count
	flat := make([]float32, nIl*nXl)
	out := make([][]float32, nIl)
	for i := range out {
		out[i] = flat[i*nXl : (i+1)*nXl : (i+1)*nXl]
	}
	sampleOff := f.hdrSize + int64(sample)*int64(f.sf.size)
	workers := min(runtime.GOMAXPROCS(0), max(1, len(flat)/4096))
	var wg sync.WaitGroup
	errs := make([]error, workers)
	chunk := (len(flat) + workers - 1) / workers
	for w := 0; w < workers; w++ {
		lo, hi := w*chunk, min(len(flat), (w+1)*chunk)
		wg.Add(1)
		go func(w, lo, hi int) {
			defer wg.Done()
			errs[w] = f.guardFault(-1, 0, func() error { return f.sliceCells(flat, lo, hi, oi, sample, sampleOff) })
		}(w, lo, hi)
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	return out, nil
}

// sliceCells fills flat[lo:hi] of a time slice (see TimeSlice).
func (f *File) sliceCells(flat []float32, lo, hi, oi, sample int, sampleOff int64) error {
	g := &f.geo
	noff := max(1, len(g.offsets))
	size := f.sf.size
	var buf [8]byte
	for c := lo; c < hi; c++ {
		t := g.grid[c*noff+oi]
		if t < 0 {
			flat[c] = float32(math.NaN())
			continue
		}
		pos := f.dataStart + int64(t)*f.traceSize + sampleOff
		if f.data != nil {
			flat[c] = f.sf.at(f.data[pos:pos+int64(size)], f.order)
			continue
		}
		b, err := f.bytesAt(pos, size, buf[:])
		if err != nil {
			return f.errf(int(t), pos+1, "reading sample %d: %v", sample, err)
		}
		flat[c] = f.sf.at(b, f.order)
	}
	return nil
}
