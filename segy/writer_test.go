package segy

import (
	"bytes"
	"encoding/binary"
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
