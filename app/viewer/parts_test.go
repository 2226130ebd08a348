package viewer

import (
	"context"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"quadtrace/app/export"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/compute/synth"
	"quadtrace/render"
	"quadtrace/segy"
	"quadtrace/segy/segytest"
)

// TestStaleJobIsCancelledAndDropped starts a job that waits for its
// cancellation, then a newer one in the same lane: the first is cancelled
// and its result never reaches the UI; the second's does.
func TestStaleJobIsCancelledAndDropped(t *testing.T) {
	js := newQueuedJobs()
	defer js.close()
	started := make(chan struct{})
	var staleShown, freshShown, staleCancelled atomic.Bool
	js.start("data", func(j *job) {
		close(started)
		select {
		case <-j.ctx.Done():
			staleCancelled.Store(true)
		case <-time.After(10 * time.Second):
		}
		j.ui(func() { staleShown.Store(true) })
	})
	<-started
	js.start("data", func(j *job) { j.ui(func() { freshShown.Store(true) }) })
	js.wait()
	if !staleCancelled.Load() {
		t.Error("the stale job was not cancelled")
	}
	if staleShown.Load() {
		t.Error("the stale job's result reached the UI")
	}
	if !freshShown.Load() {
		t.Error("the fresh job's result did not reach the UI")
	}
}

// TestViewStateStepping checks line stepping on a survey whose inlines run
// 10..50 by 5: steps move by the line increment and stop at the ends.
func TestViewStateStepping(t *testing.T) {
	info := segy.Info{Samples: 100, IntervalUS: 4000,
		Inline:    segy.Range{Min: 10, Max: 50, Step: 5, Count: 9},
		Crossline: segy.Range{Min: 1, Max: 3, Step: 1, Count: 3}}
	st := newViewState(info)
	tests := []struct {
		count   int
		want    int
		changed bool
	}{
		{0, 30, false}, {1, 35, true}, {-1, 30, true}, {10, 50, true}, {1, 50, false}, {-10, 10, true}, {-1, 10, false},
	}
	for _, tc := range tests {
		changed := st.step(info, tc.count)
		if st.Inline != tc.want || changed != tc.changed {
			t.Errorf("step %d: inline %d (changed %v), want %d (%v)", tc.count, st.Inline, changed, tc.want, tc.changed)
		}
	}
	// A typed number off the grid snaps onto it.
	st.setNumber(info, 27)
	if st.Inline != 25 {
		t.Errorf("inline 27 on a grid of 5 from 10 gave %d, want 25", st.Inline)
	}
}

// TestViewStateZoomKeepsPoint checks that zooming keeps the point under the
// cursor still and that fit shows everything.
func TestViewStateZoomKeepsPoint(t *testing.T) {
	st := viewState{Orientation: volume.Inline}
	st.fit(200, 1000)
	before := st.viewport(200, 1000)
	if before != (render.Viewport{Trace0: 0, Trace1: 200, Sample0: 0, Sample1: 1000}) {
		t.Fatalf("fit shows %+v", before)
	}
	// The point at 30 % across and 60 % down stays there.
	tr, s := 60.0, 600.0
	st.zoomAt(4, tr, s, 200, 1000)
	vp := st.viewport(200, 1000)
	fx := (tr - vp.Trace0) / (vp.Trace1 - vp.Trace0)
	fy := (s - vp.Sample0) / (vp.Sample1 - vp.Sample0)
	if vp.Trace1-vp.Trace0 != 50 || abs(fx-0.3) > 1e-9 || abs(fy-0.6) > 1e-9 {
		t.Errorf("zoom 4 about (60, 600): view %+v puts the point at (%.3f, %.3f), want 50 traces and (0.3, 0.6)", vp, fx, fy)
	}
	// Panning past the edge stops at it.
	st.pan(-1000, 0, 200, 1000)
	if vp := st.viewport(200, 1000); vp.Trace0 != 0 {
		t.Errorf("panning far left shows from trace %v, want 0", vp.Trace0)
	}
	st.setExaggeration(2, 200, 1000)
	if vp := st.viewport(200, 1000); vp.Sample1-vp.Sample0 != 125 {
		t.Errorf("zoom 4 with stretch 2 shows %v samples, want 1000/8", vp.Sample1-vp.Sample0)
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// TestSaveFigure writes the current view as a figure and reads it back.
func TestSaveFigure(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	out := filepath.Join(t.TempDir(), "inline-3.png")
	v.saveFigure(out, v.figureTitle(), 900, 600, 150)
	v.jobs.wait()
	f, err := os.Open(out)
	if err != nil {
		t.Fatalf("figure not written: %v (status %q)", err, v.ui.message.Text)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	if b := img.Bounds(); b.Dx() != 900 || b.Dy() != 600 {
		t.Errorf("figure is %v, want 900 x 600", b)
	}
	fig, _ := v.figureFor("t", 900, 600)
	if len(fig.Legends) != 2 || fig.Overlay == nil {
		t.Errorf("figure of envelope over amplitude has %d legends, overlay %v", len(fig.Legends), fig.Overlay != nil)
	}
	if fig.Horizontal.First != 20 || fig.Horizontal.Last != 24 || fig.Vertical.First != 0 || fig.Vertical.Last != 196 {
		t.Errorf("figure axes %+v %+v, want crosslines 20..24 and 0..196 ms", fig.Horizontal, fig.Vertical)
	}
	if !strings.HasPrefix(v.ui.message.Text, "Saved ") {
		t.Errorf("status %q after saving", v.ui.message.Text)
	}
}

// TestExportFromWindow runs the export job as the window starts it and
// checks the written volume opens with the input's geometry.
func TestExportFromWindow(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	out := filepath.Join(t.TempDir(), "small-envelope.sgy")
	v.runExport(export.Job{Input: v.vol.Path(), Attributes: []string{"envelope"}, Output: out, Format: 5})
	v.jobs.wait()
	if !v.ui.export.box.Hidden {
		t.Error("the export progress is still shown after the export ended")
	}
	vol, err := volume.Open(out, segy.Options{})
	if err != nil {
		t.Fatalf("exported volume: %v (status %q)", err, v.ui.message.Text)
	}
	defer vol.Close()
	in := vol.Info()
	if in.Inline.Min != 1 || in.Inline.Max != 5 || in.Crossline.Min != 20 || in.Crossline.Max != 24 || in.Samples != 50 {
		t.Errorf("exported geometry %+v %+v, %d samples; want the input's", in.Inline, in.Crossline, in.Samples)
	}
}

// TestExportDemoFromWindow exports from a (small) in-memory demo survey:
// the job writes the survey to a temporary file, exports from it, and
// leaves only the named output in the folder; the output holds the demo's
// geometry and the envelope of its traces (compared with compute's envelope
// of the same traces).
func TestExportDemoFromWindow(t *testing.T) {
	cfg := synth.DefaultConfig()
	cfg.Inlines, cfg.Crosslines, cfg.Samples = 6, 8, 200
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	v.startOpen("a small demo survey", func(ctx context.Context, progress func(int, int)) (survey, error) {
		return volume.Demo(ctx, cfg, progress)
	}, "")
	v.jobs.wait()
	if v.vol.Path() != "" {
		t.Fatalf("the demo survey did not open: %s", v.ui.message.Text)
	}
	dir := t.TempDir()
	stem := demoStem(v.info)
	if stem != "corrowdeep-3d" {
		t.Errorf("demo outputs named %q, want corrowdeep-3d", stem)
	}
	out := filepath.Join(dir, stem+"-envelope.sgy")
	v.runDemoExport(export.Job{Attributes: []string{"envelope"}, Output: out, Format: 5}, dir, stem)
	v.jobs.wait()
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 || entries[0].Name() != stem+"-envelope.sgy" {
		t.Fatalf("folder holds %v, want only %s-envelope.sgy (status %q)", entries, stem, v.ui.message.Text)
	}
	got, err := volume.Open(out, segy.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer got.Close()
	in := got.Info()
	if in.Inline.Count != 6 || in.Crossline.Count != 8 || in.Samples != 200 {
		t.Fatalf("exported geometry %+v %+v %d samples, want 6 x 8 x 200", in.Inline, in.Crossline, in.Samples)
	}
	env, _ := compute.Lookup("envelope")
	p, _ := env.Resolve(nil)
	want, err := v.vol.Attribute(context.Background(), volume.Slice{Orientation: volume.Inline, Number: in.Inline.Min + 2}, env, p, compute.Conditioning{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	sec, err := got.Read(context.Background(), volume.Slice{Orientation: volume.Inline, Number: in.Inline.Min + 2})
	if err != nil {
		t.Fatal(err)
	}
	for i := range sec.Traces {
		for k := range sec.Traces[i] {
			if sec.Traces[i][k] != want.Traces[i][k] {
				t.Fatalf("trace %d sample %d: exported %v, envelope %v", i, k, sec.Traces[i][k], want.Traces[i][k])
			}
		}
	}
}
