package viewer

import (
	"bufio"
	"context"
	"fmt"
	"path/filepath"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/storage"

	"quadtrace/app/outfile"
	"quadtrace/compute/horizon"
)

// Files of the map view: horizon files read into the window's list (and
// mapped), the map saved as a figure (figure.Write, like the window's other
// figures) and as a text grid (compute/horizon's map format, as `quadtrace
// map --out MAP.txt` writes it).

// Size and resolution of a saved map figure.
const (
	mapFigureWidth, mapFigureHeight = 2000, 1600
	mapFigureDPI                    = 200
)

// loadHorizonFile reads a horizon file in the background into the
// window's horizons, as the Horizons tab does, and shows its map.
func (v *viewer) loadHorizonFile(path string) {
	if v.vol == nil {
		v.showError("Open a survey before loading a horizon")
		return
	}
	v.loadHorizonThen(path, v.showMap)
}

// showHorizonFileDialog asks for a horizon file to load and map.
func (v *viewer) showHorizonFileDialog() {
	d := dialog.NewFileOpen(chosenPath[fyne.URIReadCloser](v, v.loadHorizonFile), v.win)
	d.SetFilter(storage.NewExtensionFileFilter([]string{".txt", ".TXT"}))
	d.Resize(fyne.NewSize(900, 600))
	d.Show()
}

func (p *mapPanel) showLoadDialog() { p.v.showHorizonFileDialog() }

// showSaveDialog asks where to save, then calls save with the path.
func (p *mapPanel) showSaveDialog(name string, exts []string, save func(path string)) {
	v := p.v
	d := dialog.NewFileSave(chosenPath[fyne.URIWriteCloser](v, save), v.win)
	d.SetFileName(name)
	if dir := v.app.Preferences().String(prefFigureFolder); dir != "" {
		if l, err := storage.ListerForURI(storage.NewFileURI(dir)); err == nil {
			d.SetLocation(l)
		}
	}
	d.SetFilter(storage.NewExtensionFileFilter(exts))
	d.Resize(fyne.NewSize(900, 600))
	d.Show()
}

func (p *mapPanel) showSaveFigureDialog() {
	if p.shownMap == nil {
		p.v.showStatus("No map to save yet")
		return
	}
	c, _ := p.mapContentNow()
	p.showSaveDialog(strings.TrimSuffix(figureFileName(c.title), ".png")+".png", []string{".png", ".jpg", ".jpeg"}, p.saveFigure)
}

func (p *mapPanel) showSaveGridDialog() {
	if p.shownMap == nil {
		p.v.showStatus("No map to save yet")
		return
	}
	c, _ := p.mapContentNow()
	p.showSaveDialog(strings.TrimSuffix(figureFileName(c.title), ".png")+".txt", []string{".txt"}, p.saveGrid)
}

// inputs are the files a save must not overwrite: the survey's.
func (p *mapPanel) inputs() []string {
	if v := p.v; v.vol != nil && v.vol.Path() != "" {
		return []string{v.vol.Path()}
	}
	return nil
}

// saveFigure draws the map shown as a report figure and writes it through
// figure.Write in the "figure" lane.
func (p *mapPanel) saveFigure(path string) {
	v := p.v
	c, err := p.mapContentNow()
	if err != nil {
		v.showError(err.Error())
		return
	}
	if filepath.Ext(path) == "" {
		path += ".png"
	}
	inputs := p.inputs()
	v.setBusy(v.ui.work, "Saving the map", 0, 0, func() { v.jobs.cancel("figure"); v.setIdle(v.ui.work) })
	v.jobs.start("figure", func(j *job) {
		err := writeMapFigure(j.ctx, c, path, inputs)
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

// writeMapFigure draws c as a figure and writes it to path (figure.Write).
func writeMapFigure(ctx context.Context, c mapContent, path string, inputs []string) error {
	f, err := c.figure(mapFigureWidth, mapFigureHeight)
	if err != nil {
		return err
	}
	return writeFigure(ctx, f, path, mapFigureDPI, inputs)
}

// saveGrid writes the map shown as a text grid (horizon.WriteMap: inline,
// crossline, x, y, value; the value is the time in ms on a time map)
// through app/outfile, in the "figure" lane.
func (p *mapPanel) saveGrid(path string) {
	v := p.v
	m := p.shownMap
	if m == nil || v.vol == nil {
		v.showError("No map to save yet")
		return
	}
	if filepath.Ext(path) == "" {
		path += ".txt"
	}
	src, err := newSurveySource(v.vol, v.state.Offset)
	if err != nil {
		v.showError(err.Error())
		return
	}
	l := src.layout()
	inputs := p.inputs()
	v.setBusy(v.ui.work, "Saving the map", 0, 0, func() { v.jobs.cancel("figure"); v.setIdle(v.ui.work) })
	v.startWithSurvey("figure", func(j *job, _ survey) {
		err := writeMapGrid(j.ctx, m, l, path, inputs)
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

// writeMapGrid writes m as compute/horizon's text grid to path through
// app/outfile: all or nothing, never over an input, a folder or a device.
func writeMapGrid(ctx context.Context, m *horizon.AttributeMap, l horizon.Layout, path string, inputs []string) error {
	out, err := outfile.Create(path, outfile.Options{Inputs: inputs})
	if err != nil {
		return err
	}
	defer out.Abort()
	w := bufio.NewWriter(out)
	if err := horizon.WriteMap(w, m, l); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err := w.Flush(); err != nil {
		return fmt.Errorf("writing %s: %w", path, err)
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	return out.Commit()
}
