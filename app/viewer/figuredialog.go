package viewer

import (
	"context"
	"fmt"
	"path/filepath"
	"quadtrace/app/figure"
	"quadtrace/app/outfile"
	"quadtrace/app/style"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/render"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/widget"
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
		save.SetFileName(figureFileName(v.figureTitle()))
		// Start in the folder the last figure went to (kept apart from the
		// folder files are opened from).
		if dir := v.app.Preferences().String(prefFigureFolder); dir != "" {
			if l, err := storage.ListerForURI(storage.NewFileURI(dir)); err == nil {
				save.SetLocation(l)
			}
		}
		save.SetFilter(storage.NewExtensionFileFilter([]string{".png"}))
		save.Resize(fyne.NewSize(900, 600))
		save.Show()
	}, v.win)
}

// figureTitle is the default title of a figure of the shown view.
func (v *viewer) figureTitle() string {
	pl := v.state.plan()
	if v.data.complete() {
		pl = v.data.plan
	}
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
	f := render.Figure{Title: title, Width: w, Height: h}
	f.Base, f.Overlay = shownLayers(d, &st, v.ranges)
	f.Legends = []render.Legend{style.LegendFor(pl.Base, f.Base)}
	if f.Overlay != nil {
		f.Legends = append(f.Legends, style.LegendFor(pl.Overlay, *f.Overlay))
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
		// The colour must be set: a zero WiggleStyle draws transparent
		// wiggles.
		f.Wiggle = &render.WiggleStyle{Color: wiggleColour, Fill: true, Gain: 1}
		if d.base != d.amp {
			f.Wiggle.Data = amp.Traces
			if r, ok := v.ranges[rangeKey(lookup(amplitudeID), nil, compute.Conditioning{}, st.ClipPercent)]; ok {
				f.Wiggle.Clip = float64(max(-r[0], r[1]))
			}
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
	var inputs []string
	if v.vol != nil && v.vol.Path() != "" {
		inputs = []string{v.vol.Path()}
	}
	v.jobs.start("figure", func(j *job) {
		err := writeFigure(j.ctx, f, path, dpi, inputs)
		v.onUI(j, func() {
			v.setIdle(v.ui.work)
			if err != nil {
				v.showError(err.Error())
				return
			}
			v.app.Preferences().SetString(prefFigureFolder, filepath.Dir(path))
			v.showStatus("Saved " + path)
		})
	})
}

// writeFigure draws f and writes it as PNG at dpi through app/outfile
// (figure.WritePNG): path is replaced only when the whole file is
// written, and never when it is a device, FIFO, folder, symbolic link or
// one of inputs.
func writeFigure(ctx context.Context, f render.Figure, path string, dpi float64, inputs []string) error {
	img, err := f.Draw()
	if err != nil {
		return fmt.Errorf("figure: %w", err)
	}
	return figure.Write(ctx, path, img, dpi, outfile.Options{Inputs: inputs})
}

// figureFileName is the default file name of a figure titled title: lower
// case letters, digits and dashes only, so it is valid on every desktop
// system (no colon, slash or space), e.g. "inline-1074-envelope-over-
// amplitude.png".
func figureFileName(title string) string {
	var b strings.Builder
	dash := false
	for _, r := range strings.ToLower(title) {
		switch {
		case r >= 'a' && r <= 'z', r >= '0' && r <= '9':
			b.WriteRune(r)
			dash = false
		case r == '.' && b.Len() > 0:
			b.WriteRune('-')
			dash = true
		default:
			if !dash && b.Len() > 0 {
				b.WriteRune('-')
				dash = true
			}
		}
	}
	name := strings.TrimRight(b.String(), "-")
	if name == "" {
		name = "figure"
	}
	return name + ".png"
}
