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
	message *widget.Label
	work    *progressItem
	export  *progressItem
	check   *progressItem // the full header check after a sampled open (geometrycheck.go)
}

func newStatusBar() *statusBar {
	s := &statusBar{cursor: widget.NewLabel(cursorHint), message: widget.NewLabel(""), work: newProgressItem(), export: newProgressItem(), check: newProgressItem()}
	s.cursor.TextStyle.Monospace = true
	s.message.Truncation = fyne.TextTruncateEllipsis
	s.content = container.NewBorder(nil, nil, s.cursor, container.NewHBox(s.check.box, s.export.box, s.work.box), s.message)
	return s
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
