package viewer

import (
	"fmt"
	"image/color"

	"quadtrace/app/style"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/palettes"
	"quadtrace/render"
)

// Colour ranges. One range per survey, attribute (with its parameters and
// conditioning) and clip percentile: it is taken from the first section
// shown and kept while paging, so a line does not change colour because
// its neighbour was brighter, and a trace has the same gain in the trace
// panel whatever view it was picked from. The viewer keeps them in
// v.ranges, emptied when another survey opens.

// rangeKey names the range of attribute a with params and cond at clip.
func rangeKey(a *compute.Attribute, params map[string]string, cond compute.Conditioning, clip float64) string {
	return fmt.Sprintf("%s@%g", attrKey(surveyWide, a, params, cond), clip)
}

// surveyWide stands for "every slice" in a range's key.
var surveyWide = volume.Slice{Orientation: -1, Number: -1}

// displayRange is the range attribute a is drawn with from data at clip:
// app/style's (symmetric for signed attributes, from zero for magnitudes
// whose values are all positive), except that a frequency read from zero
// by default: instantaneous frequency's negative values (where the phase
// runs backwards) are not part of its scale but are marked by one colour of
// their own (see markNegative).
func displayRange(a *compute.Attribute, data [][]float32, clip float64) (float32, float32) {
	lo, hi := style.Range(a, data, clip)
	if a.Unit == "Hz" && a.Kind == compute.Magnitude && lo < 0 {
		lo = 0
	}
	if lo == 0 && marksNegative(a) {
		// One palette step below zero: every negative value clips onto the
		// first entry, which markNegative paints in its own colour.
		// (254.9 rather than 255 keeps zero itself in the second entry.)
		lo = -hi / (float32(paletteSteps) - 1.1)
	}
	return lo, hi
}

// paletteSteps is the number of entries in a palette's table.
const paletteSteps = len(palettes.Palette{}.Table)

// marksNegative reports whether a's negative values get a colour of their
// own: the frequencies of the instantaneous group, whose negative values
// are a known artefact of the phase running backwards (common practice
// shows them apart rather than on the frequency scale).
func marksNegative(a *compute.Attribute) bool {
	return a.ID == "instantaneous-frequency"
}

// negativeColour paints negative instantaneous frequencies: a neutral
// grey that none of our sequential palettes uses at its low end.
var negativeColour = color.RGBA{150, 150, 150, 255}

// markNegative returns a copy of p whose first entry is negativeColour.
func markNegative(p *palettes.Palette) *palettes.Palette {
	if p == nil {
		return nil
	}
	c := *p
	c.Table[0] = negativeColour
	return &c
}

// shownLayers are the render layers of the shown data d as the section
// view draws them with state st: palettes with negative frequencies
// marked, and the kept ranges of ranges (computed from d when a range is
// not kept yet). The figure uses them, so it matches the screen.
func shownLayers(d shown, st *viewState, ranges map[string][2]float32) (base render.Layer, over *render.Layer) {
	rangeOf := func(a *compute.Attribute, params map[string]string, data [][]float32) (float32, float32) {
		if r, ok := ranges[rangeKey(a, params, d.cond, st.ClipPercent)]; ok {
			return r[0], r[1]
		}
		return displayRange(a, data, st.ClipPercent)
	}
	pal := func(a *compute.Attribute, overlay bool) *palettes.Palette {
		p := st.paletteFor(a, overlay)
		if marksNegative(a) {
			p = markNegative(p)
		}
		return p
	}
	base = render.Layer{Data: d.base.Traces, Palette: pal(d.plan.Base, false), Opacity: 1}
	base.Lo, base.Hi = rangeOf(d.plan.Base, d.baseParams, d.base.Traces)
	if d.plan.Overlay != nil && d.over != nil {
		o := render.Layer{Data: d.over.Traces, Palette: pal(d.plan.Overlay, true), Opacity: clamp(st.Opacity, 0, 1), OpacityFollowsValue: st.OpacityFollowsValue}
		o.Lo, o.Hi = rangeOf(d.plan.Overlay, d.overParams, d.over.Traces)
		over = &o
	}
	return base, over
}
