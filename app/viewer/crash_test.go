package viewer

import (
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"

	"quadtrace/segy/segytest"
)

// The crash paths of issue 12: an overlay switched on while the shown data
// do not hold it yet, and the trace panel (or the section) redrawn before
// the overlay's data arrive. Each test makes the change, then sends the
// events that redraw the trace panel and the section (a resize, a zoom key,
// a click on a trace) before the data job's results reach the UI, and only
// then lets the jobs finish.

// redrawBeforeData sends the events that ask for a new trace panel and
// section while the data job of the last change is still pending.
func redrawBeforeData(t *testing.T, v *viewer) {
	t.Helper()
	v.ui.trace.Resize(v.ui.trace.Size().Add(fyne.NewSize(1, 1)))
	v.win.Canvas().OnTypedKey()(&fyne.KeyEvent{Name: fyne.KeyPlus})
	v.pickAt(1.5, 10)
	v.requestRender()
	v.requestTrace()
	v.jobs.drain()
}

// assertOverlayShown checks that the picture and the trace panel end up
// showing the overlay the state asks for.
func assertOverlayShown(t *testing.T, v *viewer, id string) {
	t.Helper()
	v.jobs.wait()
	pl := v.state.plan()
	if pl.Overlay == nil || pl.Overlay.ID != id {
		t.Fatalf("plan %+v, want %s as overlay", pl, id)
	}
	if v.data.over == nil || v.data.plan.Overlay == nil || v.data.plan.Overlay.ID != id {
		t.Fatalf("shown data lack the %s overlay", id)
	}
	if !hasLabel(v.ui.trace.labels, lookup(id).Name) {
		t.Errorf("trace panel labels %v lack %s", labelTexts(v.ui.trace.labels), id)
	}
}

// TestCrashOneClickAfterUntick: untick the overlay, then the one-click
// "Envelope over amplitude".
func TestCrashOneClickAfterUntick(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	test.Tap(v.ui.coRenderCheck)
	v.jobs.wait()
	if v.state.CoRender {
		t.Fatal("unticking left co-rendering on")
	}
	test.Tap(v.ui.oneClick)
	redrawBeforeData(t, v)
	assertOverlayShown(t, v, "envelope")
}

// TestCrashUntickTick: untick and tick the overlay box again without
// waiting in between.
func TestCrashUntickTick(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	test.Tap(v.ui.coRenderCheck)
	redrawBeforeData(t, v)
	test.Tap(v.ui.coRenderCheck)
	redrawBeforeData(t, v)
	assertOverlayShown(t, v, "envelope")
	// And with the data of the unticked state in between.
	test.Tap(v.ui.coRenderCheck)
	v.jobs.wait()
	test.Tap(v.ui.coRenderCheck)
	redrawBeforeData(t, v)
	assertOverlayShown(t, v, "envelope")
}

// TestCrashAmplitudeThenAttribute: Amplitude in the tree, then each other
// attribute.
func TestCrashAmplitudeThenAttribute(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	for _, id := range []string{"instantaneous-phase", "envelope", "sweetness", "instantaneous-frequency"} {
		v.ui.attrTree.Select("attr:" + amplitudeID)
		v.jobs.wait()
		if v.data.over != nil {
			t.Fatalf("amplitude alone shows an overlay")
		}
		v.ui.attrTree.Select("attr:" + id)
		redrawBeforeData(t, v)
		assertOverlayShown(t, v, id)
	}
}
