package viewer

import (
	"runtime"
	"strings"
	"testing"

	"fyne.io/fyne/v2"

	"quadtrace/segy"
	"quadtrace/segy/segytest"
)

// TestMalformedFilesShowErrorAndKeepSurvey opens a good corpus file, then
// every input of the malformed-file suite that must be refused
// (segytest.Malformed, built from the SEG-Y revision 1 and 2.0 byte
// tables): the window shows the reader's one-line error in a dialog and in
// the status line, keeps the survey it had, and still steps through it.
func TestMalformedFilesShowErrorAndKeepSurvey(t *testing.T) {
	good := segytest.CorpusFile(t, "small.sgy")
	v := openViewer(t, good)
	dir := t.TempDir()
	checked := 0
	for _, c := range segytest.Malformed() {
		if c.Expect.Usable() {
			continue
		}
		path, err := c.Create(dir)
		if err != nil {
			t.Fatal(err)
		}
		overlays := len(v.win.Canvas().Overlays().List())
		v.openFile(path)
		v.jobs.wait()
		msg := v.ui.message.Text
		if !strings.Contains(msg, "Could not open") || !strings.Contains(msg, c.Expect.Err) {
			t.Errorf("%s: status %q, want the error %q", c.Name, msg, c.Expect.Err)
		}
		if got := len(v.win.Canvas().Overlays().List()); got != overlays+1 {
			t.Errorf("%s: %d dialogs shown, want one more than %d", c.Name, got, overlays)
		}
		if v.vol == nil || v.vol.Name() != good {
			t.Fatalf("%s: the open survey was replaced", c.Name)
		}
		// Close the dialog; the window must still step through the survey.
		v.win.Canvas().Overlays().Top().Hide()
		v.win.Canvas().Overlays().Remove(v.win.Canvas().Overlays().Top())
		before := v.state.Inline
		key := fyne.KeyRight
		if before == 5 {
			key = fyne.KeyLeft
		}
		v.win.Canvas().OnTypedKey()(&fyne.KeyEvent{Name: key})
		v.jobs.wait()
		if v.state.Inline == before || v.lastSection == nil {
			t.Errorf("%s: after the error the window no longer steps (inline %d)", c.Name, v.state.Inline)
		}
		checked++
	}
	if checked < 15 {
		t.Errorf("only %d refusing cases checked; the suite lists more", checked)
	}
}

// TestGarbageNumberingShownInFileOrder opens a file whose inline and
// crossline bytes hold random numbers (issue 12.2): the window follows
// segy's geometry decision and shows its traces in file order as one line,
// says so, and the open allocates in proportion to the file, not to the
// range of its numbers. Every other usable malformed file opens and draws.
func TestGarbageNumberingShownInFileOrder(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	dir := t.TempDir()
	for _, c := range segytest.Malformed() {
		if !c.Expect.Usable() || strings.Contains(c.Expect.Warning, "no traces") {
			continue
		}
		path, err := c.Create(dir)
		if err != nil {
			t.Fatal(err)
		}
		var before, after runtime.MemStats
		runtime.ReadMemStats(&before)
		v.openFile(path)
		v.jobs.wait()
		runtime.ReadMemStats(&after)
		if v.vol == nil || v.vol.Path() != path || v.data.amp == nil || v.sectionDrawn == 0 {
			t.Errorf("%s: not shown (status %q)", c.Name, v.ui.message.Text)
			continue
		}
		if grown := after.TotalAlloc - before.TotalAlloc; grown > 256<<20 {
			t.Errorf("%s: opening and drawing allocated %d MB", c.Name, grown>>20)
		}
		if c.Name == "garbage numbering everywhere" {
			if v.info.Layout != segy.LayoutUnstructured || !strings.HasPrefix(v.ui.title.Text, "Traces in file order") {
				t.Errorf("garbage numbering: layout %q, title %q", v.info.Layout, v.ui.title.Text)
			}
			if n, _ := v.dims(); n != v.info.Traces {
				t.Errorf("garbage numbering: %d of %d traces on the line", n, v.info.Traces)
			}
		}
	}
}
