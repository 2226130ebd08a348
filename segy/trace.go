package segy

import (
	"encoding/binary"
	"errors"
	"io"
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
	return f.readTrace(i, dst)
}

// readTrace is ReadTrace for a caller holding the file.
func (f *File) readTrace(i int, dst []float32) ([]float32, error) {
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
	if err := f.checkTrace(i); err != nil {
		return TraceHeader{}, err
	}
	if err := f.hold(i); err != nil {
		return TraceHeader{}, err
	}
	defer f.mu.RUnlock()
	var h TraceHeader
	err := f.guardFault(i, f.dataStart+int64(i)*f.traceSize, func() error {
		raw, err := f.traceHeaderBytes(i, nil)
		if err == nil {
			h = f.decodeHeader(raw)
		}
		return err
	})
	return h, err
}

// decodeHeader decodes a trace's header block (f.hdrSize bytes: the
// standard header and its additional ones), copying what it keeps.
func (f *File) decodeHeader(raw []byte) TraceHeader {
	var h TraceHeader
	f.decodeHeaderInto(&h, raw)
	return h
}

// decodeHeaderInto is decodeHeader into *h (which it overwrites whole),
// for callers that keep headers in a slice: no copy on the heap per trace.
func (f *File) decodeHeaderInto(h *TraceHeader, raw []byte) {
	*h = TraceHeader{}
	copy(h.Raw[:], raw[:TraceHeaderSize])
	if f.extraHeaders > 0 {
		h.Extra = append([]byte(nil), raw[TraceHeaderSize:f.hdrSize]...)
	}
	r := h.Raw[:]
	h.little = f.order == binary.ByteOrder(binary.LittleEndian)
	o := f.order
	h.Inline = int(int32(o.Uint32(r[f.ilByte-1:])))
	h.Crossline = int(int32(o.Uint32(r[f.xlByte-1:])))
	h.Offset = int(int32(o.Uint32(r[f.offByte-1:])))
	sc := i16(r, thCoordScalar, 1, o)
	h.CDPX = applyScalar(float64(int32(o.Uint32(r[f.cxByte-1:]))), sc)
	h.CDPY = applyScalar(float64(int32(o.Uint32(r[f.cyByte-1:]))), sc)
	if x, y, ok := f.ext1Coords(h.Extra); ok {
		h.CDPX, h.CDPY = x, y
	}
}

// runReadBytes is the most ReadTraces and TraceHeaders read with one call
// when the file is read through a reader (not mapped), at least one
// trace: a few hundred KiB, so that the bytes are still in the core's
// cache when they are decoded, and few enough calls that their cost
// vanishes (one read a trace of 6 KB cost as much again as the bytes).
const runReadBytes = 256 << 10

// wholeTraceHeaderLimit is the largest trace whose headers TraceHeaders
// and the geometry scan read by reading whole runs of traces rather than
// one header per read (without a mapping). A read of 240 bytes costs
// about 2.3 us here and the bytes of a run 0.2 ns each from the page
// cache (measured on the export's benchmark volume: 40,000 headers of
// 6244-byte traces in 92 ms one by one, 50 ms in runs), so runs pay up to
// about 11 KB a trace; the limit sits below that, where the gain is sure.
const wholeTraceHeaderLimit = 8 << 10

// runTraces is how many traces one read of a run covers: never more than
// the file holds, so that its buffer stays in proportion to the real file
// size whatever the headers claim.
func (f *File) runTraces() int { return max(1, min(int(runReadBytes/f.traceSize), f.ntraces)) }

// getRunBuf returns a buffer for runTraces traces from the pool.
func (f *File) getRunBuf() *[]byte {
	if b, ok := f.runPool.Get().(*[]byte); ok {
		return b
	}
	b := make([]byte, int64(f.runTraces())*f.traceSize)
	return &b
}

// ReadTraces reads len(dst) consecutive traces from trace first (0-based):
// the samples of trace first+k into dst[k], reused when its capacity
// suffices (else replaced by a new slice) and given length Info().Samples,
// and, when headers is not nil (len(headers) >= len(dst)), its header into
// headers[k]. Headers and samples are exactly what TraceHeader and
// ReadTrace give. Without a mapping it reads many traces with each call
// (runReadBytes, at least one trace) and decodes them from that buffer:
// a run costs a few system calls instead of two per trace. On an error
// the traces before the one it names are filled; the error names the
// first trace not read and the file byte where its header or samples
// could not be read, as TraceHeader and ReadTrace would.
func (f *File) ReadTraces(first int, headers []TraceHeader, dst [][]float32) error {
	return f.readRun(first, len(dst), headers, dst)
}

// TraceHeaders reads the headers of len(headers) consecutive traces from
// trace first (0-based), as TraceHeader would one by one. Without a
// mapping it reads whole runs of traces in one call when a trace is at
// most wholeTraceHeaderLimit bytes, else one header per read. Errors are
// as for ReadTraces.
func (f *File) TraceHeaders(first int, headers []TraceHeader) error {
	return f.readRun(first, len(headers), headers, nil)
}

// readRun reads n consecutive traces from first: headers into headers
// (unless nil), samples into dst (unless nil).
func (f *File) readRun(first, n int, headers []TraceHeader, dst [][]float32) error {
	if n == 0 {
		return nil
	}
	if headers != nil && len(headers) < n {
		return f.errf(first, 0, "reading %d traces: room for %d headers only", n, len(headers))
	}
	if err := f.checkTrace(first); err != nil {
		return err
	}
	if err := f.checkTrace(first + n - 1); err != nil {
		return err
	}
	if err := f.hold(first); err != nil {
		return err
	}
	defer f.mu.RUnlock()
	if f.data != nil || (dst == nil && f.traceSize > wholeTraceHeaderLimit) {
		// Mapped: nothing to gain from batching. Large traces: read the
		// headers alone, into one buffer.
		var hbuf []byte
		if f.data == nil {
			hbuf = make([]byte, f.hdrSize)
		}
		for k := 0; k < n; k++ {
			i := first + k
			if headers != nil {
				err := f.guardFault(i, f.dataStart+int64(i)*f.traceSize, func() error {
					raw, err := f.traceHeaderBytes(i, hbuf)
					if err == nil {
						f.decodeHeaderInto(&headers[k], raw)
					}
					return err
				})
				if err != nil {
					return err
				}
			}
			if dst != nil {
				var err error
				if dst[k], err = f.readTrace(i, dst[k]); err != nil {
					return err
				}
			}
		}
		return nil
	}
	bp := f.getRunBuf()
	defer f.runPool.Put(bp)
	return f.eachRunRead(first, n, *bp, func(k int, raw []byte) {
		if headers != nil {
			f.decodeHeaderInto(&headers[k], raw[:f.hdrSize])
		}
		if dst != nil {
			d := dst[k]
			if cap(d) < f.samples {
				d = make([]float32, f.samples)
			}
			d = d[:f.samples]
			f.sf.decode(d, raw[f.hdrSize:], f.order)
			dst[k] = d
		}
	})
}

// eachRunRead reads traces first to first+n-1 through f.r, len(buf)
// bytes' worth of whole traces at a time, and calls use(k, bytes of trace
// first+k) for each trace read whole, in order. When the data end early
// (a file cut short since it was opened) or a read fails, it returns an
// *Error naming the first trace not read whole: its header's file byte
// when the header is incomplete ("reading trace header"), else its
// samples' ("reading samples"), the messages of single reads.
func (f *File) eachRunRead(first, n int, buf []byte, use func(k int, trace []byte)) error {
	ts := int(f.traceSize)
	per := max(1, len(buf)/ts)
	for k := 0; k < n; k += per {
		c := min(per, n-k)
		off := f.dataStart + int64(first+k)*f.traceSize
		want := c * ts
		b := buf[:want]
		m, err := f.r.ReadAt(b, off)
		whole := c
		if m < want {
			if err == nil || errors.Is(err, io.EOF) {
				err = io.ErrUnexpectedEOF
			}
			whole = m / ts
		}
		for j := 0; j < whole; j++ {
			use(k+j, b[j*ts:(j+1)*ts])
		}
		if whole < c {
			i := first + k + whole
			hdr := f.dataStart + int64(i)*f.traceSize
			if int64(m-whole*ts) < f.hdrSize {
				return f.errf(i, hdr+1, "reading trace header: %v", err)
			}
			return f.errf(i, hdr+f.hdrSize+1, "reading samples: %v", err)
		}
	}
	return nil
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
