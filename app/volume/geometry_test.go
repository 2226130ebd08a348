package volume

import (
	"context"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"testing"

	"quadtrace/segy"
	"quadtrace/segy/segytest"
)

// TestGarbageKeysStayBounded: a survey where three traces hold garbage in
// the inline/crossline bytes (189-196), and one where every trace does,
// open and read with memory in proportion to the file, never to the key
// range (issue 12: the window claimed a billion inlines and grew to 5.8 GB;
// issue 18: figure allocated 4 to 17 GB). The geometry decision is segy's:
// the three are left out of the grid; the all-garbage file is shown as its
// traces in file order.
func TestGarbageKeysStayBounded(t *testing.T) {
	base := func() segytest.File {
		return segytest.File{Format: 5, Samples: 50, Interval: 4000, TraceSamples: segytest.SameAsBinary, TraceInterval: segytest.SameAsBinary,
			Traces: segytest.Grid3D(segytest.Seq(1, 20, 1), segytest.Seq(1, 20, 1), 50)}
	}
	three := base()
	three.Traces[5].Inline = math.MaxInt32
	three.Traces[77].Crossline = -2000000000
	three.Traces[300].Inline, three.Traces[300].Crossline = 16777216, 16777216
	all := base()
	for i := range all.Traces {
		all.Traces[i].Inline, all.Traces[i].Crossline = int(uint32(i)*2654435761), int(uint32(i)*40503*65537)
	}
	for _, c := range []struct {
		name             string
		file             segytest.File
		layout           segy.Layout
		inlines, perLine int
	}{
		{"three garbage traces", three, segy.Layout3DInlineSorted, 20, 20},
		{"garbage everywhere", all, segy.LayoutUnstructured, 1, 400},
	} {
		t.Run(c.name, func(t *testing.T) {
			path := filepath.Join(t.TempDir(), "garbage.sgy")
			data := c.file.Bytes()
			if err := os.WriteFile(path, data, 0o644); err != nil {
				t.Fatal(err)
			}
			var before, after runtime.MemStats
			runtime.GC()
			runtime.ReadMemStats(&before)
			v, err := Open(path, segy.Options{})
			if err != nil {
				t.Fatal(err)
			}
			defer v.Close()
			in := v.Info()
			if in.Layout != c.layout || in.Inline.Count != c.inlines || in.Crossline.Count != c.perLine {
				t.Fatalf("layout %s, inlines %+v, crosslines %+v", in.Layout, in.Inline, in.Crossline)
			}
			for _, il := range Numbers(in.Inline) {
				sec, err := v.Read(context.Background(), Slice{Orientation: Inline, Number: il})
				if err != nil {
					t.Fatal(err)
				}
				if len(sec.Traces) != c.perLine {
					t.Fatalf("inline %d has %d traces", il, len(sec.Traces))
				}
			}
			if _, err := v.Read(context.Background(), Slice{Orientation: TimeSlice, Number: 10}); err != nil {
				t.Fatal(err)
			}
			runtime.ReadMemStats(&after)
			used := after.TotalAlloc - before.TotalAlloc
			t.Logf("%d-byte file: %d bytes allocated opening and reading every line and a time slice", len(data), used)
			if used > 64*uint64(len(data))+(1<<20) {
				t.Errorf("allocated %d bytes for a %d-byte file", used, len(data))
			}
		})
	}
}
