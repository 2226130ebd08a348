package viewer

import (
	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"
)

// statusBar is the line under the window: the values under the cursor, the
// last message, and the progress of the work, export and header-check
// lanes with their cancel buttons.
type statusBar struct {
	content fyne.CanvasObject
	cursor  *widget.Label
	line    *fyne.Container // cursor and message (statusLineLayout)
	items   *fyne.Container // the progress items, one above the other
	message *widget.Label
	work    *progressItem
	export  *progressItem
	check   *progressItem // the full header check after a sampled open (geometrycheck.go)
}

func newStatusBar() *statusBar {
	s := &statusBar{cursor: widget.NewLabel(cursorHint), message: widget.NewLabel(""), work: newProgressItem(), export: newProgressItem(), check: newProgressItem()}
	s.cursor.TextStyle.Monospace = true
	s.message.Truncation = fyne.TextTruncateEllipsis
	s.cursor.Truncation = fyne.TextTruncateEllipsis
	s.line = container.New(statusLineLayout{}, s.cursor, s.message)
	// The progress items stack (the bar grows a line per running lane)
	// rather than stand side by side, so four at once still fit a laptop
	// screen (TestWindowFitsLaptopScreen).
	s.items = container.NewVBox(s.check.box, s.export.box, s.work.box)
	s.content = container.NewBorder(nil, nil, nil, s.items, s.line)
	return s
}

// addProgress adds another lane's progress item to the bar.
func (s *statusBar) addProgress(p *progressItem) { s.items.Add(p.box) }

// setCursor shows text as the cursor readout and gives it the width it
// needs again.
func (s *statusBar) setCursor(text string) {
	if s.cursor.Text == text {
		return
	}
	s.cursor.Text = text
	s.line.Refresh() // lays the line out again and redraws both labels
}

// statusLineLayout places the cursor readout (a truncating label) at the
// width its text needs, or all there is when that is less, and the message
// in the rest. Its minimum width is zero, so neither a long readout nor the
// progress items beside it make the window wider than a laptop screen
// (TestWindowFitsLaptopScreen); a readout cut short ends in an ellipsis.
type statusLineLayout struct{}

func (statusLineLayout) Layout(objs []fyne.CanvasObject, size fyne.Size) {
	cursor, message := objs[0].(*widget.Label), objs[1]
	// the width the text needs: an untruncated label's minimum
	want := (&widget.Label{Text: cursor.Text, TextStyle: cursor.TextStyle}).MinSize().Width
	cw := min(want, size.Width)
	cursor.Move(fyne.NewPos(0, 0))
	cursor.Resize(fyne.NewSize(cw, size.Height))
	message.Move(fyne.NewPos(cw, 0))
	message.Resize(fyne.NewSize(size.Width-cw, size.Height))
}

func (statusLineLayout) MinSize(objs []fyne.CanvasObject) fyne.Size {
	return fyne.NewSize(0, max(objs[0].MinSize().Height, objs[1].MinSize().Height))
}

// progressItem is a status-bar group of a label, a progress bar and a
// cancel button, hidden while nothing runs.
type progressItem struct {
	box    *fyne.Container
	label  *widget.Label
	bar    *widget.ProgressBar
	wait   *widget.ProgressBarInfinite
	cancel *widget.Button
	onStop func()
}

func newProgressItem() *progressItem {
	p := &progressItem{label: widget.NewLabel(""), bar: widget.NewProgressBar(), wait: widget.NewProgressBarInfinite()}
	p.cancel = widget.NewButtonWithIcon("Cancel", theme.CancelIcon(), func() {
		if p.onStop != nil {
			p.onStop()
		}
	})
	p.cancel.Importance = widget.LowImportance
	bars := container.NewStack(p.bar, p.wait)
	p.box = container.NewHBox(p.label, container.NewGridWrap(fyne.NewSize(160, p.bar.MinSize().Height), bars), p.cancel)
	p.box.Hide()
	p.wait.Stop()
	return p
}

// setBusy shows progress done/total (total 0: unknown) with a cancel action.
func (v *viewer) setBusy(p *progressItem, label string, done, total int, cancel func()) {
	p.label.SetText(label)
	p.onStop = cancel
	if total > 0 {
		p.wait.Stop()
		p.wait.Hide()
		p.bar.Show()
		p.bar.SetValue(float64(done) / float64(total))
	} else {
		p.bar.Hide()
		p.wait.Show()
		p.wait.Start()
	}
	p.box.Show()
}

// setIdle hides the progress group.
func (v *viewer) setIdle(p *progressItem) {
	p.wait.Stop()
	p.box.Hide()
}

// cursorHint fills the status bar while the pointer is off the section.
const cursorHint = "Point at the section to read its values; click a trace to show it on the right"
