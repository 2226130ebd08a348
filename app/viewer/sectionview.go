package viewer

import (
	"fmt"
	"image"
	"image/color"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"quadtrace/render"
)

// Margins around the plot area of the section view, in fyne units. The trace
// panel uses the same top and bottom margins so both share one time axis.
const (
	plotTop    = 42
	plotBottom = 10
	plotLeft   = 58
	plotRight  = 8
)

// sectionAxes labels the section's axes: the horizontal axis by the key
// (line number) of each trace index, the vertical one either by time (T0MS +
// index*DTMS) or, for a time slice, by the key of each row.
type sectionAxes struct {
	HTitle, VTitle string
	HKeys          []int
	VKeys          []int // nil: vertical axis is time
	T0MS, DTMS     float64
}

// sectionView shows a rendered section (or time slice) with its axes, the
// picked trace and the cursor, and turns the mouse into view requests:
// hover, click, wheel zoom and drag pan. It does not render data itself: the
// viewer renders in the background into an image the size of plotPixels and
// hands it over with setImage.
type sectionView struct {
	widget.BaseWidget

	img        image.Image
	vp         render.Viewport // the part of the section img shows
	axes       sectionAxes
	aspect     float64 // plot width/height to keep (maps); 0 = fill
	pick       float64 // picked trace index (a map's column); NaN = none
	pickRow    float64 // a map's picked row; NaN on a section
	message    string  // shown instead of the section (loading, errors)
	lastCursor fyne.Position

	onHover  func(trace, sample float64, inside bool)
	onPick   func(trace, sample float64)
	onZoom   func(factor, trace, sample float64)
	onPan    func(dTrace, dSample float64)
	onResize func()
	onKey    func(*fyne.KeyEvent)
	focused  bool

	// Horizons (horizonmarks.go): what a click and a drag do, the marks
	// drawn over the picture, and the erase box being drawn.
	tool           horizonTool
	onSeed         func(trace, sample float64)
	onErase        func(t0, s0, t1, s1 float64)
	onShown        func() // after each new picture
	marks          []sectionMark
	boxing         bool
	boxFrom, boxTo fyne.Position
}

func newSectionView() *sectionView {
	v := &sectionView{pick: math.NaN(), pickRow: math.NaN(), message: "Opening…"}
	v.ExtendBaseWidget(v)
	return v
}

// setImage shows img, rendered for viewport vp with the given axes.
func (v *sectionView) setImage(img image.Image, vp render.Viewport, axes sectionAxes, aspect float64) {
	v.img, v.vp, v.axes, v.aspect, v.message = img, vp, axes, aspect, ""
	v.Refresh()
	if v.onShown != nil {
		v.onShown()
	}
}

// setMessage replaces the section by a line of text.
func (v *sectionView) setMessage(msg string) {
	v.message = msg
	v.Refresh()
}

// setPick marks trace index col of a section (row NaN) or the point (col,
// row) of a map with a cross; col NaN marks nothing.
func (v *sectionView) setPick(col, row float64) {
	v.pick, v.pickRow = col, row
	v.Refresh()
}

// plotRect is the plot area inside a widget of the given size.
func (v *sectionView) plotRect(size fyne.Size) (fyne.Position, fyne.Size) {
	w := size.Width - plotLeft - plotRight
	h := size.Height - plotTop - plotBottom
	if w < 1 {
		w = 1
	}
	if h < 1 {
		h = 1
	}
	pos := fyne.NewPos(plotLeft, plotTop)
	if v.aspect > 0 {
		if w/h > float32(v.aspect) {
			nw := h * float32(v.aspect)
			pos.X += (w - nw) / 2
			w = nw
		} else {
			nh := w / float32(v.aspect)
			h = nh
		}
	}
	return pos, fyne.NewSize(w, h)
}

// plotPixels is the size in device pixels of the image to render for the
// current widget size.
func (v *sectionView) plotPixels() (int, int) {
	_, s := v.plotRect(v.Size())
	scale := float32(1)
	if c := fyne.CurrentApp().Driver().CanvasForObject(v); c != nil {
		scale = c.Scale()
	}
	w, h := int(math.Round(float64(s.Width*scale))), int(math.Round(float64(s.Height*scale)))
	return max(w, 1), max(h, 1)
}

// toData maps a widget position to fractional (trace, sample) indices of the
// shown section, and reports whether it lies on the plot.
func (v *sectionView) toData(p fyne.Position) (trace, sample float64, inside bool) {
	pos, s := v.plotRect(v.Size())
	fx := float64((p.X - pos.X) / s.Width)
	fy := float64((p.Y - pos.Y) / s.Height)
	trace = v.vp.Trace0 + fx*(v.vp.Trace1-v.vp.Trace0)
	sample = v.vp.Sample0 + fy*(v.vp.Sample1-v.vp.Sample0)
	return trace, sample, v.img != nil && fx >= 0 && fx < 1 && fy >= 0 && fy < 1
}

// MouseIn is part of desktop.Hoverable.
func (v *sectionView) MouseIn(e *desktop.MouseEvent) { v.MouseMoved(e) }

// MouseMoved is part of desktop.Hoverable.
func (v *sectionView) MouseMoved(e *desktop.MouseEvent) {
	v.lastCursor = e.Position
	if v.onHover != nil {
		t, s, in := v.toData(e.Position)
		v.onHover(t, s, in)
	}
}

// MouseOut is part of desktop.Hoverable.
func (v *sectionView) MouseOut() {
	if v.onHover != nil {
		v.onHover(0, 0, false)
	}
}

// FocusGained is part of fyne.Focusable: the section takes the stepping and
// zoom keys once clicked, whatever control had them before.
func (v *sectionView) FocusGained() { v.focused = true; v.Refresh() }

// FocusLost is part of fyne.Focusable.
func (v *sectionView) FocusLost() { v.focused = false; v.Refresh() }

// TypedRune is part of fyne.Focusable; "+" and "-" arrive as keys too.
func (v *sectionView) TypedRune(rune) {}

// TypedKey passes keys to the viewer while the section has the focus.
func (v *sectionView) TypedKey(e *fyne.KeyEvent) {
	if v.onKey != nil {
		v.onKey(e)
	}
}

// focus gives the section the keyboard.
func (v *sectionView) focus() {
	if c := fyne.CurrentApp().Driver().CanvasForObject(v); c != nil {
		c.Focus(v)
	}
}

// Tapped picks the trace under the pointer and takes the keyboard.
func (v *sectionView) Tapped(e *fyne.PointEvent) {
	v.focus()
	if v.toolTapped(e) {
		return
	}
	t, s, in := v.toData(e.Position)
	if in && v.onPick != nil {
		v.onPick(t, s)
	}
}

// Scrolled zooms about the pointer: wheel forward zooms in.
func (v *sectionView) Scrolled(e *fyne.ScrollEvent) {
	if v.onZoom == nil || e.Scrolled.DY == 0 {
		return
	}
	t, s, _ := v.toData(e.Position)
	factor := math.Pow(1.25, float64(e.Scrolled.DY)/10)
	if e.Scrolled.DY > 0 && factor < 1.05 {
		factor = 1.25
	} else if e.Scrolled.DY < 0 && factor > 1/1.05 {
		factor = 1 / 1.25
	}
	v.onZoom(factor, t, s)
}

// Dragged pans: the section follows the pointer.
func (v *sectionView) Dragged(e *fyne.DragEvent) {
	if v.toolDragged(e) {
		return
	}
	if v.onPan == nil {
		return
	}
	_, s := v.plotRect(v.Size())
	dt := -float64(e.Dragged.DX/s.Width) * (v.vp.Trace1 - v.vp.Trace0)
	ds := -float64(e.Dragged.DY/s.Height) * (v.vp.Sample1 - v.vp.Sample0)
	v.onPan(dt, ds)
}

// DragEnd is part of fyne.Draggable.
func (v *sectionView) DragEnd() { v.toolDragEnd() }

// Resize re-renders at the new size.
func (v *sectionView) Resize(s fyne.Size) {
	old := v.Size()
	v.BaseWidget.Resize(s)
	if old != s && v.onResize != nil {
		v.onResize()
	}
}

// MinSize keeps room for the axes and a usable plot.
func (v *sectionView) MinSize() fyne.Size { return fyne.NewSize(240, 200) }

// CreateRenderer is part of fyne.Widget.
func (v *sectionView) CreateRenderer() fyne.WidgetRenderer {
	r := &sectionRenderer{v: v}
	r.bg = canvas.NewRectangle(color.Transparent)
	r.frame = canvas.NewRectangle(color.Transparent)
	r.frame.StrokeWidth = 1
	r.image = canvas.NewImageFromImage(nil)
	r.image.ScaleMode = canvas.ImageScalePixels
	r.image.FillMode = canvas.ImageFillStretch
	r.pickLine = canvas.NewLine(color.RGBA{255, 200, 0, 255})
	r.pickLine.StrokeWidth = 1.5
	r.pickRow = canvas.NewLine(color.RGBA{255, 200, 0, 255})
	r.pickRow.StrokeWidth = 1.5
	r.message = canvas.NewText("", theme.Color(theme.ColorNameForeground))
	r.message.Alignment = fyne.TextAlignCenter
	r.hTitle = canvas.NewText("", theme.Color(theme.ColorNameForeground))
	r.hTitle.TextSize = theme.CaptionTextSize()
	r.vTitle = canvas.NewText("", theme.Color(theme.ColorNameForeground))
	r.vTitle.TextSize = theme.CaptionTextSize()
	r.Refresh()
	return r
}

// sectionRenderer draws the section view: the image, a frame, the picked
// trace, tick marks with labels on the top and left, and axis titles.
type sectionRenderer struct {
	v        *sectionView
	bg       *canvas.Rectangle
	frame    *canvas.Rectangle
	image    *canvas.Image
	pickLine *canvas.Line
	pickRow  *canvas.Line // the horizontal line of a map's pick cross
	message  *canvas.Text
	hTitle   *canvas.Text
	vTitle   *canvas.Text
	// Tick marks and labels, made once and reused by every layout.
	tickLines  linePool
	tickLabels textPool
	marks      markObjects // horizons over the picture
}

func (r *sectionRenderer) Destroy() {}

func (r *sectionRenderer) MinSize() fyne.Size { return r.v.MinSize() }

func (r *sectionRenderer) Objects() []fyne.CanvasObject {
	objs := []fyne.CanvasObject{r.bg, r.image}
	objs = append(objs, r.marks.objects()...)
	objs = append(objs, r.frame, r.pickLine, r.pickRow, r.hTitle, r.vTitle, r.message)
	return append(append(objs, r.tickLines.objects()...), r.tickLabels.objects()...)
}

func (r *sectionRenderer) Refresh() {
	fg := theme.Color(theme.ColorNameForeground)
	r.bg.FillColor = theme.Color(theme.ColorNameInputBackground)
	r.frame.StrokeColor = theme.Color(theme.ColorNameSeparator)
	r.frame.StrokeWidth = 1
	if r.v.focused {
		// The keys act on the section: say so with a frame that shows.
		r.frame.StrokeColor = theme.Color(theme.ColorNamePrimary)
		r.frame.StrokeWidth = 3
	}
	r.message.Color, r.hTitle.Color, r.vTitle.Color = fg, fg, fg
	r.message.Text = r.v.message
	r.image.Image = r.v.img
	r.hTitle.Text, r.vTitle.Text = r.v.axes.HTitle, r.v.axes.VTitle
	r.Layout(r.v.Size())
	r.bg.Refresh()
	r.image.Refresh()
	r.frame.Refresh()
	r.message.Refresh()
	for _, o := range r.Objects() {
		o.Refresh()
	}
}

func (r *sectionRenderer) Layout(size fyne.Size) {
	v := r.v
	pos, ps := v.plotRect(size)
	r.bg.Move(fyne.NewPos(0, 0))
	r.bg.Resize(size)
	r.image.Move(pos)
	r.image.Resize(ps)
	r.frame.Move(pos)
	r.frame.Resize(ps)
	hasImage := v.img != nil && v.message == ""
	r.image.Hidden = !hasImage
	r.message.Hidden = v.message == ""
	r.message.Move(fyne.NewPos(0, size.Height/2-12))
	r.message.Resize(fyne.NewSize(size.Width, 24))

	r.marks.layout(v, pos, ps, hasImage)
	r.pickLine.Hidden = true
	if hasImage && !math.IsNaN(v.pick) && v.vp.Trace1 > v.vp.Trace0 {
		fx := float32((v.pick + 0.5 - v.vp.Trace0) / (v.vp.Trace1 - v.vp.Trace0))
		if fx >= 0 && fx <= 1 {
			x := pos.X + fx*ps.Width
			r.pickLine.Position1 = fyne.NewPos(x, pos.Y)
			r.pickLine.Position2 = fyne.NewPos(x, pos.Y+ps.Height)
			r.pickLine.Hidden = false
		}
	}
	r.pickRow.Hidden = true
	if !r.pickLine.Hidden && !math.IsNaN(v.pickRow) && v.vp.Sample1 > v.vp.Sample0 {
		fy := float32((v.pickRow + 0.5 - v.vp.Sample0) / (v.vp.Sample1 - v.vp.Sample0))
		if fy >= 0 && fy <= 1 {
			y := pos.Y + fy*ps.Height
			r.pickRow.Position1 = fyne.NewPos(pos.X, y)
			r.pickRow.Position2 = fyne.NewPos(pos.X+ps.Width, y)
			r.pickRow.Hidden = false
		}
	}
	r.tickLines.reset()
	r.tickLabels.reset()
	defer r.tickLines.finish()
	defer r.tickLabels.finish()
	if !hasImage {
		r.hTitle.Hidden, r.vTitle.Hidden = true, true
		return
	}
	r.hTitle.Hidden, r.vTitle.Hidden = false, false
	r.layoutTicks(pos, ps)
	// Titles share the top row: the vertical axis's over its labels, the
	// horizontal axis's centred over the plot; tick labels sit below them.
	r.vTitle.Move(fyne.NewPos(4, 2))
	hs := r.hTitle.MinSize()
	r.hTitle.Move(fyne.NewPos(pos.X+(ps.Width-hs.Width)/2, 2))
}

// layoutTicks places tick marks and labels for the keys along the top and
// the time (or row keys) down the left.
func (r *sectionRenderer) layoutTicks(pos fyne.Position, ps fyne.Size) {
	v := r.v
	fg := theme.Color(theme.ColorNameForeground)
	small := theme.CaptionTextSize()
	tw := v.vp.Trace1 - v.vp.Trace0
	sw := v.vp.Sample1 - v.vp.Sample0
	if tw <= 0 || sw <= 0 {
		return
	}
	// Horizontal: keys at nice multiples, placed at their trace centres.
	if n := len(v.axes.HKeys); n > 0 {
		for _, idx := range keyTicks(v.axes.HKeys, v.vp.Trace0, v.vp.Trace1, int(ps.Width/90)+1) {
			x := pos.X + float32((float64(idx)+0.5-v.vp.Trace0)/tw)*ps.Width
			r.tickLines.next(fyne.NewPos(x, pos.Y-4), fyne.NewPos(x, pos.Y), fg)
			t := r.tickLabels.next(fmt.Sprint(v.axes.HKeys[idx]), fg, small, false)
			ts := t.MinSize()
			t.Move(fyne.NewPos(x-ts.Width/2, pos.Y-4-ts.Height))
		}
	}
	// Vertical: time in ms, or row keys for a map.
	var labels []struct {
		at   float64
		text string
	}
	if v.axes.VKeys != nil {
		for _, idx := range keyTicks(v.axes.VKeys, v.vp.Sample0, v.vp.Sample1, int(ps.Height/40)+1) {
			labels = append(labels, struct {
				at   float64
				text string
			}{float64(idx) + 0.5, fmt.Sprint(v.axes.VKeys[idx])})
		}
	} else if v.axes.DTMS > 0 {
		t0 := v.axes.T0MS + v.vp.Sample0*v.axes.DTMS
		t1 := v.axes.T0MS + v.vp.Sample1*v.axes.DTMS
		for _, t := range render.TimeTicks(t0, t1, float64(ps.Height), 45) { // figures' tick rule
			labels = append(labels, struct {
				at   float64
				text string
			}{(t - v.axes.T0MS) / v.axes.DTMS, formatMS(t)})
		}
	}
	for _, l := range labels {
		y := pos.Y + float32((l.at-v.vp.Sample0)/sw)*ps.Height
		if y < pos.Y-0.5 || y > pos.Y+ps.Height+0.5 {
			continue
		}
		r.tickLines.next(fyne.NewPos(pos.X-4, y), fyne.NewPos(pos.X, y), fg)
		t := r.tickLabels.next(l.text, fg, small, false)
		ts := t.MinSize()
		t.Move(fyne.NewPos(pos.X-6-ts.Width, y-ts.Height/2))
	}
}

// keyTicks chooses trace indices in [lo, hi) whose keys are multiples of a
// nice step, about n of them.
func keyTicks(keys []int, lo, hi float64, n int) []int {
	i0 := max(int(math.Floor(lo)), 0)
	i1 := min(int(math.Ceil(hi)), len(keys))
	if i1 <= i0 {
		return nil
	}
	span := math.Abs(float64(keys[i1-1] - keys[i0]))
	step := int(niceStep(span, n))
	if step < 1 {
		step = 1
	}
	var out []int
	for i := i0; i < i1; i++ {
		if keys[i]%step == 0 {
			out = append(out, i)
		}
	}
	if len(out) == 0 {
		out = append(out, i0)
	}
	return out
}
