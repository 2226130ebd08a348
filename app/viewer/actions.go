package viewer

import (
	"fmt"
	"math"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"strconv"
	"strings"
)

// setOrientation switches between inline, crossline and time slice,
// keeping the place: the new view passes through the picked trace, which
// stays picked, and a time slice is taken at the picked time.
func (v *viewer) setOrientation(o volume.Orientation) {
	if v.state.Orientation == o || v.vol == nil {
		return
	}
	if k, ok := v.pickedKeys(); ok {
		v.state.Inline, v.state.Crossline = k.inline, k.crossline
		v.wantPick = &k
	}
	if v.state.PickSample >= 0 && v.state.PickSample < v.info.Samples && v.data.amp != nil && v.data.amp.Slice.Orientation != volume.TimeSlice {
		v.state.SampleIndex = v.state.PickSample
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

// goToTyped goes to the line (or, on a time slice, the time in ms) typed in
// the navigation bar's entry.
func (v *viewer) goToTyped(s string) {
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

// setOffset shows offset o of a pre-stack survey.
func (v *viewer) setOffset(o int) {
	if v.state.Offset == o {
		return
	}
	v.state.Offset = o
	v.refreshNavigation()
	v.requestData()
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

// setParam changes one parameter of attribute a and says why the value is
// refused ("" when it is taken).
func (v *viewer) setParam(a *compute.Attribute, name, value string) string {
	vals := v.state.params(a.ID)
	if vals[name] == value {
		return ""
	}
	trial := copyMap(vals)
	trial[name] = value
	if _, err := a.Resolve(trial); err != nil {
		v.showStatus(err.Error())
		return err.Error()
	}
	vals[name] = value
	v.showStatus("")
	v.requestData()
	return ""
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

// fitView shows the whole section.
func (v *viewer) fitView() {
	n, m := v.dims()
	v.state.fit(n, m)
	v.refreshControls()
	v.requestRender()
	v.requestTrace()
}

// setColourRange sets the colour range of the coloured layer (the overlay,
// or the base alone) of the shown data from the texts of the minimum and
// maximum entries, for the survey and attribute (kept while paging), and
// says why the texts are refused ("" when they are taken).
func (v *viewer) setColourRange(loText, hiText string) string {
	if !v.data.complete() {
		return "nothing is shown yet"
	}
	lo, err1 := strconv.ParseFloat(strings.TrimSpace(loText), 32)
	hi, err2 := strconv.ParseFloat(strings.TrimSpace(hiText), 32)
	switch {
	case err1 != nil || math.IsNaN(lo) || math.IsInf(lo, 0):
		return fmt.Sprintf("minimum %q is not a number", strings.TrimSpace(loText))
	case err2 != nil || math.IsNaN(hi) || math.IsInf(hi, 0):
		return fmt.Sprintf("maximum %q is not a number", strings.TrimSpace(hiText))
	case !(hi > lo):
		return fmt.Sprintf("the maximum (%g) must be above the minimum (%g)", hi, lo)
	}
	d := v.data
	a, params := d.plan.Base, d.baseParams
	if d.plan.Overlay != nil {
		a, params = d.plan.Overlay, d.overParams
	}
	v.ranges[rangeKey(a, params, d.cond, v.state.ClipPercent)] = [2]float32{float32(lo), float32(hi)}
	v.requestRender()
	v.requestTrace()
	return ""
}
