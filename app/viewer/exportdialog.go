package viewer

import (
	"fmt"
	"maps"
	"os"
	"path/filepath"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/widget"

	"quadtrace/app/export"
	"quadtrace/compute"
	"quadtrace/segy"
)

// showExportDialog lets the user pick attributes, format and folder for a
// whole-volume export, which then runs in the background with progress and
// a cancel button in the status bar; the window stays usable.
func (v *viewer) showExportDialog() {
	if v.vol == nil {
		return
	}
	// The demo survey has no file: its exports default to the home folder
	// and are named after the survey.
	source, stem := v.vol.Path(), strings.TrimSuffix(filepath.Base(v.vol.Path()), filepath.Ext(v.vol.Path()))
	dir := filepath.Dir(source)
	if source == "" {
		stem = demoStem(v.info)
		if dir, _ = os.UserHomeDir(); dir == "" {
			dir = os.TempDir()
		}
	}
	var names []string
	byName := map[string]*compute.Attribute{}
	for _, a := range compute.Attributes() {
		names = append(names, a.Name)
		byName[a.Name] = a
	}
	pick := widget.NewCheckGroup(names, nil)
	pick.SetSelected([]string{lookup(v.state.AttributeID).Name})
	format := widget.NewRadioGroup([]string{"IEEE float", "IBM float"}, nil)
	format.Horizontal = true
	format.SetSelected("IEEE float")
	folder := widget.NewEntry()
	folder.SetText(dir)
	browse := widget.NewButton("Choose…", func() {
		d := dialog.NewFolderOpen(func(u fyne.ListableURI, err error) {
			if err == nil && u != nil {
				folder.SetText(u.Path())
			}
		}, v.win)
		d.Resize(fyne.NewSize(900, 600))
		d.Show()
	})
	note := widget.NewLabel("Files are named after the input and the attribute; the current parameters and conditioning are used.")
	note.Wrapping = fyne.TextWrapWord
	scroll := container.NewVScroll(pick)
	scroll.SetMinSize(fyne.NewSize(460, 260))
	body := container.NewVBox(
		widget.NewLabel("Attributes"), scroll,
		container.New(layout.NewFormLayout(), widget.NewLabel("Samples"), format, widget.NewLabel("Folder"), container.NewBorder(nil, nil, nil, browse, folder)),
		note)
	dialog.ShowCustomConfirm("Export attribute volumes", "Export", "Cancel", body, func(ok bool) {
		if !ok {
			return
		}
		var ids []string
		params := map[string]string{}
		for _, n := range pick.Selected {
			a := byName[n]
			ids = append(ids, a.ID)
			maps.Copy(params, v.state.Params[a.ID])
		}
		if len(ids) == 0 {
			v.showError("export: choose at least one attribute")
			return
		}
		out := folder.Text
		if len(ids) == 1 {
			out = filepath.Join(folder.Text, stem+"-"+ids[0]+".sgy")
		}
		job := export.Job{Input: source, SegyOptions: v.segyOpt, Attributes: ids, Params: params, Conditioning: v.state.Cond, Output: out, Format: 5}
		if format.Selected == "IBM float" {
			job.Format = 1
		}
		if source == "" {
			v.runDemoExport(job, folder.Text, stem)
			return
		}
		v.runExport(job)
	}, v.win)
}

// runExport runs an export job in its own lane.
func (v *viewer) runExport(ej export.Job) {
	cancel := func() { v.jobs.cancel("export") }
	v.setBusy(v.ui.export, "Exporting", 0, 0, cancel)
	v.jobs.start("export", func(j *job) {
		var thr progressThrottle
		paths, err := export.Run(j.ctx, ej, func(p export.Progress) {
			if thr.due(p.Done, p.Total) {
				v.onUI(j, func() { v.setBusy(v.ui.export, "Exporting", p.Done, p.Total, cancel) })
			}
		})
		v.finishExport(j, paths, err)
	})
}

// finishExport reports an export job's end on the UI goroutine.
func (v *viewer) finishExport(j *job, paths []string, err error) {
	cancelled := j.ctx.Err() != nil
	v.jobs.do(func() {
		v.setIdle(v.ui.export)
		switch {
		case cancelled:
			v.showStatus("Export cancelled; nothing was written")
		case err != nil:
			v.showError("export: " + err.Error())
		default:
			v.showStatus("Exported " + strings.Join(paths, ", "))
		}
	})
}

// demoStem names the demo survey's exports: its name in lower case with
// dashes, "corrowdeep-3d" for "Corrowdeep 3D (demo survey)".
func demoStem(info segy.Info) string {
	name := "demo-survey"
	if len(info.TextHeaders) > 0 {
		if first, _, _ := strings.Cut(info.TextHeaders[0], ","); first != "" {
			name = first
		}
	}
	return strings.Join(strings.Fields(strings.ToLower(name)), "-")
}

// runDemoExport exports from the in-memory demo survey, read as the
// export's trace source (export.Source) without writing it to a file
// first. Outputs are named after stem.
func (v *viewer) runDemoExport(ej export.Job, folder, stem string) {
	cancel := func() { v.jobs.cancel("export") }
	v.setBusy(v.ui.export, "Exporting", 0, 0, cancel)
	v.startWithSurvey("export", func(j *job, vol survey) {
		var paths []string
		src, ok := vol.(export.Source)
		err := fmt.Errorf("the survey in the window cannot be exported (%T is no trace source)", vol)
		if ok {
			ej.Source, ej.Stem = src, stem
			var thr progressThrottle
			paths, err = export.Run(j.ctx, ej, func(p export.Progress) {
				if thr.due(p.Done, p.Total) {
					v.onUI(j, func() { v.setBusy(v.ui.export, "Exporting", p.Done, p.Total, cancel) })
				}
			})
		}
		v.finishExport(j, paths, err)
	})
}
