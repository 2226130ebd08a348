package segy

import (
	"context"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"runtime/debug"
	"sync"
	"syscall"
)

// Options override what Open detects. The zero value detects everything.
// Byte positions are 1-based trace-header byte numbers of 4-byte
// two's-complement integers (common practice for these fields).
type Options struct {
	InlineByte, CrosslineByte int    // 0 = 189 / 193 (SEG-Y rev 1 table 3)
	OffsetByte                int    // 0 = 37
	CDPXByte, CDPYByte        int    // 0 = 181 / 185
	ByteOrder                 string // "" detect, "big", "little"
	// IgnorePartialTrace opens a file whose last trace is cut short (a
	// truncated download) with a warning, ignoring the partial tail. By
	// default such a file is refused with an error, because a trace size
	// that does not divide the data more often means a wrong sample count
	// or format than a usable file.
	IgnorePartialTrace bool
}

// Range is a regular integer numbering: Count values Min, Min+Step, ..., Max.
// Step is the greatest common divisor of the gaps between the values found,
// so Count may include numbers with no trace (see Info.MissingTraces).
type Range struct{ Min, Max, Step, Count int }

// Layout classifies how the traces of a file are organised.
type Layout string

// Layouts found by the geometry scan.
const (
	Layout3DInlineSorted    Layout = "3d-inline-sorted"    // regular 3D grid, crossline varies fastest
	Layout3DCrosslineSorted Layout = "3d-crossline-sorted" // regular 3D grid, inline varies fastest
	Layout2D                Layout = "2d"                  // one line: Inline is one value, Crossline the trace numbering
	LayoutPrestack          Layout = "prestack"            // several offsets per location, or field records
	LayoutUnstructured      Layout = "unstructured"        // numbering that does not form a usable grid
	LayoutEmpty             Layout = "empty"               // headers only, no traces
)

// Info is what Open finds out about a file. It is computed once.
type Info struct {
	Revision   string // "0", "1", "2.0", ... from binary header bytes 3501-3502
	Format     int    // sample format code, binary header bytes 3225-3226
	FormatName string
	ByteOrder  string  // "big" | "little"
	Samples    int     // samples per trace
	IntervalUS int     // sample interval in microseconds (0 when unknown)
	StartMS    float64 // time of the first sample: delay (bytes 109-110) times scalar (215-216) of the first trace
	Traces     int
	Layout     Layout
	// Inline and Crossline are the numbering ranges. For a 2D line, Inline
	// is a single line and Crossline holds the CDP/trace numbering used.
	Inline, Crossline Range
	// Offsets lists the distinct offsets, sorted, for pre-stack layouts;
	// nil for post-stack files (the offset is then ignored by lookups).
	Offsets []int
	// HeaderInline and HeaderCrossline are the smallest (Min) and largest
	// (Max) numbers found in the bytes used for inline and crossline, over
	// every trace, outliers included; Step and Count are 0. For reports:
	// Inline and Crossline describe the grid actually used.
	HeaderInline, HeaderCrossline Range
	// ExtraTraceHeaders is the number of additional 240-byte trace headers
	// after each standard trace header (SEG-Y rev 2.0 bytes 3507-3508);
	// the first is trace header extension 1 (see TraceHeader.Extra).
	ExtraTraceHeaders int
	// OutlierTraces counts traces left out of the grid because their
	// numbers lie far outside the others' (see the geometry decision in
	// doc.go); Outliers lists the first 100 of them.
	OutlierTraces int
	Outliers      []Outlier
	// MissingTraces counts grid positions (inline x crossline x offset)
	// with no trace; DuplicateTraces counts traces whose position was
	// already taken (the first one in the file is used).
	MissingTraces, DuplicateTraces int
	// InlineSpacingM is the distance between adjacent crosslines along an
	// inline (one crossline Step); CrosslineSpacingM the distance between
	// adjacent inlines (one inline Step). Metres; 0 without coordinates.
	InlineSpacingM, CrosslineSpacingM float64
	// CDP coordinate extent after the coordinate scalar rule.
	MinX, MaxX, MinY, MaxY float64
	// TextHeaders holds the decoded textual headers, the 3200-byte one first
	// then the extended ones, each as 80-character lines (trailing blanks
	// removed, control characters blanked) joined by '\n'.
	TextHeaders []string
	// Stanzas lists the stanza header lines found in the extended textual
	// headers, e.g. "((SEG: EndText))" (see ParseStanzas).
	Stanzas []string
	// Warnings lists what Open tolerated or assumed.
	Warnings []string
	// Amplitude summary of finite samples from a bounded sample of at most
	// 1000 traces spread evenly through the file (all traces when fewer);
	// it is an estimate for display scaling, not a full-volume statistic.
	AmplitudeMin, AmplitudeMax, AmplitudeRMS float64
}

// Outlier is a trace left out of the grid: which trace (0-based), which
// field ("inline" or "crossline") held which value, at which trace-header
// byte (1-based within the 240) and file byte (1-based).
type Outlier struct {
	Trace    int
	Field    string
	Value    int
	Byte     int
	FileByte int64
}

// Error is a problem found in a file, with where it was found. Trace is a
// 0-based trace index (-1 when not about one trace) and Byte a 1-based file
// byte number (0 when not about one position).
type Error struct {
	Path  string
	Trace int
	Byte  int64
	Msg   string
	err   error // wrapped cause, for errors.Is (os.ErrClosed, ErrChanged)
}

// Unwrap returns the cause, if any (os.ErrClosed after Close, ErrChanged
// for a mapped file that shrank).
func (e *Error) Unwrap() error { return e.err }

func (e *Error) Error() string {
	s := e.Path + ": "
	if e.Trace >= 0 {
		s += fmt.Sprintf("trace %d: ", e.Trace)
	}
	if e.Byte > 0 {
		s += fmt.Sprintf("byte %d: ", e.Byte)
	}
	return s + e.Msg
}

// File is an open SEG-Y file. Its methods are safe for concurrent use.
type File struct {
	path string
	osf  *os.File
	data []byte      // whole file mapped read-only; nil when reading through r
	r    io.ReaderAt // fallback reader
	size int64

	order     binary.ByteOrder
	sf        sampleFormat
	samples   int
	dataStart int64
	traceSize int64
	// extraHeaders is the number of additional 240-byte trace headers
	// after each standard one (SEG-Y rev 2.0 binary header bytes
	// 3507-3508); hdrSize is 240 * (1 + extraHeaders).
	extraHeaders int
	hdrSize      int64
	ntraces      int
	info         Info

	ilByte, xlByte, offByte, cxByte, cyByte int
	geoBytes                                [2]int // trace-header bytes the inline and crossline numbering came from (0: none)

	optIgnoreTail bool
	geo           geometry
	bufPool       sync.Pool // one trace's bytes (ReadTrace without a mapping)
	runPool       sync.Pool // runTraces traces' bytes (ReadTraces, TraceHeaders)
	// mu guards the mapping's lifetime: every public read holds it for
	// reading (see hold), Close takes it for writing, so Close waits for
	// reads in progress and later reads fail with ErrClosed.
	mu       sync.RWMutex
	isClosed bool
	ctx      context.Context // during open only: stops the header scan
	// onScan, when set (during Check's scan only), is called every 1024th
	// trace instead of the plain ctx test: progress, and the parent
	// file's hold released and taken again between batches.
	onScan func(i int) error

	// How the geometry index was made (see OpenFast): exact is true after
	// a full scan or a verified saved index, false for a sampled
	// hypothesis that Check has yet to confirm.
	exact    bool
	source   IndexSource
	fileSize int64   // the file's size as opened (size less trailers is f.size)
	opt      Options // the options given, for Check's scan and saved indices
	stamp    string  // the caller's identity of the file version (FastOptions.Stamp)
	// scatter serves the scattered reads of a sampled open (nil: f.r)
	scatter io.ReaderAt
	// headerWarnings counts the warnings of the headers, before geometry
	headerWarnings int
}

// scanCancelled reports, every 1024th trace i of a scan during open,
// whether the open was cancelled; the error wraps ctx.Err().
func (f *File) scanCancelled(i int) error {
	if i%1024 != 0 {
		return nil
	}
	if f.onScan != nil {
		return f.onScan(i)
	}
	if f.ctx == nil {
		return nil
	}
	if err := f.ctx.Err(); err != nil {
		return fmt.Errorf("%s: open stopped at trace %d: %w", f.path, i, err)
	}
	return nil
}

// Open opens a SEG-Y file read-only: it maps the file into memory (falling
// back to ordinary reads when the filesystem refuses mmap), parses the
// textual and binary headers, detects byte order and sample format, and
// scans every trace header to build the geometry index. Problems that leave
// the data usable (missing or duplicate traces, disagreeing headers) become
// Info().Warnings; anything else is an *Error saying what was read and where.
// Nothing is allocated in proportion to sizes the headers claim, only to the
// real file size.
func Open(path string, opt Options) (*File, error) {
	return OpenContext(context.Background(), path, opt)
}

// OpenContext is Open that stops when ctx ends: the header scan checks ctx
// every few thousand traces, and an open stopped that way returns an error
// wrapping ctx.Err().
func OpenContext(ctx context.Context, path string, opt Options) (*File, error) {
	return openPath(ctx, path, opt, nil)
}

// openPath opens a regular file, mapped when the system allows, as Open
// (fast == nil) or OpenFast does.
func openPath(ctx context.Context, path string, opt Options, fast *FastOptions) (*File, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	fh, err := OpenRegular(path)
	if err != nil {
		return nil, err
	}
	st, err := fh.Stat()
	if err != nil {
		fh.Close()
		return nil, err
	}
	data := mapFile(fh, st.Size())
	if fast != nil && !fast.ReadAll {
		if sc := openScattered(path); sc != nil {
			defer sc.Close()
			fast.scatter = sc
		}
	}
	f, err := openMode(ctx, path, fh, data, st.Size(), opt, fast)
	if err != nil {
		unmapFile(data)
		fh.Close()
		return nil, err
	}
	f.osf = fh
	return f, nil
}

// OpenRegular opens path read-only if it is a regular file, and refuses
// anything else (directory, FIFO, device, socket) with an *Error, without
// blocking: a FIFO is never opened for reading in a way that waits for a
// writer. Readers of SEG-Y input that do not use Open (the export job
// reads through its own window) open their input with it.
func OpenRegular(path string) (*os.File, error) {
	st, err := os.Stat(path)
	if err != nil {
		return nil, err
	}
	if err := refuseNonRegular(path, st.Mode()); err != nil {
		return nil, err
	}
	// O_NONBLOCK: should the path have been replaced by a FIFO since the
	// Stat, opening it does not wait for a writer; the Fstat below then
	// refuses it. It changes nothing for a regular file.
	fh, err := os.OpenFile(path, os.O_RDONLY|syscall.O_NONBLOCK, 0)
	if err != nil {
		return nil, err
	}
	if st, err = fh.Stat(); err == nil {
		err = refuseNonRegular(path, st.Mode())
	}
	if err != nil {
		fh.Close()
		return nil, err
	}
	return fh, nil
}

// refuseNonRegular fails for anything but a regular file: a directory, a
// FIFO (reading it would block until a writer comes), a device, a socket.
func refuseNonRegular(path string, m os.FileMode) error {
	if m.IsRegular() {
		return nil
	}
	kind := "not a regular file"
	switch {
	case m.IsDir():
		kind = "is a directory"
	case m&os.ModeNamedPipe != 0:
		kind = "is a FIFO (named pipe)"
	case m&os.ModeCharDevice != 0:
		kind = "is a character device"
	case m&os.ModeDevice != 0:
		kind = "is a block device"
	case m&os.ModeSocket != 0:
		kind = "is a socket"
	}
	return &Error{Path: path, Trace: -1, Msg: kind + ", not a SEG-Y file: only regular files are read"}
}

// OpenReaderAt opens SEG-Y data of the given size read through r (a file
// on a filesystem without mmap, an in-memory buffer); name is used in
// messages. Close does not close r.
func OpenReaderAt(r io.ReaderAt, size int64, name string, opt Options) (*File, error) {
	return open(context.Background(), name, r, nil, size, opt)
}

// OpenReaderAtContext is OpenReaderAt that stops when ctx ends (see
// OpenContext).
func OpenReaderAtContext(ctx context.Context, r io.ReaderAt, size int64, name string, opt Options) (*File, error) {
	return open(ctx, name, r, nil, size, opt)
}

// openBytes opens SEG-Y data held in memory, as if it were mapped.
func openBytes(data []byte, name string, opt Options) (*File, error) {
	return open(context.Background(), name, nil, data, int64(len(data)), opt)
}

// Close releases the mapping and the file. It waits for reads in progress
// (ReadTrace, TraceHeader, TimeSlice, a Create reading the headers) to
// finish; reads after Close fail with an error wrapping os.ErrClosed.
// Closing twice is harmless.
func (f *File) Close() error {
	f.mu.Lock()
	defer f.mu.Unlock()
	if f.isClosed {
		return nil
	}
	f.isClosed = true
	err := unmapFile(f.data)
	if f.osf != nil {
		if e := f.osf.Close(); err == nil {
			err = e
		}
	}
	f.data = nil
	f.r = closedReader{}
	return err
}

// hold takes a read hold on the file for one public read; release it with
// f.mu.RUnlock. It fails once the file is closed. Internal helpers never
// take the hold themselves (a second RLock could deadlock behind a waiting
// Close).
func (f *File) hold(trace int) error {
	f.mu.RLock()
	if f.isClosed {
		f.mu.RUnlock()
		return &Error{Path: f.path, Trace: trace, Msg: "reading a closed file: " + os.ErrClosed.Error(), err: os.ErrClosed}
	}
	return nil
}

// guardFault runs read with a memory fault (SIGBUS from a mapped file cut
// short by another program, SIGSEGV) turned into an error instead of a
// crash, using runtime/debug.SetPanicOnFault for the calling goroutine.
// Without a mapping it just runs read. Panics that are not memory faults
// are passed on.
func (f *File) guardFault(trace int, off int64, read func() error) (err error) {
	if f.data == nil {
		return read()
	}
	old := debug.SetPanicOnFault(true)
	defer func() {
		debug.SetPanicOnFault(old)
		if r := recover(); r != nil {
			if _, fault := r.(interface{ Addr() uintptr }); !fault {
				panic(r)
			}
			err = &Error{Path: f.path, Trace: trace, Byte: off + 1, err: ErrChanged,
				Msg: fmt.Sprintf("%v: memory fault reading the mapped file (%d bytes when opened)", ErrChanged, f.size)}
		}
	}()
	return read()
}

// ErrChanged is wrapped by errors from reads that found the file shorter
// than when it was opened (another program truncated or rewrote it).
var ErrChanged = errors.New("file changed on disk since it was opened")

type closedReader struct{}

func (closedReader) ReadAt([]byte, int64) (int, error) { return 0, os.ErrClosed }

// Path returns the path given to Open.
func (f *File) Path() string { return f.path }

// Info returns what Open found. The slices are shared; do not modify them.
func (f *File) Info() Info { return f.info }

// ByteOrder returns the byte order used to read the file.
func (f *File) ByteOrder() binary.ByteOrder { return f.order }

func (f *File) errf(trace int, byteNo int64, format string, a ...any) error {
	return &Error{Path: f.path, Trace: trace, Byte: byteNo, Msg: fmt.Sprintf(format, a...)}
}

func (f *File) warnf(format string, a ...any) {
	f.info.Warnings = append(f.info.Warnings, fmt.Sprintf(format, a...))
}

// bytesAt returns n bytes at offset off. With a mapping it returns a view
// into the mapping (do not modify); otherwise it reads into buf (grown when
// too small).
func (f *File) bytesAt(off int64, n int, buf []byte) ([]byte, error) {
	if off < 0 || off+int64(n) > f.size {
		return nil, fmt.Errorf("bytes %d-%d beyond end of file (%d bytes)", off+1, off+int64(n), f.size)
	}
	if f.data != nil {
		return f.data[off : off+int64(n)], nil
	}
	if f.r == nil {
		return nil, os.ErrClosed
	}
	if cap(buf) < n {
		buf = make([]byte, n)
	}
	buf = buf[:n]
	// io.ReaderAt may return io.EOF with a full read at the end of the
	// data; a short read is an error whatever err says (the data ended
	// before the size given at Open, e.g. a file cut short since).
	if m, err := f.r.ReadAt(buf, off); m < n {
		if err == nil || errors.Is(err, io.EOF) {
			err = io.ErrUnexpectedEOF
		}
		return nil, err
	}
	return buf, nil
}

func (f *File) getBuf() *[]byte {
	if b, ok := f.bufPool.Get().(*[]byte); ok {
		return b
	}
	b := make([]byte, f.traceSize)
	return &b
}

func open(ctx context.Context, path string, r io.ReaderAt, data []byte, size int64, opt Options) (*File, error) {
	return openMode(ctx, path, r, data, size, opt, nil)
}

// openMode opens as Open does (fast == nil: every trace header read) or
// as OpenFast does.
func openMode(ctx context.Context, path string, r io.ReaderAt, data []byte, size int64, opt Options, fast *FastOptions) (*File, error) {
	f := &File{path: path, r: r, data: data, size: size, fileSize: size, ctx: ctx, opt: opt}
	defer func() { f.ctx = nil }() // only the open is cancellable
	if fast != nil {
		f.stamp, f.scatter = fast.Stamp, fast.scatter
		defer func() { f.scatter = nil }() // only the open reads through it
	}
	f.info.Warnings = []string{}
	// The scan reads the mapping: a file cut short meanwhile faults.
	if err := f.guardFault(-1, 0, func() error { return f.parse(opt, fast) }); err != nil {
		return nil, err
	}
	return f, nil
}

// parse reads the headers and builds the geometry index: from every trace
// header (fast == nil, or when the sample does not support a regular
// grid), from a saved index that matches the file, or from a sample (see
// OpenFast).
func (f *File) parse(opt Options, fast *FastOptions) error {
	bin, err := f.parseHeaders(opt)
	if err != nil || f.ntraces == 0 {
		f.exact = err == nil
		return err
	}
	if fast != nil && fast.Saved != nil && f.useSaved(fast.Saved) {
		f.exact, f.source = true, IndexSaved
		return nil
	}
	if fast != nil && !fast.ReadAll {
		ok, err := f.sampleGeometry(bin, fast.sampleSize())
		if err != nil {
			return err
		}
		if ok {
			f.source = IndexSampled
		} else {
			// the sample does not support a regular grid: read every header
			f.info.Warnings = f.info.Warnings[:f.headerWarnings]
			f.exact = true
			if err := f.scanGeometry(bin); err != nil {
				return err
			}
		}
	} else {
		f.exact = true
		if err := f.scanGeometry(bin); err != nil {
			return err
		}
	}
	return f.sampleAmplitudes()
}

// parseHeaders reads the textual and binary headers and sizes the traces;
// it returns the binary header.
func (f *File) parseHeaders(opt Options) ([]byte, error) {
	size := f.size
	if err := f.resolveOptions(opt); err != nil {
		return nil, err
	}
	if size < TextHeaderSize {
		return nil, f.errf(-1, 0, "file is %d bytes: truncated inside the 3200-byte textual header", size)
	}
	if size < headersEnd {
		return nil, f.errf(-1, size+1, "file ends inside the binary header (bytes 3201-3600): %d bytes", size)
	}
	hdr, err := f.bytesAt(0, headersEnd, nil)
	if err != nil {
		return nil, f.errf(-1, 1, "reading headers: %v", err)
	}
	hdr = append([]byte(nil), hdr...)
	text, _ := decodeText(hdr[:TextHeaderSize])
	f.info.TextHeaders = []string{text}
	bin := hdr[TextHeaderSize:]
	if err := f.parseBinary(bin, opt); err != nil {
		return nil, err
	}
	if err := f.readExtendedText(bin); err != nil {
		return nil, err
	}
	f.noteStanzas()
	if err := f.rev2Layout(bin); err != nil {
		return nil, err
	}
	if err := f.sizeTraces(bin); err != nil {
		return nil, err
	}
	if f.ntraces == 0 {
		f.info.Layout = LayoutEmpty
		f.warnf("no traces: the file holds headers only")
	}
	f.headerWarnings = len(f.info.Warnings)
	return bin, nil
}

func (f *File) resolveOptions(opt Options) error {
	pick := func(name string, v, def int) (int, error) {
		if v == 0 {
			return def, nil
		}
		if v < 1 || v > TraceHeaderSize-3 {
			return 0, f.errf(-1, 0, "option %s = %d: a 4-byte trace header field must start at byte 1..%d", name, v, TraceHeaderSize-3)
		}
		return v, nil
	}
	var err error
	if f.ilByte, err = pick("InlineByte", opt.InlineByte, thInline); err != nil {
		return err
	}
	if f.xlByte, err = pick("CrosslineByte", opt.CrosslineByte, thCrossline); err != nil {
		return err
	}
	if f.offByte, err = pick("OffsetByte", opt.OffsetByte, thOffset); err != nil {
		return err
	}
	if f.cxByte, err = pick("CDPXByte", opt.CDPXByte, thCDPX); err != nil {
		return err
	}
	if f.cyByte, err = pick("CDPYByte", opt.CDPYByte, thCDPY); err != nil {
		return err
	}
	f.optIgnoreTail = opt.IgnorePartialTrace
	switch opt.ByteOrder {
	case "", "big", "little":
	default:
		return f.errf(-1, 0, "option ByteOrder = %q: want \"\", \"big\" or \"little\"", opt.ByteOrder)
	}
	return nil
}

// parseBinary detects the byte order and reads format, revision and the
// file-wide sampling fields.
//
// Byte order (SEG-Y rev 2.0, binary header bytes 3297-3300): the integer
// 16909060 (0x01020304) reads as such in the file's byte order. Without it
// (rev 0/1 files) the order is the one in which bytes 3225-3226 hold a
// known format code (common practice; a valid code is below 256, so the
// two readings cannot both be valid). Options.ByteOrder overrides both.
func (f *File) parseBinary(bin []byte, opt Options) error {
	switch opt.ByteOrder {
	case "big":
		f.order = binary.BigEndian
	case "little":
		f.order = binary.LittleEndian
	default:
		word := binary.BigEndian.Uint32(bin[binByteOrder-3201:])
		switch word {
		case byteOrderMagic:
			f.order = binary.BigEndian
		case 0x04030201:
			f.order = binary.LittleEndian
		case 0x02010403:
			return f.errf(-1, binByteOrder, "byte-order word 0x02010403 means pairwise byte-swapped data, which is not supported")
		default:
			be := int(binary.BigEndian.Uint16(bin[binFormat-3201:]))
			le := int(binary.LittleEndian.Uint16(bin[binFormat-3201:]))
			_, okBE := sampleFormats[be]
			_, okLE := sampleFormats[le]
			switch {
			case okLE && !okBE:
				f.order = binary.LittleEndian
			default:
				f.order = binary.BigEndian
			}
		}
	}
	f.info.ByteOrder = "big"
	if f.order == binary.ByteOrder(binary.LittleEndian) {
		f.info.ByteOrder = "little"
	}

	code := i16(bin, binFormat, 3201, f.order)
	sf, ok := sampleFormats[code]
	if !ok {
		if code == 4 {
			return f.errf(-1, binFormat, "sample format 4 (fixed point with gain) is obsolete since SEG-Y rev 1 and not supported")
		}
		return f.errf(-1, binFormat, "unknown sample format %d (read %s-endian; known: 1, 2, 3, 5, 6, 7, 8, 9, 10, 11, 12, 15, 16)", code, f.info.ByteOrder)
	}
	f.sf = sf
	f.info.Format = code
	f.info.FormatName = sf.name

	rv := f.order.Uint16(bin[binRevision-3201:])
	major, minor := int(rv>>8), int(rv&0xff)
	if major == 0 && minor >= 1 && minor <= 3 && f.order == binary.ByteOrder(binary.LittleEndian) {
		// rev 2 writes major and minor as single bytes; read as a
		// little-endian word they come out swapped.
		major, minor = minor, 0
	}
	switch {
	case major == 0:
		f.info.Revision = "0"
	case major == 1 && minor == 0:
		f.info.Revision = "1"
	default:
		f.info.Revision = fmt.Sprintf("%d.%d", major, minor)
	}
	return nil
}

func (f *File) revMajor() int {
	var m int
	fmt.Sscanf(f.info.Revision, "%d", &m)
	return m
}

// readExtendedText reads the extended textual headers: their count is in
// binary header bytes 3505-3506 (SEG-Y rev 1 / rev 2.0); -1 means "a
// variable number, the last one holding the ((SEG: EndText)) stanza"
// (rev 2.0 section 5).
func (f *File) readExtendedText(bin []byte) error {
	n := i16(bin, binExtTextHeaders, 3201, f.order)
	f.dataStart = headersEnd
	switch {
	case n == 0:
		return nil
	case n > 0:
		need := int64(headersEnd) + int64(n)*TextHeaderSize
		if need > f.size {
			return f.errf(-1, binExtTextHeaders, "%d extended textual headers need %d bytes but the file has %d", n, need, f.size)
		}
		for i := 0; i < n; i++ {
			if _, err := f.nextExtendedText(i); err != nil {
				return err
			}
		}
		return nil
	case n == -1:
		for i := 0; i < maxExtTextBlocks; i++ {
			if err := f.scanCancelled(i); err != nil {
				return err
			}
			if f.dataStart+TextHeaderSize > f.size {
				return f.errf(-1, binExtTextHeaders, "extended textual header count -1: no ((SEG: EndText)) stanza before the end of the file (read %d headers)", i)
			}
			t, err := f.nextExtendedText(i)
			if err != nil {
				return err
			}
			if containsEndText(t) {
				return nil
			}
		}
		return f.errf(-1, binExtTextHeaders, "extended textual header count -1: no end stanza in %d headers", maxExtTextBlocks)
	default:
		return f.errf(-1, binExtTextHeaders, "invalid extended textual header count %d", n)
	}
}

// nextExtendedText reads extended textual header i (0-based) at
// f.dataStart, keeps its text and moves f.dataStart past it.
func (f *File) nextExtendedText(i int) (string, error) {
	b, err := f.bytesAt(f.dataStart, TextHeaderSize, nil)
	if err != nil {
		return "", f.errf(-1, f.dataStart+1, "extended textual header %d: %v", i+1, err)
	}
	t, _ := decodeText(b)
	f.info.TextHeaders = append(f.info.TextHeaders, t)
	f.dataStart += TextHeaderSize
	return t, nil
}

func containsEndText(t string) bool {
	compact := make([]byte, 0, len(t))
	for i := 0; i < len(t); i++ {
		c := t[i]
		if c == ' ' || c == '\n' {
			continue
		}
		if c >= 'a' && c <= 'z' {
			c -= 'a' - 'A'
		}
		compact = append(compact, c)
	}
	return bytesContains(compact, "((SEG:ENDTEXT))")
}

func bytesContains(b []byte, s string) bool {
	for i := 0; i+len(s) <= len(b); i++ {
		if string(b[i:i+len(s)]) == s {
			return true
		}
	}
	return false
}

// rev2Layout reads the layout fields of a SEG-Y revision 2 binary header
// (rev 2.0 table 2): the number of additional 240-byte trace headers per
// trace (bytes 3507-3508; rev 2.0 section 7: fixed-length traces all carry
// that many), the byte offset of the first trace (3521-3528, 0 = right
// after the extended textual headers) and the number of 3200-byte data
// trailer stanzas after the last trace (3529-3532), which are not traces.
// Earlier revisions have none of them.
func (f *File) rev2Layout(bin []byte) error {
	f.hdrSize = TraceHeaderSize
	if f.revMajor() < 2 {
		return nil
	}
	f.extraHeaders = int(f.order.Uint16(bin[binExtraHeaders-3201:]))
	f.hdrSize = int64(TraceHeaderSize) * int64(1+f.extraHeaders)
	if first := f.order.Uint64(bin[binFirstTrace-3201:]); first != 0 {
		switch {
		case first < uint64(f.dataStart) || first > uint64(f.size):
			return f.errf(-1, binFirstTrace, "first trace at byte offset %d: outside %d..%d (after the headers, inside the file)", first, f.dataStart, f.size)
		case first != uint64(f.dataStart):
			f.warnf("first trace at byte offset %d (binary header byte %d), %d bytes after the headers", first, binFirstTrace, int64(first)-f.dataStart)
			f.dataStart = int64(first)
		}
	}
	if n := i32(bin, binTrailers, 3201, f.order); n != 0 {
		if n < 0 || int64(n)*TextHeaderSize > f.size-f.dataStart {
			return f.errf(-1, binTrailers, "%d data trailer stanzas of 3200 bytes do not fit in the %d bytes after the headers", n, f.size-f.dataStart)
		}
		f.size -= int64(n) * TextHeaderSize
		f.warnf("%d data trailer stanzas (%d bytes) after the last trace are not read", n, int64(n)*TextHeaderSize)
	}
	if f.extraHeaders > 0 {
		f.info.ExtraTraceHeaders = f.extraHeaders
	}
	return nil
}

// checkTraceOrder refuses a file whose trace headers are in the other byte
// order than its binary header (a converter that swapped one and not the
// other): the first trace header's sample count (bytes 115-116) and
// interval (117-118) then disagree with the binary header as read, and
// both agree once swapped. Such a file would otherwise be read as
// byte-swapped garbage.
func (f *File) checkTraceOrder(th, bin []byte, nsBin int) error {
	other := binary.ByteOrder(binary.LittleEndian)
	otherName := "little"
	if f.order == other {
		other, otherName = binary.BigEndian, "big"
	}
	ns, nsSwap := int(f.order.Uint16(th[thSamples-1:])), int(other.Uint16(th[thSamples-1:]))
	iv, ivSwap := int(f.order.Uint16(th[thInterval-1:])), int(other.Uint16(th[thInterval-1:]))
	ivBin := int(f.order.Uint16(bin[binInterval-3201:]))
	if nsBin > 0 && ns != nsBin && nsSwap == nsBin && iv != ivBin && ivSwap == ivBin {
		return f.errf(0, f.dataStart+thSamples, "trace headers are %s-endian but the binary header is %s-endian: the first trace's sample count and interval read %d and %d, or %d and %d %s-endian as in the binary header; mixed byte order is not supported",
			otherName, f.info.ByteOrder, ns, iv, nsSwap, ivSwap, otherName)
	}
	return nil
}

// sizeTraces settles samples per trace, sample interval and start time, and
// the number of traces.
//
// Rule when the binary header and the first trace header disagree
// (documented choice): the sample count is the one that divides the data
// into whole traces, the binary header's when both or neither do; the
// sample interval is the binary header's (the file-wide value, mandatory
// in SEG-Y rev 1), the trace header's only when the binary one is not
// positive. Each disagreement adds a warning.
func (f *File) sizeTraces(bin []byte) error {
	remaining := f.size - f.dataStart
	nsBin := int(f.order.Uint16(bin[binSamples-3201:]))
	nsByte := int64(binSamples)
	if f.revMajor() >= 2 {
		if ext := i32(bin, binExtSamples, 3201, f.order); ext > 0 {
			nsBin, nsByte = ext, binExtSamples
		}
	}
	var th, ext1 []byte
	if remaining >= f.hdrSize {
		b, err := f.bytesAt(f.dataStart, int(f.hdrSize), nil)
		if err != nil {
			return f.errf(0, f.dataStart+1, "reading trace header: %v", err)
		}
		th = append([]byte(nil), b[:TraceHeaderSize]...)
		if f.extraHeaders > 0 {
			ext1 = append([]byte(nil), b[TraceHeaderSize:2*TraceHeaderSize]...)
		}
	}
	nsTr := 0
	trByte := f.dataStart + thSamples
	if th != nil {
		nsTr = int(f.order.Uint16(th[thSamples-1:]))
		if err := f.checkTraceOrder(th, bin, nsBin); err != nil {
			return err
		}
	}
	if ext1 != nil {
		// rev 2.0 trace header extension 1, bytes 137-140: extended
		// number of samples in this trace (unsigned)
		if v := int64(f.order.Uint32(ext1[ext1Samples-1:])); v > 0 && v <= math.MaxInt32 {
			nsTr, trByte = int(v), f.dataStart+TraceHeaderSize+ext1Samples
		}
	}
	fits := func(ns int) bool {
		ts := f.hdrSize + int64(ns)*int64(f.sf.size)
		return remaining > 0 && remaining%ts == 0
	}
	ns := nsBin
	switch {
	case nsBin > 0 && (nsTr == 0 || nsTr == nsBin):
	case nsBin == 0 && nsTr > 0:
		ns = nsTr
		f.warnf("binary header sample count is 0 (byte %d): using the first trace header's %d (byte %d)", nsByte, nsTr, trByte)
	case nsBin > 0 && nsTr > 0:
		if !fits(nsBin) && fits(nsTr) {
			ns = nsTr
		}
		f.warnf("binary header sample count %d (byte %d) disagrees with the first trace header's %d (byte %d): using %d", nsBin, nsByte, nsTr, trByte, ns)
	default:
		if remaining > 0 {
			return f.errf(0, nsByte, "sample count 0 in the binary header and in the first trace header (byte %d)", trByte)
		}
	}
	f.samples = ns
	f.info.Samples = ns
	f.traceSize = f.hdrSize + int64(ns)*int64(f.sf.size)

	// interval
	ivBin := i16(bin, binInterval, 3201, f.order)
	if ivBin <= 0 && f.revMajor() >= 2 {
		if d := math.Float64frombits(f.order.Uint64(bin[binExtInterval-3201:])); d > 0 && d < 1e9 {
			ivBin = int(math.Round(d))
		}
	}
	ivTr := 0
	if th != nil {
		ivTr = i16(th, thInterval, 1, f.order)
	}
	if ivTr == 0 && ext1 != nil {
		// extension 1 bytes 145-152: extended sample interval (IEEE double)
		if d := math.Float64frombits(f.order.Uint64(ext1[ext1Interval-1:])); d > 0 && d < 1e9 {
			ivTr = int(math.Round(d))
		}
	}
	switch {
	case ivBin > 0 && ivTr < 0:
		f.info.IntervalUS = ivBin
		f.warnf("first trace header interval is %d (byte %d): using %d from the binary header", ivTr, f.dataStart+thInterval, ivBin)
	case ivBin > 0 && (ivTr == 0 || ivTr == ivBin):
		f.info.IntervalUS = ivBin
	case ivBin > 0:
		f.info.IntervalUS = ivBin
		f.warnf("binary header interval %d disagrees with trace headers %d (byte %d): using %d from the binary header", ivBin, ivTr, f.dataStart+thInterval, ivBin)
	case ivTr > 0:
		f.info.IntervalUS = ivTr
		f.warnf("binary header interval is %d (byte %d): using the first trace header's %d (byte %d)", ivBin, binInterval, ivTr, f.dataStart+thInterval)
	default:
		f.warnf("no positive sample interval in the binary header (byte %d: %d) or the first trace header (%d): interval unknown", binInterval, ivBin, ivTr)
	}
	if th != nil {
		f.info.StartMS = applyScalar(float64(i16(th, thDelay, 1, f.order)), i16(th, thTimeScalar, 1, f.order))
	}

	if remaining <= 0 {
		f.ntraces = 0
		f.info.Traces = 0
		return nil
	}
	n := remaining / f.traceSize
	tail := remaining % f.traceSize
	if tail != 0 {
		desc := fmt.Sprintf("a trace is %d bytes (%d-byte header + %d samples of %d bytes, format %d)", f.traceSize, f.hdrSize, ns, f.sf.size, f.sf.code)
		if n == 0 {
			return f.errf(0, f.dataStart+1, "file ends %d bytes into the first trace: %s", tail, desc)
		}
		if !f.optIgnoreTail {
			return f.errf(int(n), f.dataStart+n*f.traceSize+1, "file ends %d bytes into trace %d: %s; truncated file or wrong sample count/format", tail, n, desc)
		}
		f.warnf("file ends %d bytes into trace %d (byte %d): partial trace ignored", tail, n, f.dataStart+n*f.traceSize+1)
	}
	f.ntraces = int(n)
	f.info.Traces = int(n)
	return nil
}

// RawBinaryHeader returns a copy of the 400 bytes of the binary file
// header (file bytes 3201-3600) as stored, in the file's byte order.
func (f *File) RawBinaryHeader() ([]byte, error) {
	b, err := f.bytesAt(TextHeaderSize, BinaryHeaderSize, nil)
	if err != nil {
		return nil, f.errf(-1, TextHeaderSize+1, "reading binary header: %v", err)
	}
	return append([]byte(nil), b...), nil
}

// RawTraceHeader returns a copy of the 240 bytes of trace i's header as
// stored, in the file's byte order.
func (f *File) RawTraceHeader(i int) ([]byte, error) {
	if i < 0 || i >= f.info.Traces {
		return nil, fmt.Errorf("%s: no trace %d: the traces are 0 to %d", f.path, i, f.info.Traces-1)
	}
	h, err := f.traceHeaderBytes(i, nil)
	if err != nil {
		return nil, err
	}
	return append([]byte(nil), h...), nil
}
