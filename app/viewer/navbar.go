package viewer

import (
	"fmt"
	"math"
	"quadtrace/app/volume"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"
)

// Orientation choices as the selector shows them.
var orientationNames = []string{"Inline", "Crossline", "Time slice"}

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
