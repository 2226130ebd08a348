package export

import (
	"bytes"
	"context"
	"encoding/binary"
	"os"
	"path/filepath"
	"testing"

	"quadtrace/segy"
	"quadtrace/segy/segytest"
)

// TestExportCarriesRev2Headers: a SEG-Y revision 2.0 input with trace
// header extension 1 (rev 2.0 table 4) and one more additional header per
// trace, big- and little-endian, is exported with its additional headers
// (extension 1 field by field from the little-endian one, SEG-Y rev 2.0
// bytes 3507-3508 set in the output); issue 18 found such files misread
// and reported as truncated.
func TestExportCarriesRev2Headers(t *testing.T) {
	for _, order := range []binary.ByteOrder{binary.BigEndian, binary.LittleEndian} {
		s := segytest.Base3D()
		s.Order, s.ByteOrderWord, s.Revision, s.ExtraHeaders = order, true, [2]byte{2, 0}, 2
		for i := range s.Traces {
			s.Traces[i].Ext1 = segytest.Ext1{SeqFile: 1<<40 + uint64(i), Samples: 8, IntervalUS: 4000, Name: "SEG00001",
				CDPX: 1000.5 + float64(i), CDPY: 2000.25}
			s.Traces[i].MoreHeaders = bytes.Repeat([]byte{0xa5}, 240)
		}
		dir := t.TempDir()
		in := filepath.Join(dir, "rev2.sgy")
		if err := os.WriteFile(in, s.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		out := filepath.Join(dir, "env.sgy")
		if _, err := Run(context.Background(), Job{Input: in, Attributes: []string{"envelope"}, Output: out}, nil); err != nil {
			t.Fatalf("%v: %v", order, err)
		}
		f, err := segy.Open(out, segy.Options{})
		if err != nil {
			t.Fatal(err)
		}
		in2 := f.Info()
		want := 2
		if order == binary.ByteOrder(binary.LittleEndian) {
			want = 1 // headers after extension 1 have no known layout to convert
		}
		if in2.Traces != segytest.BaseTraces || in2.ExtraTraceHeaders != want || in2.Revision != "2.0" {
			t.Fatalf("%v: output has %d traces, %d additional headers, revision %s", order, in2.Traces, in2.ExtraTraceHeaders, in2.Revision)
		}
		for i := 0; i < in2.Traces; i++ {
			h, _ := f.TraceHeader(i)
			e, ok := h.Ext1()
			if !ok || e.SeqFile != 1<<40+uint64(i) || e.CDPX != 1000.5+float64(i) || e.Name != "SEG00001" {
				t.Fatalf("%v: trace %d extension 1 %+v", order, i, e)
			}
			if want == 2 && h.Extra[240] != 0xa5 {
				t.Fatalf("%v: trace %d second additional header not carried", order, i)
			}
		}
		f.Close()
	}
}
