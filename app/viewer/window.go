package viewer

import (
	"fmt"
	"quadtrace/app/volume"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/widget"
)

// widgets are the window's controls.
type widgets struct {
	section  *sectionView
	trace    *plotView
	spectrum *plotView
	legends  *fyne.Container

	// navigation
	orientation *widget.RadioGroup
	lineSlider  *widget.Slider
	lineEntry   *widget.Entry
	lineRange   *widget.Label
	title       *widget.Label

	// survey tab
	surveyName  *widget.Label
	surveyFacts *fyne.Container
	offsetRow   *fyne.Container
	offsetPick  *widget.Select
	byteEntries map[string]*widget.Entry
	byteOrder   *widget.Select
	headerCard  *widget.Card

	// attribute tab
	attrTree    *widget.Tree
	attrName    *widget.Label
	attrAbout   *widget.Label
	paramBox    *fyne.Container
	condEntries [3]*widget.Entry

	// display tab
	palettePick     *widget.Select
	basePalettePick *widget.Select
	clipSlider      *widget.Slider
	clipLabel       *widget.Label
	wiggleCheck     *widget.Check
	coRenderCheck   *widget.Check
	baseChoice      *widget.Select
	opacitySlider   *widget.Slider
	opacityLabel    *widget.Label
	followCheck     *widget.Check
	stretchSlider   *widget.Slider
	followCursor    *widget.Check
	oneClick        *widget.Button

	// status bar
	cursor  *widget.Label
	message *widget.Label
	work    *progressItem
	export  *progressItem

	recentMenu *fyne.MenuItem
	refreshing bool // set while controls are being updated from the state
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
	u.spectrum = newPlotView(34, 20, 10, 10, fyne.NewSize(200, 120))
	u.spectrum.onResize = v.requestTrace
	u.legends = container.NewVBox()
	u.cursor = widget.NewLabel(cursorHint)
	u.cursor.TextStyle.Monospace = true
	u.message = widget.NewLabel("")
	u.message.Truncation = fyne.TextTruncateEllipsis
	u.work = newProgressItem()
	u.export = newProgressItem()

	workspace := container.New(&workspaceLayout{traceWidth: 300, stripHeight: 150},
		u.section, u.trace, container.NewPadded(u.legends), u.spectrum)
	main := container.NewBorder(v.navigationBar(), nil, nil, nil, workspace)

	tabs := container.NewAppTabs(
		container.NewTabItem("Attribute", v.attributeTab()),
		container.NewTabItem("Display", v.displayTab()),
		container.NewTabItem("Survey", v.surveyTab()),
	)
	status := container.NewBorder(nil, nil, u.cursor, container.NewHBox(u.export.box, u.work.box), u.message)
	split := container.NewHSplit(tabs, main)
	split.Offset = 0.24
	v.win.SetContent(container.NewBorder(nil, container.NewVBox(widget.NewSeparator(), status), nil, nil, split))
	v.win.SetMainMenu(v.mainMenu())
	v.win.SetOnDropped(v.dropped)
	v.win.Canvas().SetOnTypedKey(v.typedKey)
	v.win.Canvas().AddShortcut(&desktop.CustomShortcut{KeyName: fyne.KeyO, Modifier: fyne.KeyModifierShortcutDefault}, func(fyne.Shortcut) { v.showOpenDialog() })
	v.win.Canvas().AddShortcut(&desktop.CustomShortcut{KeyName: fyne.KeyS, Modifier: fyne.KeyModifierShortcutDefault}, func(fyne.Shortcut) { v.showFigureDialog() })
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

// refreshControls sets every control from the state and the survey.
func (v *viewer) refreshControls() {
	u := v.ui
	u.refreshing = true
	defer func() { u.refreshing = false }()
	st := &v.state
	pl := st.plan()
	// Attribute tab.
	attr := lookup(st.AttributeID)
	u.attrTree.Select("attr:" + attr.ID)
	u.attrName.SetText(attr.Name + unitSuffix(attr.Unit))
	u.attrAbout.SetText(attr.Description + "\nSource: " + attr.Source)
	v.buildParamControls(attr)
	// Display tab.
	if pl.Overlay != nil {
		u.palettePick.SetSelected(paletteLabel(st.paletteFor(pl.Overlay, true)))
		u.basePalettePick.SetSelected(paletteLabel(st.paletteFor(pl.Base, false)))
		u.basePalettePick.Enable()
	} else {
		u.palettePick.SetSelected(paletteLabel(st.paletteFor(pl.Base, false)))
		u.basePalettePick.ClearSelected()
		u.basePalettePick.Disable()
	}
	u.clipSlider.SetValue(st.ClipPercent)
	u.clipLabel.SetText(fmt.Sprintf("Clip at %.1f %%", st.ClipPercent))
	u.wiggleCheck.SetChecked(st.Wiggle)
	u.coRenderCheck.SetChecked(st.CoRender)
	u.baseChoice.SetSelected(lookup(st.BaseID).Name)
	u.opacitySlider.SetValue(st.Opacity)
	u.followCheck.SetChecked(st.OpacityFollowsValue)
	if st.CoRender && attr.ID != amplitudeID {
		u.baseChoice.Enable()
		u.opacitySlider.Enable()
		u.followCheck.Enable()
	} else {
		u.baseChoice.Disable()
		u.opacitySlider.Disable()
		u.followCheck.Disable()
	}
	u.stretchSlider.SetValue(st.Exaggeration)
	u.opacityLabel.SetText(fmt.Sprintf("Opacity %.0f %%", st.Opacity*100))
	if st.Orientation == volume.TimeSlice {
		u.stretchSlider.Disable() // a map keeps its true shape
	} else {
		u.stretchSlider.Enable()
	}
	u.followCursor.SetChecked(st.FollowCursor)
	v.refreshSurvey()
	v.refreshNavigation()
}
