package viewer

import (
	"path/filepath"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"
)

// widgets are the window's parts: the section, trace panel, spectrum and
// legends, and the panels that own the controls (their fields are promoted,
// so v.ui.title is the navigation bar's title).
type widgets struct {
	section  *sectionView
	trace    *plotView
	spectrum *plotView
	legends  *legendStrip

	*navigationBar
	*attributePanel
	*displayPanel
	*surveyPanel
	*statusBar

	recentMenu *fyne.MenuItem

	// workArea holds the workspace, or the workspace and the map view
	// side by side (mappanel.go); mapPanel is nil until a map is shown.
	workArea  *fyne.Container
	workspace fyne.CanvasObject
	mapPanel  *mapPanel
}

// buildUI makes the window's content, menus and keys.
func (v *viewer) buildUI() {
	u := &widgets{}
	v.ui = u
	u.section = newSectionView()
	u.section.onHover = v.hover
	u.section.onPick = v.pickAt
	u.section.onZoom = v.zoomAt
	u.section.onPan = v.panBy
	u.section.onResize = v.requestRender
	u.section.onKey = v.typedKey
	u.trace = newPlotView(plotTop, plotBottom, 4, 4, fyne.NewSize(200, 200))
	u.trace.onResize = v.requestTrace
	u.spectrum = newPlotView(34, 20, 30, 10, fyne.NewSize(200, 120))
	u.spectrum.onResize = v.requestTrace
	u.legends = newLegendStrip()
	u.statusBar = newStatusBar()
	u.navigationBar = newNavigationBar(v)
	u.attributePanel = newAttributePanel(v)
	u.displayPanel = newDisplayPanel(v)
	u.surveyPanel = newSurveyPanel(v)
	horizonsTab := v.buildHorizonUI()
	u.statusBar.addProgress(v.hzEdit.progress)

	workspace := container.New(&workspaceLayout{traceWidth: 300, stripHeight: 150},
		u.section, u.trace, u.legends.content, u.spectrum)
	u.workspace = workspace
	u.workArea = container.NewStack(workspace)
	main := container.NewBorder(u.navigationBar.content, nil, nil, nil, u.workArea)
	tabs := container.NewAppTabs(
		container.NewTabItem("Attribute", u.attributePanel.content),
		container.NewTabItem("Display", u.displayPanel.content),
		container.NewTabItem("Survey", u.surveyPanel.content),
		container.NewTabItem("Horizons", horizonsTab),
	)
	split := container.NewHSplit(tabs, main)
	split.Offset = 0.24
	v.win.SetContent(container.NewBorder(nil, container.NewVBox(widget.NewSeparator(), u.statusBar.content), nil, nil, split))
	v.win.SetMainMenu(v.mainMenu())
	v.win.SetOnDropped(v.dropped)
	v.bindKeys()
	v.win.SetCloseIntercept(func() {
		v.saveWindowSize()
		v.win.Close()
	})
	// File > Quit ends the app without closing the window first.
	v.app.Lifecycle().SetOnStopped(v.saveWindowSize)
}

// workspaceLayout places the section with the trace panel to its right at
// the same height (so they share the time axis), the legends under the
// section and the spectrum under the trace panel.
type workspaceLayout struct{ traceWidth, stripHeight float32 }

func (l *workspaceLayout) Layout(objs []fyne.CanvasObject, size fyne.Size) {
	if len(objs) < 4 {
		return
	}
	tw := min(l.traceWidth, size.Width*0.4)
	sh := min(l.stripHeight, size.Height*0.35)
	objs[0].Move(fyne.NewPos(0, 0))
	objs[0].Resize(fyne.NewSize(size.Width-tw, size.Height-sh))
	objs[1].Move(fyne.NewPos(size.Width-tw, 0))
	objs[1].Resize(fyne.NewSize(tw, size.Height-sh))
	objs[2].Move(fyne.NewPos(0, size.Height-sh))
	objs[2].Resize(fyne.NewSize(size.Width-tw, sh))
	objs[3].Move(fyne.NewPos(size.Width-tw, size.Height-sh))
	objs[3].Resize(fyne.NewSize(tw, sh))
}

func (l *workspaceLayout) MinSize(objs []fyne.CanvasObject) fyne.Size {
	return fyne.NewSize(600, 420)
}

// refreshControls sets every panel's controls from the state.
func (v *viewer) refreshControls() {
	v.ui.attributePanel.refresh(&v.state)
	v.ui.displayPanel.refresh(&v.state)
	v.refreshNavigation()
}

// refreshNavigation sets the navigation bar and the window title from the
// state.
func (v *viewer) refreshNavigation() {
	v.ui.navigationBar.refresh(&v.state, v.info)
	v.refreshTitle()
	v.ui.mapPanel.refreshMarks() // the section's place on the map
}

// refreshTitle names the survey and the view in the window's title.
func (v *viewer) refreshTitle() {
	if v.vol == nil {
		v.win.SetTitle("quadtrace")
		return
	}
	v.win.SetTitle(filepath.Base(v.vol.Name()) + " — " + viewTitle(&v.state, v.info) + " — quadtrace")
}
