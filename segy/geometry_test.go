package segy

import (
	"strings"
	"testing"

	"quadtrace/segy/segytest"
)

func TestGeometryLayouts(t *testing.T) {
	t.Run("crossline-sorted with steps", func(t *testing.T) {
		s := segytest.File{Format: 5, Samples: 4, Interval: 2000, TraceSamples: -1, TraceInterval: -1}
		for _, xl := range segytest.Seq(100, 120, 5) {
			for _, il := range segytest.Seq(10, 20, 2) {
				s.Traces = append(s.Traces, segytest.Trace{Inline: il, Crossline: xl, Values: []float64{valueRule(il, xl, 0)}})
			}
		}
		f, err := openBytes(s.Bytes(), "xl.sgy", Options{})
		if err != nil {
			t.Fatal(err)
		}
		in := f.Info()
		if in.Layout != Layout3DCrosslineSorted || in.Inline != (Range{10, 20, 2, 6}) || in.Crossline != (Range{100, 120, 5, 5}) {
			t.Fatalf("layout %s %+v %+v", in.Layout, in.Inline, in.Crossline)
		}
		row := f.InlineTraces(14, 0)
		col := f.CrosslineTraces(110, 0)
		if len(row) != 5 || len(col) != 6 {
			t.Fatalf("row %v col %v", row, col)
		}
		for j, tr := range row {
			h, _ := f.TraceHeader(tr)
			if h.Inline != 14 || h.Crossline != 100+5*j {
				t.Errorf("row %d: %+v", j, h)
			}
		}
		for i, tr := range col {
			h, _ := f.TraceHeader(tr)
			if h.Crossline != 110 || h.Inline != 10+2*i {
				t.Errorf("col %d: %+v", i, h)
			}
		}
		if f.InlineTraces(15, 0) != nil || f.CrosslineTraces(99, 0) != nil {
			t.Error("lines off the numbering returned traces")
		}
		sl, _ := f.TimeSlice(0, 0)
		if sl[2][2] != float32(valueRule(14, 110, 0)) {
			t.Errorf("slice value %v", sl[2][2])
		}
	})
	t.Run("2D line numbered at 189/193", func(t *testing.T) {
		s := segytest.File{Format: 5, Samples: 4, Interval: 2000, TraceSamples: -1, TraceInterval: -1}
		for xl := 1; xl <= 30; xl++ {
			s.Traces = append(s.Traces, segytest.Trace{Inline: 7, Crossline: xl, X: 1000 + 25*xl, Y: 500, CoordScalar: 1})
		}
		f, _ := openBytes(s.Bytes(), "2d.sgy", Options{})
		in := f.Info()
		if in.Layout != Layout2D || in.Inline.Count != 1 || in.Crossline.Count != 30 || in.InlineSpacingM != 25 || in.CrosslineSpacingM != 0 {
			t.Fatalf("%s %+v %+v spacing %v %v", in.Layout, in.Inline, in.Crossline, in.InlineSpacingM, in.CrosslineSpacingM)
		}
	})
	t.Run("2D line falls back to bytes 9/21", func(t *testing.T) {
		s := segytest.File{Format: 5, Samples: 4, Interval: 2000, TraceSamples: -1, TraceInterval: -1}
		for cdp := 101; cdp <= 140; cdp++ {
			s.Traces = append(s.Traces, segytest.Trace{CDP: cdp, FieldRecord: 3, X: 20 * cdp, Y: 0, CoordScalar: -10})
		}
		f, _ := openBytes(s.Bytes(), "2d.sgy", Options{})
		in := f.Info()
		if in.Layout != Layout2D || in.Crossline != (Range{101, 140, 1, 40}) || !hasWarning(in, "fell back to bytes 9/21") {
			t.Fatalf("%s %+v warnings %q", in.Layout, in.Crossline, in.Warnings)
		}
		// scalar -10 divides (SEG-Y rev 1 table 3, bytes 71-72): 20 raw = 2 m
		if in.InlineSpacingM != 2 || in.MinX != 202 || in.MaxX != 280 {
			t.Errorf("spacing %v extent %v..%v", in.InlineSpacingM, in.MinX, in.MaxX)
		}
	})
	t.Run("2D CDP gathers fall back to byte 21", func(t *testing.T) {
		s := segytest.File{Format: 5, Samples: 4, Interval: 2000, TraceSamples: -1, TraceInterval: -1}
		for cdp := 11; cdp <= 20; cdp++ {
			for k, off := range []int{100, 200, 300} {
				s.Traces = append(s.Traces, segytest.Trace{CDP: cdp, FieldRecord: cdp + k, Offset: off})
			}
		}
		f, _ := openBytes(s.Bytes(), "2dps.sgy", Options{})
		in := f.Info()
		if in.Layout != LayoutPrestack || in.Crossline != (Range{11, 20, 1, 10}) || in.Inline.Count != 1 || len(in.Offsets) != 3 || in.MissingTraces != 0 || !hasWarning(in, "fell back to byte 21") {
			t.Fatalf("%s %+v %+v %v %q", in.Layout, in.Inline, in.Crossline, in.Offsets, in.Warnings)
		}
		if i, ok := f.TraceIndex(0, 15, 200); !ok || i != 13 {
			t.Errorf("TraceIndex = %d %v", i, ok)
		}
	})
	t.Run("no numbering at all", func(t *testing.T) {
		s := segytest.File{Format: 5, Samples: 4, Interval: 2000, TraceSamples: -1, TraceInterval: -1, Traces: make([]segytest.Trace, 9)}
		f, _ := openBytes(s.Bytes(), "none.sgy", Options{})
		in := f.Info()
		if in.Layout != LayoutUnstructured || in.Crossline.Count != 9 || len(f.InlineTraces(0, 0)) != 9 || !hasWarning(in, "numbered 1..9 by position") {
			t.Fatalf("%s %+v %q", in.Layout, in.Crossline, in.Warnings)
		}
	})
	t.Run("overridden byte locations", func(t *testing.T) {
		s := segytest.File{Format: 5, Samples: 4, Interval: 2000, TraceSamples: -1, TraceInterval: -1}
		for il := 1; il <= 3; il++ {
			for xl := 1; xl <= 4; xl++ {
				// inline in field record (9), crossline in CDP (21)
				s.Traces = append(s.Traces, segytest.Trace{FieldRecord: il, CDP: xl, Offset: 5, Values: []float64{valueRule(il, xl, 0)}})
			}
		}
		f, err := openBytes(s.Bytes(), "ovr.sgy", Options{InlineByte: 9, CrosslineByte: 21})
		if err != nil {
			t.Fatal(err)
		}
		in := f.Info()
		if in.Layout != Layout3DInlineSorted || in.Inline.Count != 3 || in.Crossline.Count != 4 || len(in.Warnings) != 0 {
			t.Fatalf("%s %+v %+v %q", in.Layout, in.Inline, in.Crossline, in.Warnings)
		}
		if i, ok := f.TraceIndex(2, 3, 123); !ok || i != 6 {
			t.Errorf("TraceIndex(2,3) = %d %v (post-stack ignores the offset)", i, ok)
		}
	})
	t.Run("delay with time scalar and ASCII text", func(t *testing.T) {
		// SEG-Y rev 1 table 3: bytes 215-216 scale the times of bytes
		// 95-114 (delay 109-110); negative divides, 0 means 1.
		for _, c := range []struct {
			delay, scalar int
			want          float64
		}{{100, 0, 100}, {100, -10, 10}, {-40, 1, -40}, {25, 2, 50}} {
			s := base3D()
			s.ASCIIText = true
			s.Text = "C 1 CLIENT INVENTED EXAMPLE ONLY"
			for i := range s.Traces {
				s.Traces[i].Delay, s.Traces[i].TimeScalar = c.delay, c.scalar
			}
			f, _ := openBytes(s.Bytes(), "delay.sgy", Options{})
			if f.Info().StartMS != c.want {
				t.Errorf("delay %d scalar %d: start %v, want %v", c.delay, c.scalar, f.Info().StartMS, c.want)
			}
			if !strings.HasPrefix(f.Info().TextHeaders[0], "C 1 CLIENT INVENTED EXAMPLE ONLY\n\n") {
				t.Errorf("ASCII text %q", f.Info().TextHeaders[0][:60])
			}
		}
	})
}

// TestTextHeaderEncoding: EBCDIC code page 037 (common practice for SEG-Y;
// the standard prescribes EBCDIC without naming a code page): "C" = 0xC3,
// "1" = 0xF1, space = 0x40.
func TestTextHeaderEncoding(t *testing.T) {
	b := encodeText("C 1 ab\nC 2")
	if len(b) != 3200 || b[0] != 0xC3 || b[1] != 0x40 || b[2] != 0xF1 || b[80] != 0xC3 || b[82] != 0xF2 || b[4] != 0x81 {
		t.Fatalf("% x", b[:8])
	}
	// The five bytes where SEG-Y software's EBCDIC table departs from code
	// page 037 (as segyio 1.8.3 reads them; see ebcdicVariant).
	v := encodeText("[]!^|")
	if v[0] != 0x4a || v[1] != 0x5a || v[2] != 0x4f || v[3] != 0x5f || v[4] != 0x6a {
		t.Errorf("variant bytes % x", v[:5])
	}
	if s, _ := decodeText(v); s[:5] != "[]!^|" {
		t.Errorf("variant decode %q", s[:5])
	}
	cp := encodeText("")
	cp[0], cp[1], cp[2] = 0xba, 0xbb, 0xb0 // code page 037 '[', ']', '^'
	if s, _ := decodeText(cp); s[:3] != "[]^" {
		t.Errorf("cp037 decode %q", s[:3])
	}
	text, ebc := decodeText(b)
	if !ebc || !strings.HasPrefix(text, "C 1 ab\nC 2\n") || strings.Count(text, "\n") != 39 {
		t.Fatalf("%v %q", ebc, text[:20])
	}
}
