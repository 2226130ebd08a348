package viewer

import (
	"fmt"
	"path/filepath"
	"strings"

	"quadtrace/app/horizonjob"
	"quadtrace/app/outfile"
	"quadtrace/compute/horizon"
)

// Horizon files are small (one row per picked trace): they are read and
// written in the background without a progress bar; the status bar says
// when they are done.

// saveHorizon writes h as a horizon text file (horizon.Write: one row per
// picked trace with its line numbers, coordinates, time, quality and
// origin) in the background, through app/outfile like the window's other
// outputs: path is replaced only by the complete file, and never when it is
// a device, FIFO, folder, symbolic link or the survey's own file.
func (v *viewer) saveHorizon(h *namedHorizon, path string) {
	if h.H == nil || v.vol == nil {
		v.showStatus(h.Name + " has no picks to save")
		return
	}
	if filepath.Ext(path) == "" {
		path += ".txt"
	}
	surface, offset, name := h.H, v.state.Offset, h.Name
	var inputs []string
	if p := v.vol.Path(); p != "" {
		inputs = []string{p}
	}
	v.startWithSurvey("horizon-file", func(j *job, vol survey) {
		err := writeHorizonFile(vol, offset, surface, path, inputs)
		v.onUI(j, func() {
			if err != nil {
				v.showError(fmt.Sprintf("Saving %s: %v", name, err))
				return
			}
			v.showStatus("Saved " + name + " to " + path)
		})
	})
}

// writeHorizonFile writes surface, on vol's grid, to path.
func writeHorizonFile(vol survey, offset int, surface *horizon.Horizon, path string, inputs []string) error {
	src, err := newSurveySource(vol, offset)
	if err != nil {
		return err
	}
	l := src.layout()
	if l.Inlines != surface.Inlines || l.Crosslines != surface.Crosslines {
		return fmt.Errorf("the horizon's %d x %d grid is not the survey's %d x %d", surface.Inlines, surface.Crosslines, l.Inlines, l.Crosslines)
	}
	f, err := outfile.Create(path, outfile.Options{Inputs: inputs})
	if err != nil {
		return err
	}
	if err := horizon.Write(f, surface.Picks(l)); err != nil {
		f.Abort()
		return fmt.Errorf("%s: %w", path, err)
	}
	return f.Commit()
}

// loadHorizon reads a horizon text file in the background and adds it to
// the list as a new horizon named after the file; an error names the file
// and the line.
func (v *viewer) loadHorizon(path string) { v.loadHorizonThen(path, nil) }

// loadHorizonThen is loadHorizon that then calls then (when not nil) with
// the new horizon, once it is in the list (the map view shows it).
func (v *viewer) loadHorizonThen(path string, then func(*namedHorizon)) {
	if v.vol == nil {
		return
	}
	offset := v.state.Offset
	v.startWithSurvey("horizon-file", func(j *job, vol survey) {
		h, err := readHorizonFile(vol, offset, path)
		picked := 0
		if err == nil {
			picked = h.Picked()
		}
		v.onUI(j, func() {
			if err != nil {
				v.showError(err.Error())
				return
			}
			if v.vol != vol {
				return // another survey was opened meanwhile
			}
			v.showStatus(fmt.Sprintf("Read %s: %d traces picked", filepath.Base(path), picked))
			n := v.horizons.addSurface(strings.TrimSuffix(filepath.Base(path), filepath.Ext(path)), h, picked)
			if then != nil {
				then(n)
			}
		})
	})
}

// readHorizonFile reads path onto vol's grid.
func readHorizonFile(vol survey, offset int, path string) (*horizon.Horizon, error) {
	src, err := newSurveySource(vol, offset)
	if err != nil {
		return nil, err
	}
	return horizonjob.ReadFile(path, src.layout())
}
