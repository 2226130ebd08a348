package viewer

import (
	"image/color"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
)

// textPool keeps the text objects of a renderer's labels (tick labels, plot
// labels) across layouts: a layout takes texts with next, reusing those made
// before and making new ones only when it needs more than ever, and finish
// hides the ones it did not take. fyne's own widgets make their canvas
// objects once in the renderer and update them in Refresh the same way.
type textPool struct {
	texts []*canvas.Text
	used  int
}

// reset starts a layout.
func (p *textPool) reset() { p.used = 0 }

// next returns a visible text object showing s in colour c at size.
func (p *textPool) next(s string, c color.Color, size float32, bold bool) *canvas.Text {
	if p.used == len(p.texts) {
		p.texts = append(p.texts, canvas.NewText("", c))
	}
	t := p.texts[p.used]
	p.used++
	t.Text, t.Color, t.TextSize, t.TextStyle.Bold = s, c, size, bold
	t.Hidden = false
	return t
}

// finish hides the texts this layout did not take.
func (p *textPool) finish() {
	for _, t := range p.texts[p.used:] {
		t.Hidden = true
	}
}

// objects lists every text object of the pool.
func (p *textPool) objects() []fyne.CanvasObject {
	out := make([]fyne.CanvasObject, len(p.texts))
	for i, t := range p.texts {
		out[i] = t
	}
	return out
}

// linePool is textPool for lines (tick marks).
type linePool struct {
	lines []*canvas.Line
	used  int
}

func (p *linePool) reset() { p.used = 0 }

// next returns a visible line from a to b in colour c.
func (p *linePool) next(a, b fyne.Position, c color.Color) *canvas.Line {
	if p.used == len(p.lines) {
		l := canvas.NewLine(c)
		l.StrokeWidth = 1
		p.lines = append(p.lines, l)
	}
	l := p.lines[p.used]
	p.used++
	l.Position1, l.Position2, l.StrokeColor = a, b, c
	l.Hidden = false
	return l
}

func (p *linePool) finish() {
	for _, l := range p.lines[p.used:] {
		l.Hidden = true
	}
}

func (p *linePool) objects() []fyne.CanvasObject {
	out := make([]fyne.CanvasObject, len(p.lines))
	for i, l := range p.lines {
		out[i] = l
	}
	return out
}
