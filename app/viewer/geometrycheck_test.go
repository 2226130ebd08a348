package viewer

import (
	"math"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"

	"quadtrace/app/indexcache"
	"quadtrace/app/volume"
	"quadtrace/segy"
	"quadtrace/segy/segytest"
)

// newCheckViewer makes a window on fyne's test driver with opt, not yet
// started; its jobs are stopped and its survey closed when the test ends.
func newCheckViewer(t testing.TB, opt Options) *viewer {
	t.Helper()
	v := newViewer(test.NewTempApp(t), opt, newQueuedJobs())
	v.win.Resize(fyne.NewSize(1400, 900))
	t.Cleanup(func() {
		v.jobs.close()
		v.jobs.wait()
		if v.vol != nil {
			v.vol.Close()
		}
	})
	return v
}

// A file whose first section comes from a sampled geometry that is wrong
// on the shown inline (a trace carrying its neighbour's crossline, not
// among the sampled headers): the window shows the first section at once,
// the header check runs in its lane, and when it ends the survey is
// replaced by the exact one, the inline is drawn again (the position left
// without a trace is empty now) and the status bar says what changed. The
// geometry cache is a temporary folder.
func TestHeaderCheckCorrectsShownSurvey(t *testing.T) {
	const nil_, nx = 100, 90
	g := segytest.Grid(nil_, nx, 8)
	k := 49*nx + 30 // inline 149, the middle one the window opens on
	for segytest.SampledByFastOpen(k, nil_*nx) {
		k++
	}
	xl := g.Traces[k].Crossline
	g.Traces[k].Crossline = g.Traces[k-1].Crossline
	dir := t.TempDir()
	path := filepath.Join(dir, "dup.sgy")
	if err := os.WriteFile(path, g.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	v := newCheckViewer(t, Options{Path: path, IndexCache: indexcache.New(filepath.Join(dir, "cache"))})
	v.start()
	v.jobs.wait()
	if v.vol == nil {
		t.Fatalf("no survey; status %q", v.ui.message.Text)
	}
	c, ok := v.vol.(checkable)
	if !ok || !c.Exact() {
		t.Fatal("after the jobs, the survey shown is not the checked one")
	}
	if msg := v.ui.message.Text; !strings.Contains(msg, "1 trace repeats the position of an earlier one") || !strings.Contains(msg, "drawn again") {
		t.Errorf("status %q does not say what changed", msg)
	}
	full, err := volume.Open(path, segy.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer full.Close()
	if !reflect.DeepEqual(v.info, full.Info()) {
		t.Error("the window's survey Info differs from a full open's")
	}
	if v.state.Inline != 149 || v.data.amp == nil {
		t.Fatalf("inline %d shown (want 149), data %v", v.state.Inline, v.data.amp != nil)
	}
	j := slices.Index(v.data.amp.Keys, xl)
	if j < 0 || !math.IsNaN(float64(v.data.amp.Traces[j][0])) {
		t.Errorf("crossline %d of inline 149 should be empty after the check", xl)
	}
	if v.ui.check.box.Visible() {
		t.Error("the check's progress is still shown")
	}
}

// A regular file: the check finds nothing, the survey stays the one
// opened, no note; a second window opens it from the cache with nothing
// left to check.
func TestHeaderCheckRegularFile(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "regular.sgy")
	if err := os.WriteFile(path, segytest.Grid(100, 90, 8).Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	cache := indexcache.New(filepath.Join(dir, "cache"))
	for round := 0; round < 2; round++ {
		v := newCheckViewer(t, Options{Path: path, IndexCache: cache})
		v.start()
		v.jobs.wait()
		vol, _ := v.vol.(*volume.Volume)
		if vol == nil {
			t.Fatalf("round %d: no survey", round)
		}
		if want := []segy.IndexSource{segy.IndexSampled, segy.IndexSaved}[round]; vol.IndexSource() != want {
			t.Errorf("round %d: index from %v, want %v", round, vol.IndexSource(), want)
		}
		if msg := v.ui.message.Text; strings.Contains(msg, "Checked") {
			t.Errorf("round %d: status %q for a regular file", round, msg)
		}
	}
}

// startUntilShown starts the viewer and runs its UI functions until a
// survey is shown (the header check has then just started), without
// waiting for the jobs.
func startUntilShown(t *testing.T, v *viewer) {
	t.Helper()
	v.start()
	deadline := time.Now().Add(time.Minute)
	for v.vol == nil {
		if time.Now().After(deadline) {
			t.Fatal("no survey shown within a minute")
		}
		if v.jobs.drain() == 0 {
			time.Sleep(time.Millisecond)
		}
	}
}

// Cancel on the check's progress stops it: the survey opened from the
// sample stays, the status bar says the lines follow a sample; opening
// another file while a check runs stops that check too, and the new file
// is shown without any note about the first.
func TestHeaderCheckCancelAndSwitch(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "regular.sgy")
	if err := os.WriteFile(path, segytest.Grid(100, 90, 8).Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, how := range []string{"cancel", "switch"} {
		v := newCheckViewer(t, Options{Path: path, IndexCache: indexcache.New(filepath.Join(t.TempDir(), "cache"))})
		startUntilShown(t, v)
		first := v.vol
		if !v.ui.check.box.Visible() {
			t.Fatalf("%s: no check progress shown after the sampled open", how)
		}
		switch how {
		case "cancel":
			v.ui.check.onStop()
		case "switch":
			v.openFile(segytest.CorpusFile(t, "small.sgy"))
		}
		v.jobs.wait()
		if v.ui.check.box.Visible() {
			t.Errorf("%s: the check's progress is still shown", how)
		}
		switch how {
		case "cancel":
			if v.vol != first || v.vol.(checkable).Exact() {
				t.Errorf("cancel: the survey changed or became exact")
			}
			if msg := v.ui.message.Text; !strings.Contains(msg, "stopped") {
				t.Errorf("cancel: status %q", msg)
			}
		case "switch":
			if v.info.Traces != 25 || strings.Contains(v.ui.message.Text, "Checked") {
				t.Errorf("switch: %d traces shown (want small.sgy's 25), status %q", v.info.Traces, v.ui.message.Text)
			}
		}
	}
}
