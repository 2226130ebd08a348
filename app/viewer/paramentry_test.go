package viewer

import (
	"strings"
	"testing"

	"fyne.io/fyne/v2/test"

	"quadtrace/segy/segytest"
)

// TestParameterRefusalBesideEntry (issue 12 point 9): a parameter typed out
// of its range, or not a number, is refused with the reason in the line
// beside its entry, the attribute keeps its previous value, and the line
// hides again once an accepted value is typed and applied. The range of
// weighted-frequency's window (4 to 10000 ms) is the registry's own.
func TestParameterRefusalBesideEntry(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	v.ui.attrTree.Select("attr:weighted-frequency")
	v.jobs.wait()
	e, why := v.ui.paramEntries["window"], v.ui.paramWhy["window"]
	if e == nil || why == nil {
		t.Fatalf("no window entry for weighted-frequency (entries %v)", v.ui.paramEntries)
	}
	if why.Visible() {
		t.Fatalf("refusal line shown before anything was typed: %q", why.Text)
	}
	before := v.state.params("weighted-frequency")["window"]
	for _, c := range []struct{ typed, want string }{
		{"2", "out of range"},
		{"20000", "out of range"},
		{"forty", "not a number"},
	} {
		e.SetText("")
		test.Type(e, c.typed)
		e.OnSubmitted(e.Text)
		v.jobs.wait()
		if !why.Visible() || !strings.Contains(why.Text, c.want) || !strings.Contains(why.Text, "4 to 10000") {
			t.Errorf("typed %q: refusal line %q (shown %v), want it to say %q and the range 4 to 10000", c.typed, why.Text, why.Visible(), c.want)
		}
		if got := v.state.params("weighted-frequency")["window"]; got != before {
			t.Errorf("typed %q: window became %q, want it kept at %q", c.typed, got, before)
		}
	}
	e.SetText("")
	test.Type(e, "60")
	e.OnSubmitted(e.Text)
	v.jobs.wait()
	if why.Visible() {
		t.Errorf("accepted 60 ms but the refusal line still shows %q", why.Text)
	}
	if got := v.state.params("weighted-frequency")["window"]; got != "60" {
		t.Errorf("window %q after typing 60, want 60", got)
	}
}
