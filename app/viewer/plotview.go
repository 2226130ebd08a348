package viewer

import (
	"image"
	"image/color"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"
)

// plotLabel is a line of text placed on a plotView: X is a fraction of the
// plot width, Y a fraction of its height (negative values reach into the top
// margin, values above 1 into the bottom one), moved down by DY. Align says
// which end of the text sits at X.
type plotLabel struct {
	X, Y  float64
	DY    float32 // added to the height given by Y, in fyne units
	Text  string
	Align fyne.TextAlign
	Color color.Color // nil: the theme's foreground
	Bold  bool
	Small bool // a scale label: smaller than the caption size
	// MaxWidth, when above 0, is the widest the text may be, as a fraction
	// of the plot width: longer text is cut with an ellipsis.
	MaxWidth float64
	// Outside lets a label sit left of the plot area (in the left margin)
	// instead of being pushed inside the widget's edge.
	Outside bool
}

// plotView shows a picture drawn in the background (curves of the trace
// panel, the spectrum) with text labels laid over it by fyne. Its margins
// are fixed at construction so that a plot can line up with another widget.
type plotView struct {
	widget.BaseWidget

	top, bottom, left, right float32
	minSize                  fyne.Size
	img                      image.Image
	labels                   []plotLabel
	message                  string
	onResize                 func()
	onTapped                 func(fx, fy float64)
}

func newPlotView(top, bottom, left, right float32, min fyne.Size) *plotView {
	p := &plotView{top: top, bottom: bottom, left: left, right: right, minSize: min}
	p.ExtendBaseWidget(p)
	return p
}

// set shows img with labels.
func (p *plotView) set(img image.Image, labels []plotLabel) {
	p.img, p.labels, p.message = img, labels, ""
	p.Refresh()
}

// setMessage shows a line of text instead of a plot.
func (p *plotView) setMessage(msg string) {
	p.img, p.labels, p.message = nil, nil, msg
	p.Refresh()
}

func (p *plotView) plotRect(size fyne.Size) (fyne.Position, fyne.Size) {
	w := max(size.Width-p.left-p.right, 1)
	h := max(size.Height-p.top-p.bottom, 1)
	return fyne.NewPos(p.left, p.top), fyne.NewSize(w, h)
}

// plotPixels is the size in device pixels of the picture to draw.
func (p *plotView) plotPixels() (int, int) {
	_, s := p.plotRect(p.Size())
	scale := float32(1)
	if c := fyne.CurrentApp().Driver().CanvasForObject(p); c != nil {
		scale = c.Scale()
	}
	return max(int(math.Round(float64(s.Width*scale))), 1), max(int(math.Round(float64(s.Height*scale))), 1)
}

// Resize asks for a new picture at the new size.
func (p *plotView) Resize(s fyne.Size) {
	old := p.Size()
	p.BaseWidget.Resize(s)
	if old != s && p.onResize != nil {
		p.onResize()
	}
}

// Tapped reports where on the plot the user clicked.
func (p *plotView) Tapped(e *fyne.PointEvent) {
	if p.onTapped == nil {
		return
	}
	pos, s := p.plotRect(p.Size())
	p.onTapped(float64((e.Position.X-pos.X)/s.Width), float64((e.Position.Y-pos.Y)/s.Height))
}

// MinSize is part of fyne.Widget.
func (p *plotView) MinSize() fyne.Size { return p.minSize }

// CreateRenderer is part of fyne.Widget.
func (p *plotView) CreateRenderer() fyne.WidgetRenderer {
	r := &plotRenderer{p: p}
	r.bg = canvas.NewRectangle(color.Transparent)
	r.image = canvas.NewImageFromImage(nil)
	r.image.ScaleMode = canvas.ImageScalePixels
	r.image.FillMode = canvas.ImageFillStretch
	r.message = canvas.NewText("", theme.Color(theme.ColorNameForeground))
	r.message.Alignment = fyne.TextAlignCenter
	r.message.TextSize = theme.CaptionTextSize()
	r.Refresh()
	return r
}

type plotRenderer struct {
	p       *plotView
	bg      *canvas.Rectangle
	image   *canvas.Image
	message *canvas.Text
	texts   textPool // the labels, made once and reused by every layout
}

func (r *plotRenderer) Destroy() {}

func (r *plotRenderer) MinSize() fyne.Size { return r.p.MinSize() }

func (r *plotRenderer) Objects() []fyne.CanvasObject {
	return append([]fyne.CanvasObject{r.bg, r.image, r.message}, r.texts.objects()...)
}

func (r *plotRenderer) Refresh() {
	r.bg.FillColor = theme.Color(theme.ColorNameInputBackground)
	r.message.Color = theme.Color(theme.ColorNameForeground)
	r.message.Text = r.p.message
	r.image.Image = r.p.img
	r.Layout(r.p.Size())
	for _, o := range r.Objects() {
		o.Refresh()
	}
}

func (r *plotRenderer) Layout(size fyne.Size) {
	p := r.p
	r.bg.Resize(size)
	pos, ps := p.plotRect(size)
	r.image.Move(pos)
	r.image.Resize(ps)
	r.image.Hidden = p.img == nil
	r.message.Hidden = p.message == ""
	r.message.Move(fyne.NewPos(0, size.Height/2-10))
	r.message.Resize(fyne.NewSize(size.Width, 20))
	r.texts.reset()
	defer r.texts.finish()
	fg := theme.Color(theme.ColorNameForeground)
	for _, l := range p.labels {
		c := l.Color
		if c == nil {
			c = fg
		}
		textSize := theme.CaptionTextSize()
		if l.Small {
			textSize *= 0.85
		}
		t := r.texts.next(l.Text, c, textSize, l.Bold)
		if l.MaxWidth > 0 {
			t.Text = fitText(l.Text, float32(l.MaxWidth)*ps.Width, textSize, t.TextStyle)
		}
		ts := t.MinSize()
		x := pos.X + float32(l.X)*ps.Width
		switch l.Align {
		case fyne.TextAlignCenter:
			x -= ts.Width / 2
		case fyne.TextAlignTrailing:
			x -= ts.Width
		}
		if l.Outside {
			x -= 3 // a gap between the label and the plot it labels
		}
		x = max(0, min(x, size.Width-ts.Width))
		y := pos.Y + float32(l.Y)*ps.Height + l.DY - ts.Height/2
		t.Move(fyne.NewPos(x, y))
	}
}

// fitText cuts s with an ellipsis so that it is at most width wide at the
// given text size and style.
func fitText(s string, width, size float32, style fyne.TextStyle) string {
	if fyne.MeasureText(s, size, style).Width <= width {
		return s
	}
	r := []rune(s)
	for n := len(r) - 1; n > 0; n-- {
		c := string(r[:n]) + "…"
		if fyne.MeasureText(c, size, style).Width <= width {
			return c
		}
	}
	return ""
}
