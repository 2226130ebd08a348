package viewer

import (
	"fmt"
	"image/color"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"quadtrace/compute/horizon"
)

// Names of the section tools, as the Horizons tab offers them.
var toolNames = []string{"Look and pick", "Place seeds", "Erase in a box"}

// horizonPanel is the Horizons tab: the section tool, the tracking settings,
// the tracking and undo buttons, and the list of horizons, each with its
// visibility, colour, name, map, save, rename and delete. It owns its
// widgets; refresh rebuilds the list from v.horizons.
type horizonPanel struct {
	v       *viewer
	content fyne.CanvasObject

	tool        *widget.RadioGroup
	event       *widget.Select
	window      *widget.Entry
	phaseJump   *widget.Entry
	minEnvelope *widget.Entry
	minCorr     *widget.Entry
	minSep      *widget.Entry // horizon.Options.MinSeparationMS
	track       *widget.Button
	undo        *widget.Button
	clearSeeds  *widget.Button
	addButton   *widget.Button
	openButton  *widget.Button
	active      *widget.Label
	list        *fyne.Container
	rows        map[*namedHorizon]*horizonRow
}

// horizonRow is one horizon's line in the list.
type horizonRow struct {
	box    *fyne.Container
	shown  *widget.Check
	swatch *canvas.Rectangle
	colour *widget.Button
	name   *widget.Button
	mapBtn *widget.Button
	save   *widget.Button
	rename *widget.Button
	remove *widget.Button
}

func newHorizonPanel(v *viewer) *horizonPanel {
	p := &horizonPanel{v: v, rows: map[*namedHorizon]*horizonRow{}}
	p.tool = widget.NewRadioGroup(toolNames, func(s string) {
		for i, n := range toolNames {
			if n == s {
				v.setHorizonTool(horizonTool(i))
				return
			}
		}
		v.setHorizonTool(toolLook) // unselected
	})
	p.tool.Required = true
	p.tool.SetSelected(toolNames[toolLook])

	o := v.hzEdit.opts
	p.event = widget.NewSelect(horizon.Events(), func(string) { v.applyTrackSettings() })
	p.event.SetSelected(o.Event.String())
	entry := func(x float64, hint string) *widget.Entry {
		e := widget.NewEntry()
		e.SetText(strconv.FormatFloat(x, 'g', -1, 64))
		e.SetPlaceHolder(hint)
		e.OnSubmitted = func(string) { v.applyTrackSettings() }
		return e
	}
	p.window = entry(o.WindowMS, "ms")
	p.phaseJump = entry(o.MaxPhaseJumpDeg, "0: off")
	p.minEnvelope = entry(o.MinEnvelope, "0: off")
	p.minCorr = entry(o.MinCorrelation, "-1 to 1")
	p.minSep = entry(o.MinSeparationMS, "0: off")
	form := container.New(layout.NewFormLayout(),
		widget.NewLabel("Event"), p.event,
		widget.NewLabel("Search ± (ms)"), p.window,
		widget.NewLabel("Phase change ≤ (°)"), p.phaseJump,
		widget.NewLabel("Envelope ≥ (× local)"), p.minEnvelope,
		widget.NewLabel("Correlation ≥"), p.minCorr,
		widget.NewLabel("Stop at interference (ms)"), p.minSep,
	)
	p.track = widget.NewButtonWithIcon("Track from seeds", theme.MediaPlayIcon(), func() {
		if v.applyTrackSettings() {
			v.trackActive()
		}
	})
	p.track.Importance = widget.HighImportance
	p.undo = widget.NewButtonWithIcon("Undo", theme.ContentUndoIcon(), v.undoActive)
	p.clearSeeds = widget.NewButtonWithIcon("Drop seeds", theme.ContentClearIcon(), v.dropSeeds)
	p.addButton = widget.NewButtonWithIcon("New horizon", theme.ContentAddIcon(), func() { v.horizons.add() })
	p.openButton = widget.NewButtonWithIcon("Open horizon file…", theme.FolderOpenIcon(), v.showHorizonOpenDialog)
	p.active = widget.NewLabel("")
	p.active.Wrapping = fyne.TextWrapWord
	p.list = container.NewVBox()
	help := widget.NewLabel("Choose \"Place seeds\", click the event on an inline or crossline (it snaps to the chosen event), then track. Drag a box with \"Erase in a box\" to remove picks. Click a horizon's name to edit it. \"Stop at interference\" (peaks and troughs only) leaves a trace empty where a strong event of the other polarity lies closer than that: set it to the wavelet's tuning thickness to stop a thinning bed where its top and base merge.")
	help.Wrapping = fyne.TextWrapWord
	help.Importance = widget.LowImportance
	p.content = container.NewVScroll(container.NewVBox(
		widget.NewCard("", "On the section", p.tool),
		widget.NewCard("", "Tracking", container.NewVBox(form, p.track, container.NewGridWithColumns(2, p.undo, p.clearSeeds))),
		widget.NewCard("", "Horizons", container.NewVBox(p.active, p.list, container.NewGridWithColumns(2, p.addButton, p.openButton))),
		help,
	))
	p.refresh()
	return p
}

// setHorizonTool makes t what a click and a drag on the section do.
func (v *viewer) setHorizonTool(t horizonTool) {
	v.hzEdit.tool = t
	v.ui.section.tool = t
	v.ui.section.boxing = false
	if p := v.hzEdit.panel; p != nil && p.tool.Selected != toolNames[t] {
		p.tool.SetSelected(toolNames[t])
	}
}

// applyTrackSettings reads the tracking settings from the tab; on a bad
// entry it says which and keeps the settings as they were.
func (v *viewer) applyTrackSettings() bool {
	p := v.hzEdit.panel
	if p == nil {
		return true
	}
	o := v.hzEdit.opts
	if e, err := horizon.ParseEvent(p.event.Selected); err == nil {
		o.Event = e
	}
	fields := []struct {
		e    *widget.Entry
		name string
		dst  *float64
	}{
		{p.window, "search window", &o.WindowMS},
		{p.phaseJump, "phase change", &o.MaxPhaseJumpDeg},
		{p.minEnvelope, "envelope fraction", &o.MinEnvelope},
		{p.minCorr, "correlation", &o.MinCorrelation},
		{p.minSep, "interference distance", &o.MinSeparationMS},
	}
	for _, f := range fields {
		x, err := strconv.ParseFloat(strings.TrimSpace(f.e.Text), 64)
		if err != nil {
			v.showStatus(fmt.Sprintf("Tracking: %s %q is not a number", f.name, f.e.Text))
			return false
		}
		*f.dst = x
	}
	if err := o.Check(); err != nil {
		v.showStatus("Tracking: " + err.Error())
		return false
	}
	v.hzEdit.opts = o
	return true
}

// dropSeeds forgets the active horizon's seeds that wait to be tracked.
func (v *viewer) dropSeeds() {
	if h := v.horizons.current(); h != nil && len(h.seeds) > 0 {
		h.seeds = nil
		v.horizons.notify()
	}
}

// refresh shows the list of horizons as it is.
func (p *horizonPanel) refresh() {
	v := p.v
	l := &v.horizons
	var objs []fyne.CanvasObject
	seen := map[*namedHorizon]bool{}
	for i, h := range l.items {
		r := p.rows[h]
		if r == nil {
			r = p.newRow(h)
			p.rows[h] = r
		}
		seen[h] = true
		r.shown.SetChecked(!h.Hidden)
		r.swatch.FillColor = h.Colour
		r.swatch.Refresh()
		r.name.SetText(h.Name)
		r.name.Importance = widget.LowImportance
		if i == l.active {
			r.name.Importance = widget.HighImportance
		}
		r.name.Refresh()
		if h.H == nil {
			r.save.Disable()
		} else {
			r.save.Enable()
		}
		if h.H != nil {
			r.mapBtn.Show()
		} else {
			r.mapBtn.Hide()
		}
		objs = append(objs, r.box)
	}
	for h := range p.rows {
		if !seen[h] {
			delete(p.rows, h)
		}
	}
	p.list.Objects = objs
	p.list.Refresh()
	if h := l.current(); h != nil {
		p.active.SetText(fmt.Sprintf("Editing %s: %d traces picked, %d seeds waiting, %d edits to undo", h.Name, h.picked, len(h.seeds), len(h.undo)))
		p.track.Enable()
		if len(h.undo) > 0 {
			p.undo.Enable()
		} else {
			p.undo.Disable()
		}
	} else {
		p.active.SetText("No horizon yet: placing a seed starts one")
		p.undo.Disable()
	}
}

// newRow makes the list line of h.
func (p *horizonPanel) newRow(h *namedHorizon) *horizonRow {
	v := p.v
	r := &horizonRow{}
	r.shown = widget.NewCheck("", func(on bool) {
		if h.Hidden == !on {
			return
		}
		h.Hidden = !on
		v.horizons.notify()
	})
	r.swatch = canvas.NewRectangle(h.Colour)
	r.swatch.SetMinSize(fyne.NewSize(18, 18))
	r.colour = widget.NewButton("", func() { v.chooseHorizonColour(h) })
	r.colour.Importance = widget.LowImportance
	r.name = widget.NewButton(h.Name, func() { v.horizons.setActive(h) })
	r.name.Alignment = widget.ButtonAlignLeading
	r.mapBtn = widget.NewButton("Map", func() { v.showMap(h) })
	r.save = widget.NewButtonWithIcon("", theme.DocumentSaveIcon(), func() { v.showHorizonSaveDialog(h) })
	r.rename = widget.NewButtonWithIcon("", theme.DocumentCreateIcon(), func() { v.showRenameDialog(h) })
	r.remove = widget.NewButtonWithIcon("", theme.DeleteIcon(), func() { v.deleteHorizon(h) })
	left := container.NewHBox(r.shown, container.NewStack(r.colour, container.NewCenter(r.swatch)))
	right := container.NewHBox(r.mapBtn, r.save, r.rename, r.remove)
	r.box = container.NewBorder(nil, nil, left, right, r.name)
	return r
}

// deleteHorizon removes h, after cancelling an edit of it that runs.
func (v *viewer) deleteHorizon(h *namedHorizon) {
	if v.hzEdit.running == h {
		v.cancelHorizonJob()
	}
	v.horizons.remove(h)
	v.showStatus("Deleted " + h.Name)
}

// renameHorizon names h name, unless it is empty or another horizon's.
func (v *viewer) renameHorizon(h *namedHorizon, name string) error {
	name = strings.TrimSpace(name)
	switch {
	case name == "":
		return fmt.Errorf("a horizon needs a name")
	case name != h.Name && v.horizons.named(name):
		return fmt.Errorf("another horizon is called %q", name)
	}
	if name != h.Name {
		h.Name = name
		v.horizons.notify()
	}
	return nil
}

func (v *viewer) showRenameDialog(h *namedHorizon) {
	e := widget.NewEntry()
	e.SetText(h.Name)
	dialog.ShowForm("Rename horizon", "Rename", "Cancel", []*widget.FormItem{widget.NewFormItem("Name", e)}, func(ok bool) {
		if !ok {
			return
		}
		if err := v.renameHorizon(h, e.Text); err != nil {
			v.showError(err.Error())
		}
	}, v.win)
}

// setHorizonColour draws h in c from now on.
func (v *viewer) setHorizonColour(h *namedHorizon, c color.Color) {
	nc := color.NRGBAModel.Convert(c).(color.NRGBA)
	nc.A = 255
	if nc != h.Colour {
		h.Colour = nc
		v.horizons.notify()
	}
}

func (v *viewer) chooseHorizonColour(h *namedHorizon) {
	d := dialog.NewColorPicker("Colour of "+h.Name, "", func(c color.Color) { v.setHorizonColour(h, c) }, v.win)
	d.Advanced = true
	d.SetColor(h.Colour)
	d.Show()
}

// chosenPath turns a file dialog's answer into a call of use with the
// chosen path (none when the dialog was dismissed; an error is shown).
func chosenPath[T interface {
	URI() fyne.URI
	Close() error
}](v *viewer, use func(path string)) func(T, error) {
	return func(f T, err error) {
		if err != nil {
			v.showError(err.Error())
			return
		}
		if any(f) == nil {
			return
		}
		path := f.URI().Path()
		f.Close()
		use(path)
	}
}

func (v *viewer) showHorizonSaveDialog(h *namedHorizon) {
	d := dialog.NewFileSave(chosenPath[fyne.URIWriteCloser](v, func(path string) { v.saveHorizon(h, path) }), v.win)
	d.SetFileName(strings.TrimSuffix(figureFileName(h.Name), ".png") + ".txt")
	d.SetFilter(storage.NewExtensionFileFilter([]string{".txt"}))
	d.Resize(fyne.NewSize(900, 600))
	d.Show()
}

func (v *viewer) showHorizonOpenDialog() {
	d := dialog.NewFileOpen(chosenPath[fyne.URIReadCloser](v, v.loadHorizon), v.win)
	d.SetFilter(storage.NewExtensionFileFilter([]string{".txt"}))
	d.Resize(fyne.NewSize(900, 600))
	d.Show()
}

// buildHorizonUI sets up the horizon editing of the window (called by
// buildUI once the section view exists) and returns the Horizons tab.
func (v *viewer) buildHorizonUI() fyne.CanvasObject {
	v.hzEdit.opts = defaultTrackOptions()
	v.hzEdit.marksVersion = -1
	v.hzEdit.progress = newProgressItem()
	s := v.ui.section
	s.onSeed = func(trace, sample float64) {
		if v.applyTrackSettings() {
			v.placeSeed(trace, sample)
		}
	}
	s.onErase = v.eraseBoxAt
	s.onShown = v.requestHorizonMarks
	v.hzEdit.panel = newHorizonPanel(v)
	v.horizons.onChange(v.hzEdit.panel.refresh)
	v.horizons.onChange(v.requestHorizonMarks)
	return v.hzEdit.panel.content
}

// resetHorizons drops the horizons of the survey shown before (a new
// survey has another grid) and stops their jobs.
func (v *viewer) resetHorizons() {
	for _, lane := range []string{laneHorizon, laneSeed, laneMarks, "horizon-file"} {
		v.jobs.cancel(lane)
	}
	v.setIdle(v.hzEdit.progress)
	v.hzEdit.running = nil
	v.horizons.clear()
	v.hzEdit.marksVersion = -1
	v.ui.section.setMarks(nil)
}
