package viewer

import (
	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"quadtrace/palettes"
)

// paletteChooser picks a palette from a list that shows each palette's
// colours beside its name. Closed, it is a button with the chosen
// palette's swatch; tapped, it opens the list in a pop-up. Its API follows
// widget.Select (Options, Selected, SetSelected, OnChanged).
type paletteChooser struct {
	widget.BaseWidget

	Options   []string // labels made by paletteLabel
	Selected  string
	OnChanged func(string)

	byLabel  map[string]*palettes.Palette
	button   *widget.Button
	swatch   *canvas.Image
	disabled bool
	popUp    *widget.PopUp
}

func newPaletteChooser(all []*palettes.Palette, changed func(string)) *paletteChooser {
	c := &paletteChooser{OnChanged: changed, byLabel: map[string]*palettes.Palette{}}
	for _, p := range all {
		l := paletteLabel(p)
		c.Options = append(c.Options, l)
		c.byLabel[l] = p
	}
	c.swatch = swatchImage(nil)
	c.button = widget.NewButton("(choose)", c.open)
	c.button.Alignment = widget.ButtonAlignLeading
	c.ExtendBaseWidget(c)
	return c
}

// swatchImage is a palette's colours as a small stretched picture.
func swatchImage(p *palettes.Palette) *canvas.Image {
	img := canvas.NewImageFromImage(paletteStrip(p))
	img.FillMode = canvas.ImageFillStretch
	img.ScaleMode = canvas.ImageScaleSmooth
	img.SetMinSize(fyne.NewSize(64, 14))
	return img
}

// SetSelected chooses label and calls OnChanged when it changes.
func (c *paletteChooser) SetSelected(label string) {
	if label == c.Selected {
		return
	}
	c.Selected = label
	c.show()
	if c.OnChanged != nil {
		c.OnChanged(label)
	}
}

// ClearSelected chooses nothing (without calling OnChanged).
func (c *paletteChooser) ClearSelected() {
	c.Selected = ""
	c.show()
}

func (c *paletteChooser) show() {
	text := c.Selected
	if text == "" {
		text = "(none)"
	}
	c.button.SetText(text)
	c.swatch.Image = paletteStrip(c.byLabel[c.Selected])
	c.swatch.Refresh()
}

// Disable and Enable switch the chooser off and on; Disabled tells.
func (c *paletteChooser) Disable()       { c.disabled = true; c.button.Disable() }
func (c *paletteChooser) Enable()        { c.disabled = false; c.button.Enable() }
func (c *paletteChooser) Disabled() bool { return c.disabled }

// open shows the list of palettes with their swatches.
func (c *paletteChooser) open() {
	cnv := fyne.CurrentApp().Driver().CanvasForObject(c)
	if cnv == nil || c.disabled {
		return
	}
	list := widget.NewList(
		func() int { return len(c.Options) },
		func() fyne.CanvasObject {
			return container.NewBorder(nil, nil, swatchImage(nil), nil, widget.NewLabel("palette name (family)"))
		},
		func(i widget.ListItemID, o fyne.CanvasObject) {
			row := o.(*fyne.Container)
			label := row.Objects[0].(*widget.Label)
			sw := row.Objects[1].(*canvas.Image)
			label.SetText(c.Options[i])
			sw.Image = paletteStrip(c.byLabel[c.Options[i]])
			sw.Refresh()
		})
	list.OnSelected = func(i widget.ListItemID) {
		if c.popUp != nil {
			c.popUp.Hide()
		}
		c.SetSelected(c.Options[i])
	}
	box := container.NewGridWrap(fyne.NewSize(max(c.Size().Width, 260), 320), list)
	c.popUp = widget.NewPopUp(box, cnv)
	pos := fyne.CurrentApp().Driver().AbsolutePositionForObject(c)
	c.popUp.ShowAtPosition(pos.Add(fyne.NewPos(0, c.Size().Height)))
}

// CreateRenderer is part of fyne.Widget.
func (c *paletteChooser) CreateRenderer() fyne.WidgetRenderer {
	c.show()
	return widget.NewSimpleRenderer(container.NewBorder(nil, nil, container.NewPadded(c.swatch), nil, c.button))
}
