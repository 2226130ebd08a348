package viewer

import (
	"image"
	"image/color"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"
)

// mapView shows a rendered map figure (render.Figure: the map with its
// axes, legend, scale bar, north arrow and ground grid, drawn in the
// background at the widget's pixel size) and, over it as canvas lines that
// move without a redraw, the position of the section shown in the window
// and the picked trace. A tap on the map reports the cell under it.
type mapView struct {
	widget.BaseWidget

	img     image.Image
	plot    image.Rectangle // the map's cells inside img, in img pixels
	nh, nv  int             // crosslines and inlines of the map
	message string

	// The section's place on the map, in cell coordinates: a row (inline)
	// or a column (crossline); NaN draws no line.
	lineRow, lineCol float64
	// The pick, in cell coordinates (centre of the cell); NaN: none.
	pickCol, pickRow float64

	onTap    func(col, row float64)
	onHover  func(col, row float64, inside bool)
	onResize func()
}

func newMapView() *mapView {
	v := &mapView{lineRow: math.NaN(), lineCol: math.NaN(), pickCol: math.NaN(), pickRow: math.NaN(), message: "Computing the map…"}
	v.ExtendBaseWidget(v)
	return v
}

// setImage shows img, whose map of nh x nv cells lies in plot.
func (v *mapView) setImage(img image.Image, plot image.Rectangle, nh, nv int) {
	v.img, v.plot, v.nh, v.nv, v.message = img, plot, nh, nv, ""
	v.Refresh()
}

// setMessage replaces the map by a line of text.
func (v *mapView) setMessage(msg string) {
	v.message = msg
	v.Refresh()
}

// setMarks places the section line (row or column; NaN for none) and the
// pick cross (NaN for none), in cell coordinates.
func (v *mapView) setMarks(lineRow, lineCol, pickCol, pickRow float64) {
	if same(v.lineRow, lineRow) && same(v.lineCol, lineCol) && same(v.pickCol, pickCol) && same(v.pickRow, pickRow) {
		return
	}
	v.lineRow, v.lineCol, v.pickCol, v.pickRow = lineRow, lineCol, pickCol, pickRow
	v.Refresh()
}

// same compares two coordinates, NaN equal to NaN.
func same(a, b float64) bool { return a == b || math.IsNaN(a) && math.IsNaN(b) }

// pixels is the size in device pixels of the image to render.
func (v *mapView) pixels() (int, int) {
	s := v.Size()
	scale := float32(1)
	if c := fyne.CurrentApp().Driver().CanvasForObject(v); c != nil {
		scale = c.Scale()
	}
	return max(int(math.Round(float64(s.Width*scale))), 1), max(int(math.Round(float64(s.Height*scale))), 1)
}

// toWidget maps cell coordinates to a position in the widget.
func (v *mapView) toWidget(col, row float64) fyne.Position {
	b := v.img.Bounds()
	s := v.Size()
	px := float64(v.plot.Min.X) + col/float64(v.nh)*float64(v.plot.Dx())
	py := float64(v.plot.Min.Y) + row/float64(v.nv)*float64(v.plot.Dy())
	return fyne.NewPos(float32(px/float64(b.Dx()))*s.Width, float32(py/float64(b.Dy()))*s.Height)
}

// toCell maps a widget position to cell coordinates, and reports whether
// it lies on the map.
func (v *mapView) toCell(p fyne.Position) (col, row float64, inside bool) {
	if v.img == nil || v.nh == 0 || v.nv == 0 || v.plot.Empty() || v.message != "" {
		return 0, 0, false
	}
	b := v.img.Bounds()
	s := v.Size()
	if s.Width <= 0 || s.Height <= 0 {
		return 0, 0, false
	}
	px := float64(p.X/s.Width) * float64(b.Dx())
	py := float64(p.Y/s.Height) * float64(b.Dy())
	col = (px - float64(v.plot.Min.X)) / float64(v.plot.Dx()) * float64(v.nh)
	row = (py - float64(v.plot.Min.Y)) / float64(v.plot.Dy()) * float64(v.nv)
	return col, row, col >= 0 && col < float64(v.nh) && row >= 0 && row < float64(v.nv)
}

// Tapped reports the cell under the pointer.
func (v *mapView) Tapped(e *fyne.PointEvent) {
	if c, r, in := v.toCell(e.Position); in && v.onTap != nil {
		v.onTap(c, r)
	}
}

// MouseIn is part of desktop.Hoverable.
func (v *mapView) MouseIn(e *desktop.MouseEvent) { v.MouseMoved(e) }

// MouseMoved reports the cell under the pointer.
func (v *mapView) MouseMoved(e *desktop.MouseEvent) {
	if v.onHover != nil {
		c, r, in := v.toCell(e.Position)
		v.onHover(c, r, in)
	}
}

// MouseOut is part of desktop.Hoverable.
func (v *mapView) MouseOut() {
	if v.onHover != nil {
		v.onHover(0, 0, false)
	}
}

// Resize re-renders at the new size.
func (v *mapView) Resize(s fyne.Size) {
	old := v.Size()
	v.BaseWidget.Resize(s)
	if old != s && v.onResize != nil {
		v.onResize()
	}
}

// MinSize keeps a usable map.
func (v *mapView) MinSize() fyne.Size { return fyne.NewSize(260, 220) }

// Colours of the marks: the section line and the pick cross, in the
// section view's pick colour, with a dark edge line so they read on light
// and dark palettes alike.
var (
	mapMarkColour = color.RGBA{255, 200, 0, 255}
	mapMarkEdge   = color.RGBA{0, 0, 0, 200}
)

// CreateRenderer is part of fyne.Widget.
func (v *mapView) CreateRenderer() fyne.WidgetRenderer {
	r := &mapRenderer{v: v}
	r.bg = canvas.NewRectangle(color.White)
	r.image = canvas.NewImageFromImage(nil)
	r.image.ScaleMode = canvas.ImageScalePixels
	r.image.FillMode = canvas.ImageFillStretch
	for i := range r.lines {
		c := mapMarkColour
		w := float32(2)
		if i%2 == 0 {
			c, w = mapMarkEdge, 4
		}
		r.lines[i] = canvas.NewLine(c)
		r.lines[i].StrokeWidth = w
	}
	r.message = canvas.NewText("", theme.Color(theme.ColorNameForeground))
	r.message.Alignment = fyne.TextAlignCenter
	r.Refresh()
	return r
}

// mapRenderer draws the map view: the image, then the section line and the
// two strokes of the pick cross (each as a dark edge under a bright line).
type mapRenderer struct {
	v       *mapView
	bg      *canvas.Rectangle
	image   *canvas.Image
	lines   [6]*canvas.Line // section line, cross horizontal, cross vertical; edge then colour
	message *canvas.Text
}

func (r *mapRenderer) Destroy() {}

func (r *mapRenderer) MinSize() fyne.Size { return r.v.MinSize() }

func (r *mapRenderer) Objects() []fyne.CanvasObject {
	objs := []fyne.CanvasObject{r.bg, r.image}
	for _, l := range r.lines {
		objs = append(objs, l)
	}
	return append(objs, r.message)
}

func (r *mapRenderer) Refresh() {
	r.message.Color = theme.Color(theme.ColorNameForeground)
	r.message.Text = r.v.message
	r.image.Image = r.v.img
	r.Layout(r.v.Size())
	for _, o := range r.Objects() {
		o.Refresh()
	}
}

func (r *mapRenderer) Layout(size fyne.Size) {
	v := r.v
	r.bg.Resize(size)
	r.image.Move(fyne.NewPos(0, 0))
	r.image.Resize(size)
	r.message.Move(fyne.NewPos(0, size.Height/2-10))
	r.message.Resize(fyne.NewSize(size.Width, 20))
	show := v.message == "" && v.img != nil && v.nh > 0 && v.nv > 0
	r.image.Hidden = !show
	r.bg.Hidden = !show
	for _, l := range r.lines {
		l.Hide()
	}
	if !show {
		return
	}
	place := func(i int, a, b fyne.Position) {
		for _, l := range r.lines[2*i : 2*i+2] {
			l.Position1, l.Position2 = a, b
			l.Show()
		}
	}
	switch {
	case !math.IsNaN(v.lineRow):
		place(0, v.toWidget(0, v.lineRow), v.toWidget(float64(v.nh), v.lineRow))
	case !math.IsNaN(v.lineCol):
		place(0, v.toWidget(v.lineCol, 0), v.toWidget(v.lineCol, float64(v.nv)))
	}
	if !math.IsNaN(v.pickCol) && !math.IsNaN(v.pickRow) {
		c := v.toWidget(v.pickCol, v.pickRow)
		const arm = 9
		place(1, fyne.NewPos(c.X-arm, c.Y), fyne.NewPos(c.X+arm, c.Y))
		place(2, fyne.NewPos(c.X, c.Y-arm), fyne.NewPos(c.X, c.Y+arm))
	}
}
