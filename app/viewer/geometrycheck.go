package viewer

import (
	"context"
	"fmt"
	"path/filepath"
	"slices"

	"quadtrace/app/volume"
	"quadtrace/segy"
)

// checkable is a survey whose geometry may be a sampled hypothesis
// (*volume.Volume opened with volume.OpenFast).
type checkable interface {
	Exact() bool
	Check(ctx context.Context, progress func(done, total int)) (*volume.Volume, *segy.Checked, error)
}

// checkLabel names the header check in the status bar.
const checkLabel = "Checking trace headers"

// startCheck runs the full header check of a survey opened from a sampled
// geometry in the "check" lane, with its progress and a cancel button in
// the status bar. The survey stays shown meanwhile. When the check finds
// the file other than the sample said, the survey is replaced by one with
// the exact index, the views are drawn again at the same place, and the
// status bar says what changed.
func (v *viewer) startCheck() {
	vol := v.vol
	c, ok := vol.(checkable)
	if !ok || c.Exact() {
		return
	}
	name := filepath.Base(vol.Name())
	cancel := func() {
		v.jobs.cancel("check")
		v.setIdle(v.ui.check)
		v.showStatus("Header check of " + name + " stopped: the lines shown follow a sample of its headers")
	}
	v.setBusy(v.ui.check, checkLabel, 0, 0, cancel)
	v.startWithSurvey("check", func(j *job, _ survey) {
		var thr progressThrottle
		nv, ch, err := c.Check(j.ctx, func(done, total int) {
			if thr.due(done, total) {
				v.onUI(j, func() { v.setBusy(v.ui.check, checkLabel, done, total, cancel) })
			}
		})
		if j.ctx.Err() != nil {
			if nv != nil {
				nv.Close()
			}
			return
		}
		v.onUI(j, func() {
			v.setIdle(v.ui.check)
			switch {
			case v.vol != vol: // another survey is shown now
				if nv != nil {
					nv.Close()
				}
			case err != nil:
				v.showStatus(fmt.Sprintf("Header check of %s failed: %v (the lines shown follow a sample of its headers)", name, err))
			case nv != nil:
				v.replaceSurvey(nv, ch)
			}
		})
	})
	// a job that is no longer current does not run its ui functions: the
	// lane's cancel (a new survey, the Cancel button) hides the progress
}

// replaceSurvey shows nv, the exact index of the survey shown, in its
// place: the same slice, attribute and view where the lines still exist
// (else the survey's middle inline, as on opening), the sections read and
// drawn again, and a note in plain words when the geometry changed.
func (v *viewer) replaceSurvey(nv survey, ch *segy.Checked) {
	old := v.vol
	v.jobs.cancel("render")
	v.closeSurvey(old)
	v.vol = nv
	limitSurveyMemory(nv)
	v.info = nv.Info()
	v.data = shown{}
	v.cache.clear()
	if !slices.Contains(volume.Numbers(v.info.Inline), v.state.Inline) ||
		!slices.Contains(volume.Numbers(v.info.Crossline), v.state.Crossline) ||
		(len(v.info.Offsets) > 0 && !slices.Contains(v.info.Offsets, v.state.Offset)) {
		keep := v.state
		v.state = newViewState(v.info)
		v.state.AttributeID, v.state.Params, v.state.Cond, v.state.Palettes = keep.AttributeID, keep.Params, keep.Cond, keep.Palettes
		v.state.CoRender, v.state.BaseID, v.state.Opacity = keep.CoRender, keep.BaseID, keep.Opacity
		v.wantPick, v.history, v.histPos, v.histPending = nil, nil, 0, -1
	}
	v.ui.surveyPanel.refresh(nv.Name(), nv.Path() != "", v.info)
	v.refreshControls()
	if ch != nil && ch.Geometry {
		v.showStatus(ch.Summary + " The views were drawn again.")
	}
	v.requestData()
}
