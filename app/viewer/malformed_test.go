package viewer

import (
	"strings"
	"testing"

	"fyne.io/fyne/v2"

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
