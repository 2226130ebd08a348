package segy

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"reflect"
	"runtime"
	"strings"
	"testing"

	"quadtrace/segy/segytest"
)

// runFile builds a file of 12 inlines x 25 crosslines of 1000-sample
// traces (4240 bytes: 61 traces to a run read of runReadBytes, so 300
// traces span five reads), in the given byte order, with extra additional
// trace headers (SEG-Y rev 2.0) when extra > 0. Samples encode the trace's
// position (segytest.Grid).
func runFile(order binary.ByteOrder, extra int) []byte { return runFileOf(order, extra, 1000) }

// runFileOf is runFile with traces of the given number of samples.
func runFileOf(order binary.ByteOrder, extra, samples int) []byte {
	s := segytest.Grid(12, 25, samples)
	s.Order = order
	if extra > 0 {
		s.Revision = [2]byte{2, 0}
		s.ByteOrderWord = true
		s.ExtraHeaders = extra
		for i := range s.Traces {
			s.Traces[i].Ext1 = segytest.Ext1{SeqFile: uint64(i + 1), Samples: uint32(samples), IntervalUS: 4000, Name: "SEG00001"}
		}
	}
	return s.Bytes()
}

// TestReadTracesMatchesSingleReads: a run read with ReadTraces and
// TraceHeaders gives, trace by trace, what ReadTrace and TraceHeader give
// (themselves checked against segyio and the corpus elsewhere), mapped
// and through a reader, for runs starting and ending inside and across
// the reader's run reads, in both byte orders and with an additional
// trace header (rev 2.0); and with traces larger than
// wholeTraceHeaderLimit, whose headers TraceHeaders reads one at a time.
func TestReadTracesMatchesSingleReads(t *testing.T) {
	for _, c := range []struct {
		name    string
		order   binary.ByteOrder
		extra   int
		samples int
	}{{"big-endian", binary.BigEndian, 0, 1000}, {"little-endian", binary.LittleEndian, 0, 1000}, {"rev 2 with extension 1", binary.BigEndian, 1, 1000},
		{"traces of 8640 bytes", binary.BigEndian, 0, 2100}} {
		data := runFileOf(c.order, c.extra, c.samples)
		mapped, err := openBytes(data, "run.sgy", Options{})
		if err != nil {
			t.Fatal(err)
		}
		reader, err := OpenReaderAt(bytes.NewReader(data), int64(len(data)), "run.sgy", Options{})
		if err != nil {
			t.Fatal(err)
		}
		if n := reader.runTraces(); n != 61 && c.extra == 0 && c.samples == 1000 {
			t.Fatalf("%d traces a run read, the test expects 61", n)
		}
		total := mapped.Info().Traces
		for _, f := range []*File{mapped, reader} {
			via := c.name + " mapped"
			if f == reader {
				via = c.name + " reader"
			}
			for _, run := range [][2]int{{0, total}, {0, 1}, {60, 2}, {5, 122}, {total - 1, 1}, {total - 70, 70}, {17, 0}} {
				first, n := run[0], run[1]
				hs := make([]TraceHeader, n)
				dst := make([][]float32, n)
				for k := range dst {
					if k%3 == 0 {
						dst[k] = make([]float32, 0, 3000) // reused with room to spare
					}
				}
				if err := f.ReadTraces(first, hs, dst); err != nil {
					t.Fatalf("%s: ReadTraces(%d, %d): %v", via, first, n, err)
				}
				only := make([]TraceHeader, n)
				if err := f.TraceHeaders(first, only); err != nil {
					t.Fatalf("%s: TraceHeaders(%d, %d): %v", via, first, n, err)
				}
				for k := 0; k < n; k++ {
					i := first + k
					wantH, err := f.TraceHeader(i)
					if err != nil {
						t.Fatal(err)
					}
					want, err := f.ReadTrace(i, nil)
					if err != nil {
						t.Fatal(err)
					}
					if !reflect.DeepEqual(hs[k], wantH) || !reflect.DeepEqual(only[k], wantH) {
						t.Fatalf("%s: run (%d, %d): header of trace %d differs from TraceHeader's", via, first, n, i)
					}
					if len(dst[k]) != c.samples || len(dst[k]) != len(want) {
						t.Fatalf("%s: run (%d, %d): trace %d has %d samples, want %d", via, first, n, i, len(dst[k]), len(want))
					}
					for s := range want {
						if math.Float32bits(dst[k][s]) != math.Float32bits(want[s]) {
							t.Fatalf("%s: run (%d, %d): trace %d sample %d: %v, ReadTrace gives %v", via, first, n, i, s, dst[k][s], want[s])
						}
					}
					if il, xl := 100+i/25, 20+2*(i%25); dst[k][0] != float32(il*1000+xl) {
						t.Fatalf("%s: trace %d holds %v, want inline %d crossline %d's %d", via, i, dst[k][0], il, xl, il*1000+xl)
					}
				}
			}
			for _, bad := range [][2]int{{-1, 2}, {total - 1, 2}, {total, 1}} {
				if err := f.ReadTraces(bad[0], nil, make([][]float32, bad[1])); err == nil {
					t.Errorf("%s: ReadTraces(%d, %d traces) of %d traces gave no error", via, bad[0], bad[1], total)
				}
			}
			if err := f.ReadTraces(0, make([]TraceHeader, 1), make([][]float32, 2)); err == nil {
				t.Errorf("%s: ReadTraces with fewer headers than traces gave no error", via)
			}
		}
	}
}

// TestReadTracesFileCutShort: when the data end inside a run (a file cut
// short after it was opened) the error names the first trace not read
// and the file byte where its header, or its samples, could not be read,
// as TraceHeader and ReadTrace name them; the traces before it are
// filled. A failing reader's error is passed on the same way.
func TestReadTracesFileCutShort(t *testing.T) {
	data := runFile(binary.BigEndian, 0)
	const ts = 240 + 1000*4
	var r cutReader
	r.data = data
	f, err := OpenReaderAt(&r, int64(len(data)), "cut.sgy", Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		name      string
		keep      int // bytes of the file left
		trace     int
		byteNo    int64
		what      string
		filledTo  int
		headerMsg string
	}{
		{"inside trace 100's samples", 3600 + 100*ts + 240 + 7, 100, 3600 + 100*ts + 240 + 1, "reading samples", 100, ""},
		{"inside trace 100's header", 3600 + 100*ts + 13, 100, 3600 + 100*ts + 1, "reading trace header", 100, ""},
		{"at the end of trace 121 (a run read's boundary)", 3600 + 122*ts, 122, 3600 + 122*ts + 1, "reading trace header", 122, ""},
	} {
		r.data = data[:c.keep]
		dst := make([][]float32, 200)
		hs := make([]TraceHeader, 200)
		err := f.ReadTraces(0, hs, dst)
		var se *Error
		if !errors.As(err, &se) || se.Trace != c.trace || se.Byte != c.byteNo || !strings.Contains(err.Error(), c.what) || !strings.Contains(err.Error(), io.ErrUnexpectedEOF.Error()) {
			t.Fatalf("%s: error %v, want trace %d, byte %d, %q, unexpected EOF", c.name, err, c.trace, c.byteNo, c.what)
		}
		want := fmt.Sprintf("cut.sgy: trace %d: byte %d: %s", c.trace, c.byteNo, c.what)
		if !strings.HasPrefix(err.Error(), want) {
			t.Errorf("%s: error %q, want it to start %q", c.name, err, want)
		}
		// The single reads name the same trace and byte.
		if _, err1 := f.TraceHeader(c.trace); c.what == "reading trace header" && (err1 == nil || !strings.HasPrefix(err1.Error(), want)) {
			t.Errorf("%s: TraceHeader gives %v, ReadTraces %v", c.name, err1, err)
		}
		if _, err1 := f.ReadTrace(c.trace, nil); c.what == "reading samples" && (err1 == nil || !strings.HasPrefix(err1.Error(), want)) {
			t.Errorf("%s: ReadTrace gives %v, ReadTraces %v", c.name, err1, err)
		}
		for k := 0; k < c.filledTo; k++ {
			if il, xl := 100+k/25, 20+2*(k%25); len(dst[k]) != 1000 || dst[k][999] != float32(il*1000+xl) || hs[k].Inline != il || hs[k].Crossline != xl {
				t.Fatalf("%s: trace %d before the cut not filled", c.name, k)
			}
		}
		if err := f.TraceHeaders(0, hs); c.what == "reading trace header" && (err == nil || !strings.HasPrefix(err.Error(), want)) {
			t.Errorf("%s: TraceHeaders gives %v, want %q", c.name, err, want)
		}
	}
	fail := failingReader{data: data, failAt: 3600 + 150*ts}
	g, err := OpenReaderAt(&fail, int64(len(data)), "failing.sgy", Options{})
	if err != nil {
		t.Fatal(err)
	}
	fail.on = true
	err = g.ReadTraces(140, nil, make([][]float32, 20))
	if err == nil || !strings.Contains(err.Error(), errDeviceGone.Error()) || !strings.Contains(err.Error(), "trace 150: byte "+fmt.Sprint(3600+150*ts+1)) {
		t.Errorf("failing reader: error %v, want the reader's error at trace 150", err)
	}
}

var errDeviceGone = errors.New("invented input/output error")

// failingReader fails every read that reaches byte failAt once on is set,
// returning the bytes before it.
type failingReader struct {
	data   []byte
	failAt int64
	on     bool
}

func (r *failingReader) ReadAt(p []byte, off int64) (int, error) {
	if r.on && off+int64(len(p)) > r.failAt {
		n := max(0, int(r.failAt-off))
		copy(p, r.data[off:off+int64(n)])
		return n, errDeviceGone
	}
	return bytes.NewReader(r.data).ReadAt(p, off)
}

// TestScanReadsHeadersInRuns: the geometry scan through a reader reads a
// file of small traces in runs (a few reads, not one per header) and
// finds what the scan of the mapping finds; a file of traces larger than
// wholeTraceHeaderLimit is scanned one header a read.
func TestScanReadsHeadersInRuns(t *testing.T) {
	for _, c := range []struct {
		samples          int
		least, fewerThan int // reads of the open: 300 headers, then the 300 traces of the amplitude sample one read each
	}{{1000, 300, 320}, {2100, 600, 620}} {
		data := segytest.Grid(12, 25, c.samples).Bytes()
		var cr countingReader
		cr.data = data
		f, err := OpenReaderAt(&cr, int64(len(data)), "count.sgy", Options{})
		if err != nil {
			t.Fatal(err)
		}
		m, err := openBytes(data, "count.sgy", Options{})
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(f.Info(), m.Info()) {
			t.Errorf("%d samples: Info through a reader differs from the mapped one:\n%+v\n%+v", c.samples, f.Info(), m.Info())
		}
		if cr.reads < c.least || cr.reads >= c.fewerThan {
			t.Errorf("%d samples: %d reads to open 300 traces, want %d to %d", c.samples, cr.reads, c.least, c.fewerThan-1)
		}
	}
}

type countingReader struct {
	data  []byte
	reads int
}

func (r *countingReader) ReadAt(p []byte, off int64) (int, error) {
	r.reads++
	return bytes.NewReader(r.data).ReadAt(p, off)
}

// TestParallelScanMatchesMapped: a reader-based open of a file large
// enough for several goroutines to scan it (2000 traces, 33 run reads)
// finds exactly the Info of the mapped open, which reads every header in
// order, with traces declaring other sample counts in both halves (the
// warning names the first of them); and a file cut short in the second
// half fails at the first missing trace, as a single pass does.
func TestParallelScanMatchesMapped(t *testing.T) {
	if runtime.GOMAXPROCS(0) < 2 {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(2))
	}
	s := segytest.Grid(40, 50, 1000)
	data := s.Bytes()
	const ts = 240 + 1000*4
	for _, tr := range []int{1500, 700, 1999} {
		binary.BigEndian.PutUint16(data[3600+tr*ts+114:], uint16(900+tr)) // trace bytes 115-116
	}
	m, err := openBytes(data, "big.sgy", Options{})
	if err != nil {
		t.Fatal(err)
	}
	if parts := min(runtime.GOMAXPROCS(0), m.ntraces/(scanPartRuns*m.runTraces())); parts < 2 {
		t.Fatalf("the file is scanned by %d goroutines, the test needs 2", parts)
	}
	r, err := OpenReaderAt(bytes.NewReader(data), int64(len(data)), "big.sgy", Options{})
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(r.Info(), m.Info()) {
		t.Errorf("Info through a reader differs from the mapped one:\n%+v\n%+v", r.Info(), m.Info())
	}
	if !hasWarning(r.Info(), fmt.Sprintf("3 traces declare a sample count other than the file's 1000 (first: trace 700, byte %d: 1600)", 3600+700*ts+115)) {
		t.Errorf("warnings %q", r.Info().Warnings)
	}
	if !reflect.DeepEqual(r.geo, m.geo) {
		t.Error("the geometry index through a reader differs from the mapped one")
	}
	claimed := int64(len(data))
	short := data[:3600+1234*ts+17]
	_, err = OpenReaderAt(bytes.NewReader(short), claimed, "cut.sgy", Options{})
	want := fmt.Sprintf("cut.sgy: trace 1234: byte %d: reading trace header: unexpected EOF", 3600+1234*ts+1)
	if err == nil || err.Error() != want {
		t.Errorf("cut in the second half: error %v, want %q", err, want)
	}
	short = data[:3600+300*ts+17]
	_, err = OpenReaderAt(bytes.NewReader(short), claimed, "cut.sgy", Options{})
	want = fmt.Sprintf("cut.sgy: trace 300: byte %d: reading trace header: unexpected EOF", 3600+300*ts+1)
	if err == nil || err.Error() != want {
		t.Errorf("cut in the first half: error %v, want %q", err, want)
	}
}

// TestAmplitudeStatsMatchesMath: the amplitude summary's comparisons give
// bit for bit what math.Min, math.Max, math.IsNaN and math.IsInf give
// (the definitions: IEEE 754 with -0 below +0 for Min and Max, Go's math
// package), on traces of NaNs, infinities, signed zeros, subnormals and
// random values in every order.
func TestAmplitudeStatsMatchesMath(t *testing.T) {
	special := []float32{float32(math.NaN()), float32(math.Inf(1)), float32(math.Inf(-1)), 0, float32(math.Copysign(0, -1)),
		math.SmallestNonzeroFloat32, -math.SmallestNonzeroFloat32, math.MaxFloat32, -math.MaxFloat32, 1, -1}
	rng := rand.New(rand.NewPCG(5, 13))
	for round := 0; round < 2000; round++ {
		tr := make([]float32, rng.IntN(12))
		for k := range tr {
			if rng.IntN(2) == 0 {
				tr[k] = special[rng.IntN(len(special))]
			} else {
				tr[k] = float32(rng.NormFloat64() * 1000)
			}
		}
		got := amplitudeStats{lo: math.Inf(1), hi: math.Inf(-1)}
		got.add(tr)
		got.add(tr[:len(tr)/2])
		want := amplitudeStats{lo: math.Inf(1), hi: math.Inf(-1)}
		for _, part := range [][]float32{tr, tr[:len(tr)/2]} {
			for _, v := range part {
				x := float64(v)
				if math.IsNaN(x) || math.IsInf(x, 0) {
					want.bad++
					continue
				}
				want.lo, want.hi = math.Min(want.lo, x), math.Max(want.hi, x)
				want.sum2 += x * x
				want.count++
			}
		}
		if math.Float64bits(got.lo) != math.Float64bits(want.lo) || math.Float64bits(got.hi) != math.Float64bits(want.hi) ||
			math.Float64bits(got.sum2) != math.Float64bits(want.sum2) || got.count != want.count || got.bad != want.bad {
			t.Fatalf("trace %v: got %+v, math gives %+v", tr, got, want)
		}
	}
}
