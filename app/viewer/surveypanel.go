package viewer

import (
	"fmt"
	"quadtrace/segy"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"
)

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
