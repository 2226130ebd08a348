package segy

import (
	"context"
	"errors"
	"os"
	"reflect"
	"slices"
	"strings"
	"sync"
	"testing"

	"quadtrace/segy/segytest"
)

func openFastT(t testing.TB, path string, opt Options, fo FastOptions) *File {
	t.Helper()
	f, err := OpenFast(context.Background(), path, opt, fo)
	if err != nil {
		t.Fatalf("OpenFast(%s): %v", path, err)
	}
	t.Cleanup(func() { f.Close() })
	return f
}

// sameIndex fails unless a and b find the same trace at every grid
// position and agree on the geometry fields of Info.
func sameIndex(t *testing.T, what string, a, b *File) {
	t.Helper()
	if !sameGeometry(a, b) {
		t.Errorf("%s: geometry differs:\n %+v %v %v\n %+v %v %v", what, a.info.Layout, a.info.Inline, a.info.Crossline, b.info.Layout, b.info.Inline, b.info.Crossline)
	}
}

// checkAgainstOpen is the contract of OpenFast and Check on one file: the
// hypothesis (when sampled) either matches Open's geometry or Check says
// it does not; Check ends in exactly Open's Info; the index it returns,
// given back to OpenFast, gives Open's Info and index at once.
func checkAgainstOpen(t *testing.T, path string, opt Options, sample int) (fast *File, ch *Checked) {
	t.Helper()
	full := openT(t, path, opt)
	fast = openFastT(t, path, opt, FastOptions{sample: sample, Stamp: "v1"})
	ch, err := fast.Check(context.Background(), nil)
	if err != nil {
		t.Fatalf("%s: Check: %v", path, err)
	}
	if !reflect.DeepEqual(ch.Info, full.Info()) {
		t.Errorf("%s: Check's Info differs from Open's:\n got  %+v\n want %+v", path, ch.Info, full.Info())
	}
	if got := sameGeometry(fast, full); got == ch.Geometry {
		t.Errorf("%s: Check says geometry changed = %v, but hypothesis and full scan agree = %v", path, ch.Geometry, got)
	}
	if ch.Geometry != (ch.Summary != "") {
		t.Errorf("%s: geometry changed = %v with summary %q", path, ch.Geometry, ch.Summary)
	}
	if fast.Exact() && (ch.Refined || !reflect.DeepEqual(fast.Info(), full.Info())) {
		t.Errorf("%s: an exact open differs from Open", path)
	}
	again := openFastT(t, path, opt, FastOptions{Saved: ch.Index, Stamp: "v1"})
	if full.Info().Traces > 0 && again.IndexSource() != IndexSaved { // a file of headers only has no index
		t.Fatalf("%s: the checked index was not used", path)
	}
	if !reflect.DeepEqual(again.Info(), full.Info()) {
		t.Errorf("%s: reopened with the checked index, Info differs from Open's:\n got  %+v\n want %+v", path, again.Info(), full.Info())
	}
	sameIndex(t, path+" (saved index)", again, full)
	return fast, ch
}

// The sampled hypothesis against the full scan on every file of the open
// corpus (testdata/segy-corpus: segyio's test files, written by an
// independent implementation), with a sample small enough that the
// sampled path runs on them.
func TestFastOpenCorpus(t *testing.T) {
	names := []string{"small.sgy", "small-lsb.sgy", "small-ps.sgy", "normal-small.sgy", "1x1.sgy", "1xN.sgy", "Mx1.sgy",
		"shot-gather.sgy", "multi-text.sgy", "text.sgy", "tiny.sgy"}
	for _, name := range names {
		t.Run(name, func(t *testing.T) {
			p := segytest.CorpusFile(t, name)
			for _, sample := range []int{1, 2, 4, 8, 4096} {
				f, ch := checkAgainstOpen(t, p, Options{}, sample)
				if ch.Geometry {
					t.Errorf("sample %d: a regular corpus file was guessed wrong: %s", sample, ch.Summary)
				}
				_ = f
			}
		})
	}
}

// sampledNotExact opens path with the sampled path forced (sample 4) and
// requires that it took the hypothesis.
func writeGrid(t *testing.T, g segytest.File) string { return writeTemp(t, g.Bytes()) }

// The sampled hypothesis on generated irregular files (segytest.Irregulars:
// gaps, duplicates, a swapped pair of lines, a partial last inline, a trace
// out of order) with samples of several sizes: whatever the sample sees,
// Check ends in Open's Info and reports exactly when the hypothesis was
// wrong.
func TestFastOpenIrregular(t *testing.T) {
	const nil_, nx = 30, 40
	for _, irr := range segytest.Irregulars() {
		t.Run(irr.Name, func(t *testing.T) {
			g := segytest.Grid(nil_, nx, 4)
			g.Traces = irr.Change(g.Traces, nx)
			p := writeGrid(t, g)
			for _, sample := range []int{2, 5, 16, 64, 4096} {
				checkAgainstOpen(t, p, Options{}, sample)
			}
		})
	}
}

// A hypothesis the sample cannot refute (two whole inlines stored in each
// other's place, between the sampled traces) is corrected by Check and
// reported in plain words; a regular file with a partial last inline is
// guessed right.
func TestFastOpenWrongHypothesisCorrected(t *testing.T) {
	const nil_, nx = 30, 40
	g := segytest.Grid(nil_, nx, 4)
	for j := 520; j < 560; j++ { // inlines 113 and 114 in each other's place
		g.Traces[j], g.Traces[j+nx] = g.Traces[j+nx], g.Traces[j]
	}
	p := writeGrid(t, g)
	// sample 2 reads traces 0, 600 (inline 115) and the last: the swap of
	// inlines 113 and 114 (traces 520-599) is not among them.
	fast, ch := checkAgainstOpen(t, p, Options{}, 2)
	if fast.Exact() {
		t.Fatal("the sampled open read every header; the test needs the hypothesis")
	}
	if !ch.Geometry {
		t.Fatal("Check did not report the swapped lines")
	}
	if !strings.Contains(ch.Summary, "80 positions show other traces") {
		t.Errorf("summary %q does not say that 80 positions (two lines of 40) changed", ch.Summary)
	}
	// the hypothesis read the swapped traces at the wrong place; the
	// exact index reads them where their headers say
	full := openT(t, p, Options{})
	i, _ := fast.TraceIndex(113, 20, 0)
	j, _ := full.TraceIndex(113, 20, 0)
	if i == j {
		t.Errorf("hypothesis and full scan both put inline 113 at trace %d", i)
	}
	h, _ := full.TraceHeader(j)
	if h.Inline != 113 {
		t.Errorf("the full scan's inline 113 reads a trace of inline %d", h.Inline)
	}

	g = segytest.Grid(nil_, nx, 4)
	g.Traces = g.Traces[:len(g.Traces)-nx/2]
	p = writeGrid(t, g)
	fast, ch = checkAgainstOpen(t, p, Options{}, 4)
	if fast.Exact() || ch.Geometry {
		t.Errorf("partial last inline: exact = %v (want a hypothesis), geometry changed = %v (want none)", fast.Exact(), ch.Geometry)
	}
	if fast.Info().MissingTraces != nx/2 {
		t.Errorf("partial last inline: hypothesis has %d missing traces, want %d", fast.Info().MissingTraces, nx/2)
	}
}

// A regular file too large for the sample to be the whole file, opened
// with the default sample: the hypothesis is taken and is exactly Open's
// Info (an affine coordinate grid: the extent is at the corners, which
// the sample reads).
func TestFastOpenRegularDefaultSample(t *testing.T) {
	g := segytest.Grid(100, 120, 2) // 12000 traces > 2*4096
	p := writeGrid(t, g)
	fast, ch := checkAgainstOpen(t, p, Options{}, 0)
	if fast.Exact() {
		t.Fatal("a regular 12000-trace file was read in full")
	}
	if ch.Refined {
		t.Errorf("the hypothesis Info differs from Open's on a regular file")
	}
}

// A saved index is used only for the file it was made from: another
// stamp, other options, a changed header or trace header, a damaged or
// truncated entry are ignored (the open samples instead).
func TestSavedIndexNotTrusted(t *testing.T) {
	g := segytest.Grid(30, 40, 4)
	p := writeGrid(t, g)
	full := openFastT(t, p, Options{}, FastOptions{Stamp: "a", sample: 2})
	ch, err := full.Check(context.Background(), nil)
	if err != nil {
		t.Fatal(err)
	}
	used := func(path string, opt Options, fo FastOptions) bool {
		f, err := OpenFast(context.Background(), path, opt, fo)
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		return f.IndexSource() == IndexSaved && reflect.DeepEqual(f.Info(), ch.Info) && f.geo.grid != nil
	}
	// exact anyway when read in full: use sample 2 so only the index makes it exact
	if !used(p, Options{}, FastOptions{Saved: ch.Index, Stamp: "a", sample: 2}) {
		t.Fatal("a matching index was not used")
	}
	if f := openFastT(t, p, Options{}, FastOptions{Saved: ch.Index, Stamp: "b", sample: 2}); f.IndexSource() == IndexSaved {
		t.Error("an index with another stamp was used")
	}
	if f := openFastT(t, p, Options{InlineByte: 189}, FastOptions{Saved: ch.Index, Stamp: "a", sample: 2}); f.IndexSource() == IndexSaved {
		t.Error("an index made with other options was used")
	}
	for k := range []int{0, 1, 2, 3} {
		bad := append([]byte(nil), ch.Index...)
		switch k {
		case 0:
			bad[len(bad)/2] ^= 1
		case 1:
			bad = bad[:len(bad)-1]
		case 2:
			bad = bad[:5]
		case 3:
			bad[len(bad)-1] ^= 0x80
		}
		if f := openFastT(t, p, Options{}, FastOptions{Saved: bad, Stamp: "a", sample: 2}); f.IndexSource() == IndexSaved {
			t.Errorf("damaged index %d was used", k)
		}
	}
	// same size, other bytes: an inline number in the first trace header,
	// and the binary header's sample interval
	for _, change := range []struct {
		name string
		at   int64
	}{{"trace 0 inline (byte 189)", 3600 + 188 + 3}, {"binary interval (3217)", 3216 + 1}} {
		b, _ := os.ReadFile(p)
		b[change.at] ^= 1
		q := writeTemp(t, b)
		if f := openFastT(t, q, Options{}, FastOptions{Saved: ch.Index, Stamp: "a", sample: 2}); f.IndexSource() == IndexSaved {
			t.Errorf("%s changed: the index was used", change.name)
		}
	}
}

// Check on its own goroutine while other goroutines read and one closes
// the file: run under the race detector (go test -race ./segy/). The check
// either finishes or fails with os.ErrClosed; reads fail with os.ErrClosed
// after Close; nothing crashes.
func TestCheckConcurrentReadsAndClose(t *testing.T) {
	g := segytest.Grid(60, 80, 16) // 4800 traces: the check takes several batches
	p := writeGrid(t, g)
	for round := 0; round < 6; round++ {
		f, err := OpenFast(context.Background(), p, Options{}, FastOptions{sample: 4})
		if err != nil {
			t.Fatal(err)
		}
		if f.Exact() {
			t.Fatal("want a hypothesis to check")
		}
		var wg sync.WaitGroup
		done := make(chan struct{})
		var checkErr error
		wg.Add(1)
		go func() {
			defer wg.Done()
			_, checkErr = f.Check(context.Background(), func(done, total int) {})
		}()
		for w := 0; w < 3; w++ {
			wg.Add(1)
			go func(w int) {
				defer wg.Done()
				buf := make([]float32, 16)
				for i := w; ; i = (i + 7) % 4800 {
					select {
					case <-done:
						return
					default:
					}
					var err error
					if buf, err = f.ReadTrace(i, buf); err != nil && !errors.Is(err, os.ErrClosed) {
						t.Errorf("ReadTrace: %v", err)
						return
					}
					f.TraceIndex(100+i%60, 20, 0)
					_ = f.Info()
				}
			}(w)
		}
		if round%2 == 0 {
			f.Close()
		}
		close(done)
		wg.Wait()
		f.Close()
		if checkErr != nil && !errors.Is(checkErr, os.ErrClosed) {
			t.Errorf("round %d: Check: %v", round, checkErr)
		}
	}
}

// A cancelled check stops with the context's error.
func TestCheckCancelled(t *testing.T) {
	p := writeGrid(t, segytest.Grid(60, 80, 4))
	f := openFastT(t, p, Options{}, FastOptions{sample: 4})
	ctx, cancel := context.WithCancel(context.Background())
	calls := 0
	_, err := f.Check(ctx, func(done, total int) {
		if calls++; calls == 2 {
			cancel()
		}
	})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("Check after cancel: %v, want context.Canceled", err)
	}
}

// Every single-byte change of a saved index (each 5th byte, every bit
// pattern 0x01 and 0x80) is caught: the index is not used, the open
// samples or reads the file instead and nothing panics.
func TestSavedIndexAnyByteChanged(t *testing.T) {
	p := writeGrid(t, segytest.Grid(12, 10, 2))
	f := openFastT(t, p, Options{}, FastOptions{Stamp: "s", sample: 2})
	ch, err := f.Check(context.Background(), nil)
	if err != nil {
		t.Fatal(err)
	}
	for at := 0; at < len(ch.Index); at += 5 {
		for _, bit := range []byte{0x01, 0x80} {
			bad := append([]byte(nil), ch.Index...)
			bad[at] ^= bit
			g, err := OpenFast(context.Background(), p, Options{}, FastOptions{Saved: bad, Stamp: "s", sample: 2})
			if err != nil {
				t.Fatalf("byte %d changed: %v", at, err)
			}
			if g.IndexSource() == IndexSaved {
				t.Errorf("byte %d of %d changed (^%#x): the index was used", at, len(ch.Index), bit)
			}
			g.Close()
		}
	}
}

// A crossline-sorted file (inline varying fastest) and a 2D line (one
// inline) are guessed from the sample as the full scan finds them.
func TestFastOpenCrosslineSortedAnd2D(t *testing.T) {
	g := segytest.Grid(30, 40, 2)
	byXl := slices.Clone(g.Traces)
	slices.SortStableFunc(byXl, func(a, b segytest.Trace) int { return a.Crossline - b.Crossline })
	g.Traces = byXl
	p := writeGrid(t, g)
	fast, ch := checkAgainstOpen(t, p, Options{}, 4)
	if fast.Exact() || ch.Geometry || fast.Info().Layout != Layout3DCrosslineSorted {
		t.Errorf("crossline-sorted: exact %v, changed %v, layout %s", fast.Exact(), ch.Geometry, fast.Info().Layout)
	}
	line := writeGrid(t, segytest.Grid(1, 300, 2))
	fast, ch = checkAgainstOpen(t, line, Options{}, 4)
	if fast.Exact() || ch.Geometry || fast.Info().Layout != Layout2D {
		t.Errorf("2D line: exact %v, changed %v, layout %s", fast.Exact(), ch.Geometry, fast.Info().Layout)
	}
}
