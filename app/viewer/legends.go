package viewer

import (
	"fmt"
	"image"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/widget"

	"quadtrace/compute"
	"quadtrace/palettes"
	"quadtrace/render"
)

// legendStrip is the colour key under the section: one row per drawn layer
// (overlay first), each a heading, the palette bar and the values at its
// ends. Its widgets are made once; refresh updates and shows or hides them.
type legendStrip struct {
	content fyne.CanvasObject
	rows    [2]legendRow
}

type legendRow struct {
	box    *fyne.Container
	head   *widget.Label
	bar    *canvas.Image
	lo, hi *widget.Label
}

func newLegendStrip() *legendStrip {
	s := &legendStrip{}
	box := container.NewVBox()
	for i := range s.rows {
		r := &s.rows[i]
		r.head = widget.NewLabelWithStyle("", fyne.TextAlignLeading, fyne.TextStyle{Bold: true})
		r.bar = canvas.NewImageFromImage(paletteStrip(nil))
		r.bar.ScaleMode = canvas.ImageScaleSmooth
		r.bar.FillMode = canvas.ImageFillStretch
		r.bar.SetMinSize(fyne.NewSize(200, 14))
		r.lo, r.hi = widget.NewLabel(""), widget.NewLabel("")
		r.box = container.NewVBox(r.head, container.NewBorder(nil, nil, r.lo, r.hi, container.NewVBox(layout.NewSpacer(), r.bar, layout.NewSpacer())))
		r.box.Hide()
		box.Add(r.box)
	}
	s.content = container.NewPadded(box)
	return s
}

// shown is the number of layers the strip shows.
func (s *legendStrip) shown() int {
	n := 0
	for _, r := range s.rows {
		if r.box.Visible() {
			n++
		}
	}
	return n
}

func (r *legendRow) set(a *compute.Attribute, l render.Layer, note string) {
	name := a.Name + unitSuffix(a.Unit)
	if note != "" {
		name += " — " + note
	}
	r.head.SetText(name)
	r.bar.Image = paletteStrip(l.Palette)
	r.bar.Refresh()
	r.lo.SetText(render.FormatTick(float64(l.Lo), decimalsFor(l.Lo, l.Hi)))
	r.hi.SetText(render.FormatTick(float64(l.Hi), decimalsFor(l.Lo, l.Hi)))
	r.box.Show()
}

// pendingNote explains the hatch over a time slice still being computed.
const pendingNote = "grey hatch: not computed yet"

// refresh shows a colour key for each layer of a render of plan pl drawn
// with the state st's opacity.
func (s *legendStrip) refresh(pl layerPlan, res renderResult, st *viewState) {
	if res.hasOv && pl.Overlay != nil {
		note := fmt.Sprintf("over, %.0f %% opacity", st.Opacity*100)
		if st.OpacityFollowsValue {
			note += " following the value"
		}
		if res.pending {
			note += "; " + pendingNote
		}
		s.rows[0].set(pl.Overlay, res.ov, note)
		s.rows[1].set(pl.Base, res.base, "base")
		return
	}
	note := ""
	if res.pending {
		note = pendingNote
	}
	s.rows[0].set(pl.Base, res.base, note)
	s.rows[1].box.Hide()
}

// decimalsFor picks the decimals that tell lo and hi apart.
func decimalsFor(lo, hi float32) int {
	span := math.Abs(float64(hi - lo))
	if span == 0 {
		return 2
	}
	return max(0, min(6, render.TickDecimals(niceStep(span, 5))))
}

// paletteStrip is a 256 x 1 picture of a palette.
func paletteStrip(p *palettes.Palette) image.Image {
	img := image.NewRGBA(image.Rect(0, 0, 256, 1))
	if p == nil {
		return img
	}
	for i, c := range p.Table {
		img.SetRGBA(i, 0, c)
	}
	return img
}
