package viewer

import (
	"fmt"
	"math"
	"quadtrace/app/volume"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/driver/desktop"
)

// hover shows the values under the cursor and, when asked, moves the trace
// panel with it.
func (v *viewer) hover(trace, sample float64, inside bool) {
	if !inside || v.data.amp == nil {
		v.ui.statusBar.setCursor(cursorHint)
		return
	}
	v.ui.statusBar.setCursor(v.describePoint(trace, sample))
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
	if v.data.amp.Slice.Orientation == volume.TimeSlice {
		pick = j*n + i
	} else {
		v.state.PickSample = j
	}
	if pick == v.state.PickTrace {
		return
	}
	v.state.PickTrace = pick
	v.ui.section.setPick(v.pickPoint())
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

// viewCommand is a View menu command with its window-level shortcut; an
// empty name is a separator.
type viewCommand struct {
	name     string
	shortcut *desktop.CustomShortcut
	do       func()
}

// viewCommands are the View menu's commands. Their shortcuts are the
// window's: they act whichever control has the keyboard, because fyne runs
// main-menu shortcuts before the focused widget sees the key.
func (v *viewer) viewCommands() []viewCommand {
	ctrl := fyne.KeyModifierShortcutDefault
	sc := func(k fyne.KeyName, m fyne.KeyModifier) *desktop.CustomShortcut {
		return &desktop.CustomShortcut{KeyName: k, Modifier: m}
	}
	return []viewCommand{
		{"Next line", sc(fyne.KeyPageDown, ctrl), func() { v.stepLine(1) }},
		{"Previous line", sc(fyne.KeyPageUp, ctrl), func() { v.stepLine(-1) }},
		{"Ten lines forward", sc(fyne.KeyPageDown, ctrl|fyne.KeyModifierShift), func() { v.stepLine(10) }},
		{"Ten lines back", sc(fyne.KeyPageUp, ctrl|fyne.KeyModifierShift), func() { v.stepLine(-10) }},
		{},
		{"Zoom in", sc(fyne.KeyEqual, ctrl), func() { v.zoomCentre(1.5) }},
		{"Zoom out", sc(fyne.KeyMinus, ctrl), func() { v.zoomCentre(1 / 1.5) }},
		{"Whole section", sc(fyne.KeyHome, ctrl), v.fitView},
		{},
		{"Back", sc(fyne.KeyLeft, fyne.KeyModifierAlt), func() { v.goHistory(-1) }},
		{"Forward", sc(fyne.KeyRight, fyne.KeyModifierAlt), func() { v.goHistory(1) }},
	}
}

// bindKeys sets the window's shortcuts and its key handler. The View
// commands' shortcuts are also set on the canvas, for a window without a
// main menu (fyne's test driver).
func (v *viewer) bindKeys() {
	c := v.win.Canvas()
	c.SetOnTypedKey(v.typedKey)
	c.AddShortcut(&desktop.CustomShortcut{KeyName: fyne.KeyO, Modifier: fyne.KeyModifierShortcutDefault}, func(fyne.Shortcut) { v.showOpenDialog() })
	c.AddShortcut(&desktop.CustomShortcut{KeyName: fyne.KeyS, Modifier: fyne.KeyModifierShortcutDefault}, func(fyne.Shortcut) { v.showFigureDialog() })
	for _, vc := range v.viewCommands() {
		if vc.shortcut != nil {
			do := vc.do
			c.AddShortcut(vc.shortcut, func(fyne.Shortcut) { do() })
		}
	}
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

// keyHelp lists the keys for the Help menu.
const keyHelp = `On the section (click it first):
Right / Left arrow    next / previous line
Page Down / Page Up   ten lines forward / back
+ / -                 zoom in / out
Home                  whole section

Anywhere in the window:
Ctrl+Page Down / Up   next / previous line
Ctrl+Shift+Page Down / Up   ten lines forward / back
Ctrl+= / Ctrl+-       zoom in / out
Ctrl+Home             whole section
Alt+Left / Alt+Right  back / forward through the views shown
Mouse wheel           zoom about the pointer
Drag                  move the view
Click                 show that trace in the trace panel
Ctrl+O                open a SEG-Y file
Ctrl+S                save a figure`
