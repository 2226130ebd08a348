// Package viewer is quadtrace's desktop window: a survey opened from a
// SEG-Y file (or the built-in demo survey), paged through by inline,
// crossline and time slice, with any attribute of the registry drawn alone
// or over another layer, a trace panel with curves and spectrum, figures and
// exports. It is the only package besides app that imports fyne.
//
// The UI goroutine only arranges widgets: every read, computation and
// rendering runs in background jobs (see jobs), whose results come back
// through fyne.Do; a new request cancels the stale one.
package viewer

import (
	"context"
	"fmt"
	"image"
	"path/filepath"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/app"

	"quadtrace/app/indexcache"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/compute/synth"
	"quadtrace/segy"
)

// Options says what the viewer opens and whether it only takes a snapshot.
type Options struct {
	// Path is the SEG-Y file to open; "" opens the built-in demo survey.
	Path string
	// Snapshot, when not empty, makes the viewer write a PNG of its window
	// to this path once the first section, attribute and trace panel are
	// drawn, and then quit.
	Snapshot string
	// SegyOptions override the header byte locations and byte order.
	SegyOptions segy.Options
	// Demo, when not nil, is the size of the demo survey to generate
	// instead of synth.DefaultConfig (tests use a small one).
	Demo *synth.Config
	// IndexCache keeps the geometry indices of opened files (nil: none;
	// Run uses indexcache.Default when it is nil).
	IndexCache *indexcache.Cache
}

// Run opens the viewer window and returns when it is closed. With
// opt.Snapshot set it returns after writing the snapshot, or with the error
// that prevented it.
func Run(opt Options) error {
	limitWindowMemory()
	if opt.IndexCache == nil {
		opt.IndexCache = indexcache.Default()
	}
	a := app.NewWithID("org.quadtrace.viewer")
	v := newViewer(a, opt, newJobs())
	v.start()
	v.win.ShowAndRun()
	v.jobs.close()
	v.closeSurveyNow(5 * time.Second)
	return v.exitErr
}

// survey is what the viewer needs of an opened volume (*volume.Volume).
type survey interface {
	Info() segy.Info
	Name() string
	Path() string
	Close() error
	Read(ctx context.Context, s volume.Slice) (volume.Section, error)
	Trace(inline, crossline, offset int) ([]float32, error)
	Attribute(ctx context.Context, s volume.Slice, a *compute.Attribute, p compute.Params, cond compute.Conditioning, progress func(done, total int)) (volume.Section, error)
	TraceAttribute(ctx context.Context, inline, crossline, offset int, a *compute.Attribute, p compute.Params, cond compute.Conditioning) ([]float32, error)
	// AttributeSoFar is a time slice of an attribute as far as it is
	// computed (pending cells marked), without waiting.
	AttributeSoFar(s volume.Slice, a *compute.Attribute, p compute.Params, cond compute.Conditioning) (volume.Section, bool)
	// SetFocus says where the view is, so whole-volume work starts there.
	SetFocus(inline, crossline, sample int)
	// WriteDemo writes the in-memory demo survey as SEG-Y (an error for a file).
	WriteDemo(ctx context.Context, path string, opt segy.WriteOptions) error
}

// shown holds the data behind the picture: the amplitude of the slice and
// the sections of the base and overlay layers, with the keys they were made
// for. Sections are never changed once made, so jobs may read them freely.
//
// plan, the parameters and the conditioning are those the sections were
// made with: everything that draws the data (section, trace panel, legends,
// figures, the cursor readout) takes the layers from here, never from the
// state, whose layers may already name an overlay whose data are still
// being computed.
type shown struct {
	ampKey, baseKey, overKey string
	amp, base, over          *volume.Section
	plan                     layerPlan
	baseParams, overParams   map[string]string
	cond                     compute.Conditioning
}

// complete reports whether d holds every section its plan names.
func (d shown) complete() bool {
	return d.amp != nil && d.base != nil && d.plan.Base != nil && (d.plan.Overlay == nil) == (d.over == nil) &&
		len(d.amp.Traces) > 0 && len(d.base.Traces) == len(d.amp.Traces) && (d.over == nil || len(d.over.Traces) == len(d.amp.Traces))
}

// viewer is the window and everything it shows. Its fields belong to the UI
// goroutine; jobs get copies of what they need.
type viewer struct {
	app     fyne.App
	win     fyne.Window
	opt     Options
	jobs    *jobs
	exitErr error

	vol     survey
	info    segy.Info
	segyOpt segy.Options
	state   viewState
	data    shown
	// shownState holds the state's data fields (slice, layers, parameters)
	// of what the picture shows; a cancelled request goes back to them.
	shownState viewState
	cache      *sectionCache
	ranges     map[string][2]float32 // colour ranges by rangeKey (see ranges.go)

	// What the window currently shows, kept for tests and the snapshot.
	lastSection   *image.RGBA
	sectionDrawn  int // renders shown so far
	traceDrawn    int // trace panels shown so far
	lastTrace     tracePicture
	snapshotTaken bool

	ui *widgets

	holds surveyHolds // the jobs reading each survey

	// horizons are the window's horizons (see horizons.go).
	horizons horizonList
	hzEdit   horizonEditor // seeds, tracking, erasing (horizonedit.go)

	// wantPick is the trace to pick in the next data shown (set by a change
	// of view); history and histPos are the Back/Forward history.
	wantPick    *pickKeys
	history     []historyEntry
	histPos     int
	histPending int // the entry a Back/Forward is going to; -1: none
}

// newViewer builds the window on app a, with its background work run by js;
// start opens the survey. The caller shows the window.
func newViewer(a fyne.App, opt Options, js *jobs) *viewer {
	v := &viewer{horizons: horizonList{active: -1}, histPending: -1, app: a, opt: opt, jobs: js, segyOpt: opt.SegyOptions, ranges: map[string][2]float32{}, cache: newSectionCache(sectionCacheBytes)}
	v.win = a.NewWindow("quadtrace")
	v.buildUI()
	v.restoreWindowSize()
	return v
}

// start opens opt.Path, or the demo survey when it is empty, in the
// background.
func (v *viewer) start() {
	if v.opt.Snapshot != "" {
		v.startSnapshotTimer()
	}
	if v.opt.Path != "" {
		v.openFile(v.opt.Path)
	} else {
		v.openDemo()
	}
}

// onUI runs f on the UI goroutine for job j, if j is still current.
func (v *viewer) onUI(j *job, f func()) {
	j.ui(f)
}

// --- opening ---

// openFile opens a SEG-Y file in the background.
func (v *viewer) openFile(path string) {
	opt := v.segyOpt
	v.startOpen(filepath.Base(path), func(ctx context.Context, progress func(int, int)) (survey, error) {
		// the geometry from the cache or a sample of the headers; the full
		// check follows in the background (startCheck)
		vol, err := volume.OpenFast(ctx, path, opt, v.opt.IndexCache) // Cancel stops the header scan too
		if err != nil {
			return nil, err
		}
		return vol, nil
	}, path)
}

// openDemo generates the built-in demo survey in the background.
func (v *viewer) openDemo() {
	v.startOpen("the demo survey", func(ctx context.Context, progress func(int, int)) (survey, error) {
		cfg := synth.DefaultConfig()
		if v.opt.Demo != nil {
			cfg = *v.opt.Demo
		}
		vol, err := volume.Demo(ctx, cfg, progress)
		if err != nil {
			return nil, err
		}
		return vol, nil
	}, "")
}

// startOpen runs open in the "open" lane, then shows what it opened. A
// cancelled or failed open leaves the survey shown before as it was: its
// picture comes back and the controls name it again.
func (v *viewer) startOpen(what string, open func(context.Context, func(int, int)) (survey, error), path string) {
	v.jobs.cancel("data")
	v.ui.section.setMessage("Opening " + what + "…")
	cancel := func() {
		v.jobs.cancel("open")
		v.setIdle(v.ui.work)
		v.keepShownSurvey()
	}
	v.setBusy(v.ui.work, "Opening "+what, 0, 0, cancel)
	v.jobs.start("open", func(j *job) {
		var thr progressThrottle
		vol, err := open(j.ctx, func(done, total int) {
			if thr.due(done, total) {
				v.onUI(j, func() { v.setBusy(v.ui.work, "Opening "+what, done, total, cancel) })
			}
		})
		if vol != nil && (err != nil || j.ctx.Err() != nil) {
			vol.Close() // cancelled (its memory goes with it) or failed
		}
		if j.ctx.Err() != nil {
			return // the cancel (or the newer open) has seen to the window
		}
		v.onUI(j, func() {
			v.setIdle(v.ui.work)
			if err != nil {
				msg := fmt.Sprintf("Could not open %s: %v", what, err)
				if !v.keepShownSurvey() {
					v.ui.section.setMessage(msg)
				}
				v.showError(msg)
				v.failSnapshot(err)
				return
			}
			v.setSurvey(vol)
			if path != "" {
				v.addRecent(path)
			}
		})
	})
}

// keepShownSurvey goes back to showing the survey that was shown before an
// open that did not happen, and reports whether there was one.
func (v *viewer) keepShownSurvey() bool {
	if v.data.amp == nil {
		return false
	}
	v.ui.section.setMessage("")
	v.backToShown()
	v.requestData() // the data lane was cancelled for the open
	return true
}

// setSurvey shows a newly opened survey from its middle inline.
func (v *viewer) setSurvey(vol survey) {
	v.jobs.cancel("check") // of the survey shown before
	v.setIdle(v.ui.check)
	v.closeSurvey(v.vol)
	v.jobs.cancel("render") // a picture of the old survey must not show up
	v.vol = vol
	limitSurveyMemory(vol)
	v.info = vol.Info()
	v.data = shown{}
	v.cache.clear()
	v.ranges = map[string][2]float32{}
	v.state = newViewState(v.info)
	v.wantPick, v.history, v.histPos, v.histPending = nil, nil, 0, -1
	v.resetHorizons() // horizons belong to the survey they were picked on
	v.showStatus("")  // errors about the survey before do not apply
	if v.info.IntervalUS <= 0 {
		// Without a sample interval no attribute can be computed; the
		// amplitude can still be looked at.
		v.state.AttributeID, v.state.CoRender = amplitudeID, false
		defer v.showStatus(filepath.Base(vol.Name()) + " gives no sample interval: only the amplitude can be shown")
	}
	v.loadPalettePrefs()
	v.ui.surveyPanel.refresh(vol.Name(), vol.Path() != "", v.info)
	v.refreshControls()
	if v.info.Traces == 0 {
		msg := filepath.Base(vol.Name()) + " holds headers but no traces"
		v.ui.section.setMessage(msg)
		v.showStatus(msg)
		v.failSnapshot(fmt.Errorf("%s", msg))
		return
	}
	v.requestData()
	v.startCheck()
}

func copyMap(m map[string]string) map[string]string {
	out := make(map[string]string, len(m))
	for k, x := range m {
		out[k] = x
	}
	return out
}

func copyRanges(m map[string][2]float32) map[string][2]float32 {
	out := make(map[string][2]float32, len(m))
	for k, x := range m {
		out[k] = x
	}
	return out
}

// --- status and progress ---

// showStatus puts a message in the status bar.
func (v *viewer) showStatus(msg string) {
	v.ui.message.SetText(msg)
}

// failSnapshot ends a snapshot run that cannot succeed.
func (v *viewer) failSnapshot(err error) {
	if v.opt.Snapshot == "" || v.snapshotTaken {
		return
	}
	v.snapshotTaken = true
	v.exitErr = fmt.Errorf("snapshot: %w", err)
	v.app.Quit()
}

// timeMS is the time of fractional sample index s of the shown data.
func (v *viewer) timeMS(s float64) float64 {
	sec := v.data.amp
	if sec == nil {
		return 0
	}
	return (sec.T0 + s*sec.DT) * 1000
}
