package viewer

import (
	"fmt"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/widget"

	"quadtrace/app/export"
	"quadtrace/app/figure"
	"quadtrace/app/style"
	"quadtrace/app/version"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/render"
	"quadtrace/segy"
)

// Preference keys.
const (
	prefRecent       = "recentFiles"
	prefWidth        = "windowWidth"
	prefHeight       = "windowHeight"
	prefPalettes     = "paletteChoices"
	maxRecent        = 8
	defaultWinWidth  = 1440
	defaultWinHeight = 900
)

// mainMenu builds the window's menus.
func (v *viewer) mainMenu() *fyne.MainMenu {
	v.ui.recentMenu = fyne.NewMenuItem("Open recent", nil)
	v.rebuildRecentMenu()
	file := fyne.NewMenu("File",
		fyne.NewMenuItem("Open SEG-Y file…", v.showOpenDialog),
		v.ui.recentMenu,
		fyne.NewMenuItem("Open the demo survey", v.openDemo),
		fyne.NewMenuItemSeparator(),
		fyne.NewMenuItem("Save figure…", v.showFigureDialog),
		fyne.NewMenuItem("Export attribute volume…", v.showExportDialog),
	)
	view := fyne.NewMenu("View",
		fyne.NewMenuItem("Next line", func() { v.stepLine(1) }),
		fyne.NewMenuItem("Previous line", func() { v.stepLine(-1) }),
		fyne.NewMenuItem("Ten lines forward", func() { v.stepLine(10) }),
		fyne.NewMenuItem("Ten lines back", func() { v.stepLine(-10) }),
		fyne.NewMenuItemSeparator(),
		fyne.NewMenuItem("Zoom in", func() { v.zoomCentre(1.5) }),
		fyne.NewMenuItem("Zoom out", func() { v.zoomCentre(1 / 1.5) }),
		fyne.NewMenuItem("Whole section", v.fitView),
	)
	help := fyne.NewMenu("Help",
		fyne.NewMenuItem("Keys and mouse", func() {
			l := widget.NewLabel(keyHelp)
			l.TextStyle.Monospace = true
			dialog.ShowCustom("Keys and mouse", "Close", l, v.win)
		}),
		fyne.NewMenuItem("About quadtrace", v.showAbout),
	)
	return fyne.NewMainMenu(file, view, help)
}

// --- opening files ---

func (v *viewer) showOpenDialog() {
	d := dialog.NewFileOpen(func(r fyne.URIReadCloser, err error) {
		if err != nil {
			v.showError(err.Error())
			return
		}
		if r == nil {
			return
		}
		path := r.URI().Path()
		r.Close()
		v.openFile(path)
	}, v.win)
	d.SetFilter(storage.NewExtensionFileFilter([]string{".sgy", ".segy", ".SGY", ".SEGY"}))
	d.Resize(fyne.NewSize(900, 600))
	// Start where the last file came from.
	if recent := v.recentFiles(); len(recent) > 0 {
		if l, err := storage.ListerForURI(storage.NewFileURI(filepath.Dir(recent[0]))); err == nil {
			d.SetLocation(l)
		}
	}
	d.Show()
}

// dropped opens the first SEG-Y file dropped on the window.
func (v *viewer) dropped(_ fyne.Position, uris []fyne.URI) {
	for _, u := range uris {
		if isSegyName(u.Path()) {
			v.openFile(u.Path())
			return
		}
	}
	v.showStatus("Drop a .sgy or .segy file to open it")
}

func isSegyName(p string) bool {
	switch strings.ToLower(filepath.Ext(p)) {
	case ".sgy", ".segy":
		return true
	}
	return false
}

// recentFiles is the list of recently opened files, newest first.
func (v *viewer) recentFiles() []string {
	return v.app.Preferences().StringList(prefRecent)
}

// addRecent puts path at the head of the recent files.
func (v *viewer) addRecent(path string) {
	if abs, err := filepath.Abs(path); err == nil {
		path = abs
	}
	list := []string{path}
	for _, p := range v.recentFiles() {
		if p != path && len(list) < maxRecent {
			list = append(list, p)
		}
	}
	v.app.Preferences().SetStringList(prefRecent, list)
	v.rebuildRecentMenu()
}

func (v *viewer) rebuildRecentMenu() {
	item := v.ui.recentMenu
	if item == nil {
		return
	}
	var items []*fyne.MenuItem
	for _, p := range v.recentFiles() {
		p := p
		items = append(items, fyne.NewMenuItem(p, func() { v.openFile(p) }))
	}
	if len(items) == 0 {
		items = append(items, fyne.NewMenuItem("(none yet)", nil))
		items[0].Disabled = true
	}
	item.ChildMenu = fyne.NewMenu("", items...)
	if mm := v.win.MainMenu(); mm != nil {
		mm.Refresh()
	}
}

// rescan opens the current file again with the byte locations and byte
// order typed in the survey tab.
func (v *viewer) rescan() {
	if v.vol == nil || v.vol.Path() == "" {
		v.showStatus("The demo survey has no file to read again")
		return
	}
	opt := v.segyOpt
	vals := map[string]*int{"inline": &opt.InlineByte, "crossline": &opt.CrosslineByte, "offset": &opt.OffsetByte, "cdpx": &opt.CDPXByte, "cdpy": &opt.CDPYByte}
	for name, e := range v.ui.byteEntries {
		s := strings.TrimSpace(e.Text)
		if s == "" {
			*vals[name] = 0
			continue
		}
		n, err := strconv.Atoi(s)
		if err != nil || n < 1 || n > 237 {
			v.showError(fmt.Sprintf("%s byte: %q is not a trace header byte (1 to 237)", name, s))
			return
		}
		*vals[name] = n
	}
	switch v.ui.byteOrder.Selected {
	case "big", "little":
		opt.ByteOrder = v.ui.byteOrder.Selected
	default:
		opt.ByteOrder = ""
	}
	v.segyOpt = opt
	v.openFile(v.vol.Path())
}

// showTextHeader shows the textual headers in a monospaced box.
func (v *viewer) showTextHeader() {
	if v.vol == nil {
		return
	}
	text := strings.Join(v.info.TextHeaders, "\n\n")
	if strings.TrimSpace(text) == "" {
		text = "(the textual header is empty)"
	}
	l := widget.NewLabel(text)
	l.TextStyle.Monospace = true
	s := container.NewScroll(l)
	s.SetMinSize(fyne.NewSize(720, 520))
	dialog.ShowCustom("Textual header of "+filepath.Base(v.vol.Name()), "Close", s, v.win)
}

// showError shows a message box.
func (v *viewer) showError(msg string) {
	v.showStatus(msg)
	if v.opt.Snapshot != "" {
		return
	}
	dialog.ShowError(fmt.Errorf("%s", msg), v.win)
}

// --- About ---

// aboutText is the About box, with the cautions every user should read.
const aboutText = `quadtrace %s — complex-trace attributes for SEG-Y volumes.

Attributes help you look at seismic data; they are not answers. Noise,
processing, tuning and the parameters you choose can all make patterns that
are not geology.

Before anything is decided on drilling, drilling hazards or reserves, have the
work checked by qualified people, tied to well control, and handled under the
rules that apply where you work.

The demo survey and every place named in it are invented.`

func (v *viewer) showAbout() {
	l := widget.NewLabel(fmt.Sprintf(aboutText, version.Version))
	l.Wrapping = fyne.TextWrapOff
	dialog.ShowCustom("About quadtrace", "Close", l, v.win)
}

// --- window size and palette choices ---

func (v *viewer) restoreWindowSize() {
	p := v.app.Preferences()
	w := p.FloatWithFallback(prefWidth, defaultWinWidth)
	h := p.FloatWithFallback(prefHeight, defaultWinHeight)
	v.win.Resize(fyne.NewSize(float32(max(w, 800)), float32(max(h, 560))))
}

func (v *viewer) saveWindowSize() {
	if v.opt.Snapshot != "" {
		return // a snapshot run leaves the user's window size alone
	}
	s := v.win.Canvas().Size()
	if s.Width > 0 && s.Height > 0 {
		v.app.Preferences().SetFloat(prefWidth, float64(s.Width))
		v.app.Preferences().SetFloat(prefHeight, float64(s.Height))
	}
}

// loadPalettePrefs restores the palette chosen for each attribute and role.
func (v *viewer) loadPalettePrefs() {
	if v.state.Palettes == nil {
		v.state.Palettes = map[string]string{}
	}
	for _, kv := range v.app.Preferences().StringList(prefPalettes) {
		if k, val, ok := strings.Cut(kv, "="); ok {
			v.state.Palettes[k] = val
		}
	}
}

func (v *viewer) savePalettePrefs() {
	var list []string
	for k, val := range v.state.Palettes {
		list = append(list, k+"="+val)
	}
	v.app.Preferences().SetStringList(prefPalettes, list)
}

// --- figures ---

// showFigureDialog asks for the figure's size, resolution and title, then
// for the file, and writes the PNG in the background.
func (v *viewer) showFigureDialog() {
	if v.data.amp == nil {
		v.showStatus("Nothing to save yet")
		return
	}
	width := widget.NewEntry()
	width.SetText("2400")
	height := widget.NewEntry()
	height.SetText("1500")
	dpi := widget.NewEntry()
	dpi.SetText("300")
	title := widget.NewEntry()
	title.SetText(v.figureTitle())
	items := []*widget.FormItem{
		widget.NewFormItem("Title", title),
		widget.NewFormItem("Width (pixels)", width),
		widget.NewFormItem("Height (pixels)", height),
		widget.NewFormItem("Resolution (dpi)", dpi),
	}
	dialog.ShowForm("Save figure", "Choose file…", "Cancel", items, func(ok bool) {
		if !ok {
			return
		}
		w, err1 := strconv.Atoi(strings.TrimSpace(width.Text))
		h, err2 := strconv.Atoi(strings.TrimSpace(height.Text))
		d, err3 := strconv.ParseFloat(strings.TrimSpace(dpi.Text), 64)
		if err1 != nil || err2 != nil || err3 != nil || w < 200 || h < 150 || w > 20000 || h > 20000 || !(d > 0) {
			v.showError("figure: width and height must be 200 to 20000 pixels and the resolution a positive number")
			return
		}
		save := dialog.NewFileSave(func(wc fyne.URIWriteCloser, err error) {
			if err != nil {
				v.showError(err.Error())
				return
			}
			if wc == nil {
				return
			}
			path := wc.URI().Path()
			wc.Close()
			v.saveFigure(path, title.Text, w, h, d)
		}, v.win)
		save.SetFileName(strings.ReplaceAll(strings.ToLower(v.figureTitle()), " ", "-") + ".png")
		save.SetFilter(storage.NewExtensionFileFilter([]string{".png"}))
		save.Resize(fyne.NewSize(900, 600))
		save.Show()
	}, v.win)
}

func (v *viewer) figureTitle() string {
	pl := v.state.plan()
	t := v.state.title(v.info) + ": "
	if pl.Overlay != nil {
		return t + pl.Overlay.Name + " over " + strings.ToLower(pl.Base.Name)
	}
	return t + pl.Base.Name
}

// figureFor builds the report figure of the current view.
func (v *viewer) figureFor(title string, w, h int) (render.Figure, error) {
	d := v.data
	if d.amp == nil || d.base == nil {
		return render.Figure{}, fmt.Errorf("no section is shown")
	}
	st := v.state
	pl := st.plan()
	basePal := st.paletteFor(pl.Base, false)
	f := render.Figure{Title: title, Width: w, Height: h}
	f.Base = style.Layer(pl.Base, d.base.Traces, basePal, st.ClipPercent)
	f.Legends = []render.Legend{style.LegendFor(pl.Base, f.Base)}
	if pl.Overlay != nil && d.over != nil {
		ov := style.Overlay(pl.Overlay, d.over.Traces, st.paletteFor(pl.Overlay, true), st.ClipPercent, st.Opacity, st.OpacityFollowsValue)
		f.Overlay = &ov
		f.Legends = []render.Legend{f.Legends[0], style.LegendFor(pl.Overlay, ov)}
	}
	amp := d.amp
	if amp.Slice.Orientation == volume.TimeSlice {
		f.MapAspect = amp.MapAspect
		if !(f.MapAspect > 0) {
			f.MapAspect = 1
		}
		f.Horizontal = render.Axis{Title: "Crossline", First: float64(amp.Keys[0]), Last: float64(amp.Keys[len(amp.Keys)-1])}
		f.Vertical = render.Axis{Title: "Inline", First: float64(amp.InlineKeys[0]), Last: float64(amp.InlineKeys[len(amp.InlineKeys)-1])}
		f.Scale = render.ScaleBar{MetresPerTrace: v.info.InlineSpacingM}
		return f, nil
	}
	n, m := len(amp.Traces), len(amp.Traces[0])
	vp := st.viewport(n, m)
	f.View = vp
	i0, i1 := int(vp.Trace0), min(int(vp.Trace1+0.999)-1, n-1)
	hTitle := "Crossline"
	if amp.Slice.Orientation == volume.Crossline {
		hTitle = "Inline"
	}
	// Axis values are at the centres of the first and last trace (sample)
	// in view.
	f.Horizontal = render.Axis{Title: hTitle, First: float64(amp.Keys[i0]), Last: float64(amp.Keys[max(i1, i0)])}
	s0, s1 := int(vp.Sample0), min(int(vp.Sample1+0.999)-1, m-1)
	f.Vertical = render.Axis{Title: "Time (ms)", First: (amp.T0 + float64(s0)*amp.DT) * 1000, Last: (amp.T0 + float64(max(s1, s0))*amp.DT) * 1000}
	if st.Wiggle {
		f.Wiggle = &render.WiggleStyle{Fill: true, Gain: 1}
		if d.base != d.amp {
			f.Wiggle.Data = amp.Traces
		}
	}
	f.Scale = render.ScaleBar{MetresPerTrace: amp.MetresPerTrace}
	return f, nil
}

// saveFigure draws and writes the figure in the background.
func (v *viewer) saveFigure(path, title string, w, h int, dpi float64) {
	f, err := v.figureFor(title, w, h)
	if err != nil {
		v.showError(err.Error())
		return
	}
	if filepath.Ext(path) == "" {
		path += ".png"
	}
	v.setBusy(v.ui.work, "Saving figure", 0, 0, func() { v.jobs.cancel("figure") })
	v.jobs.start("figure", func(j *job) {
		err := writeFigure(f, path, dpi)
		v.onUI(j, func() {
			v.setIdle(v.ui.work)
			if err != nil {
				v.showError(err.Error())
				return
			}
			v.showStatus("Saved " + path)
		})
	})
}

// writeFigure draws f and writes it through figure.Write (format from the
// extension, path replaced only when the whole file is written).
func writeFigure(f render.Figure, path string, dpi float64) error {
	img, err := f.Draw()
	if err != nil {
		return fmt.Errorf("figure: %w", err)
	}
	return figure.Write(path, img, dpi)
}

// --- export ---

// showExportDialog lets the user pick attributes, format and folder for a
// whole-volume export, which then runs in the background with progress and
// a cancel button in the status bar; the window stays usable.
func (v *viewer) showExportDialog() {
	if v.vol == nil {
		return
	}
	// The demo survey has no file: its exports default to the home folder
	// and are named after the survey.
	source, stem := v.vol.Path(), strings.TrimSuffix(filepath.Base(v.vol.Path()), filepath.Ext(v.vol.Path()))
	dir := filepath.Dir(source)
	if source == "" {
		stem = demoStem(v.info)
		if dir, _ = os.UserHomeDir(); dir == "" {
			dir = os.TempDir()
		}
	}
	var names []string
	byName := map[string]*compute.Attribute{}
	for _, a := range compute.Attributes() {
		names = append(names, a.Name)
		byName[a.Name] = a
	}
	pick := widget.NewCheckGroup(names, nil)
	pick.SetSelected([]string{lookup(v.state.AttributeID).Name})
	format := widget.NewRadioGroup([]string{"IEEE float", "IBM float"}, nil)
	format.Horizontal = true
	format.SetSelected("IEEE float")
	folder := widget.NewEntry()
	folder.SetText(dir)
	browse := widget.NewButton("Choose…", func() {
		d := dialog.NewFolderOpen(func(u fyne.ListableURI, err error) {
			if err == nil && u != nil {
				folder.SetText(u.Path())
			}
		}, v.win)
		d.Resize(fyne.NewSize(900, 600))
		d.Show()
	})
	note := widget.NewLabel("Files are named after the input and the attribute; the current parameters and conditioning are used.")
	note.Wrapping = fyne.TextWrapWord
	scroll := container.NewVScroll(pick)
	scroll.SetMinSize(fyne.NewSize(460, 260))
	body := container.NewVBox(
		widget.NewLabel("Attributes"), scroll,
		container.New(layout.NewFormLayout(), widget.NewLabel("Samples"), format, widget.NewLabel("Folder"), container.NewBorder(nil, nil, nil, browse, folder)),
		note)
	dialog.ShowCustomConfirm("Export attribute volumes", "Export", "Cancel", body, func(ok bool) {
		if !ok {
			return
		}
		var ids []string
		params := map[string]string{}
		for _, n := range pick.Selected {
			a := byName[n]
			ids = append(ids, a.ID)
			for k, val := range v.state.Params[a.ID] {
				params[k] = val
			}
		}
		if len(ids) == 0 {
			v.showError("export: choose at least one attribute")
			return
		}
		out := folder.Text
		if len(ids) == 1 {
			out = filepath.Join(folder.Text, stem+"-"+ids[0]+".sgy")
		}
		job := export.Job{Input: source, SegyOptions: v.segyOpt, Attributes: ids, Params: params, Conditioning: v.state.Cond, Output: out, Format: 5}
		if format.Selected == "IBM float" {
			job.Format = 1
		}
		if source == "" {
			v.runDemoExport(job, folder.Text, stem)
			return
		}
		v.runExport(job)
	}, v.win)
}

// runExport runs an export job in its own lane.
func (v *viewer) runExport(ej export.Job) {
	cancel := func() { v.jobs.cancel("export") }
	v.setBusy(v.ui.export, "Exporting", 0, 0, cancel)
	v.jobs.start("export", func(j *job) {
		var thr progressThrottle
		paths, err := export.Run(j.ctx, ej, func(p export.Progress) {
			if thr.due(p.Done, p.Total) {
				v.onUI(j, func() { v.setBusy(v.ui.export, "Exporting", p.Done, p.Total, cancel) })
			}
		})
		v.finishExport(j, paths, err)
	})
}

// finishExport reports an export job's end on the UI goroutine.
func (v *viewer) finishExport(j *job, paths []string, err error) {
	cancelled := j.ctx.Err() != nil
	v.jobs.do(func() {
		v.setIdle(v.ui.export)
		switch {
		case cancelled:
			v.showStatus("Export cancelled; nothing was written")
		case err != nil:
			v.showError("export: " + err.Error())
		default:
			v.showStatus("Exported " + strings.Join(paths, ", "))
		}
	})
}

// demoStem names the demo survey's exports: its name in lower case with
// dashes, "corrowdeep-3d" for "Corrowdeep 3D (demo survey)".
func demoStem(info segy.Info) string {
	name := "demo-survey"
	if len(info.TextHeaders) > 0 {
		if first, _, _ := strings.Cut(info.TextHeaders[0], ","); first != "" {
			name = first
		}
	}
	return strings.Join(strings.Fields(strings.ToLower(name)), "-")
}

// runDemoExport exports from the in-memory demo survey: the job first
// writes the survey as a temporary SEG-Y file in a hidden folder inside the
// destination folder (the export job reads files), exports from it as from
// any file, and removes it whatever happens. Outputs are named after stem.
func (v *viewer) runDemoExport(ej export.Job, folder, stem string) {
	vol := v.vol
	cancel := func() { v.jobs.cancel("export") }
	v.setBusy(v.ui.export, "Writing the demo survey", 0, 0, cancel)
	v.jobs.start("export", func(j *job) {
		// A hidden folder of its own holds stem.sgy, so that the export
		// names its outputs stem-ID.sgy and records stem.sgy as the source.
		tmpDir, err := os.MkdirTemp(folder, ".quadtrace-demo-*")
		input := filepath.Join(tmpDir, stem+".sgy")
		if err == nil {
			defer os.RemoveAll(tmpDir)
			err = vol.WriteDemo(j.ctx, input, segy.WriteOptions{Format: 5})
		}
		var paths []string
		if err == nil {
			ej.Input = input
			var thr progressThrottle
			paths, err = export.Run(j.ctx, ej, func(p export.Progress) {
				if thr.due(p.Done, p.Total) {
					v.onUI(j, func() { v.setBusy(v.ui.export, "Exporting", p.Done, p.Total, cancel) })
				}
			})
		}
		v.finishExport(j, paths, err)
	})
}
