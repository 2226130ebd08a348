package viewer

import (
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
)

// laptopWidth is the width of the common laptop screen the window must fit
// at its minimum size: 1366 x 768 pixels (common practice: the most
// widespread laptop panel of recent years).
const laptopWidth = 1366

// The window's minimum width fits a 1366-pixel screen on fyne's test driver,
// whichever tab is shown, with every status-bar progress item showing, a
// long message, a long cursor readout and a long title; the controls that
// made it wider (the navigation bar in one row, the histogram note, the
// Horizons tab's three buttons in a row, the readout beside the progress
// items) now wrap, shorten or stack.
func TestWindowFitsLaptopScreen(t *testing.T) {
	v := openDemoViewer(t, horizonDemo(), fyne.NewSize(1400, 900))
	check := func(what string) {
		t.Helper()
		if w := v.win.Content().MinSize().Width; w > laptopWidth {
			t.Errorf("%s: the window is at least %.0f wide, more than a %d-pixel screen", what, w, laptopWidth)
		}
	}
	check("as opened")
	tabs := findTabs(v.win.Content())
	if tabs == nil {
		t.Fatal("no tabs in the window")
	}
	for i, it := range tabs.Items {
		tabs.SelectIndex(i)
		check("the " + it.Text + " tab")
	}
	u := v.ui
	long := strings.Repeat("Corrowdeep 3D, Halvane Basin ", 12)
	noop := func() {}
	v.setBusy(u.statusBar.check, "Checking every trace header", 10, 100, noop)
	v.setBusy(u.statusBar.export, "Exporting envelope", 10, 100, noop)
	v.setBusy(u.statusBar.work, "Computing sweetness", 0, 0, noop)
	v.setBusy(v.hzEdit.progress, "Tracking Horizon 1", 10, 100, noop)
	v.showStatus(long)
	u.statusBar.setCursor(long)
	u.navigationBar.title.SetText(long)
	check("every progress item showing, long message, readout and title")
}

// findTabs returns the first tab container under o.
func findTabs(o fyne.CanvasObject) *container.AppTabs {
	switch c := o.(type) {
	case *container.AppTabs:
		return c
	case *container.Split:
		if t := findTabs(c.Leading); t != nil {
			return t
		}
		return findTabs(c.Trailing)
	case *fyne.Container:
		for _, k := range c.Objects {
			if t := findTabs(k); t != nil {
				return t
			}
		}
	}
	return nil
}
