package viewer

import (
	"fmt"
	"maps"
	"math"
	"sort"
	"strings"

	"quadtrace/app/style"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/palettes"
	"quadtrace/render"
	"quadtrace/segy"
)

// Limits of the zoom and the vertical stretch.
const (
	maxZoom         = 64
	minExaggeration = 1
	maxExaggeration = 8
)

// viewState is what the window shows: which slice of the survey, which
// attribute with which parameters, how the layers are coloured and blended,
// how far the view is zoomed, and which trace is picked. It is plain data,
// changed only on the UI goroutine, so tests can set it and check it.
type viewState struct {
	Orientation volume.Orientation
	// Line numbers remembered per orientation: the inline and crossline
	// numbers, and the sample index of the time slice.
	Inline, Crossline, SampleIndex int
	Offset                         int // offset shown for a pre-stack survey

	AttributeID string                       // the attribute shown ("amplitude" for the plain data)
	Params      map[string]map[string]string // attribute id -> parameter name -> text value
	Cond        compute.Conditioning         // applied before every attribute
	ClipPercent float64                      // percentile clip of every layer, 90..100
	Wiggle      bool                         // amplitude wiggles drawn on top

	// Co-rendering: the attribute is drawn over a base layer, the amplitude
	// when BaseID is "" or "amplitude", otherwise another attribute.
	CoRender            bool
	BaseID              string
	Opacity             float64 // 0..1
	OpacityFollowsValue bool

	// Palette names chosen per attribute and role (see paletteKey); absent
	// keys use the default for the attribute's kind.
	Palettes map[string]string

	// Zoom (1 = whole section), vertical stretch on top of it, and the view
	// centre in section index units (trace index, sample index).
	Zoom, Exaggeration        float64
	CenterTrace, CenterSample float64

	PickTrace    int  // index of the picked trace in the section; -1 = none
	PickSample   int  // sample index clicked on a section; -1 = none
	FollowCursor bool // the trace panel follows the cursor instead of clicks
}

// newViewState returns the state shown when a survey is first opened: the
// middle inline, envelope over amplitude, the middle trace picked.
func newViewState(info segy.Info) viewState {
	s := viewState{
		Orientation:         volume.Inline,
		Inline:              middle(info.Inline),
		Crossline:           middle(info.Crossline),
		SampleIndex:         info.Samples / 2,
		AttributeID:         "envelope",
		Params:              map[string]map[string]string{},
		Palettes:            map[string]string{},
		ClipPercent:         99,
		CoRender:            true,
		Opacity:             0.75,
		OpacityFollowsValue: true,
		Zoom:                1,
		Exaggeration:        1,
		PickTrace:           -1,
		PickSample:          -1,
	}
	if len(info.Offsets) > 0 {
		s.Offset = info.Offsets[0]
	}
	if _, err := compute.Lookup("envelope"); err != nil {
		s.AttributeID, s.CoRender = amplitudeID, false
	}
	return s
}

// middle is the line number nearest the middle of r that lies on its step.
func middle(r segy.Range) int {
	if r.Count <= 0 {
		return r.Min
	}
	step := r.Step
	if step == 0 {
		step = 1
	}
	return r.Min + (r.Count-1)/2*step
}

// dataFields returns a copy of the fields that decide which sections are
// read and computed (slice, layers, parameters, conditioning), the rest
// zero.
func (s *viewState) dataFields() viewState {
	params := make(map[string]map[string]string, len(s.Params))
	for id, m := range s.Params {
		params[id] = maps.Clone(m)
	}
	return viewState{Orientation: s.Orientation, Inline: s.Inline, Crossline: s.Crossline, SampleIndex: s.SampleIndex,
		Offset: s.Offset, AttributeID: s.AttributeID, Params: params, Cond: s.Cond, CoRender: s.CoRender, BaseID: s.BaseID}
}

// restoreDataFields sets the fields dataFields copies from d.
func (s *viewState) restoreDataFields(d viewState) {
	s.Orientation, s.Inline, s.Crossline, s.SampleIndex, s.Offset = d.Orientation, d.Inline, d.Crossline, d.SampleIndex, d.Offset
	s.AttributeID, s.Cond, s.CoRender, s.BaseID = d.AttributeID, d.Cond, d.CoRender, d.BaseID
	s.Params = d.dataFields().Params
}

// slice is the slice of the survey the state shows.
func (s *viewState) slice() volume.Slice {
	return volume.Slice{Orientation: s.Orientation, Number: s.number(), Offset: s.Offset}
}

// number is the current line number (or sample index for a time slice).
func (s *viewState) number() int {
	switch s.Orientation {
	case volume.Crossline:
		return s.Crossline
	case volume.TimeSlice:
		return s.SampleIndex
	}
	return s.Inline
}

// lineRange is the range of numbers the current orientation can take.
func lineRange(info segy.Info, o volume.Orientation) segy.Range {
	switch o {
	case volume.Crossline:
		return info.Crossline
	case volume.TimeSlice:
		return segy.Range{Min: 0, Max: info.Samples - 1, Step: 1, Count: info.Samples}
	}
	return info.Inline
}

// setNumber moves to line number n, snapped onto the survey's line grid and
// clamped to its range. It reports whether the number changed.
func (s *viewState) setNumber(info segy.Info, n int) bool {
	r := lineRange(info, s.Orientation)
	step := r.Step
	if step <= 0 {
		step = 1
	}
	if n < r.Min {
		n = r.Min
	}
	if n > r.Max {
		n = r.Max
	}
	n = r.Min + (n-r.Min)/step*step
	if n == s.number() {
		return false
	}
	switch s.Orientation {
	case volume.Crossline:
		s.Crossline = n
	case volume.TimeSlice:
		s.SampleIndex = n
	default:
		s.Inline = n
	}
	return true
}

// step moves by count lines (negative: backwards), using the survey's line
// increment, and reports whether the line changed.
func (s *viewState) step(info segy.Info, count int) bool {
	r := lineRange(info, s.Orientation)
	step := r.Step
	if step <= 0 {
		step = 1
	}
	return s.setNumber(info, s.number()+count*step)
}

// title names the shown slice for people, e.g. "Inline 1074", "Time slice
// 812 ms" or, in a pre-stack survey, "Inline 3, offset 250".
func (s *viewState) title(info segy.Info) string {
	var t string
	switch s.Orientation {
	case volume.Crossline:
		t = fmt.Sprintf("Crossline %d", s.Crossline)
	case volume.TimeSlice:
		t = fmt.Sprintf("Time slice %s ms", formatMS(info.StartMS+float64(s.SampleIndex)*float64(info.IntervalUS)/1000))
	default:
		t = fmt.Sprintf("Inline %d", s.Inline)
	}
	if len(info.Offsets) > 1 {
		t += fmt.Sprintf(", offset %d", s.Offset)
	}
	return t
}

// params returns the text values of the parameters of attribute id.
func (s *viewState) params(id string) map[string]string {
	m := s.Params[id]
	if m == nil {
		m = map[string]string{}
		if s.Params == nil {
			s.Params = map[string]map[string]string{}
		}
		s.Params[id] = m
	}
	return m
}

// viewport is the part of an nTraces x nSamples section in view.
func (s *viewState) viewport(nTraces, nSamples int) render.Viewport {
	zoom := clamp(s.Zoom, 1, maxZoom)
	ex := clamp(s.Exaggeration, minExaggeration, maxExaggeration)
	if s.Orientation == volume.TimeSlice {
		ex = 1 // a map keeps its aspect
	}
	tw := float64(nTraces) / zoom
	sw := float64(nSamples) / (zoom * ex)
	t0 := clamp(s.CenterTrace-tw/2, 0, float64(nTraces)-tw)
	s0 := clamp(s.CenterSample-sw/2, 0, float64(nSamples)-sw)
	return render.Viewport{Trace0: t0, Trace1: t0 + tw, Sample0: s0, Sample1: s0 + sw}
}

// fit shows the whole section.
func (s *viewState) fit(nTraces, nSamples int) {
	s.Zoom, s.Exaggeration = 1, 1
	s.CenterTrace, s.CenterSample = float64(nTraces)/2, float64(nSamples)/2
}

// zoomAt multiplies the zoom by factor keeping the point (trace, sample)
// under the same screen position.
func (s *viewState) zoomAt(factor, trace, sample float64, nTraces, nSamples int) {
	before := s.viewport(nTraces, nSamples)
	s.Zoom = clamp(s.Zoom*factor, 1, maxZoom)
	s.keepPoint(before, trace, sample, nTraces, nSamples)
}

// setExaggeration sets the vertical stretch keeping the view's centre.
func (s *viewState) setExaggeration(ex float64, nTraces, nSamples int) {
	vp := s.viewport(nTraces, nSamples)
	s.Exaggeration = clamp(ex, minExaggeration, maxExaggeration)
	s.keepPoint(vp, (vp.Trace0+vp.Trace1)/2, (vp.Sample0+vp.Sample1)/2, nTraces, nSamples)
}

// keepPoint moves the centre so that (trace, sample), which was at a given
// fraction of the old viewport, stays at that fraction of the new one.
func (s *viewState) keepPoint(before render.Viewport, trace, sample float64, nTraces, nSamples int) {
	fx := (trace - before.Trace0) / (before.Trace1 - before.Trace0)
	fy := (sample - before.Sample0) / (before.Sample1 - before.Sample0)
	zoom := clamp(s.Zoom, 1, maxZoom)
	ex := clamp(s.Exaggeration, minExaggeration, maxExaggeration)
	if s.Orientation == volume.TimeSlice {
		ex = 1
	}
	tw := float64(nTraces) / zoom
	sw := float64(nSamples) / (zoom * ex)
	s.CenterTrace = trace - fx*tw + tw/2
	s.CenterSample = sample - fy*sw + sw/2
	s.clampCentre(nTraces, nSamples)
}

// pan moves the view by (dTrace, dSample) section units.
func (s *viewState) pan(dTrace, dSample float64, nTraces, nSamples int) {
	vp := s.viewport(nTraces, nSamples)
	s.CenterTrace = (vp.Trace0+vp.Trace1)/2 + dTrace
	s.CenterSample = (vp.Sample0+vp.Sample1)/2 + dSample
	s.clampCentre(nTraces, nSamples)
}

func (s *viewState) clampCentre(nTraces, nSamples int) {
	vp := s.viewport(nTraces, nSamples)
	s.CenterTrace = (vp.Trace0 + vp.Trace1) / 2
	s.CenterSample = (vp.Sample0 + vp.Sample1) / 2
}

// Palette choices are kept per attribute and role: an attribute shown as
// the base layer and the same attribute drawn as an overlay have separate
// palettes (an overlay defaults to a saturated map made to sit over
// amplitude).
func paletteKey(id string, overlay bool) string {
	if overlay {
		return "over:" + id
	}
	return "base:" + id
}

// paletteFor returns the palette of attribute a in the given role: the one
// chosen in the state when it exists, else the shared default (app/style:
// magnitude sequential, signed diverging, cyclic cyclic; overlays of
// magnitudes the overlay map).
func (s *viewState) paletteFor(a *compute.Attribute, overlay bool) *palettes.Palette {
	name := s.Palettes[paletteKey(a.ID, overlay)]
	var p *palettes.Palette
	var err error
	if overlay {
		p, err = style.OverlayPalette(a, name)
	} else {
		p, err = style.Palette(a, name)
	}
	if err != nil || p == nil {
		p = palettes.Default(style.Family(a.Kind))
	}
	return p
}

// amplitudeID is the registry's id of the plain amplitude.
const amplitudeID = "amplitude"

// layerPlan says which attributes make up the picture: the base layer and,
// when co-rendering, the overlay.
type layerPlan struct {
	Base    *compute.Attribute
	Overlay *compute.Attribute // nil: no overlay
}

// plan works out the layers from the state. An unknown id falls back to the
// amplitude.
func (s *viewState) plan() layerPlan {
	attr := lookup(s.AttributeID)
	if !s.CoRender || attr.ID == amplitudeID {
		return layerPlan{Base: attr}
	}
	base := lookup(s.BaseID)
	if base.ID == attr.ID {
		base = lookup(amplitudeID)
	}
	return layerPlan{Base: base, Overlay: attr}
}

// lookup returns the attribute with id, or the amplitude when there is none.
func lookup(id string) *compute.Attribute {
	if id == "" {
		id = amplitudeID
	}
	if a, err := compute.Lookup(id); err == nil {
		return a
	}
	a, err := compute.Lookup(amplitudeID)
	if err != nil {
		// The registry always holds the amplitude; this is a broken build.
		return &compute.Attribute{ID: amplitudeID, Name: "Amplitude", Unit: "amplitude", Kind: compute.Signed}
	}
	return a
}

// attrKey identifies an attribute section: the slice, the attribute with
// its parameters, and the conditioning. Equal keys mean equal data.
func attrKey(sl volume.Slice, a *compute.Attribute, params map[string]string, cond compute.Conditioning) string {
	var b strings.Builder
	fmt.Fprintf(&b, "%d/%d/%d", sl.Orientation, sl.Number, sl.Offset)
	fmt.Fprintf(&b, "/%s/%g/%g/%g", a.ID, cond.LowCutHz, cond.HighCutHz, cond.AGCWindowMS)
	names := make([]string, 0, len(params))
	for n := range params {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		fmt.Fprintf(&b, "/%s=%s", n, params[n])
	}
	return b.String()
}

func clamp(v, lo, hi float64) float64 {
	if hi < lo {
		return lo
	}
	return math.Max(lo, math.Min(hi, v))
}

// formatMS prints a time in milliseconds without needless decimals.
func formatMS(ms float64) string {
	if ms == math.Trunc(ms) {
		return fmt.Sprintf("%.0f", ms)
	}
	return fmt.Sprintf("%.1f", ms)
}
