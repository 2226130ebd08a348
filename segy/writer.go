package segy

import (
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
)

// WriteOptions choose the output sample format and textual header.
type WriteOptions struct {
	// Format is the sample format code: 0 or 5 = 4-byte IEEE float
	// (default), 1 = 4-byte IBM float.
	Format int
	// TextHeader: "" copies the source's first textual header (or a short
	// default for CreateNew); otherwise this text, ASCII converted to
	// EBCDIC, cut or padded to 40 lines of 80 characters.
	TextHeader string
}

// NewSpec describes a file written from scratch.
type NewSpec struct {
	Samples, IntervalUS int
	StartMS             float64
	TextHeader          string
}

// Writer streams a SEG-Y file to an io.Writer: the revision 1 layout,
// big-endian, no extended textual headers; revision 2.0 when the source
// has additional trace headers, which it carries over (SEG-Y rev 2.0
// section 7: bytes 3507-3508 give their number). The file-system policy
// (where the bytes go, temporary files, what may be overwritten) is the
// caller's: quadtrace's commands write through app/outfile. A Writer is
// not safe for concurrent use.
type Writer struct {
	name string // for messages
	out  io.Writer
	// pending holds what is not yet handed to out: whole traces are
	// encoded straight into it (no second copy, as through a bufio.Writer)
	// and it goes to out in one Write when the next trace would not fit.
	pending  []byte
	err      error // the first error of out, returned from then on
	format   int
	samples  int
	interval int
	delayMS  int
	timeSc   int
	extra    int  // additional 240-byte headers written per trace
	swapExt1 bool // source extension 1 is little-endian
	traces   int
	done     bool
}

// writeBuffer is the size of the Writer's buffer (at least one trace): one
// Write call per 1 MiB.
const writeBuffer = 1 << 20

// NewWriter starts a file written to w with the headers of src: its first
// textual header (re-encoded as EBCDIC) or opt.TextHeader, and bytes
// 3201-3260 of its binary header converted to big-endian, with the format
// code updated, revision 1 (bytes 3501-3502 = 0x0100; 2.0 with the
// byte-order word when additional trace headers are carried), fixed-length
// traces and no extended textual headers. name is used in messages.
// Additional trace headers of src are carried: all of them from a
// big-endian source; from a little-endian one only extension 1, swapped
// field by field (the layout of other additional headers is not known, so
// they cannot be converted).
func NewWriter(w io.Writer, name string, src *File, opt WriteOptions) (*Writer, error) {
	if src == nil {
		return nil, errors.New("segy.NewWriter: nil source file")
	}
	bin := make([]byte, BinaryHeaderSize)
	if err := src.hold(-1); err != nil {
		return nil, err
	}
	err := src.guardFault(-1, TextHeaderSize, func() error {
		b, err := src.bytesAt(TextHeaderSize, BinaryHeaderSize, nil)
		if err != nil {
			return src.errf(-1, TextHeaderSize+1, "reading binary header: %v", err)
		}
		copy(bin[:60], b[:60])
		return nil
	})
	src.mu.RUnlock()
	if err != nil {
		return nil, err
	}
	little := src.order == binary.ByteOrder(binary.LittleEndian)
	if little {
		swapWords(bin, binaryHeaderWords, 3201)
	}
	text := opt.TextHeader
	if text == "" {
		text = src.info.TextHeaders[0]
	}
	delay := 0
	timeSc := 0
	if src.ntraces > 0 {
		if h, err := src.TraceHeader(0); err == nil {
			delay = i16(h.Raw[:], thDelay, 1, src.order)
			timeSc = i16(h.Raw[:], thTimeScalar, 1, src.order)
		}
	}
	extra := src.extraHeaders
	if little {
		extra = min(extra, 1)
	}
	return newWriter(w, name, text, bin, src.samples, src.info.IntervalUS, delay, timeSc, extra, little, opt)
}

// NewWriterSpec starts a file from scratch with the given sampling,
// written to w; name is used in messages.
func NewWriterSpec(w io.Writer, name string, spec NewSpec, opt WriteOptions) (*Writer, error) {
	if spec.Samples <= 0 || spec.Samples > math.MaxUint16 {
		return nil, fmt.Errorf("segy: write %s: samples per trace %d outside 1..65535", name, spec.Samples)
	}
	if spec.IntervalUS <= 0 || spec.IntervalUS > math.MaxInt16 {
		return nil, fmt.Errorf("segy: write %s: sample interval %d us outside 1..32767", name, spec.IntervalUS)
	}
	text := opt.TextHeader
	if text == "" {
		text = spec.TextHeader
	}
	if text == "" {
		text = "C 1 WRITTEN BY QUADTRACE\nC40 END TEXTUAL HEADER"
	}
	bin := make([]byte, BinaryHeaderSize)
	binary.BigEndian.PutUint16(bin[3213-3201:], 1)       // data traces per ensemble
	binary.BigEndian.PutUint16(bin[3255-3201:], 1)       // measurement system: metres
	binary.BigEndian.PutUint16(bin[binSorting-3201:], 4) // trace sorting: horizontally stacked
	delay, timeSc, err := encodeDelay(spec.StartMS)
	if err != nil {
		return nil, fmt.Errorf("segy: write %s: %w", name, err)
	}
	return newWriter(w, name, text, bin, spec.Samples, spec.IntervalUS, delay, timeSc, 0, false, opt)
}

// encodeDelay expresses a start time in ms as the int16 delay recording
// time (trace bytes 109-110) and its time scalar (215-216; negative
// divides, SEG-Y rev 1 table 3), choosing the smallest of 1, -10, -100,
// -1000 that represents it exactly, else the finest that fits.
func encodeDelay(ms float64) (delay, scalar int, err error) {
	if math.IsNaN(ms) || math.Abs(ms) > math.MaxInt16 {
		return 0, 0, fmt.Errorf("start time %v ms does not fit the 16-bit delay field", ms)
	}
	best, bestSc := int(math.Round(ms)), 1
	for _, sc := range []int{1, 10, 100, 1000} {
		v := ms * float64(sc)
		if math.Abs(v) > math.MaxInt16 {
			break
		}
		best, bestSc = int(math.Round(v)), sc
		if v == math.Round(v) {
			break
		}
	}
	if bestSc == 1 {
		return best, 1, nil
	}
	return best, -bestSc, nil
}

func newWriter(out io.Writer, name, text string, bin []byte, samples, interval, delay, timeSc, extra int, swapExt1 bool, opt WriteOptions) (*Writer, error) {
	format := opt.Format
	if format == 0 {
		format = 5
	}
	if format != 1 && format != 5 {
		return nil, fmt.Errorf("segy: write %s: sample format %d not supported for writing (1 = IBM, 5 = IEEE)", name, format)
	}
	if samples <= 0 || samples > math.MaxUint16 {
		return nil, fmt.Errorf("segy: write %s: samples per trace %d outside 1..65535", name, samples)
	}
	if interval > math.MaxInt16 || interval < 0 {
		interval = 0
	}
	o := binary.BigEndian
	o.PutUint16(bin[binInterval-3201:], uint16(interval))
	o.PutUint16(bin[3219-3201:], uint16(interval)) // original field interval
	o.PutUint16(bin[binSamples-3201:], uint16(samples))
	o.PutUint16(bin[3223-3201:], uint16(samples)) // original field samples
	o.PutUint16(bin[binFormat-3201:], uint16(format))
	for i := 3261 - 3201; i < BinaryHeaderSize; i++ {
		bin[i] = 0
	}
	bin[binRevision-3201] = 1 // SEG-Y rev 1: 0x0100
	if extra > 0 {
		// SEG-Y rev 2.0: major 2, minor 0, the byte-order word, and the
		// number of additional trace headers
		bin[binRevision-3201], bin[binRevision-3200] = 2, 0
		o.PutUint32(bin[binByteOrder-3201:], byteOrderMagic)
		o.PutUint16(bin[binExtraHeaders-3201:], uint16(extra))
	}
	o.PutUint16(bin[binFixedLength-3201:], 1)
	o.PutUint16(bin[binExtTextHeaders-3201:], 0)

	w := &Writer{name: name, out: out,
		format: format, samples: samples, interval: interval, delayMS: delay, timeSc: timeSc,
		extra: extra, swapExt1: swapExt1,
		pending: make([]byte, 0, max(writeBuffer, TextHeaderSize+BinaryHeaderSize+TraceHeaderSize*(1+extra)+4*samples))}
	w.pending = append(w.pending, encodeText(text)...)
	w.pending = append(w.pending, bin...)
	return w, nil
}

// flush hands the pending bytes to out. An error stays: later calls
// return it (as a bufio.Writer does), and a short write without an error
// is io.ErrShortWrite.
func (w *Writer) flush() error {
	if w.err != nil {
		return w.err
	}
	if len(w.pending) == 0 {
		return nil
	}
	n, err := w.out.Write(w.pending)
	if n < len(w.pending) && err == nil {
		err = io.ErrShortWrite
	}
	if err != nil {
		w.err = err
		return err
	}
	w.pending = w.pending[:0]
	return nil
}

// NewTraceHeader builds a big-endian revision 1 trace header: inline and
// crossline at bytes 189/193, the crossline also as the CDP ensemble number
// (bytes 21-24) so 2D-style readers find a numbering; CDP X/Y at bytes 181/185 with a coordinate scalar
// (bytes 71-72) of -100 (centimetre precision) when the coordinates are
// not whole numbers and fit, else 1. Trace identification code (29-30) is 1
// (seismic data). The writer fills in sample count and interval.
func NewTraceHeader(inline, crossline int, cdpx, cdpy float64) TraceHeader {
	var h TraceHeader
	o := binary.BigEndian
	r := h.Raw[:]
	o.PutUint32(r[thInline-1:], uint32(int32(inline)))
	o.PutUint32(r[thCrossline-1:], uint32(int32(crossline)))
	o.PutUint32(r[thCDP-1:], uint32(int32(crossline)))
	o.PutUint16(r[29-1:], 1)
	scalar := 1
	whole := cdpx == math.Trunc(cdpx) && cdpy == math.Trunc(cdpy)
	if !whole && math.Abs(cdpx)*100 < math.MaxInt32 && math.Abs(cdpy)*100 < math.MaxInt32 {
		scalar = -100
	}
	enc := func(v float64) uint32 {
		if scalar == -100 {
			v *= 100
		}
		v = math.Round(v)
		v = math.Max(math.MinInt32, math.Min(math.MaxInt32, v))
		return uint32(int32(v))
	}
	o.PutUint16(r[thCoordScalar-1:], uint16(int16(scalar)))
	o.PutUint32(r[thCDPX-1:], enc(cdpx))
	o.PutUint32(r[thCDPY-1:], enc(cdpy))
	h.Inline, h.Crossline = inline, crossline
	h.CDPX = applyScalar(float64(int32(o.Uint32(r[thCDPX-1:]))), scalar)
	h.CDPY = applyScalar(float64(int32(o.Uint32(r[thCDPY-1:]))), scalar)
	return h
}

// WriteTrace appends one trace. h.Raw is the authoritative header (the
// decoded fields of h are not consulted): it is converted to big-endian and
// its sample count (bytes 115-116) and interval (117-118) are set to the
// file's; a zero delay (109-110) with time scalar is filled from the
// writer's start time. The additional headers of h.Extra follow when the
// file carries them (zeros where h has fewer), with extension 1's sample
// count and interval set too. len(samples) must equal the file's sample
// count.
func (w *Writer) WriteTrace(h TraceHeader, samples []float32) error {
	if w.done {
		return fmt.Errorf("segy: write %s: writer already finished or aborted", w.name)
	}
	if len(samples) != w.samples {
		return fmt.Errorf("segy: write %s: trace %d has %d samples, the file has %d", w.name, w.traces, len(samples), w.samples)
	}
	hdr := TraceHeaderSize * (1 + w.extra)
	size := hdr + 4*w.samples
	if len(w.pending)+size > cap(w.pending) {
		if err := w.flush(); err != nil {
			return fmt.Errorf("segy: write %s: trace %d: %w", w.name, w.traces, err)
		}
	}
	if w.err != nil {
		return fmt.Errorf("segy: write %s: trace %d: %w", w.name, w.traces, w.err)
	}
	at := len(w.pending)
	b := w.pending[at : at+size]
	copy(b[:TraceHeaderSize], h.Raw[:])
	if h.little {
		swapWords(b[:TraceHeaderSize], traceHeaderWords, 1)
	}
	o := binary.BigEndian
	o.PutUint16(b[thSamples-1:], uint16(w.samples))
	o.PutUint16(b[thInterval-1:], uint16(w.interval))
	if int16(o.Uint16(b[thDelay-1:])) == 0 && w.delayMS != 0 {
		o.PutUint16(b[thDelay-1:], uint16(int16(w.delayMS)))
		o.PutUint16(b[thTimeScalar-1:], uint16(int16(w.timeSc)))
	}
	if w.extra > 0 {
		x := b[TraceHeaderSize:hdr]
		clear(x)
		copy(x, h.Extra)
		if h.little {
			swapExt1(x[:TraceHeaderSize])
		}
		o.PutUint32(x[ext1Samples-1:], uint32(w.samples))
		o.PutUint64(x[ext1Interval-1:], math.Float64bits(float64(w.interval)))
	}
	d := b[hdr:]
	switch {
	case w.format == 1:
		for i, v := range samples {
			o.PutUint32(d[4*i:], Float32ToIBM(v))
		}
	case hostLittleEndian():
		swap32(d, float32Bytes(samples)) // big-endian IEEE, two words at a time
	default:
		for i, v := range samples {
			o.PutUint32(d[4*i:], math.Float32bits(v))
		}
	}
	w.pending = w.pending[:at+size]
	w.traces++
	return nil
}

// swapExt1 reverses the byte order of the fields of trace header
// extension 1 (SEG-Y rev 2.0 table 4): four 8-byte integers (1-32),
// thirteen doubles (33-136), 4-byte fields at 137-156, 2-byte fields at
// 157-160, two doubles (161-176); 177-232 are unassigned (left as read)
// and 233-240 are characters.
func swapExt1(x []byte) {
	rev := func(b []byte) {
		for i, j := 0, len(b)-1; i < j; i, j = i+1, j-1 {
			b[i], b[j] = b[j], b[i]
		}
	}
	for p := 0; p < 136; p += 8 {
		rev(x[p : p+8])
	}
	rev(x[136:140])
	rev(x[140:144])
	rev(x[144:152])
	rev(x[152:156])
	rev(x[156:158])
	rev(x[158:160])
	rev(x[160:168])
	rev(x[168:176])
}

// Finish flushes what is buffered to the io.Writer. It does not close,
// sync or rename anything: that is the caller's file-system policy.
func (w *Writer) Finish() error {
	if w.done {
		return fmt.Errorf("segy: write %s: writer already finished or aborted", w.name)
	}
	w.done = true
	if err := w.flush(); err != nil {
		return fmt.Errorf("segy: write %s: %w", w.name, err)
	}
	return nil
}

// Abort stops the writer: later writes fail. What was written stays in
// the io.Writer; discarding it is the caller's file-system policy (an
// app/outfile output is discarded by its Abort). Safe to call after
// Finish and more than once.
func (w *Writer) Abort() error {
	w.done = true
	return nil
}
