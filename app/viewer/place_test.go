package viewer

import (
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/test"

	"quadtrace/app/volume"
	"quadtrace/segy/segytest"
)

// menuShortcut runs the main-menu item bound to shortcut s, as fyne's
// desktop driver does before the focused widget sees the key (the test
// driver has no main menu). It fails the test when no item has s.
func menuShortcut(t *testing.T, v *viewer, s fyne.Shortcut) {
	t.Helper()
	for _, m := range v.win.MainMenu().Items {
		for _, it := range m.Items {
			if it.Shortcut != nil && it.Shortcut.ShortcutName() == s.ShortcutName() {
				it.Action()
				return
			}
		}
	}
	t.Fatalf("no menu item has the shortcut %s", s.ShortcutName())
}

// TestPlaceKeptAcrossViews picks a trace and a time on inline 3 of
// small.sgy, then goes to the crossline, the time slice and back: every
// view passes through the picked trace, keeps it picked (a cross on the
// map) and the time slice is at the picked time. The window title names
// the survey and the view.
func TestPlaceKeptAcrossViews(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	v.pickAt(1.5, 10.5) // crossline 21, sample 10 (40 ms at 4 ms)
	v.jobs.wait()
	if k, ok := v.pickedKeys(); !ok || k != (pickKeys{3, 21}) {
		t.Fatalf("picked %+v, want inline 3 crossline 21", k)
	}
	if title := v.win.Title(); !strings.Contains(title, "small.sgy") || !strings.Contains(title, "Inline 3") {
		t.Errorf("window title %q does not name the survey and the view", title)
	}
	v.ui.orientation.SetSelected("Crossline")
	v.jobs.wait()
	if v.state.Crossline != 21 || v.state.PickTrace != 2 {
		t.Fatalf("crossline view %d with pick %d, want crossline 21 with inline 3 (index 2) picked", v.state.Crossline, v.state.PickTrace)
	}
	if !hasLabel(v.ui.trace.labels, "Inline 3, crossline 21") {
		t.Errorf("trace panel %v after switching to the crossline", labelTexts(v.ui.trace.labels))
	}
	if title := v.win.Title(); !strings.Contains(title, "Crossline 21") {
		t.Errorf("window title %q after switching to crossline 21", title)
	}
	v.ui.orientation.SetSelected("Time slice")
	v.jobs.wait()
	if v.state.SampleIndex != 10 {
		t.Errorf("time slice at sample %d, want the picked sample 10", v.state.SampleIndex)
	}
	if k, ok := v.pickedKeys(); !ok || k != (pickKeys{3, 21}) {
		t.Errorf("time slice pick %+v, want inline 3 crossline 21", k)
	}
	if s := v.ui.section; s.pick != 1 || s.pickRow != 2 {
		t.Errorf("map pick marked at column %v row %v, want 1, 2", s.pick, s.pickRow)
	}
	v.ui.orientation.SetSelected("Inline")
	v.jobs.wait()
	if v.state.Inline != 3 || v.state.PickTrace != 1 {
		t.Errorf("back on inline %d with pick %d, want inline 3 with crossline 21 (index 1)", v.state.Inline, v.state.PickTrace)
	}
}

// TestBackAndForward walks the view history with Alt+Left and Alt+Right.
func TestBackAndForward(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	v.stepLine(1) // inline 4
	v.jobs.wait()
	v.setAttribute("instantaneous-phase")
	v.jobs.wait()
	back := &desktop.CustomShortcut{KeyName: fyne.KeyLeft, Modifier: fyne.KeyModifierAlt}
	fwd := &desktop.CustomShortcut{KeyName: fyne.KeyRight, Modifier: fyne.KeyModifierAlt}
	menuShortcut(t, v, back)
	v.jobs.wait()
	if v.state.Inline != 4 || v.state.AttributeID != "envelope" {
		t.Fatalf("one step back: inline %d %s, want inline 4 envelope", v.state.Inline, v.state.AttributeID)
	}
	menuShortcut(t, v, back)
	v.jobs.wait()
	if v.state.Inline != 3 {
		t.Fatalf("two steps back: inline %d, want 3", v.state.Inline)
	}
	if v.goHistory(-1) {
		t.Error("went back past the first view")
	}
	menuShortcut(t, v, fwd)
	menuShortcut(t, v, fwd) // before the first step's data arrive
	v.jobs.wait()
	if v.state.Inline != 4 || v.state.AttributeID != "instantaneous-phase" || v.data.plan.Overlay.ID != "instantaneous-phase" {
		t.Errorf("two steps forward: inline %d %s, want inline 4 phase", v.state.Inline, v.state.AttributeID)
	}
	// A new view after going back drops the forward entries.
	menuShortcut(t, v, back)
	v.jobs.wait()
	v.stepLine(-2) // inline 2
	v.jobs.wait()
	if v.goHistory(1) {
		t.Error("forward still possible after a new view")
	}
}

// TestWindowShortcutsWhateverHasFocus types into the line entry, then uses
// the window's paging, zoom and whole-section shortcuts: they act on the
// view although the entry has the keyboard.
func TestWindowShortcutsWhateverHasFocus(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	v.win.Canvas().Focus(v.ui.lineEntry)
	ctrl := fyne.KeyModifierShortcutDefault
	menuShortcut(t, v, &desktop.CustomShortcut{KeyName: fyne.KeyPageDown, Modifier: ctrl})
	v.jobs.wait()
	if v.state.Inline != 4 || v.ui.lineEntry.Text != "4" {
		t.Fatalf("Ctrl+Page Down with the entry focused: inline %d, entry %q", v.state.Inline, v.ui.lineEntry.Text)
	}
	menuShortcut(t, v, &desktop.CustomShortcut{KeyName: fyne.KeyPageUp, Modifier: ctrl | fyne.KeyModifierShift})
	v.jobs.wait()
	if v.state.Inline != 1 {
		t.Errorf("Ctrl+Shift+Page Up from 4: inline %d, want 1", v.state.Inline)
	}
	menuShortcut(t, v, &desktop.CustomShortcut{KeyName: fyne.KeyEqual, Modifier: ctrl})
	v.jobs.wait()
	if v.state.Zoom <= 1 {
		t.Errorf("Ctrl+= did not zoom: %v", v.state.Zoom)
	}
	menuShortcut(t, v, &desktop.CustomShortcut{KeyName: fyne.KeyHome, Modifier: ctrl})
	v.jobs.wait()
	if v.state.Zoom != 1 {
		t.Errorf("Ctrl+Home left zoom %v", v.state.Zoom)
	}
	// The section shows that it has the keyboard.
	test.Tap(v.ui.section)
	if !v.ui.section.focused || v.win.Canvas().Focused() != v.ui.section {
		t.Error("clicking the section did not give it the keyboard")
	}
}

// TestErrorClearsOnNextOpen opens a file that fails, then a good one: the
// error no longer shows.
func TestErrorClearsOnNextOpen(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	v.openFile(segytest.CorpusFile(t, "text.sgy"))
	v.jobs.wait()
	if !strings.Contains(v.ui.message.Text, "text.sgy") {
		t.Fatalf("no error shown for text.sgy: %q", v.ui.message.Text)
	}
	v.openFile(segytest.CorpusFile(t, "tiny.sgy"))
	v.jobs.wait()
	if strings.Contains(v.ui.message.Text, "text.sgy") || v.ui.section.message != "" {
		t.Errorf("after opening tiny.sgy the status still says %q (section %q)", v.ui.message.Text, v.ui.section.message)
	}
	if v.data.amp == nil || v.state.Orientation != volume.Inline {
		t.Error("tiny.sgy not shown")
	}
}
