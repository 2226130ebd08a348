package export

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"quadtrace/app/apptest"
	"quadtrace/compute"
	"quadtrace/segy/segytest"
)

// Checks: an export of a crossline range (a selection of short runs with
// gaps between them, each run read with one call) holds, read back by
// Debian's python3-segyio, exactly the envelope of the selected input
// traces in file order and their inline and crossline numbers (trace
// header bytes 189 and 193, SEG-Y rev 1 table 3); with a
// budget so small that blocks end inside runs too.
func TestExportSelectionWithGapsReadsTheRightTraces(t *testing.T) {
	segytest.NeedPython(t, "segyio", "numpy")
	dir := t.TempDir()
	in := filepath.Join(dir, "in.sgy")
	apptest.WriteVolume(t, in, apptest.VolumeSpec{Inlines: [2]int{1, 12}, Crosslines: [2]int{1, 40}, Samples: 251, IntervalUS: 4000})
	sec, hs := apptest.ReadSection(t, in)
	var sel compute.Section
	sel.DT, sel.T0 = sec.DT, sec.T0
	var keys [][2]int
	for i, h := range hs {
		if h.Crossline >= 7 && h.Crossline <= 19 && h.Inline >= 2 {
			sel.Traces = append(sel.Traces, sec.Traces[i])
			keys = append(keys, [2]int{h.Inline, h.Crossline})
		}
	}
	want := expected(t, sel, "envelope", nil, "")
	for _, budget := range []int64{0, 40 << 10} {
		out := filepath.Join(dir, fmt.Sprintf("sel-%d.sgy", budget))
		if _, err := Run(context.Background(), Job{Input: in, Attributes: []string{"envelope"}, Output: out,
			Inlines: &Range{2, 12}, Crosslines: &Range{7, 19}, BudgetBytes: budget}, nil); err != nil {
			t.Fatal(err)
		}
		got := apptest.ReadBySegyio(t, out)
		if got.Traces != len(keys) {
			t.Fatalf("budget %d: %d traces exported, want %d", budget, got.Traces, len(keys))
		}
		checkSamples(t, "envelope", got, want, 5)
		for k, h := range got.Headers {
			if h["189"] != keys[k][0] || h["193"] != keys[k][1] {
				t.Fatalf("budget %d: output trace %d is inline %d crossline %d, want %v", budget, k, h["189"], h["193"], keys[k])
			}
		}
	}
}

// Checks: an input cut short while it is exported (after its headers were
// read, before the reader reaches the cut) fails with an error naming the
// first trace not read and the file byte where its samples end, and
// leaves no output and no temporary file.
func TestExportInputCutShortMidRun(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.sgy")
	v := apptest.VolumeSpec{Inlines: [2]int{1, 20}, Crosslines: [2]int{1, 30}, Samples: 200, IntervalUS: 4000}
	apptest.WriteVolume(t, in, v)
	const traceBytes = 240 + 200*4
	cutTrace := 400
	keep := int64(3600 + cutTrace*traceBytes + 240 + 100)
	out := filepath.Join(dir, "out.sgy")
	cut := false
	_, err := Run(context.Background(), Job{Input: in, Attributes: []string{"envelope"}, Output: out, BudgetBytes: 64 << 10}, func(p Progress) {
		if !cut {
			if p.Done >= cutTrace-blocksInFlight*64 {
				t.Errorf("first progress at trace %d: blocks too large for the test", p.Done)
			}
			if err := os.Truncate(in, keep); err != nil {
				t.Error(err)
			}
			cut = true
		}
	})
	wantMsg := fmt.Sprintf("trace %d: byte %d: reading samples: unexpected EOF", cutTrace, 3600+cutTrace*traceBytes+240+1)
	if err == nil || !strings.Contains(err.Error(), wantMsg) {
		t.Fatalf("error %v, want one containing %q", err, wantMsg)
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("%s exists after the failed export", out)
	}
	if left := apptest.StrayTemps(t, dir); len(left) > 0 {
		t.Errorf("temporary files left: %v", left)
	}
}
