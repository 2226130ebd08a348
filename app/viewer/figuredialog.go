package viewer

import (
	"fmt"
	"path/filepath"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/widget"

	"quadtrace/app/figure"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/render"
)

// showFigureDialog asks for the figure's size, resolution and title, then
// for the file, and writes the PNG in the background.
func (v *viewer) showFigureDialog() {
	if v.data.amp == nil {
		v.showStatus("Nothing to save yet")
		return
	}
	width := widget.NewEntry()
	width.SetText("2400")
	height := widget.NewEntry()
	height.SetText("1500")
	dpi := widget.NewEntry()
	dpi.SetText("300")
	title := widget.NewEntry()
	title.SetText(v.figureTitle())
	items := []*widget.FormItem{
		widget.NewFormItem("Title", title),
		widget.NewFormItem("Width (pixels)", width),
		widget.NewFormItem("Height (pixels)", height),
		widget.NewFormItem("Resolution (dpi)", dpi),
	}
	dialog.ShowForm("Save figure", "Choose file…", "Cancel", items, func(ok bool) {
		if !ok {
			return
		}
		w, err1 := strconv.Atoi(strings.TrimSpace(width.Text))
		h, err2 := strconv.Atoi(strings.TrimSpace(height.Text))
		d, err3 := strconv.ParseFloat(strings.TrimSpace(dpi.Text), 64)
		if err1 != nil || err2 != nil || err3 != nil || w < 200 || h < 150 || w > 20000 || h > 20000 || !(d > 0) {
			v.showError("figure: width and height must be 200 to 20000 pixels and the resolution a positive number")
			return
		}
		save := dialog.NewFileSave(func(wc fyne.URIWriteCloser, err error) {
			if err != nil {
				v.showError(err.Error())
				return
			}
			if wc == nil {
				return
			}
			path := wc.URI().Path()
			wc.Close()
			v.saveFigure(path, title.Text, w, h, d)
		}, v.win)
		save.SetFileName(strings.ReplaceAll(strings.ToLower(v.figureTitle()), " ", "-") + ".png")
		save.SetFilter(storage.NewExtensionFileFilter([]string{".png"}))
		save.Resize(fyne.NewSize(900, 600))
		save.Show()
	}, v.win)
}

func (v *viewer) figureTitle() string {
	pl := v.state.plan()
	t := v.state.title(v.info) + ": "
	if pl.Overlay != nil {
		return t + pl.Overlay.Name + " over " + strings.ToLower(pl.Base.Name)
	}
	return t + pl.Base.Name
}

// figureFor builds the report figure of the current view.
func (v *viewer) figureFor(title string, w, h int) (render.Figure, error) {
	d := v.data
	if !d.complete() {
		return render.Figure{}, fmt.Errorf("no section is shown")
	}
	st := v.state
	c := figure.Content{
		Name: filepath.Base(v.vol.Name()), Cond: st.Cond, Clip: st.ClipPercent, Opacity: st.Opacity,
		OpacityFollows: st.OpacityFollowsValue, Wiggle: st.Wiggle, Width: w, Height: h, Title: title,
	}
	for k, a := range []*compute.Attribute{d.plan.Base, d.plan.Overlay} {
		sec := []*volume.Section{d.base, d.over}[k]
		if a == nil || sec == nil {
			continue
		}
		p, _ := a.Resolve(st.Params[a.ID]) // for the caption; the shown data used these
		c.Attrs, c.Params, c.Sections = append(c.Attrs, a), append(c.Params, p), append(c.Sections, sec)
		c.Palettes = append(c.Palettes, st.paletteFor(a, k == 1))
	}
	if d.base != d.amp {
		c.Amplitude = d.amp
	}
	if d.amp.Slice.Orientation == volume.TimeSlice {
		c.MetresPerTrace = v.info.InlineSpacingM
		if loc, ok := v.vol.(figure.Located); ok {
			c.Geo = figure.MapGeo(loc, d.amp.InlineKeys, d.amp.Keys)
		}
	} else {
		c.View = st.viewport(len(d.amp.Traces), len(d.amp.Traces[0]))
	}
	return figure.Compose(c)
}

// saveFigure draws and writes the figure in the background.
func (v *viewer) saveFigure(path, title string, w, h int, dpi float64) {
	f, err := v.figureFor(title, w, h)
	if err != nil {
		v.showError(err.Error())
		return
	}
	if filepath.Ext(path) == "" {
		path += ".png"
	}
	v.setBusy(v.ui.work, "Saving figure", 0, 0, func() { v.jobs.cancel("figure") })
	v.jobs.start("figure", func(j *job) {
		err := writeFigure(f, path, dpi)
		v.onUI(j, func() {
			v.setIdle(v.ui.work)
			if err != nil {
				v.showError(err.Error())
				return
			}
			v.showStatus("Saved " + path)
		})
	})
}

// writeFigure draws f and writes it through figure.Write (format from the
// extension, path replaced only when the whole file is written).
func writeFigure(f render.Figure, path string, dpi float64) error {
	img, err := f.Draw()
	if err != nil {
		return fmt.Errorf("figure: %w", err)
	}
	return figure.Write(path, img, dpi)
}
