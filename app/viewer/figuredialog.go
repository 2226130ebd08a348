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
	"quadtrace/app/style"
	"quadtrace/app/volume"
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
	pl := d.plan
	basePal := st.paletteFor(pl.Base, false)
	f := render.Figure{Title: title, Width: w, Height: h}
	f.Base = style.Layer(pl.Base, d.base.Traces, basePal, st.ClipPercent)
	f.Legends = []render.Legend{style.LegendFor(pl.Base, f.Base)}
	if pl.Overlay != nil && d.over != nil {
		ov := style.Overlay(pl.Overlay, d.over.Traces, st.paletteFor(pl.Overlay, true), st.ClipPercent, st.Opacity, st.OpacityFollowsValue)
		f.Overlay = &ov
		f.Legends = []render.Legend{f.Legends[0], style.LegendFor(pl.Overlay, ov)}
	}
	amp := d.amp
	if amp.Slice.Orientation == volume.TimeSlice {
		f.MapAspect = amp.MapAspect
		if !(f.MapAspect > 0) {
			f.MapAspect = 1
		}
		f.Horizontal = render.Axis{Title: "Crossline", First: float64(amp.Keys[0]), Last: float64(amp.Keys[len(amp.Keys)-1])}
		f.Vertical = render.Axis{Title: "Inline", First: float64(amp.InlineKeys[0]), Last: float64(amp.InlineKeys[len(amp.InlineKeys)-1])}
		f.Scale = render.ScaleBar{MetresPerTrace: v.info.InlineSpacingM}
		return f, nil
	}
	n, m := len(amp.Traces), len(amp.Traces[0])
	vp := st.viewport(n, m)
	f.View = vp
	i0, i1 := int(vp.Trace0), min(int(vp.Trace1+0.999)-1, n-1)
	hTitle := "Crossline"
	if amp.Slice.Orientation == volume.Crossline {
		hTitle = "Inline"
	}
	// Axis values are at the centres of the first and last trace (sample)
	// in view.
	f.Horizontal = render.Axis{Title: hTitle, First: float64(amp.Keys[i0]), Last: float64(amp.Keys[max(i1, i0)])}
	s0, s1 := int(vp.Sample0), min(int(vp.Sample1+0.999)-1, m-1)
	f.Vertical = render.Axis{Title: "Time (ms)", First: (amp.T0 + float64(s0)*amp.DT) * 1000, Last: (amp.T0 + float64(max(s1, s0))*amp.DT) * 1000}
	if st.Wiggle {
		f.Wiggle = &render.WiggleStyle{Fill: true, Gain: 1}
		if d.base != d.amp {
			f.Wiggle.Data = amp.Traces
		}
	}
	f.Scale = render.ScaleBar{MetresPerTrace: amp.MetresPerTrace}
	return f, nil
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
