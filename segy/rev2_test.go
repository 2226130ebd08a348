package segy

import (
	"bytes"
	"encoding/binary"
	"math"
	"strings"
	"testing"

	"quadtrace/segy/segytest"
)

// rev2File is Base3D as SEG-Y revision 2.0 with extra additional trace
// headers: extension 1 carries 64-bit sequence numbers, the sample count
// and interval and CDP coordinates as doubles (rev 2.0 table 4); the
// standard header's sample count (115-116) is 0, so the count must come
// from extension 1.
func rev2File(extra int, order binary.ByteOrder) segytest.File {
	s := segytest.Base3D()
	s.Order, s.ByteOrderWord, s.Revision = order, true, [2]byte{2, 0}
	s.ExtraHeaders = extra
	s.TraceSamples = 0
	for i := range s.Traces {
		tr := &s.Traces[i]
		tr.Ext1 = segytest.Ext1{SeqLine: 1<<40 + uint64(i), SeqFile: 1<<41 + uint64(i), Samples: 8, IntervalUS: 4000,
			Count: uint16(extra), CDPX: 500000.25 + float64(tr.Crossline)*12.5, CDPY: 6e6 + float64(tr.Inline)*25, Name: "SEG00001"}
		tr.MoreHeaders = bytes.Repeat([]byte{byte(i + 1)}, 240*(extra-1))
	}
	return s
}

// TestRev2AdditionalTraceHeaders: files with 1 and 3 additional trace
// headers per trace (SEG-Y rev 2.0 binary header bytes 3507-3508), big-
// and little-endian, read with the right trace size: grid, samples,
// extension 1 fields and coordinates. Before, such files were reported as
// truncated at a late trace.
func TestRev2AdditionalTraceHeaders(t *testing.T) {
	for _, c := range []struct {
		name  string
		extra int
		order binary.ByteOrder
	}{{"one extra, big-endian", 1, binary.BigEndian}, {"three extra, little-endian", 3, binary.LittleEndian}} {
		t.Run(c.name, func(t *testing.T) {
			s := rev2File(c.extra, c.order)
			data := s.Bytes()
			if want := 3600 + 12*(240*(1+c.extra)+32); len(data) != want {
				t.Fatalf("built %d bytes, want %d", len(data), want)
			}
			for _, via := range []string{"mmap", "readat"} {
				var f *File
				var err error
				if via == "mmap" {
					f, err = Open(writeTemp(t, data), Options{})
				} else {
					f, err = OpenReaderAt(bytes.NewReader(data), int64(len(data)), "rev2.sgy", Options{})
				}
				if err != nil {
					t.Fatalf("%s: %v", via, err)
				}
				in := f.Info()
				if in.Revision != "2.0" || in.ExtraTraceHeaders != c.extra || in.Samples != 8 || in.IntervalUS != 4000 {
					t.Fatalf("%s: revision %s extra %d samples %d interval %d", via, in.Revision, in.ExtraTraceHeaders, in.Samples, in.IntervalUS)
				}
				checkGrid(t, f, 3, 4)
				h, err := f.TraceHeader(5)
				if err != nil {
					t.Fatal(err)
				}
				e, ok := h.Ext1()
				if !ok || e.SeqLine != 1<<40+5 || e.SeqFile != 1<<41+5 || e.Samples != 8 || e.Name != "SEG00001" {
					t.Errorf("%s: extension 1 %+v %v", via, e, ok)
				}
				if h.CDPX != 500000.25+11*12.5 || h.CDPY != 6e6+2*25 {
					t.Errorf("%s: CDP %v %v, want extension 1's doubles", via, h.CDPX, h.CDPY)
				}
				if len(h.Extra) != 240*c.extra || (c.extra > 1 && h.Extra[240] != 6) {
					t.Errorf("%s: %d extra bytes", via, len(h.Extra))
				}
				if in.InlineSpacingM != 12.5 || in.CrosslineSpacingM != 25 {
					t.Errorf("%s: spacing %v %v", via, in.InlineSpacingM, in.CrosslineSpacingM)
				}
				f.Close()
			}
		})
	}
}

// TestRev2FirstTraceOffsetAndTrailers: the first trace starts where bytes
// 3521-3528 say, and data trailer stanzas (3529-3532) are not traces.
func TestRev2FirstTraceOffsetAndTrailers(t *testing.T) {
	s := rev2File(1, binary.BigEndian)
	s.Gap, s.FirstTrace, s.Trailers = 400, 4000, 2
	f, err := openBytes(s.Bytes(), "offset.sgy", Options{})
	if err != nil {
		t.Fatal(err)
	}
	checkGrid(t, f, 3, 4)
	if !hasWarning(f.Info(), "2 data trailer stanzas") || !hasWarning(f.Info(), "first trace at byte offset 4000") {
		t.Errorf("warnings %q", f.Info().Warnings)
	}
	s.FirstTrace = 1 << 40
	if _, err := openBytes(s.Bytes(), "far.sgy", Options{}); err == nil || !strings.Contains(err.Error(), "byte 3521") {
		t.Errorf("first trace far beyond the file: %v", err)
	}
}

// TestRev2WriterCarriesExtraHeaders: an exported copy of a rev 2 file
// keeps the additional trace headers (extension 1 swapped to big-endian
// field by field from a little-endian source).
func TestRev2WriterCarriesExtraHeaders(t *testing.T) {
	for _, order := range []binary.ByteOrder{binary.BigEndian, binary.LittleEndian} {
		s := rev2File(1, order)
		src, err := openBytes(s.Bytes(), "src.sgy", Options{})
		if err != nil {
			t.Fatal(err)
		}
		var out bytes.Buffer
		w, err := NewWriter(&out, "copy.sgy", src, WriteOptions{})
		if err != nil {
			t.Fatal(err)
		}
		buf := []float32{}
		for i := 0; i < src.Info().Traces; i++ {
			h, _ := src.TraceHeader(i)
			buf, _ = src.ReadTrace(i, buf)
			if err := w.WriteTrace(h, buf); err != nil {
				t.Fatal(err)
			}
		}
		if err := w.Finish(); err != nil {
			t.Fatal(err)
		}
		g, err := openBytes(out.Bytes(), "copy.sgy", Options{})
		if err != nil {
			t.Fatalf("%v: reading the copy: %v", order, err)
		}
		in := g.Info()
		if in.ExtraTraceHeaders != 1 || in.Revision != "2.0" || in.ByteOrder != "big" {
			t.Fatalf("%v: copy has revision %s, %d extra headers, %s-endian", order, in.Revision, in.ExtraTraceHeaders, in.ByteOrder)
		}
		checkGrid(t, g, 3, 4)
		h, _ := g.TraceHeader(7)
		if e, ok := h.Ext1(); !ok || e.SeqFile != 1<<41+7 || e.CDPX != 500000.25+13*12.5 || math.IsNaN(e.IntervalUS) || e.Name != "SEG00001" {
			t.Errorf("%v: copied extension 1 %+v", order, e)
		}
	}
}
