package viewer

import (
	"image/color"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
)

// objectPool keeps a renderer's repeated canvas objects (tick marks, tick
// and plot labels) across layouts: a layout takes objects with take, which
// reuses those made before and makes new ones only when it needs more than
// ever, and finish hides the ones it did not take. fyne's own widgets make
// their canvas objects once in the renderer and update them in Refresh the
// same way.
type objectPool[T fyne.CanvasObject] struct {
	items []T
	used  int
	make  func() T
}

// reset starts a layout.
func (p *objectPool[T]) reset() { p.used = 0 }

// take returns the next object, made when the pool has none left.
func (p *objectPool[T]) take() T {
	if p.used == len(p.items) {
		p.items = append(p.items, p.make())
	}
	o := p.items[p.used]
	p.used++
	o.Show()
	return o
}

// finish hides the objects this layout did not take.
func (p *objectPool[T]) finish() {
	for _, o := range p.items[p.used:] {
		o.Hide()
	}
}

// objects lists every object of the pool.
func (p *objectPool[T]) objects() []fyne.CanvasObject {
	out := make([]fyne.CanvasObject, len(p.items))
	for i, o := range p.items {
		out[i] = o
	}
	return out
}

// textPool is the pool of a renderer's labels.
type textPool struct{ objectPool[*canvas.Text] }

// next returns a visible text object showing s in colour c at size.
func (p *textPool) next(s string, c color.Color, size float32, bold bool) *canvas.Text {
	if p.make == nil {
		p.make = func() *canvas.Text { return canvas.NewText("", c) }
	}
	t := p.take()
	t.Text, t.Color, t.TextSize, t.TextStyle.Bold = s, c, size, bold
	return t
}

// linePool is the pool of a renderer's tick marks.
type linePool struct{ objectPool[*canvas.Line] }

// next returns a visible line from a to b in colour c.
func (p *linePool) next(a, b fyne.Position, c color.Color) *canvas.Line {
	if p.make == nil {
		p.make = func() *canvas.Line { l := canvas.NewLine(c); l.StrokeWidth = 1; return l }
	}
	l := p.take()
	l.Position1, l.Position2, l.StrokeColor = a, b, c
	return l
}
