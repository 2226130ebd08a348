package segy

import (
	"bytes"
	"context"
	"encoding/binary"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"testing"

	"quadtrace/segy/segytest"
)

// Native fuzz targets (go test -fuzz=FuzzX -fuzztime=20s ./segy/). Seeds:
// every file of testdata/segy-corpus plus the generated malformed files;
// crashers found are kept by Go under testdata/fuzz/ as regression seeds.

func addCorpusSeeds(f *testing.F) {
	entries, err := os.ReadDir(corpusDir)
	if err != nil {
		f.Fatalf("segy corpus %s missing (it is part of the repository): %v", corpusDir, err)
	}
	for _, e := range entries {
		if filepath.Ext(e.Name()) != ".sgy" {
			continue
		}
		b, err := os.ReadFile(filepath.Join(corpusDir, e.Name()))
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
}

func malformedSeeds() [][]byte {
	good := base3D().Bytes()
	le := base3D()
	le.Order = binary.LittleEndian
	ext := base3D()
	ext.ExtTextCount = -1
	ext.ExtText = []string{"((SEG: EndText))"}
	seeds := [][]byte{good, le.Bytes(), ext.Bytes(), good[:3700], good[:3600+272*3+10], nil}
	for _, c := range segytest.Malformed() {
		if !c.Special() {
			seeds = append(seeds, c.Bytes)
		}
	}
	return seeds
}

// checkOpened exercises an opened file within bounded work and checks
// invariants that must hold for any input.
func checkOpened(t *testing.T, f *File, size int) {
	in := f.Info()
	if in.Traces < 0 || int64(in.Traces)*(240+int64(in.Samples)*int64(FormatSize(in.Format))) > int64(size) {
		t.Fatalf("%d traces of %d samples cannot fit in %d bytes", in.Traces, in.Samples, size)
	}
	var buf []float32
	for i := 0; i < min(in.Traces, 64); i++ {
		if _, err := f.ReadTrace(i, buf); err != nil {
			t.Fatal(err)
		}
		if _, err := f.TraceHeader(i); err != nil {
			t.Fatal(err)
		}
	}
	if in.Traces > 0 && in.Samples > 0 {
		if row := f.InlineTraces(in.Inline.Min, firstOffset(in)); row != nil && len(row) != in.Crossline.Count {
			t.Fatalf("inline row of %d, crossline count %d", len(row), in.Crossline.Count)
		}
		f.CrosslineTraces(in.Crossline.Max, firstOffset(in))
		f.TimeSlice(in.Samples/2, firstOffset(in))
	}
	if in.MissingTraces < 0 || in.DuplicateTraces < 0 || in.DuplicateTraces > in.Traces {
		t.Fatalf("missing %d duplicates %d", in.MissingTraces, in.DuplicateTraces)
	}
	// The geometry decision: the grid every user builds (lines, slices,
	// the window's line lists) is bounded by the number of traces, never
	// by the range of numbers the headers hold.
	cells := int64(in.Inline.Count) * int64(in.Crossline.Count) * int64(max(1, len(in.Offsets)))
	if in.Traces > 0 && (in.Inline.Count < 0 || in.Crossline.Count < 0 || cells > int64(gridLimit(in.Traces))) {
		t.Fatalf("grid %+v x %+v x %d offsets for %d traces", in.Inline, in.Crossline, len(in.Offsets), in.Traces)
	}
	if in.OutlierTraces < len(in.Outliers) || 2*in.OutlierTraces >= max(1, in.Traces) && in.OutlierTraces > 0 {
		t.Fatalf("%d outliers (%d listed) of %d traces", in.OutlierTraces, len(in.Outliers), in.Traces)
	}
}

func firstOffset(in Info) int {
	if len(in.Offsets) > 0 {
		return in.Offsets[0]
	}
	return 0
}

// FuzzOpen opens whole files from bytes, through the in-memory mapping
// path and the ReadAt path; both must agree.
func FuzzOpen(f *testing.F) {
	addCorpusSeeds(f)
	for _, s := range malformedSeeds() {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		a, errA := openBytes(data, "fuzz.sgy", Options{})
		b, errB := OpenReaderAt(bytes.NewReader(data), int64(len(data)), "fuzz.sgy", Options{})
		if (errA == nil) != (errB == nil) {
			t.Fatalf("mapped: %v, ReadAt: %v", errA, errB)
		}
		if errA != nil {
			if errA.Error() != errB.Error() {
				t.Fatalf("errors differ: %v / %v", errA, errB)
			}
			return
		}
		checkOpened(t, a, len(data))
		checkOpened(t, b, len(data))
		if a.Info().Traces > 0 {
			x, _ := a.ReadTrace(a.Info().Traces-1, nil)
			y, _ := b.ReadTrace(b.Info().Traces-1, nil)
			for k := range x {
				if math.Float32bits(x[k]) != math.Float32bits(y[k]) {
					t.Fatalf("sample %d: %v vs %v", k, x[k], y[k])
				}
			}
		}
	})
}

// FuzzBinaryHeader varies the 400-byte binary header over a fixed textual
// header and trace data.
func FuzzBinaryHeader(f *testing.F) {
	good := base3D().Bytes()
	f.Add(good[3200:3600], good[3600:])
	le := base3D()
	le.Order = binary.LittleEndian
	lb := le.Bytes()
	f.Add(lb[3200:3600], lb[3600:])
	text := good[:3200]
	f.Fuzz(func(t *testing.T, bin, rest []byte) {
		if len(bin) > 400 {
			bin = bin[:400]
		}
		data := append(append(append([]byte(nil), text...), bin...), make([]byte, 400-len(bin))...)
		data = append(data, rest...)
		if file, err := openBytes(data, "bin.sgy", Options{}); err == nil {
			checkOpened(t, file, len(data))
		}
	})
}

// FuzzTraceHeaders drives the geometry scan: the fuzz input is cut into
// traces of a 1-sample, 1-byte format file (240-byte header + 1 sample).
func FuzzTraceHeaders(f *testing.F) {
	s := base3D()
	s.Format, s.Samples = 16, 1
	s.SampleBytes = func(tr, k int) []byte { return []byte{byte(tr)} }
	f.Add(s.Bytes()[3600:])
	for _, name := range []string{"small-ps.sgy", "shot-gather.sgy"} {
		b, err := os.ReadFile(filepath.Join(corpusDir, name))
		if err != nil {
			f.Fatalf("segy corpus file missing (it is part of the repository): %v", err)
		}
		f.Add(b[3600:])
	}
	hdr := s.Bytes()[:3600]
	f.Fuzz(func(t *testing.T, traces []byte) {
		data := append(append([]byte(nil), hdr...), traces...)
		data = data[:3600+(len(traces)/241)*241]
		file, err := openBytes(data, "th.sgy", Options{})
		if err != nil {
			t.Fatalf("well-formed sizes must open: %v", err)
		}
		checkOpened(t, file, len(data))
		in := file.Info()
		// Every trace is found by its own numbering unless it is a
		// duplicate or an outlier; in an unstructured file, by its
		// position (inline 0, crossline 1..traces).
		found := 0
		for i := 0; i < in.Traces; i++ {
			h, _ := file.TraceHeader(i)
			il, xl := h.Inline, h.Crossline
			if in.Layout == LayoutUnstructured {
				il, xl = 0, i+1
			}
			if j, ok := file.TraceIndex(il, xl, h.Offset); ok && j == i {
				found++
			}
		}
		if in.Warnings != nil && !hasWarning(in, "fell back") && found != in.Traces-in.DuplicateTraces-in.OutlierTraces {
			t.Fatalf("%d of %d traces found by their numbering (%d duplicates, %d outliers, layout %s)", found, in.Traces, in.DuplicateTraces, in.OutlierTraces, in.Layout)
		}
		// The sampled open of the same bytes (a sample of 2, so the
		// hypothesis is tried on any file of more than 4 traces) ends, after
		// Check, in exactly this Info, and its index reopens to it.
		ctx := context.Background()
		r := bytes.NewReader(data)
		fast, err := OpenReaderAtFast(ctx, r, int64(len(data)), "th.sgy", Options{}, FastOptions{sample: 2})
		if err != nil {
			t.Fatalf("the sampled open failed where Open did not: %v", err)
		}
		ch, err := fast.Check(ctx, nil)
		if err != nil {
			t.Fatalf("Check: %v", err)
		}
		if !reflect.DeepEqual(ch.Info, in) {
			t.Fatalf("Check's Info differs from Open's:\n%+v\n%+v", ch.Info, in)
		}
		again, err := OpenReaderAtFast(ctx, r, int64(len(data)), "th.sgy", Options{}, FastOptions{Saved: ch.Index, sample: 2})
		if err != nil {
			t.Fatal(err)
		}
		if in.Traces > 0 && (again.IndexSource() != IndexSaved || !reflect.DeepEqual(again.Info(), in)) {
			t.Fatalf("reopened with the checked index: source %v, same Info %v", again.IndexSource(), reflect.DeepEqual(again.Info(), in))
		}
	})
}

// FuzzTextHeader decodes arbitrary 3200-byte blocks.
func FuzzTextHeader(f *testing.F) {
	f.Add(encodeText("C 1 SEED"))
	f.Add(bytes.Repeat([]byte("C"), 3200))
	f.Fuzz(func(t *testing.T, block []byte) {
		s, _ := decodeText(block)
		if len(block) == 3200 && bytes.Count([]byte(s), []byte("\n")) != 39 {
			t.Fatalf("%d lines", bytes.Count([]byte(s), []byte("\n"))+1)
		}
		// Re-encoding and decoding what we decoded is stable.
		again, _ := decodeText(encodeText(s))
		if len(block) == 3200 && containsOnly7bit(s) && again != s {
			t.Fatalf("unstable: %q -> %q", s, again)
		}
	})
}

func containsOnly7bit(s string) bool {
	for i := 0; i < len(s); i++ {
		if s[i] >= 0x7f {
			return false
		}
	}
	return true
}

// FuzzDecodeSamples checks every format's bulk decoder against its
// one-sample decoder (used by time slices) for both byte orders.
func FuzzDecodeSamples(f *testing.F) {
	f.Add(uint8(1), false, []byte{0xc2, 0x76, 0xa0, 0x00})
	f.Add(uint8(7), true, []byte{1, 2, 3, 4, 5, 6})
	f.Fuzz(func(t *testing.T, format uint8, little bool, src []byte) {
		sf, ok := sampleFormats[int(format)]
		if !ok {
			if DecodeSamples(make([]float32, 1), src, int(format), "big") {
				t.Fatal("unknown format decoded")
			}
			return
		}
		var o binary.ByteOrder = binary.BigEndian
		order := "big"
		if little {
			o, order = binary.LittleEndian, "little"
		}
		n := len(src) / sf.size
		dst := make([]float32, n)
		if !DecodeSamples(dst, src, int(format), order) {
			t.Fatal("DecodeSamples refused a long enough source")
		}
		for k := 0; k < n; k++ {
			one := sf.at(src[k*sf.size:], o)
			if math.Float32bits(one) != math.Float32bits(dst[k]) {
				t.Fatalf("format %d sample %d: bulk %v, single %v", format, k, dst[k], one)
			}
		}
	})
}

// FuzzIBM compares the fast IBM decoder with the textbook formula and
// checks the encoder's round trip.
func FuzzIBM(f *testing.F) {
	f.Add(uint32(0xC276A000))
	f.Add(uint32(0x00100000))
	f.Fuzz(func(t *testing.T, w uint32) {
		got := IBMToFloat32(w)
		if want := float32(ibmReference(w)); math.Float32bits(got) != math.Float32bits(want) && !(got == 0 && want == 0) {
			t.Fatalf("%#08x: %g, want %g", w, got, want)
		}
		if v := got; !math.IsInf(float64(v), 0) && v != 0 {
			back := IBMToFloat32(Float32ToIBM(v))
			if back != v {
				t.Fatalf("%#08x -> %g -> %g", w, v, back)
			}
		}
	})
}

// FuzzGeometryDecision feeds arbitrary inline and crossline numbers (and
// offsets) to the geometry decision through files built by segytest: the
// grid stays bounded by the trace count (checkOpened), outliers are few,
// and every trace is either on the grid, a duplicate, an outlier, or the
// file is unstructured in file order.
func FuzzGeometryDecision(f *testing.F) {
	f.Add([]byte{0, 0, 0, 1, 0, 0, 0, 10, 0, 0, 0, 1, 0, 0, 0, 11, 0x7f, 0xff, 0xff, 0xff, 0, 0, 0, 12}, false)
	f.Add([]byte{0x80, 0, 0, 0, 0x80, 0, 0, 0, 0, 0, 0, 2, 0, 0, 0, 3}, true)
	f.Fuzz(func(t *testing.T, keys []byte, offsets bool) {
		s := segytest.File{Format: 16, Samples: 1, Interval: 1000, TraceSamples: segytest.SameAsBinary, TraceInterval: segytest.SameAsBinary}
		for i := 0; i+8 <= len(keys) && i < 8*400; i += 8 {
			tr := segytest.Trace{Inline: int(int32(binary.BigEndian.Uint32(keys[i:]))), Crossline: int(int32(binary.BigEndian.Uint32(keys[i+4:])))}
			if offsets {
				tr.Offset = int(keys[i] % 3)
			}
			s.Traces = append(s.Traces, tr)
		}
		data := s.Bytes()
		file, err := openBytes(data, "geo.sgy", Options{})
		if err != nil {
			t.Fatalf("well-formed file must open: %v", err)
		}
		checkOpened(t, file, len(data))
		in := file.Info()
		if in.Layout != LayoutUnstructured && in.OutlierTraces > max(16, in.Traces/100) {
			t.Fatalf("%d outliers of %d traces", in.OutlierTraces, in.Traces)
		}
		for _, o := range in.Outliers {
			h, _ := file.TraceHeader(o.Trace)
			if h.Int(o.Byte, 4) != o.Value || o.FileByte != 3600+int64(o.Trace)*241+int64(o.Byte) {
				t.Fatalf("outlier %+v: header holds %d", o, h.Int(o.Byte, 4))
			}
		}
	})
}
