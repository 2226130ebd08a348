package segy

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"quadtrace/segy/segytest"
)

// copyVolume writes every trace of src to dst with the given options.
func copyVolume(t *testing.T, src *File, dst string, opt WriteOptions) {
	t.Helper()
	w, err := createFile(dst, src, opt)
	if err != nil {
		t.Fatal(err)
	}
	var buf []float32
	for i := 0; i < src.Info().Traces; i++ {
		h, err := src.TraceHeader(i)
		if err != nil {
			t.Fatal(err)
		}
		buf, _ = src.ReadTrace(i, buf)
		if err := w.WriteTrace(h, buf); err != nil {
			t.Fatal(err)
		}
	}
	if err := w.Commit(); err != nil {
		t.Fatal(err)
	}
}

func TestWriterCopiesCorpus(t *testing.T) {
	for _, name := range []string{"small.sgy", "small-lsb.sgy", "normal-small.sgy", "small-ps.sgy", "shot-gather.sgy"} {
		for _, format := range []int{1, 5} {
			t.Run(name+map[int]string{1: "/ibm", 5: "/ieee"}[format], func(t *testing.T) {
				src := openT(t, segytest.CorpusFile(t, name), Options{})
				dst := filepath.Join(t.TempDir(), "out.sgy")
				copyVolume(t, src, dst, WriteOptions{Format: format})
				out := openT(t, dst, Options{})
				a, b := src.Info(), out.Info()
				if b.ByteOrder != "big" || b.Format != format || b.Revision != "1" || b.Traces != a.Traces || b.Samples != a.Samples ||
					b.IntervalUS != a.IntervalUS || b.Layout != a.Layout || b.Inline != a.Inline || b.Crossline != a.Crossline || b.TextHeaders[0] != a.TextHeaders[0] {
					t.Fatalf("info differs:\n src %+v\n out %+v", a, b)
				}
				var x, y []float32
				for i := 0; i < a.Traces; i++ {
					x, _ = src.ReadTrace(i, x)
					y, _ = out.ReadTrace(i, y)
					for k := range x {
						// IBM -> float32 -> IBM is exact (see TestIBMRandomRoundTrip), IEEE trivially.
						if math.Float32bits(x[k]) != math.Float32bits(y[k]) {
							t.Fatalf("trace %d sample %d: %v -> %v", i, k, x[k], y[k])
						}
					}
					hs, _ := src.TraceHeader(i)
					ho, _ := out.TraceHeader(i)
					for _, w := range traceHeaderWords {
						want := hs.Int(w[0], w[1])
						switch w[0] {
						case 115:
							want = a.Samples
						case 117:
							want = a.IntervalUS
						}
						if got := ho.Int(w[0], w[1]); got != want {
							t.Fatalf("trace %d byte %d: %d, want %d", i, w[0], got, want)
						}
					}
				}
				// SEG-Y rev 1 binary header: 3225 format code, 3501 revision 0x0100, 3503 fixed length 1.
				raw, _ := os.ReadFile(dst)
				if binary.BigEndian.Uint16(raw[3224:]) != uint16(format) || binary.BigEndian.Uint16(raw[3500:]) != 0x0100 || binary.BigEndian.Uint16(raw[3502:]) != 1 {
					t.Errorf("binary header % x", raw[3224:3226])
				}
			})
		}
	}
}

// TestWriterRefusals: what the writer itself refuses (traces of the
// wrong length, sample counts and formats it cannot write). Destinations
// (the input itself, links, devices) are app/outfile's policy and tested
// there.
func TestWriterRefusals(t *testing.T) {
	var out bytes.Buffer
	w, err := NewWriterSpec(&out, "new.sgy", NewSpec{Samples: 10, IntervalUS: 2000, StartMS: 100}, WriteOptions{Format: 1})
	if err != nil {
		t.Fatal(err)
	}
	if err := w.WriteTrace(NewTraceHeader(1, 1, 0, 0), make([]float32, 10)); err != nil {
		t.Fatal(err)
	}
	if err := w.WriteTrace(NewTraceHeader(1, 2, 0, 0), make([]float32, 9)); err == nil {
		t.Error("short trace accepted")
	}
	if err := w.Finish(); err != nil {
		t.Fatal(err)
	}
	if out.Len() != 3600+240+40 {
		t.Errorf("wrote %d bytes, want the headers and one trace (%d)", out.Len(), 3600+240+40)
	}
	if err := w.WriteTrace(NewTraceHeader(1, 3, 0, 0), make([]float32, 10)); err == nil {
		t.Error("trace accepted after Finish")
	}
	if _, err := NewWriterSpec(&out, "x.sgy", NewSpec{Samples: 0, IntervalUS: 2000}, WriteOptions{}); err == nil {
		t.Error("zero samples accepted")
	}
	if _, err := NewWriterSpec(&out, "x.sgy", NewSpec{Samples: 10, IntervalUS: 2000}, WriteOptions{Format: 3}); err == nil {
		t.Error("format 3 accepted for writing")
	}
	if _, err := NewWriter(&out, "x.sgy", nil, WriteOptions{}); err == nil {
		t.Error("nil source accepted")
	}
}

func TestCreateNewRoundTrip(t *testing.T) {
	dst := filepath.Join(t.TempDir(), "demo.sgy")
	w, err := createNewFile(dst, NewSpec{Samples: 6, IntervalUS: 4000, StartMS: 200, TextHeader: "C 1 INVENTED DEMO SURVEY"}, WriteOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for il := 1; il <= 3; il++ {
		for xl := 1; xl <= 4; xl++ {
			tr := make([]float32, 6)
			for k := range tr {
				tr[k] = float32(valueRule(il, xl, k))
			}
			// coordinates with centimetres: scalar -100 is used
			if err := w.WriteTrace(NewTraceHeader(il, xl, 5000+12.5*float64(xl), 7000.25+25*float64(il)), tr); err != nil {
				t.Fatal(err)
			}
		}
	}
	if err := w.Commit(); err != nil {
		t.Fatal(err)
	}
	if st, err := os.Stat(dst); err != nil || st.Mode().Perm() != 0o644 {
		t.Errorf("committed file mode %v (%v)", st.Mode(), err)
	}
	f := openT(t, dst, Options{})
	in := f.Info()
	if in.Layout != Layout3DInlineSorted || in.Traces != 12 || in.StartMS != 200 || in.IntervalUS != 4000 || in.Format != 5 {
		t.Fatalf("%+v", in)
	}
	if in.InlineSpacingM != 12.5 || in.CrosslineSpacingM != 25 || in.MinY != 7025.25 {
		t.Errorf("spacing %v %v minY %v", in.InlineSpacingM, in.CrosslineSpacingM, in.MinY)
	}
	if !strings.HasPrefix(in.TextHeaders[0], "C 1 INVENTED DEMO SURVEY") {
		t.Errorf("text %q", in.TextHeaders[0][:30])
	}
	h, _ := f.TraceHeader(5)
	if h.Int(21, 4) != 2 || h.Int(71, 2) != -100 || h.CDPX != 5025 {
		t.Errorf("header cdp %d scalar %d x %v", h.Int(21, 4), h.Int(71, 2), h.CDPX)
	}
	checkGridAt(t, f, 3, 4)
}

func TestEncodeDelay(t *testing.T) {
	for _, c := range []struct {
		ms            float64
		delay, scalar int
	}{{0, 0, 1}, {100, 100, 1}, {12.5, 125, -10}, {-0.25, -25, -100}, {1.0625, 1063, -1000}, {3000.5, 30005, -10}} {
		d, s, err := encodeDelay(c.ms)
		if err != nil || d != c.delay || s != c.scalar {
			t.Errorf("encodeDelay(%v) = %d, %d, %v; want %d, %d", c.ms, d, s, err, c.delay, c.scalar)
		}
		if c.ms != 1.0625 && applyScalar(float64(d), s) != c.ms {
			t.Errorf("%v does not come back", c.ms)
		}
	}
	if _, _, err := encodeDelay(40000); err == nil {
		t.Error("40000 ms accepted")
	}
}

func checkGridAt(t *testing.T, f *File, nil_, nxl int) {
	t.Helper()
	var buf []float32
	for il := 1; il <= nil_; il++ {
		for j, tr := range f.InlineTraces(il, 0) {
			buf, _ = f.ReadTrace(tr, buf)
			for k, v := range buf {
				if w := float32(valueRule(il, 1+j, k)); v != w {
					t.Fatalf("(%d,%d) sample %d = %v, want %v", il, 1+j, k, v, w)
				}
			}
		}
	}
}

// failingOutput accepts limit bytes, then fails every write with err
// (short: accepts part of a write and returns no error at all).
type failingOutput struct {
	got   bytes.Buffer
	limit int
	short bool
	calls int
}

var errOutputFull = errors.New("invented: no space left on the output")

func (o *failingOutput) Write(p []byte) (int, error) {
	o.calls++
	room := o.limit - o.got.Len()
	if len(p) <= room {
		return o.got.Write(p)
	}
	o.got.Write(p[:max(0, room)])
	if o.short {
		return max(0, room), nil
	}
	return max(0, room), errOutputFull
}

// TestWriterOutputFails: when the output stops taking bytes (a full disk,
// or a short write without an error, which io.Writer forbids), WriteTrace
// fails naming the file and the trace whose write met it, with the cause
// (io.ErrShortWrite for the short write); every later WriteTrace and
// Finish fail too. What reached the output is the start of the file a
// working output receives, which holds whole 1 MiB writes.
func TestWriterOutputFails(t *testing.T) {
	const samples = 1000 // 4240-byte traces
	write := func(out io.Writer, traces int) (*Writer, int, error) {
		w, err := NewWriterSpec(out, "full.sgy", NewSpec{Samples: samples, IntervalUS: 2000}, WriteOptions{})
		if err != nil {
			t.Fatal(err)
		}
		tr := make([]float32, samples)
		for i := 0; i < traces; i++ {
			for k := range tr {
				tr[k] = float32(i) + float32(k)/1000
			}
			if err := w.WriteTrace(NewTraceHeader(1, i+1, 0, 0), tr); err != nil {
				return w, i, err
			}
		}
		return w, traces, w.Finish()
	}
	var whole bytes.Buffer
	if _, n, err := write(&whole, 1000); err != nil || n != 1000 || whole.Len() != 3600+1000*4240 {
		t.Fatalf("working output: %d traces, %d bytes, %v", n, whole.Len(), err)
	}
	for _, short := range []bool{false, true} {
		out := &failingOutput{limit: 3 << 20, short: short}
		w, failed, err := write(out, 1000)
		want := errOutputFull
		if short {
			want = io.ErrShortWrite
		}
		// a write of at most 1 MiB holds 247 traces: the fourth fails
		perWrite := writeBuffer / 4240
		if err == nil || !errors.Is(err, want) || !strings.Contains(err.Error(), fmt.Sprintf("full.sgy: trace %d:", failed)) {
			t.Fatalf("short %v: error %v at trace %d, want %v naming the trace", short, err, failed, want)
		}
		if failed < 3*perWrite || failed > 4*perWrite+1 {
			t.Errorf("short %v: failed at trace %d, want between %d and %d (writes of 1 MiB into 3 MiB)", short, failed, 3*perWrite, 4*perWrite+1)
		}
		if !bytes.Equal(out.got.Bytes(), whole.Bytes()[:out.got.Len()]) {
			t.Errorf("short %v: the bytes that reached the output differ from a working output's", short)
		}
		calls := out.calls
		if err := w.WriteTrace(NewTraceHeader(1, 1, 0, 0), make([]float32, samples)); err == nil || !errors.Is(err, want) {
			t.Errorf("short %v: a trace after the failure: %v", short, err)
		}
		if err := w.Finish(); err == nil || !errors.Is(err, want) {
			t.Errorf("short %v: Finish after the failure: %v", short, err)
		}
		if out.calls != calls {
			t.Errorf("short %v: the output was written to again after it failed", short)
		}
	}
}
