package viewer

import (
	"fmt"
	"image"
	"math"
	"quadtrace/compute"
	"quadtrace/palettes"
	"quadtrace/render"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/widget"
)

// refreshLegends shows a colour key for each drawn layer.
func (v *viewer) refreshLegends(pl layerPlan, res renderResult) {
	u := v.ui
	u.legends.RemoveAll()
	add := func(a *compute.Attribute, l render.Layer, note string) {
		name := a.Name + unitSuffix(a.Unit)
		if note != "" {
			name += " — " + note
		}
		head := widget.NewLabelWithStyle(name, fyne.TextAlignLeading, fyne.TextStyle{Bold: true})
		bar := canvas.NewImageFromImage(paletteStrip(l.Palette))
		bar.ScaleMode = canvas.ImageScaleSmooth
		bar.FillMode = canvas.ImageFillStretch
		bar.SetMinSize(fyne.NewSize(200, 14))
		lo := widget.NewLabel(render.FormatTick(float64(l.Lo), decimalsFor(l.Lo, l.Hi)))
		hi := widget.NewLabel(render.FormatTick(float64(l.Hi), decimalsFor(l.Lo, l.Hi)))
		u.legends.Add(head)
		u.legends.Add(container.NewBorder(nil, nil, lo, hi, container.NewVBox(layout.NewSpacer(), bar, layout.NewSpacer())))
	}
	if res.hasOv {
		note := fmt.Sprintf("over, %.0f %% opacity", v.state.Opacity*100)
		if v.state.OpacityFollowsValue {
			note += " following the value"
		}
		add(pl.Overlay, res.ov, note)
		add(pl.Base, res.base, "base")
	} else {
		add(pl.Base, res.base, "")
	}
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
