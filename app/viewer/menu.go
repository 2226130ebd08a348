package viewer

import (
	"fmt"
	"quadtrace/app/version"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/widget"
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
		fyne.NewMenuItem("Map a horizon file…", v.showHorizonFileDialog),
		fyne.NewMenuItem("Export attribute volume…", v.showExportDialog),
	)
	var items []*fyne.MenuItem
	for _, c := range v.viewCommands() {
		if c.name == "" {
			items = append(items, fyne.NewMenuItemSeparator())
			continue
		}
		it := fyne.NewMenuItem(c.name, c.do)
		it.Shortcut = c.shortcut
		items = append(items, it)
	}
	view := fyne.NewMenu("View", items...)
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

// showError shows a message box.
func (v *viewer) showError(msg string) {
	v.showStatus(msg)
	if v.opt.Snapshot != "" {
		return
	}
	dialog.ShowError(fmt.Errorf("%s", msg), v.win)
}
