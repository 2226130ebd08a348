package viewer

import (
	"fmt"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"quadtrace/segy"
)

// surveyPanel is the Survey tab: what the scan found (geometry, sampling,
// coordinates, amplitudes, notes), the textual header button and the trace
// header byte locations to read the file again with. It owns its widgets;
// refresh fills them for a newly opened survey.
type surveyPanel struct {
	content fyne.CanvasObject

	surveyName  *widget.Label
	surveyFacts *fyne.Container
	byteEntries map[string]*widget.Entry
	byteOrder   *widget.Select
	headerCard  *widget.Card
}

func newSurveyPanel(v *viewer) *surveyPanel {
	p := &surveyPanel{}
	p.surveyName = widget.NewLabel("")
	p.surveyName.TextStyle.Bold = true
	p.surveyName.Wrapping = fyne.TextWrapBreak
	p.surveyFacts = container.New(layout.NewFormLayout())
	headerBtn := widget.NewButtonWithIcon("Textual header…", theme.DocumentIcon(), v.showTextHeader)
	p.byteEntries = map[string]*widget.Entry{}
	form := container.New(layout.NewFormLayout())
	for _, f := range byteFields {
		e := widget.NewEntry()
		e.SetPlaceHolder(fmt.Sprint(f.def))
		p.byteEntries[f.name] = e
		form.Add(widget.NewLabel(f.label))
		form.Add(e)
	}
	p.byteOrder = widget.NewSelect([]string{"detect", "big", "little"}, nil)
	p.byteOrder.SetSelected("detect")
	form.Add(widget.NewLabel("Byte order"))
	form.Add(p.byteOrder)
	rescan := widget.NewButtonWithIcon("Read the file again with these", theme.ViewRefreshIcon(), v.rescan)
	p.headerCard = widget.NewCard("", "Trace header byte locations", container.NewVBox(form, rescan))
	p.content = container.NewVScroll(container.NewVBox(p.surveyName, p.surveyFacts, headerBtn, p.headerCard))
	return p
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

// refresh shows the scan facts of the survey called name; a survey without
// a file (the demo) hides the byte locations, which mean nothing for it.
func (p *surveyPanel) refresh(name string, hasFile bool, in segy.Info) {
	p.surveyName.SetText(name)
	var cells []fyne.CanvasObject
	add := func(k, val string) {
		vl := widget.NewLabel(val)
		vl.Wrapping = fyne.TextWrapWord
		cells = append(cells, widget.NewLabel(k), vl)
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
	p.surveyFacts.Objects = cells
	p.surveyFacts.Refresh()
	if hasFile {
		p.headerCard.Show()
	} else {
		p.headerCard.Hide()
	}
}

func rangeText(r segy.Range) string {
	if r.Count <= 1 {
		return fmt.Sprint(r.Min)
	}
	return fmt.Sprintf("%d–%d step %d (%d)", r.Min, r.Max, r.Step, r.Count)
}
