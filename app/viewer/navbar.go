package viewer

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"quadtrace/app/volume"
	"quadtrace/segy"
)

// Orientation choices as the selector shows them.
var orientationNames = []string{"Inline", "Crossline", "Time slice"}

// navigationBar is the bar above the section: the orientation selector,
// line stepping, the line entry with its range, the offset choice of a
// pre-stack survey, zoom buttons and the title of what is shown. It owns
// its widgets; refresh sets them from the state, and user changes go to the
// viewer's actions.
type navigationBar struct {
	v          *viewer
	refreshing bool // set while refresh updates the widgets
	content    fyne.CanvasObject

	orientation *widget.RadioGroup
	lineSlider  *widget.Slider
	lineEntry   *widget.Entry
	lineRange   *widget.Label
	offsetRow   *fyne.Container
	offsetPick  *widget.Select
	title       *widget.Label
}

func newNavigationBar(v *viewer) *navigationBar {
	n := &navigationBar{v: v}
	n.orientation = widget.NewRadioGroup(orientationNames, func(s string) {
		if n.refreshing {
			return
		}
		for i, name := range orientationNames {
			if name == s {
				v.setOrientation(volume.Orientation(i))
			}
		}
	})
	n.orientation.Horizontal = true
	n.orientation.Required = true
	n.lineSlider = widget.NewSlider(0, 1)
	n.lineSlider.OnChanged = func(f float64) {
		// While dragging, the entry previews the line; it is read at the end.
		switch {
		case n.refreshing:
		case v.state.Orientation == volume.TimeSlice:
			n.lineEntry.SetText(formatMS(v.info.StartMS + math.Round(f)*float64(v.info.IntervalUS)/1000))
		default:
			n.lineEntry.SetText(fmt.Sprint(int(math.Round(f))))
		}
	}
	n.lineSlider.OnChangeEnded = func(f float64) {
		if !n.refreshing {
			v.goToLine(int(math.Round(f)))
			v.ui.section.focus()
		}
	}
	n.lineEntry = widget.NewEntry()
	n.lineEntry.OnSubmitted = func(s string) { v.goToTyped(s) }
	n.offsetPick = widget.NewSelect(nil, func(s string) {
		if n.refreshing {
			return
		}
		if o, err := strconv.Atoi(s); err == nil {
			v.setOffset(o)
		}
	})
	n.offsetRow = container.NewHBox(widget.NewSeparator(), widget.NewLabel("Offset"), n.offsetPick)
	n.offsetRow.Hide()
	n.lineRange = widget.NewLabel("")
	n.title = widget.NewLabel("")
	n.title.TextStyle.Bold = true
	n.title.Truncation = fyne.TextTruncateEllipsis // a long title never widens the window
	btn := func(icon fyne.Resource, f func()) *widget.Button {
		b := widget.NewButtonWithIcon("", icon, f)
		b.Importance = widget.LowImportance
		return b
	}
	back10 := btn(theme.MediaFastRewindIcon(), func() { v.stepLine(-10) })
	back := btn(theme.NavigateBackIcon(), func() { v.stepLine(-1) })
	next := btn(theme.NavigateNextIcon(), func() { v.stepLine(1) })
	next10 := btn(theme.MediaFastForwardIcon(), func() { v.stepLine(10) })
	zoomIn := btn(theme.ZoomInIcon(), func() { v.zoomCentre(1.5) })
	zoomOut := btn(theme.ZoomOutIcon(), func() { v.zoomCentre(1 / 1.5) })
	fit := btn(theme.ZoomFitIcon(), v.fitView)
	entry := container.NewGridWrap(fyne.NewSize(90, n.lineEntry.MinSize().Height), n.lineEntry)
	// Two rows, so the bar fits beside the tabs on a 1366-pixel screen
	// (TestWindowFitsLaptopScreen): the orientation, the title and the zoom
	// buttons above; the line stepping, slider, entry and offset below.
	row1 := container.NewBorder(nil, nil, container.NewHBox(n.orientation, widget.NewSeparator()),
		container.NewHBox(widget.NewSeparator(), zoomOut, zoomIn, fit), n.title)
	row2 := container.NewBorder(nil, nil, container.NewHBox(back10, back),
		container.NewHBox(next, next10, entry, n.lineRange, n.offsetRow), n.lineSlider)
	n.content = container.NewVBox(row1, row2)
	return n
}

// refresh sets the selector, slider, entry, offset choice and title from
// the state st of a survey described by info.
func (n *navigationBar) refresh(st *viewState, info segy.Info) {
	was := n.refreshing
	n.refreshing = true
	defer func() { n.refreshing = was }()
	n.orientation.SetSelected(orientationNames[st.Orientation])
	r := lineRange(info, st.Orientation)
	n.lineSlider.Min, n.lineSlider.Max = float64(r.Min), float64(max(r.Max, r.Min+1))
	n.lineSlider.Step = float64(max(r.Step, 1))
	n.lineSlider.SetValue(float64(st.number()))
	if st.Orientation == volume.TimeSlice {
		n.lineEntry.SetText(formatMS(info.StartMS + float64(st.SampleIndex)*float64(info.IntervalUS)/1000))
		n.lineRange.SetText(fmt.Sprintf("ms of %s–%s", formatMS(info.StartMS), formatMS(info.StartMS+float64(max(info.Samples-1, 0))*float64(info.IntervalUS)/1000)))
	} else {
		n.lineEntry.SetText(fmt.Sprint(st.number()))
		n.lineRange.SetText(fmt.Sprintf("of %d–%d", r.Min, r.Max))
	}
	if len(info.Offsets) > 1 {
		opts := make([]string, 0, len(info.Offsets))
		for _, o := range info.Offsets {
			opts = append(opts, fmt.Sprint(o))
		}
		n.offsetPick.SetOptions(opts)
		n.offsetPick.SetSelected(fmt.Sprint(st.Offset))
		n.offsetRow.Show()
	} else {
		n.offsetRow.Hide()
	}
	n.title.SetText(viewTitle(st, info))
}

// viewTitle names the slice and the layers the state shows, e.g.
// "Inline 1074 — Envelope over amplitude".
func viewTitle(st *viewState, info segy.Info) string {
	title := st.title(info)
	pl := st.plan()
	if pl.Overlay != nil {
		return title + " — " + pl.Overlay.Name + " over " + strings.ToLower(pl.Base.Name)
	}
	return title + " — " + pl.Base.Name
}
