package viewer

import (
	"fmt"
	"path/filepath"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/widget"
)

// Preference keys.
const (
	prefRecent       = "recentFiles"
	prefWidth        = "windowWidth"
	prefHeight       = "windowHeight"
	prefPalettes     = "paletteChoices"
	prefFigureFolder = "figureFolder"
	maxRecent        = 8
	// the first window fits a 1366 x 768 laptop screen (with a title bar
	// and a panel), as its minimum does (TestWindowFitsLaptopScreen)
	defaultWinWidth  = 1280
	defaultWinHeight = 720
)

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
