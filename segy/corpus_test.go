package segy

import (
	"encoding/binary"
	"math"
	"os"
	"testing"

	"quadtrace/segy/segytest"
)

// Checks against the open files of testdata/segy-corpus (written by
// segyio; contents documented in its README.md, quoted as "README").

// valueRule is the README's rule: sample k of (il, xl) = il + xl/100 + k*1e-5.
func valueRule(il, xl, k int) float64 { return float64(il) + float64(xl)/100 + float64(k)*1e-5 }

// ibmTol is the precision of a float32 stored as IBM float: the fraction
// keeps at least 21 significant bits (IBM System/370 Principles of
// Operation: 24-bit fraction, base-16 normalisation).
func ibmTol(v float64) float64 { return math.Abs(v)*math.Ldexp(1, -20) + 1e-30 }

func TestCorpusPostStack3D(t *testing.T) {
	cases := []struct {
		name          string
		order         string
		il0, il1      int
		xl0, xl1      int
		samples, dtUS int
	}{
		{"small.sgy", "big", 1, 5, 20, 24, 50, 4000},        // README: inlines 1..5, crosslines 20..24, 50 samples, 4 ms
		{"small-lsb.sgy", "little", 1, 5, 20, 24, 50, 4000}, // README: small.sgy little-endian
		{"tiny.sgy", "big", 1, 3, 20, 21, 4, 1000},          // README: inlines 1..3, crosslines 20..21, 4 samples, 1 ms
		{"normal-small.sgy", "big", 1, 5, 20, 24, 50, 4000},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := openT(t, segytest.CorpusFile(t, c.name), Options{})
			in := f.Info()
			nil_, nxl := c.il1-c.il0+1, c.xl1-c.xl0+1
			if in.Traces != nil_*nxl || in.Samples != c.samples || in.IntervalUS != c.dtUS {
				t.Fatalf("traces/samples/interval = %d/%d/%d, want %d/%d/%d", in.Traces, in.Samples, in.IntervalUS, nil_*nxl, c.samples, c.dtUS)
			}
			if in.ByteOrder != c.order || in.Format != 1 || in.Layout != Layout3DInlineSorted {
				t.Errorf("byte order %s format %d layout %s, want %s, 1 (README: IBM float), %s", in.ByteOrder, in.Format, in.Layout, c.order, Layout3DInlineSorted)
			}
			if want := (Range{c.il0, c.il1, 1, nil_}); in.Inline != want {
				t.Errorf("Inline = %+v, want %+v", in.Inline, want)
			}
			if want := (Range{c.xl0, c.xl1, 1, nxl}); in.Crossline != want {
				t.Errorf("Crossline = %+v, want %+v", in.Crossline, want)
			}
			if in.MissingTraces != 0 || in.DuplicateTraces != 0 || in.Offsets != nil {
				t.Errorf("missing %d duplicates %d offsets %v", in.MissingTraces, in.DuplicateTraces, in.Offsets)
			}
			var buf []float32
			for il := c.il0; il <= c.il1; il++ {
				for xl := c.xl0; xl <= c.xl1; xl++ {
					i, ok := f.TraceIndex(il, xl, 0)
					if !ok {
						t.Fatalf("TraceIndex(%d,%d) missing", il, xl)
					}
					h, err := f.TraceHeader(i)
					if err != nil || h.Inline != il || h.Crossline != xl {
						t.Fatalf("trace %d header %d/%d (err %v), want %d/%d", i, h.Inline, h.Crossline, err, il, xl)
					}
					if buf, err = f.ReadTrace(i, buf); err != nil {
						t.Fatal(err)
					}
					for k, v := range buf {
						want := valueRule(il, xl, k)
						if math.Abs(float64(v)-want) > ibmTol(want) {
							t.Fatalf("(il %d, xl %d) sample %d = %v, want %v (README value rule)", il, xl, k, v, want)
						}
					}
				}
			}
		})
	}
}

func TestCorpusReadmeValues(t *testing.T) {
	f := openT(t, segytest.CorpusFile(t, "small.sgy"), Options{})
	first, _ := f.ReadTrace(0, nil)
	last, _ := f.ReadTrace(f.Info().Traces-1, nil)
	// README: trace 0 starts 1.20000, 1.20001, 1.20002; last trace ends 5.24048, 5.24049.
	for _, c := range []struct{ got, want float64 }{
		{float64(first[0]), 1.20000}, {float64(first[1]), 1.20001}, {float64(first[2]), 1.20002},
		{float64(last[len(last)-2]), 5.24048}, {float64(last[len(last)-1]), 5.24049},
	} {
		if math.Abs(c.got-c.want) > 5e-6 {
			t.Errorf("got %.6f, want %.5f", c.got, c.want)
		}
	}
}

// small-lsb.sgy must read exactly like small.sgy (README).
func TestCorpusLittleEndianTwin(t *testing.T) {
	be := openT(t, segytest.CorpusFile(t, "small.sgy"), Options{})
	le := openT(t, segytest.CorpusFile(t, "small-lsb.sgy"), Options{})
	if le.Info().ByteOrder != "little" || be.Info().ByteOrder != "big" {
		t.Fatalf("byte orders %s / %s", be.Info().ByteOrder, le.Info().ByteOrder)
	}
	var a, b []float32
	for i := 0; i < be.Info().Traces; i++ {
		a, _ = be.ReadTrace(i, a)
		b, _ = le.ReadTrace(i, b)
		for k := range a {
			if math.Float32bits(a[k]) != math.Float32bits(b[k]) {
				t.Fatalf("trace %d sample %d: %v vs %v", i, k, a[k], b[k])
			}
		}
		ha, _ := be.TraceHeader(i)
		hb, _ := le.TraceHeader(i)
		for _, w := range traceHeaderWords {
			if ha.Int(w[0], w[1]) != hb.Int(w[0], w[1]) {
				t.Fatalf("trace %d byte %d: %d vs %d", i, w[0], ha.Int(w[0], w[1]), hb.Int(w[0], w[1]))
			}
		}
	}
	// Forcing the wrong order must not panic; it fails on the format code.
	if _, err := Open(segytest.CorpusFile(t, "small-lsb.sgy"), Options{ByteOrder: "big"}); err == nil {
		t.Error("small-lsb.sgy read as big-endian opened without error")
	}
}

// README: normal-small.sgy has CDP X/Y with coordinate scalar 10: (il 1,
// xl 20) at X=0,Y=0; (1, 21) Y=1; (5, 24) X=4,Y=4 raw. SEG-Y rev 1 table 3,
// bytes 71-72: a positive scalar multiplies.
func TestCorpusCoordinates(t *testing.T) {
	f := openT(t, segytest.CorpusFile(t, "normal-small.sgy"), Options{})
	for _, c := range []struct {
		il, xl int
		x, y   float64
	}{{1, 20, 0, 0}, {1, 21, 0, 10}, {5, 24, 40, 40}} {
		i, _ := f.TraceIndex(c.il, c.xl, 0)
		h, err := f.TraceHeader(i)
		if err != nil {
			t.Fatal(err)
		}
		if h.CDPX != c.x || h.CDPY != c.y {
			t.Errorf("(%d,%d): X,Y = %v,%v, want %v,%v", c.il, c.xl, h.CDPX, h.CDPY, c.x, c.y)
		}
	}
	in := f.Info()
	if in.MinX != 0 || in.MaxX != 40 || in.MinY != 0 || in.MaxY != 40 {
		t.Errorf("extent X %v..%v Y %v..%v, want 0..40 both", in.MinX, in.MaxX, in.MinY, in.MaxY)
	}
	// Along an inline consecutive crosslines step 1 raw unit in Y (10 m);
	// between inlines 1 raw unit in X (10 m).
	if in.InlineSpacingM != 10 || in.CrosslineSpacingM != 10 {
		t.Errorf("spacing %v / %v, want 10 / 10", in.InlineSpacingM, in.CrosslineSpacingM)
	}
}

func TestCorpusPrestack(t *testing.T) {
	cases := []struct {
		name          string
		nil_, nxl     int
		offsets       int
		first, last   float64 // README check values where given
		checkEndpoint bool
	}{
		{"small-ps.sgy", 4, 3, 2, 101.01, 204.03, true}, // README: inlines 1..4, crosslines 1..3, 2 offsets, 24 traces
		{"1x1.sgy", 1, 1, 4, 0, 0, false},               // README: 1 x 1 x 4 offsets
		{"1xN.sgy", 1, 6, 4, 0, 0, false},               // README: 1 x 6 x 4
		{"Mx1.sgy", 6, 1, 4, 0, 0, false},               // README: 6 x 1 x 4
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			f := openT(t, segytest.CorpusFile(t, c.name), Options{})
			in := f.Info()
			if in.Layout != LayoutPrestack || in.Inline.Count != c.nil_ || in.Crossline.Count != c.nxl || len(in.Offsets) != c.offsets {
				t.Fatalf("layout %s inline %+v crossline %+v offsets %v", in.Layout, in.Inline, in.Crossline, in.Offsets)
			}
			if in.Traces != c.nil_*c.nxl*c.offsets || in.Samples != 10 || in.MissingTraces != 0 {
				t.Fatalf("traces %d samples %d missing %d", in.Traces, in.Samples, in.MissingTraces)
			}
			seen := map[int]bool{}
			for _, off := range in.Offsets {
				for il := in.Inline.Min; il <= in.Inline.Max; il++ {
					row := f.InlineTraces(il, off)
					if len(row) != c.nxl {
						t.Fatalf("InlineTraces(%d,%d) = %v", il, off, row)
					}
					for j, tr := range row {
						h, _ := f.TraceHeader(tr)
						if h.Inline != il || h.Crossline != in.Crossline.Min+j*in.Crossline.Step || h.Offset != off {
							t.Fatalf("trace %d header %+v at il %d xl index %d off %d", tr, h, il, j, off)
						}
						seen[tr] = true
					}
				}
			}
			if len(seen) != in.Traces {
				t.Errorf("grid reaches %d of %d traces", len(seen), in.Traces)
			}
			if c.checkEndpoint {
				a, _ := f.ReadTrace(0, nil)
				b, _ := f.ReadTrace(in.Traces-1, nil)
				if math.Abs(float64(a[0])-c.first) > 1e-4 || math.Abs(float64(b[len(b)-1])-c.last) > 1e-4 {
					t.Errorf("first %v last %v, want %v %v", a[0], b[len(b)-1], c.first, c.last)
				}
			}
			if sl, err := f.TimeSlice(3, in.Offsets[len(in.Offsets)-1]); err != nil || len(sl) != c.nil_ || len(sl[0]) != c.nxl {
				t.Errorf("TimeSlice: %v %v", sl, err)
			}
		})
	}
}

// README: shot-gather.sgy has no inline/crossline numbers; field record
// numbers 2, 3, 5, 8 at bytes 9-12; the first sample of each trace equals
// its field record number; 61 traces of 25 samples, 1 ms.
func TestCorpusShotGather(t *testing.T) {
	f := openT(t, segytest.CorpusFile(t, "shot-gather.sgy"), Options{})
	in := f.Info()
	if in.Traces != 61 || in.Samples != 25 || in.IntervalUS != 1000 {
		t.Fatalf("traces %d samples %d interval %d", in.Traces, in.Samples, in.IntervalUS)
	}
	if !hasWarning(in, "fell back to bytes 9/13") || in.Layout != LayoutPrestack {
		t.Errorf("layout %s warnings %q", in.Layout, in.Warnings)
	}
	if in.Inline.Min != 2 || in.Inline.Max != 8 {
		t.Errorf("records %+v, want 2..8", in.Inline)
	}
	records := map[int]bool{}
	var buf []float32
	for i := 0; i < in.Traces; i++ {
		h, _ := f.TraceHeader(i)
		rec := h.Int(9, 4)
		records[rec] = true
		buf, _ = f.ReadTrace(i, buf)
		if buf[0] != float32(rec) {
			t.Fatalf("trace %d: first sample %v, field record %d", i, buf[0], rec)
		}
		if j, ok := f.TraceIndex(rec, h.Int(13, 4), 0); !ok || j != i {
			t.Fatalf("TraceIndex(record %d, channel %d) = %d %v, want %d", rec, h.Int(13, 4), j, ok, i)
		}
	}
	if len(records) != 4 || !records[2] || !records[3] || !records[5] || !records[8] {
		t.Errorf("records %v", records)
	}
	if got := f.InlineTraces(2, 0); len(got) != in.Crossline.Count {
		t.Errorf("record 2 gather has %d slots", len(got))
	}
}

// README: multi-text.sgy has 4 extended textual headers; the trace starts
// after 3600 + 4*3200 bytes.
func TestCorpusExtendedText(t *testing.T) {
	p := segytest.CorpusFile(t, "multi-text.sgy")
	f := openT(t, p, Options{})
	in := f.Info()
	if len(in.TextHeaders) != 5 || in.Traces != 1 || in.Samples != 1 {
		t.Fatalf("%d text headers, %d traces, %d samples", len(in.TextHeaders), in.Traces, in.Samples)
	}
	raw, err := os.ReadFile(p)
	if err != nil {
		t.Fatal(err)
	}
	start := 3600 + 4*3200
	// IBM value at byte start+240, decoded independently with math.Pow.
	w := binary.BigEndian.Uint32(raw[start+240:])
	want := ibmReference(w)
	got, _ := f.ReadTrace(0, nil)
	if float64(got[0]) != want {
		t.Errorf("sample %v, want %v read at byte %d", got[0], want, start+241)
	}
	if len(raw) != start+240+4 {
		t.Errorf("file size %d does not match the README layout", len(raw))
	}
}

// README: text.sgy holds headers only; it must open and report "no traces".
func TestCorpusNoTraces(t *testing.T) {
	f := openT(t, segytest.CorpusFile(t, "text.sgy"), Options{})
	in := f.Info()
	if in.Traces != 0 || in.Layout != LayoutEmpty || !hasWarning(in, "no traces") {
		t.Fatalf("traces %d layout %s warnings %q", in.Traces, in.Layout, in.Warnings)
	}
	if _, err := f.ReadTrace(0, nil); err == nil {
		t.Error("ReadTrace(0) on a file without traces succeeded")
	}
	if f.InlineTraces(0, 0) != nil {
		t.Error("InlineTraces on an empty file")
	}
	if _, err := f.TimeSlice(0, 0); err == nil {
		t.Error("TimeSlice on an empty file succeeded")
	}
	if len(in.TextHeaders) != 1 || in.TextHeaders[0][:3] != "C 1" {
		t.Errorf("text header %q", in.TextHeaders)
	}
}

// ibmReference decodes an IBM float the slow textbook way (IBM System/370
// Principles of Operation): (-1)^s * 0.f * 16^(e-64), in float64 then
// rounded once to float32.
func ibmReference(w uint32) float64 {
	frac := float64(w&0xffffff) / (1 << 24)
	v := frac * math.Pow(16, float64(int((w>>24)&0x7f)-64))
	if w>>31 == 1 {
		v = -v
	}
	return float64(float32(v))
}
