package viewer

import (
	"fmt"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/palettes"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"
)

// displayPanel is the Display tab: palettes, clip, layers (co-rendering,
// base layer, opacity, wiggles), vertical stretch and whether the trace
// panel follows the cursor. It owns its widgets; refresh sets them from the
// state.
type displayPanel struct {
	refreshing bool
	content    fyne.CanvasObject

	palettePick     *paletteChooser
	basePalettePick *paletteChooser
	clipSlider      *widget.Slider
	clipLabel       *widget.Label
	wiggleCheck     *widget.Check
	coRenderCheck   *widget.Check
	baseChoice      *widget.Select
	opacitySlider   *widget.Slider
	opacityLabel    *widget.Label
	followCheck     *widget.Check
	stretchSlider   *widget.Slider
	followCursor    *widget.Check
	oneClick        *widget.Button

	// The colour range of the coloured layer (the overlay, or the base
	// alone): its values' histogram with the range drawn on it, and
	// entries for the range's ends.
	histogram *canvas.Image
	histNote  *widget.Label
	minEntry  *widget.Entry
	maxEntry  *widget.Entry
	rangeWhy  *widget.Label
}

func newDisplayPanel(v *viewer) *displayPanel {
	u := &displayPanel{}
	u.palettePick = newPaletteChooser(palettes.All(), func(label string) {
		if u.refreshing {
			return
		}
		s := paletteName(label)
		pl := v.state.plan()
		if pl.Overlay != nil {
			v.setPalette(pl.Overlay, true, s)
		} else {
			v.setPalette(pl.Base, false, s)
		}
	})
	u.basePalettePick = newPaletteChooser(palettes.All(), func(label string) {
		if u.refreshing {
			return
		}
		v.setPalette(v.state.plan().Base, false, paletteName(label))
	})
	u.clipLabel = widget.NewLabel("")
	u.clipSlider = widget.NewSlider(90, 100)
	u.clipSlider.Step = 0.1
	u.clipSlider.OnChangeEnded = func(f float64) {
		if u.refreshing {
			return
		}
		v.state.ClipPercent = f
		v.refreshControls()
		v.requestRender()
	}
	u.wiggleCheck = widget.NewCheck("Amplitude wiggles on top", func(b bool) {
		if u.refreshing {
			return
		}
		v.state.Wiggle = b
		v.requestRender()
	})
	u.coRenderCheck = widget.NewCheck("Draw the attribute over a base layer", func(b bool) {
		if u.refreshing {
			return
		}
		v.setCoRender(b)
	})
	var attrNames []string
	for _, a := range compute.Attributes() {
		attrNames = append(attrNames, a.Name)
	}
	u.baseChoice = widget.NewSelect(attrNames, func(s string) {
		if u.refreshing {
			return
		}
		for _, a := range compute.Attributes() {
			if a.Name == s {
				v.state.BaseID = a.ID
			}
		}
		v.refreshControls()
		v.requestData()
	})
	u.opacitySlider = widget.NewSlider(0, 1)
	u.opacitySlider.Step = 0.05
	u.opacityLabel = widget.NewLabel("")
	u.opacitySlider.OnChanged = func(f float64) { u.opacityLabel.SetText(fmt.Sprintf("Opacity %.0f %%", f*100)) }
	u.opacitySlider.OnChangeEnded = func(f float64) {
		if u.refreshing {
			return
		}
		v.state.Opacity = f
		v.requestRender()
	}
	u.followCheck = widget.NewCheck("Opacity follows the value", func(b bool) {
		if u.refreshing {
			return
		}
		v.state.OpacityFollowsValue = b
		v.requestRender()
	})
	u.oneClick = widget.NewButtonWithIcon("Envelope over amplitude", theme.ColorPaletteIcon(), v.envelopeOverAmplitude)
	u.oneClick.Importance = widget.HighImportance
	u.stretchSlider = widget.NewSlider(minExaggeration, maxExaggeration)
	u.stretchSlider.Step = 0.25
	u.stretchSlider.OnChangeEnded = func(f float64) {
		if u.refreshing {
			return
		}
		n, m := v.dims()
		v.state.setExaggeration(f, n, m)
		v.refreshControls()
		v.requestRender()
		v.requestTrace()
	}
	u.followCursor = widget.NewCheck("Trace panel follows the cursor", func(b bool) { v.state.FollowCursor = b })

	u.histogram = canvas.NewImageFromImage(nil)
	u.histogram.FillMode = canvas.ImageFillStretch
	u.histogram.ScaleMode = canvas.ImageScalePixels
	u.histogram.SetMinSize(fyne.NewSize(histogramWidth, histogramHeight))
	u.histNote = widget.NewLabel("")
	u.histNote.SizeName = theme.SizeNameCaptionText
	u.histNote.Wrapping = fyne.TextWrapWord // wraps in the tab's width instead of widening the window
	u.minEntry, u.maxEntry = widget.NewEntry(), widget.NewEntry()
	u.rangeWhy = refusalLabel()
	submit := func(string) {
		u.rangeWhy.SetText("")
		setRefusal(u.rangeWhy, v.setColourRange(u.minEntry.Text, u.maxEntry.Text))
	}
	u.minEntry.OnSubmitted, u.maxEntry.OnSubmitted = submit, submit
	colour := container.New(layout.NewFormLayout(),
		widget.NewLabel("Palette"), u.palettePick,
		widget.NewLabel("Base palette"), u.basePalettePick,
		u.clipLabel, u.clipSlider,
		widget.NewLabel("Values"), container.NewVBox(u.histogram, u.histNote),
		widget.NewLabel("Minimum"), u.minEntry,
		widget.NewLabel("Maximum"), container.NewVBox(u.maxEntry, u.rangeWhy))
	layers := container.New(layout.NewFormLayout(),
		widget.NewLabel("Base layer"), u.baseChoice,
		u.opacityLabel, u.opacitySlider)
	view := container.New(layout.NewFormLayout(), widget.NewLabel("Vertical stretch"), u.stretchSlider)
	u.content = container.NewVScroll(container.NewVBox(
		u.oneClick,
		widget.NewCard("", "Colours", colour),
		widget.NewCard("", "Layers", container.NewVBox(u.coRenderCheck, layers, u.followCheck, u.wiggleCheck)),
		widget.NewCard("", "View", container.NewVBox(view, u.followCursor)),
	))
	return u
}

// refresh sets the display controls from the state.
func (u *displayPanel) refresh(st *viewState) {
	was := u.refreshing
	u.refreshing = true
	defer func() { u.refreshing = was }()
	pl := st.plan()
	if pl.Overlay != nil {
		u.palettePick.SetSelected(paletteLabel(st.paletteFor(pl.Overlay, true)))
		u.basePalettePick.SetSelected(paletteLabel(st.paletteFor(pl.Base, false)))
		u.basePalettePick.Enable()
	} else {
		u.palettePick.SetSelected(paletteLabel(st.paletteFor(pl.Base, false)))
		u.basePalettePick.ClearSelected()
		u.basePalettePick.Disable()
	}
	u.clipSlider.SetValue(st.ClipPercent)
	u.clipLabel.SetText(fmt.Sprintf("Clip at %.1f %%", st.ClipPercent))
	u.wiggleCheck.SetChecked(st.Wiggle)
	u.coRenderCheck.SetChecked(st.CoRender)
	u.baseChoice.SetSelected(lookup(st.BaseID).Name)
	u.opacitySlider.SetValue(st.Opacity)
	u.followCheck.SetChecked(st.OpacityFollowsValue)
	if pl.Overlay != nil {
		u.baseChoice.Enable()
		u.opacitySlider.Enable()
		u.followCheck.Enable()
	} else {
		u.baseChoice.Disable()
		u.opacitySlider.Disable()
		u.followCheck.Disable()
	}
	u.stretchSlider.SetValue(st.Exaggeration)
	u.opacityLabel.SetText(fmt.Sprintf("Opacity %.0f %%", st.Opacity*100))
	if st.Orientation == volume.TimeSlice {
		u.stretchSlider.Disable() // a map keeps its true shape
	} else {
		u.stretchSlider.Enable()
	}
	u.followCursor.SetChecked(st.FollowCursor)
}

// setHistogram shows the histogram of the coloured layer's values (of
// attribute a) and its colour range in the entries.
func (u *displayPanel) setHistogram(h valueHistogram, a *compute.Attribute) {
	u.histogram.Image = h.img
	u.histogram.Refresh()
	unit := unitSuffix(a.Unit)
	if h.max > h.min {
		u.histNote.SetText(fmt.Sprintf("%s: values %s to %s%s; colours between the red lines", a.Name, fmtValue(float32(h.min)), fmtValue(float32(h.max)), unit))
	} else {
		u.histNote.SetText(a.Name + ": no values to count")
	}
	u.minEntry.SetText(fmtValue(h.lo))
	u.maxEntry.SetText(fmtValue(h.hi))
	setRefusal(u.rangeWhy, "")
}

// paletteLabel names a palette in the choice lists with its family, so the
// user can tell a cyclic map from a sequential one.
func paletteLabel(p *palettes.Palette) string {
	return p.Name + " (" + p.Family.String() + ")"
}

// paletteName is the palette name of a label made by paletteLabel.
func paletteName(label string) string {
	if i := strings.LastIndex(label, " ("); i > 0 {
		return label[:i]
	}
	return label
}
