package viewer

import (
	"fmt"
	"image"

	"math"

	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/palettes"
	"quadtrace/render"
	"quadtrace/segy"
)

// Orientation choices as the selector shows them.
var orientationNames = []string{"Inline", "Crossline", "Time slice"}

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

// navigationBar holds the orientation selector, line stepping and zoom.
func (v *viewer) navigationBar() fyne.CanvasObject {
	u := v.ui
	u.orientation = widget.NewRadioGroup(orientationNames, func(s string) {
		if u.refreshing {
			return
		}
		for i, n := range orientationNames {
			if n == s {
				v.setOrientation(volume.Orientation(i))
			}
		}
	})
	u.orientation.Horizontal = true
	u.orientation.Required = true
	u.lineSlider = widget.NewSlider(0, 1)
	u.lineSlider.OnChanged = func(f float64) {
		// While dragging, the entry previews the line; it is read at the end.
		switch {
		case u.refreshing:
		case v.state.Orientation == volume.TimeSlice:
			u.lineEntry.SetText(formatMS(v.info.StartMS + math.Round(f)*float64(v.info.IntervalUS)/1000))
		default:
			u.lineEntry.SetText(fmt.Sprint(int(math.Round(f))))
		}
	}
	u.lineSlider.OnChangeEnded = func(f float64) {
		if !u.refreshing {
			v.goToLine(int(math.Round(f)))
			u.section.focus()
		}
	}
	u.lineEntry = widget.NewEntry()
	u.lineEntry.OnSubmitted = func(s string) {
		n, err := strconv.Atoi(strings.TrimSpace(s))
		if err != nil {
			v.showStatus(fmt.Sprintf("%q is not a line number", s))
			v.refreshNavigation()
			return
		}
		if v.state.Orientation == volume.TimeSlice {
			n = v.sampleOfMS(float64(n))
		}
		v.goToLine(n)
	}
	u.offsetPick = widget.NewSelect(nil, func(s string) {
		if u.refreshing {
			return
		}
		if n, err := strconv.Atoi(s); err == nil {
			v.state.Offset = n
			v.refreshNavigation()
			v.requestData()
		}
	})
	u.offsetRow = container.NewHBox(widget.NewSeparator(), widget.NewLabel("Offset"), u.offsetPick)
	u.offsetRow.Hide()
	u.lineRange = widget.NewLabel("")
	u.title = widget.NewLabel("")
	u.title.TextStyle.Bold = true
	btn := func(icon fyne.Resource, tip string, f func()) *widget.Button {
		b := widget.NewButtonWithIcon("", icon, f)
		b.Importance = widget.LowImportance
		return b
	}
	back10 := btn(theme.MediaFastRewindIcon(), "back ten", func() { v.stepLine(-10) })
	back := btn(theme.NavigateBackIcon(), "previous", func() { v.stepLine(-1) })
	next := btn(theme.NavigateNextIcon(), "next", func() { v.stepLine(1) })
	next10 := btn(theme.MediaFastForwardIcon(), "forward ten", func() { v.stepLine(10) })
	zoomIn := btn(theme.ZoomInIcon(), "zoom in", func() { v.zoomCentre(1.5) })
	zoomOut := btn(theme.ZoomOutIcon(), "zoom out", func() { v.zoomCentre(1 / 1.5) })
	fit := btn(theme.ZoomFitIcon(), "whole section", v.fitView)
	entry := container.NewGridWrap(fyne.NewSize(90, u.lineEntry.MinSize().Height), u.lineEntry)
	left := container.NewHBox(u.orientation, widget.NewSeparator(), back10, back)
	right := container.NewHBox(next, next10, entry, u.lineRange, u.offsetRow, widget.NewSeparator(), zoomOut, zoomIn, fit)
	row1 := container.NewBorder(nil, nil, left, right, u.lineSlider)
	return container.NewVBox(row1, u.title)
}

// --- side panel tabs ---

func (v *viewer) surveyTab() fyne.CanvasObject {
	u := v.ui
	u.surveyName = widget.NewLabel("")
	u.surveyName.TextStyle.Bold = true
	u.surveyName.Wrapping = fyne.TextWrapBreak
	u.surveyFacts = container.New(layout.NewFormLayout())
	headerBtn := widget.NewButtonWithIcon("Textual header…", theme.DocumentIcon(), v.showTextHeader)
	u.byteEntries = map[string]*widget.Entry{}
	form := container.New(layout.NewFormLayout())
	for _, f := range byteFields {
		e := widget.NewEntry()
		e.SetPlaceHolder(fmt.Sprint(f.def))
		u.byteEntries[f.name] = e
		form.Add(widget.NewLabel(f.label))
		form.Add(e)
	}
	u.byteOrder = widget.NewSelect([]string{"detect", "big", "little"}, nil)
	u.byteOrder.SetSelected("detect")
	form.Add(widget.NewLabel("Byte order"))
	form.Add(u.byteOrder)
	rescan := widget.NewButtonWithIcon("Read the file again with these", theme.ViewRefreshIcon(), v.rescan)
	u.headerCard = widget.NewCard("", "Trace header byte locations", container.NewVBox(form, rescan))
	headers := u.headerCard
	return container.NewVScroll(container.NewVBox(u.surveyName, u.surveyFacts, headerBtn, headers))
}

// byteFields are the trace header fields whose byte location can be set.
var byteFields = []struct {
	name, label string
	def         int
}{
	{"inline", "Inline byte", 189},
	{"crossline", "Crossline byte", 193},
	{"offset", "Offset byte", 37},
	{"cdpx", "CDP X byte", 181},
	{"cdpy", "CDP Y byte", 185},
}

func (v *viewer) attributeTab() fyne.CanvasObject {
	u := v.ui
	groups, byGroup := attributeGroups()
	u.attrTree = widget.NewTree(
		func(id widget.TreeNodeID) []widget.TreeNodeID {
			if id == "" {
				return groups
			}
			return byGroup[id]
		},
		func(id widget.TreeNodeID) bool { return id == "" || byGroup[id] != nil },
		func(branch bool) fyne.CanvasObject { return widget.NewLabel("Instantaneous bandwidth xx") },
		func(id widget.TreeNodeID, branch bool, o fyne.CanvasObject) {
			l := o.(*widget.Label)
			if branch {
				l.SetText(groupTitle(id))
				l.TextStyle.Bold = true
			} else {
				a := lookup(strings.TrimPrefix(id, "attr:"))
				l.SetText(a.Name)
				l.TextStyle.Bold = false
			}
			l.Refresh()
		})
	for _, g := range groups {
		u.attrTree.OpenBranch(g)
	}
	u.attrTree.OnSelected = func(id widget.TreeNodeID) {
		if u.refreshing || !strings.HasPrefix(id, "attr:") {
			return
		}
		v.setAttribute(strings.TrimPrefix(id, "attr:"))
	}
	u.attrName = widget.NewLabel("")
	u.attrName.TextStyle.Bold = true
	u.attrAbout = widget.NewLabel("")
	u.attrAbout.Wrapping = fyne.TextWrapWord
	u.paramBox = container.NewVBox()
	condForm := container.New(layout.NewFormLayout())
	for i, name := range []string{"Low cut (Hz)", "High cut (Hz)", "AGC window (ms)"} {
		e := widget.NewEntry()
		e.SetPlaceHolder("off")
		e.OnSubmitted = func(string) { v.applyConditioning() }
		u.condEntries[i] = e
		condForm.Add(widget.NewLabel(name))
		condForm.Add(e)
	}
	condApply := widget.NewButton("Apply conditioning", v.applyConditioning)
	cond := widget.NewCard("", "Conditioning before the attribute", container.NewVBox(condForm, condApply))
	details := container.NewVBox(u.attrName, u.attrAbout, u.paramBox, cond)
	treeBox := container.NewGridWrap(fyne.NewSize(300, 300), u.attrTree)
	return container.NewBorder(treeBox, nil, nil, nil, container.NewVScroll(details))
}

// attributeGroups lists the registry's groups in registry order and the
// attributes of each, as tree node ids.
func attributeGroups() ([]string, map[string][]string) {
	var groups []string
	by := map[string][]string{}
	for _, a := range compute.Attributes() {
		g := "group:" + string(a.Group)
		if by[g] == nil {
			groups = append(groups, g)
		}
		by[g] = append(by[g], "attr:"+a.ID)
	}
	return groups, by
}

func groupTitle(id string) string {
	g := strings.TrimPrefix(id, "group:")
	if g == "" {
		return g
	}
	return strings.ToUpper(g[:1]) + g[1:]
}

func (v *viewer) displayTab() fyne.CanvasObject {
	u := v.ui
	var names []string
	for _, p := range palettes.All() {
		names = append(names, paletteLabel(p))
	}
	u.palettePick = widget.NewSelect(names, func(label string) {
		if u.refreshing {
			return
		}
		s := paletteName(label)
		pl := v.state.plan()
		if pl.Overlay != nil {
			v.setPalette(pl.Overlay, true, s)
		} else {
			v.setPalette(pl.Base, false, s)
		}
	})
	u.basePalettePick = widget.NewSelect(names, func(label string) {
		if u.refreshing {
			return
		}
		v.setPalette(v.state.plan().Base, false, paletteName(label))
	})
	u.clipLabel = widget.NewLabel("")
	u.clipSlider = widget.NewSlider(90, 100)
	u.clipSlider.Step = 0.1
	u.clipSlider.OnChangeEnded = func(f float64) {
		if u.refreshing {
			return
		}
		v.state.ClipPercent = f
		v.refreshControls()
		v.requestRender()
	}
	u.wiggleCheck = widget.NewCheck("Amplitude wiggles on top", func(b bool) {
		if u.refreshing {
			return
		}
		v.state.Wiggle = b
		v.requestRender()
	})
	u.coRenderCheck = widget.NewCheck("Draw the attribute over a base layer", func(b bool) {
		if u.refreshing {
			return
		}
		v.setCoRender(b)
	})
	var attrNames []string
	for _, a := range compute.Attributes() {
		attrNames = append(attrNames, a.Name)
	}
	u.baseChoice = widget.NewSelect(attrNames, func(s string) {
		if u.refreshing {
			return
		}
		for _, a := range compute.Attributes() {
			if a.Name == s {
				v.state.BaseID = a.ID
			}
		}
		v.refreshControls()
		v.requestData()
	})
	u.opacitySlider = widget.NewSlider(0, 1)
	u.opacitySlider.Step = 0.05
	u.opacityLabel = widget.NewLabel("")
	u.opacitySlider.OnChanged = func(f float64) { u.opacityLabel.SetText(fmt.Sprintf("Opacity %.0f %%", f*100)) }
	u.opacitySlider.OnChangeEnded = func(f float64) {
		if u.refreshing {
			return
		}
		v.state.Opacity = f
		v.requestRender()
	}
	u.followCheck = widget.NewCheck("Opacity follows the value", func(b bool) {
		if u.refreshing {
			return
		}
		v.state.OpacityFollowsValue = b
		v.requestRender()
	})
	u.oneClick = widget.NewButtonWithIcon("Envelope over amplitude", theme.ColorPaletteIcon(), v.envelopeOverAmplitude)
	u.oneClick.Importance = widget.HighImportance
	u.stretchSlider = widget.NewSlider(minExaggeration, maxExaggeration)
	u.stretchSlider.Step = 0.25
	u.stretchSlider.OnChangeEnded = func(f float64) {
		if u.refreshing {
			return
		}
		n, m := v.dims()
		v.state.setExaggeration(f, n, m)
		v.refreshControls()
		v.requestRender()
		v.requestTrace()
	}
	u.followCursor = widget.NewCheck("Trace panel follows the cursor", func(b bool) { v.state.FollowCursor = b })

	colour := container.New(layout.NewFormLayout(),
		widget.NewLabel("Palette"), u.palettePick,
		widget.NewLabel("Base palette"), u.basePalettePick,
		u.clipLabel, u.clipSlider)
	layers := container.New(layout.NewFormLayout(),
		widget.NewLabel("Base layer"), u.baseChoice,
		u.opacityLabel, u.opacitySlider)
	view := container.New(layout.NewFormLayout(), widget.NewLabel("Vertical stretch"), u.stretchSlider)
	return container.NewVScroll(container.NewVBox(
		u.oneClick,
		widget.NewCard("", "Colours", colour),
		widget.NewCard("", "Layers", container.NewVBox(u.coRenderCheck, layers, u.followCheck, u.wiggleCheck)),
		widget.NewCard("", "View", container.NewVBox(view, u.followCursor)),
	))
}

// paletteLabel names a palette in the choice lists with its family, so the
// user can tell a cyclic map from a sequential one.
func paletteLabel(p *palettes.Palette) string {
	return p.Name + " (" + p.Family.String() + ")"
}

// paletteName is the palette name of a label made by paletteLabel.
func paletteName(label string) string {
	if i := strings.LastIndex(label, " ("); i > 0 {
		return label[:i]
	}
	return label
}

// --- keeping the controls in step with the state ---

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

// unitSuffix is " (unit)", or nothing for unitless values and for values in
// the input's own amplitude units, which SEG-Y does not name.
func unitSuffix(unit string) string {
	if unit == "" || unit == "amplitude" {
		return ""
	}
	return " (" + unit + ")"
}

// refreshNavigation sets the selector, slider, entry and title.
func (v *viewer) refreshNavigation() {
	u := v.ui
	was := u.refreshing
	u.refreshing = true
	defer func() { u.refreshing = was }()
	st := &v.state
	u.orientation.SetSelected(orientationNames[st.Orientation])
	r := lineRange(v.info, st.Orientation)
	u.lineSlider.Min, u.lineSlider.Max = float64(r.Min), float64(max(r.Max, r.Min+1))
	u.lineSlider.Step = float64(max(r.Step, 1))
	u.lineSlider.SetValue(float64(st.number()))
	if st.Orientation == volume.TimeSlice {
		u.lineEntry.SetText(formatMS(v.info.StartMS + float64(st.SampleIndex)*float64(v.info.IntervalUS)/1000))
		u.lineRange.SetText(fmt.Sprintf("ms of %s–%s", formatMS(v.info.StartMS), formatMS(v.info.StartMS+float64(v.info.Samples-1)*float64(v.info.IntervalUS)/1000)))
	} else {
		u.lineEntry.SetText(fmt.Sprint(st.number()))
		u.lineRange.SetText(fmt.Sprintf("of %d–%d", r.Min, r.Max))
	}
	title := st.title(v.info)
	pl := st.plan()
	if pl.Overlay != nil {
		title += " — " + pl.Overlay.Name + " over " + strings.ToLower(pl.Base.Name)
	} else {
		title += " — " + pl.Base.Name
	}
	u.title.SetText(title)
}

// refreshSurvey fills the survey tab from the scan facts.
func (v *viewer) refreshSurvey() {
	u := v.ui
	in := v.info
	if v.vol == nil {
		return
	}
	u.surveyName.SetText(v.vol.Name())
	u.surveyFacts.RemoveAll()
	add := func(k, val string) {
		kl := widget.NewLabel(k)
		vl := widget.NewLabel(val)
		vl.Wrapping = fyne.TextWrapWord
		u.surveyFacts.Add(kl)
		u.surveyFacts.Add(vl)
	}
	add("SEG-Y revision", in.Revision)
	add("Samples", fmt.Sprintf("%s, %s byte order", in.FormatName, in.ByteOrder))
	add("Sampling", fmt.Sprintf("%d × %s ms from %s ms", in.Samples, formatMS(float64(in.IntervalUS)/1000), formatMS(in.StartMS)))
	add("Traces", fmt.Sprintf("%d (%s)", in.Traces, in.Layout))
	add("Inlines", rangeText(in.Inline))
	add("Crosslines", rangeText(in.Crossline))
	if len(in.Offsets) > 1 {
		add("Offsets", fmt.Sprintf("%d (%d to %d)", len(in.Offsets), in.Offsets[0], in.Offsets[len(in.Offsets)-1]))
	}
	if in.MissingTraces > 0 || in.DuplicateTraces > 0 {
		add("Gaps", fmt.Sprintf("%d missing, %d duplicate", in.MissingTraces, in.DuplicateTraces))
	}
	if in.InlineSpacingM > 0 || in.CrosslineSpacingM > 0 {
		add("Bin size", fmt.Sprintf("%.1f m × %.1f m", in.InlineSpacingM, in.CrosslineSpacingM))
		add("X", fmt.Sprintf("%.0f – %.0f", in.MinX, in.MaxX))
		add("Y", fmt.Sprintf("%.0f – %.0f", in.MinY, in.MaxY))
	}
	add("Amplitude", fmt.Sprintf("%.3g to %.3g, RMS %.3g", in.AmplitudeMin, in.AmplitudeMax, in.AmplitudeRMS))
	for _, w := range in.Warnings {
		add("Note", w)
	}
	// Byte locations mean something only for a file.
	if v.vol.Path() == "" {
		u.headerCard.Hide()
	} else {
		u.headerCard.Show()
	}
	if len(in.Offsets) > 1 {
		var opts []string
		for _, o := range in.Offsets {
			opts = append(opts, fmt.Sprint(o))
		}
		u.offsetPick.SetOptions(opts)
		u.offsetPick.SetSelected(fmt.Sprint(v.state.Offset))
		u.offsetRow.Show()
	} else {
		u.offsetRow.Hide()
	}
}

func rangeText(r segy.Range) string {
	if r.Count <= 1 {
		return fmt.Sprint(r.Min)
	}
	return fmt.Sprintf("%d–%d step %d (%d)", r.Min, r.Max, r.Step, r.Count)
}

// buildParamControls makes an entry (or a choice) for each parameter of a.
func (v *viewer) buildParamControls(a *compute.Attribute) {
	u := v.ui
	u.paramBox.RemoveAll()
	if len(a.Params) == 0 {
		u.paramBox.Add(widget.NewLabel("No parameters"))
		return
	}
	form := container.New(layout.NewFormLayout())
	vals := v.state.params(a.ID)
	for _, ps := range a.Params {
		ps := ps
		label := ps.Name + unitSuffix(ps.Unit)
		cur, ok := vals[ps.Name]
		if !ok {
			cur = ps.Default
		}
		var ctl fyne.CanvasObject
		if ps.Choices != nil {
			sel := widget.NewSelect(ps.Choices, nil)
			sel.SetSelected(cur)
			sel.OnChanged = func(s string) { v.setParam(a, ps.Name, s) }
			ctl = sel
		} else {
			e := widget.NewEntry()
			e.SetText(cur)
			e.Validator = func(s string) error {
				f, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
				if err != nil {
					return fmt.Errorf("a number, please")
				}
				if f < ps.Min || f > ps.Max {
					return fmt.Errorf("between %g and %g", ps.Min, ps.Max)
				}
				return nil
			}
			e.OnSubmitted = func(s string) {
				if e.Validate() == nil {
					v.setParam(a, ps.Name, strings.TrimSpace(s))
				}
			}
			ctl = e
		}
		lab := widget.NewLabel(label)
		form.Add(lab)
		form.Add(ctl)
		form.Add(layout.NewSpacer())
		help := widget.NewLabel(ps.Description)
		help.Wrapping = fyne.TextWrapWord
		help.SizeName = theme.SizeNameCaptionText
		form.Add(help)
	}
	u.paramBox.Add(widget.NewLabelWithStyle("Parameters (Enter applies)", fyne.TextAlignLeading, fyne.TextStyle{Italic: true}))
	u.paramBox.Add(form)
}

// refreshLegends shows a colour key for each drawn layer.
func (v *viewer) refreshLegends(pl layerPlan, res renderResult) {
	u := v.ui
	u.legends.RemoveAll()
	add := func(a *compute.Attribute, l render.Layer, note string) {
		name := a.Name + unitSuffix(a.Unit)
		if note != "" {
			name += " — " + note
		}
		head := widget.NewLabelWithStyle(name, fyne.TextAlignLeading, fyne.TextStyle{Bold: true})
		bar := canvas.NewImageFromImage(paletteStrip(l.Palette))
		bar.ScaleMode = canvas.ImageScaleSmooth
		bar.FillMode = canvas.ImageFillStretch
		bar.SetMinSize(fyne.NewSize(200, 14))
		lo := widget.NewLabel(render.FormatTick(float64(l.Lo), decimalsFor(l.Lo, l.Hi)))
		hi := widget.NewLabel(render.FormatTick(float64(l.Hi), decimalsFor(l.Lo, l.Hi)))
		u.legends.Add(head)
		u.legends.Add(container.NewBorder(nil, nil, lo, hi, container.NewVBox(layout.NewSpacer(), bar, layout.NewSpacer())))
	}
	if res.hasOv {
		note := fmt.Sprintf("over, %.0f %% opacity", v.state.Opacity*100)
		if v.state.OpacityFollowsValue {
			note += " following the value"
		}
		add(pl.Overlay, res.ov, note)
		add(pl.Base, res.base, "base")
	} else {
		add(pl.Base, res.base, "")
	}
}

// decimalsFor picks the decimals that tell lo and hi apart.
func decimalsFor(lo, hi float32) int {
	span := math.Abs(float64(hi - lo))
	if span == 0 {
		return 2
	}
	return max(0, min(6, render.TickDecimals(niceStep(span, 5))))
}

// paletteStrip is a 256 x 1 picture of a palette.
func paletteStrip(p *palettes.Palette) image.Image {
	img := image.NewRGBA(image.Rect(0, 0, 256, 1))
	if p == nil {
		return img
	}
	for i, c := range p.Table {
		img.SetRGBA(i, 0, c)
	}
	return img
}

// --- actions ---

// setOrientation switches between inline, crossline and time slice.
func (v *viewer) setOrientation(o volume.Orientation) {
	if v.state.Orientation == o {
		return
	}
	v.state.Orientation = o
	v.state.PickTrace = -1
	v.refreshControls()
	v.requestData()
}

// goToLine shows line n (sample index for a time slice).
func (v *viewer) goToLine(n int) {
	if v.state.setNumber(v.info, n) {
		v.requestData()
	}
	v.refreshNavigation()
}

// stepLine moves count lines forward (negative: back).
func (v *viewer) stepLine(count int) {
	if v.vol == nil {
		return
	}
	if v.state.step(v.info, count) {
		v.refreshNavigation()
		v.requestData()
	}
}

// sampleOfMS is the sample index nearest time ms.
func (v *viewer) sampleOfMS(ms float64) int {
	if v.info.IntervalUS <= 0 {
		return 0
	}
	return int(math.Round((ms - v.info.StartMS) / (float64(v.info.IntervalUS) / 1000)))
}

// setAttribute shows attribute id (with co-rendering as it is set).
func (v *viewer) setAttribute(id string) {
	if v.state.AttributeID == id {
		return
	}
	v.state.AttributeID = id
	v.refreshControls()
	v.requestData()
	v.ui.section.focus() // the arrow keys go on stepping lines
}

// setParam changes one parameter of attribute a.
func (v *viewer) setParam(a *compute.Attribute, name, value string) {
	vals := v.state.params(a.ID)
	if vals[name] == value {
		return
	}
	trial := copyMap(vals)
	trial[name] = value
	if _, err := a.Resolve(trial); err != nil {
		v.showStatus(err.Error())
		return
	}
	vals[name] = value
	v.showStatus("")
	v.requestData()
}

// applyConditioning reads the conditioning entries.
func (v *viewer) applyConditioning() {
	var vals [3]float64
	for i, e := range v.ui.condEntries {
		s := strings.TrimSpace(e.Text)
		if s == "" || s == "off" {
			continue
		}
		f, err := strconv.ParseFloat(s, 64)
		if err != nil || f < 0 {
			v.showStatus(fmt.Sprintf("conditioning: %q is not a non-negative number", s))
			return
		}
		vals[i] = f
	}
	v.state.Cond = compute.Conditioning{LowCutHz: vals[0], HighCutHz: vals[1], AGCWindowMS: vals[2]}
	v.showStatus("")
	v.requestData()
}

// setCoRender turns the overlay on or off.
func (v *viewer) setCoRender(on bool) {
	v.state.CoRender = on
	v.refreshControls()
	v.requestData()
}

// envelopeOverAmplitude is the one-click co-rendering of the envelope over
// the amplitude, its opacity following its value.
func (v *viewer) envelopeOverAmplitude() {
	st := &v.state
	st.AttributeID, st.BaseID, st.CoRender = "envelope", amplitudeID, true
	st.OpacityFollowsValue = true
	if st.Opacity < 0.3 {
		st.Opacity = 0.75
	}
	v.refreshControls()
	v.requestData()
}

// setPalette chooses the palette of attribute a in a role and remembers it.
func (v *viewer) setPalette(a *compute.Attribute, overlay bool, name string) {
	if v.state.Palettes == nil {
		v.state.Palettes = map[string]string{}
	}
	v.state.Palettes[paletteKey(a.ID, overlay)] = name
	v.savePalettePrefs()
	v.requestRender()
}

// hover shows the values under the cursor and, when asked, moves the trace
// panel with it.
func (v *viewer) hover(trace, sample float64, inside bool) {
	if !inside || v.data.amp == nil {
		v.ui.cursor.SetText(cursorHint)
		return
	}
	v.ui.cursor.SetText(v.describePoint(trace, sample))
	if v.state.FollowCursor {
		v.pickAt(trace, sample)
	}
}

// describePoint tells where (trace, sample) is and what values it holds.
func (v *viewer) describePoint(trace, sample float64) string {
	d := v.data
	i, j := int(math.Floor(trace)), int(math.Floor(sample))
	var b strings.Builder
	var ampV, baseV, overV float32
	at := func(s *volume.Section, r, c int) float32 {
		if s == nil || r < 0 || r >= len(s.Traces) || c < 0 || c >= len(s.Traces[r]) {
			return float32(math.NaN())
		}
		return s.Traces[r][c]
	}
	if d.amp.Slice.Orientation == volume.TimeSlice {
		if j < 0 || j >= len(d.amp.InlineKeys) || i < 0 || i >= len(d.amp.Keys) {
			return ""
		}
		fmt.Fprintf(&b, "IL %d  XL %d  t %s ms", d.amp.InlineKeys[j], d.amp.Keys[i], formatMS(v.timeMS(float64(d.amp.Slice.Number))))
		ampV, baseV, overV = at(d.amp, j, i), at(d.base, j, i), at(d.over, j, i)
	} else {
		if i < 0 || i >= len(d.amp.Keys) {
			return ""
		}
		il, xl := v.state.Inline, d.amp.Keys[i]
		if d.amp.Slice.Orientation == volume.Crossline {
			il, xl = d.amp.Keys[i], v.state.Crossline
		}
		fmt.Fprintf(&b, "IL %d  XL %d  t %s ms", il, xl, formatMS(v.timeMS(float64(j))))
		ampV, baseV, overV = at(d.amp, i, j), at(d.base, i, j), at(d.over, i, j)
	}
	fmt.Fprintf(&b, "  amplitude %s", fmtValue(ampV))
	pl := d.plan
	if pl.Base != nil && pl.Base.ID != amplitudeID {
		fmt.Fprintf(&b, "  %s %s", strings.ToLower(pl.Base.Name), fmtValue(baseV))
	}
	if pl.Overlay != nil {
		fmt.Fprintf(&b, "  %s %s", strings.ToLower(pl.Overlay.Name), fmtValue(overV))
	}
	return b.String()
}

func fmtValue(x float32) string {
	if math.IsNaN(float64(x)) {
		return "—"
	}
	return strconv.FormatFloat(float64(x), 'g', 4, 32)
}

// pickAt picks the trace (or, on a map, the point) at (trace, sample).
func (v *viewer) pickAt(trace, sample float64) {
	n, m := v.dims()
	i, j := int(math.Floor(trace)), int(math.Floor(sample))
	if i < 0 || i >= n || j < 0 || j >= m {
		return
	}
	pick := i
	if v.state.Orientation == volume.TimeSlice {
		pick = j*n + i
	}
	if pick == v.state.PickTrace {
		return
	}
	v.state.PickTrace = pick
	v.ui.section.setPick(v.pickIndex())
	v.requestTrace()
}

// zoomAt zooms by factor about (trace, sample).
func (v *viewer) zoomAt(factor, trace, sample float64) {
	n, m := v.dims()
	if n == 0 {
		return
	}
	v.state.zoomAt(factor, trace, sample, n, m)
	v.requestRender()
	v.requestTrace()
}

// zoomCentre zooms by factor about the middle of the view.
func (v *viewer) zoomCentre(factor float64) {
	n, m := v.dims()
	if n == 0 {
		return
	}
	vp := v.state.viewport(n, m)
	v.zoomAt(factor, (vp.Trace0+vp.Trace1)/2, (vp.Sample0+vp.Sample1)/2)
}

// panBy moves the view.
func (v *viewer) panBy(dTrace, dSample float64) {
	n, m := v.dims()
	if n == 0 {
		return
	}
	v.state.pan(dTrace, dSample, n, m)
	v.requestRender()
	v.requestTrace()
}

// fitView shows the whole section.
func (v *viewer) fitView() {
	n, m := v.dims()
	v.state.fit(n, m)
	v.refreshControls()
	v.requestRender()
	v.requestTrace()
}

// typedKey handles the keys of the section view (when it has the focus, or
// nothing has):
// Right/Left step one line, Page Down/Page Up ten, + and - zoom, Home shows
// the whole section.
func (v *viewer) typedKey(e *fyne.KeyEvent) {
	switch e.Name {
	case fyne.KeyRight:
		v.stepLine(1)
	case fyne.KeyLeft:
		v.stepLine(-1)
	case fyne.KeyPageDown:
		v.stepLine(10)
	case fyne.KeyPageUp:
		v.stepLine(-10)
	case fyne.KeyPlus, fyne.KeyEqual:
		v.zoomCentre(1.5)
	case fyne.KeyMinus:
		v.zoomCentre(1 / 1.5)
	case fyne.KeyHome:
		v.fitView()
	}
}

// cursorHint fills the status bar while the pointer is off the section.
const cursorHint = "Point at the section to read its values; click a trace to show it on the right"

// keyHelp lists the keys for the Help menu.
const keyHelp = `Right / Left arrow    next / previous line
Page Down / Page Up   ten lines forward / back
+ / -                 zoom in / out
Home                  whole section
Mouse wheel           zoom about the pointer
Drag                  move the view
Click                 show that trace in the trace panel
Ctrl+O                open a SEG-Y file
Ctrl+S                save a figure`
