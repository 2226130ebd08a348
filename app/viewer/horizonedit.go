package viewer

import (
	"fmt"
	"math"

	"quadtrace/app/volume"
	"quadtrace/compute/horizon"
)

// horizonTool is what a click and a drag on the section do.
type horizonTool int

const (
	toolLook  horizonTool = iota // click picks a trace, drag pans (the usual)
	toolSeed                     // click places a seed on the active horizon
	toolErase                    // drag a box: the active horizon's picks inside go
)

// horizonEditor is the window's horizon editing: the tool, the tracking
// settings and the progress of the tracking lane. It belongs to the UI
// goroutine; jobs get copies.
type horizonEditor struct {
	tool     horizonTool
	opts     horizon.Options
	progress *progressItem
	panel    *horizonPanel
	// running is the horizon the "horizon" lane edits, nil when idle.
	running *namedHorizon
	// marksPlace and marksVersion say what the marks over the section were
	// last asked for: the view's place and the list's version (-1: none).
	marksPlace   sectionPlace
	marksVersion int
}

// defaultTrackOptions are the tracking settings a window starts with (the
// track command's defaults).
func defaultTrackOptions() horizon.Options {
	return horizon.Options{Event: horizon.Peak, WindowMS: 4, MinCorrelation: 0.8}
}

// The lanes of horizon work: tracking and erasing share one lane (a new
// edit cancels the stale one); seeds are snapped in their own; the marks
// drawn over the section are computed in a third.
const (
	laneHorizon = "horizon"
	laneSeed    = "horizon-seed"
	laneMarks   = "horizon-marks"
)

// sectionPlace is where the shown data lie on the survey's grid: their
// orientation, the grid index of their line (inline or crossline) or the
// time of their slice, and their time axis in ms (sample j covers cell
// coordinates [j, j+1), its centre at j+0.5).
type sectionPlace struct {
	orientation volume.Orientation
	line        int     // grid index of the inline or crossline; -1 when off the grid
	sliceMS     float64 // a time slice's time
	t0MS, dtMS  float64
}

// place returns where the shown data lie, and false when nothing is shown.
func (v *viewer) place() (sectionPlace, bool) {
	d := v.data.amp
	if d == nil || len(d.Traces) == 0 || v.vol == nil {
		return sectionPlace{}, false
	}
	p := sectionPlace{orientation: d.Slice.Orientation, line: -1, t0MS: d.T0 * 1000, dtMS: d.DT * 1000}
	switch p.orientation {
	case volume.Inline:
		p.line = gridIndex(v.info.Inline, d.Slice.Number)
	case volume.Crossline:
		p.line = gridIndex(v.info.Crossline, d.Slice.Number)
	case volume.TimeSlice:
		p.sliceMS = p.t0MS + float64(d.Slice.Number)*p.dtMS
	}
	return p, p.dtMS > 0
}

// cell returns the grid index (il, xl) and time of the point (trace,
// sample) of the view at p; ok is false off the grid.
func (p sectionPlace) cell(trace, sample float64, nIL, nXL int) (il, xl int, ms float64, ok bool) {
	i, j := int(math.Floor(trace)), int(math.Floor(sample))
	switch p.orientation {
	case volume.Inline:
		il, xl, ms = p.line, i, p.t0MS+(sample-0.5)*p.dtMS
	case volume.Crossline:
		il, xl, ms = i, p.line, p.t0MS+(sample-0.5)*p.dtMS
	default:
		il, xl, ms = j, i, p.sliceMS
	}
	return il, xl, ms, il >= 0 && il < nIL && xl >= 0 && xl < nXL && !math.IsNaN(ms)
}

// sampleY is the cell coordinate on the time axis of time ms.
func (p sectionPlace) sampleY(ms float64) float64 { return (ms-p.t0MS)/p.dtMS + 0.5 }

// activeOrNew returns the active horizon, adding one when there is none.
func (v *viewer) activeOrNew() *namedHorizon {
	if h := v.horizons.current(); h != nil {
		return h
	}
	return v.horizons.add()
}

// placeSeed puts a seed on the active horizon at the point (trace, sample)
// of the shown view, snapped in the background to the nearest event of the
// tracking settings' kind within their search window or within
// seedReachPixels of the click on the screen, whichever reaches further (a
// pointer cannot hit a time to a few ms on a section of seconds); the status
// bar says when there is none.
func (v *viewer) placeSeed(trace, sample float64) {
	p, ok := v.place()
	if !ok {
		return
	}
	nIL, nXL := v.info.Inline.Count, v.info.Crossline.Count
	il, xl, ms, ok := p.cell(trace, sample, nIL, nXL)
	if !ok {
		return
	}
	target := v.activeOrNew()
	opts := v.hzEdit.opts
	reach := max(opts.WindowMS, v.seedReachMS(p))
	offset := v.state.Offset
	v.startWithSurvey(laneSeed, func(j *job, vol survey) {
		seed, err := snapSeed(vol, offset, il, xl, ms, opts.Event, reach)
		v.onUI(j, func() {
			if err != nil {
				v.showStatus(err.Error())
				return
			}
			if v.horizons.index(target) < 0 {
				return // deleted meanwhile
			}
			target.seeds = withSeed(target.seeds, seed)
			v.showStatus(fmt.Sprintf("Seed of %s at %s: %d waiting to be tracked", target.Name, v.seedName(seed), len(target.seeds)))
			v.horizons.notify()
		})
	})
}

// seedName names a seed by line numbers and time.
func (v *viewer) seedName(s horizon.Seed) string {
	il := v.info.Inline.Min + s.Inline*max(v.info.Inline.Step, 1)
	xl := v.info.Crossline.Min + s.Crossline*max(v.info.Crossline.Step, 1)
	return fmt.Sprintf("IL %d XL %d %s ms", il, xl, formatMS(s.TimeMS))
}

// seedReachPixels is how far, in screen units, a click may be from the event
// its seed snaps to.
const seedReachPixels = 10

// seedReachMS is seedReachPixels as time on the shown view at p: on a
// section, the time those units span at the current zoom; on a time slice,
// five samples.
func (v *viewer) seedReachMS(p sectionPlace) float64 {
	if p.orientation == volume.TimeSlice {
		return 5 * p.dtMS
	}
	s := v.ui.section
	_, ps := s.plotRect(s.Size())
	if ps.Height <= 0 {
		return 0
	}
	return seedReachPixels * (s.vp.Sample1 - s.vp.Sample0) * p.dtMS / float64(ps.Height)
}

// snapSeed reads the trace at grid index (il, xl) of vol and returns the
// seed on the event e nearest to ms within reach ms. A seed on an event is
// one horizon.Track keeps where it is (it snaps a seed to the nearest event
// within its window).
func snapSeed(vol survey, offset, il, xl int, ms float64, e horizon.Event, reach float64) (horizon.Seed, error) {
	src, err := newSurveySource(vol, offset)
	if err != nil {
		return horizon.Seed{}, err
	}
	g := src.Grid()
	tr, err := src.Trace(il, xl, nil)
	if err != nil {
		return horizon.Seed{}, err
	}
	at := (ms/1000 - g.T0) / g.DT
	half := reach / (g.DT * 1000)
	best := math.NaN()
	for _, x := range e.Locate(tr, at-half, at+half, nil) {
		if !(math.Abs(x-at) >= math.Abs(best-at)) {
			best = x
		}
	}
	if math.IsNaN(best) {
		return horizon.Seed{}, fmt.Errorf("No %v within %s ms of %s ms on this trace: no seed placed", e, formatMS(reach), formatMS(ms))
	}
	return horizon.Seed{Inline: il, Crossline: xl, TimeMS: (g.T0 + best*g.DT) * 1000}, nil
}

// withSeed returns seeds with s added, replacing a seed on the same trace
// (the tracker takes one seed per trace).
func withSeed(seeds []horizon.Seed, s horizon.Seed) []horizon.Seed {
	out := make([]horizon.Seed, 0, len(seeds)+1)
	for _, x := range seeds {
		if x.Inline != s.Inline || x.Crossline != s.Crossline {
			out = append(out, x)
		}
	}
	return append(out, s)
}

// trackActive tracks the active horizon from its waiting seeds in the
// background. The new picks join the horizon's earlier ones, which stay
// as they are where both have a pick. A new tracking or erase cancels a
// running one; the result replaces the horizon only if nothing else
// changed it meanwhile.
func (v *viewer) trackActive() {
	target := v.horizons.current()
	if target == nil || len(target.seeds) == 0 {
		v.showStatus("Place seeds first: choose the seed tool and click the event on a section")
		return
	}
	if v.vol == nil {
		return
	}
	if err := v.hzEdit.opts.Check(); err != nil {
		v.showError(err.Error())
		return
	}
	start, seeds, opts, offset := target.H, append([]horizon.Seed(nil), target.seeds...), v.hzEdit.opts, v.state.Offset
	label := "Tracking " + target.Name
	v.hzEdit.running = target
	v.setBusy(v.hzEdit.progress, label, 0, 0, v.cancelHorizonJob)
	v.startWithSurvey(laneHorizon, func(j *job, vol survey) {
		var thr progressThrottle
		var merged *horizon.Horizon
		added, picked := 0, 0
		src, err := newSurveySource(vol, offset)
		if err == nil {
			var h *horizon.Horizon
			h, err = horizon.Track(j.ctx, src, seeds, opts, func(done, total int) {
				if thr.due(done, total) {
					v.onUI(j, func() { v.setBusy(v.hzEdit.progress, label, done, total, v.cancelHorizonJob) })
				}
			})
			if err == nil {
				merged, added = mergeHorizons(start, h)
				picked = merged.Picked()
			}
		}
		if j.ctx.Err() != nil {
			return // cancelled: the horizon stays as it was
		}
		v.onUI(j, func() {
			v.hzEdit.running = nil
			v.setIdle(v.hzEdit.progress)
			if err != nil {
				v.showError(fmt.Sprintf("Tracking %s: %v", target.Name, err))
				return
			}
			if v.horizons.index(target) < 0 || target.H != start {
				v.showStatus(target.Name + " changed while it was tracked: its tracking was dropped")
				return
			}
			if added == 0 {
				// The seeds lie where the horizon is picked already:
				// nothing changes (another reflector needs a new horizon).
				target.seeds = nil
				v.showStatus(fmt.Sprintf("Tracked %s: nothing new, its seeds lie on traces it has picked already (use a new horizon for another reflector)", target.Name))
				v.horizons.notify()
				return
			}
			target.replace(merged, picked, nil, "tracking")
			v.showStatus(fmt.Sprintf("Tracked %s: %d traces added, %d picked in all", target.Name, added, picked))
			v.horizons.notify()
		})
	})
}

// cancelHorizonJob stops a running tracking or erase; the horizon keeps
// the picks it had before.
func (v *viewer) cancelHorizonJob() {
	v.jobs.cancel(laneHorizon)
	v.setIdle(v.hzEdit.progress)
	if h := v.hzEdit.running; h != nil {
		v.showStatus("Cancelled: " + h.Name + " is as it was")
	}
	v.hzEdit.running = nil
}

// mergeHorizons returns a new horizon holding the picks of old and, where
// old has none, those of fresh (old may be nil), with the number of picks
// fresh added.
func mergeHorizons(old, fresh *horizon.Horizon) (*horizon.Horizon, int) {
	out := cloneHorizon(fresh)
	if old == nil || old.Inlines != fresh.Inlines || old.Crosslines != fresh.Crosslines {
		return out, out.Picked()
	}
	added := 0
	for k, s := range old.State {
		if s != horizon.Empty {
			out.TimeMS[k], out.Quality[k], out.State[k] = old.TimeMS[k], old.Quality[k], s
		} else if out.State[k] != horizon.Empty {
			added++
		}
	}
	return out, added
}

// cloneHorizon returns a copy of h that shares nothing with it.
func cloneHorizon(h *horizon.Horizon) *horizon.Horizon {
	return &horizon.Horizon{
		Inlines: h.Inlines, Crosslines: h.Crosslines,
		TimeMS:  append([]float64(nil), h.TimeMS...),
		Quality: append([]float32(nil), h.Quality...),
		State:   append([]horizon.State(nil), h.State...),
	}
}

// eraseBox is a box drawn on a view: cell coordinates [t0, t1] along the
// traces (crosslines of a time slice) and [s0, s1] down the samples
// (inlines of a time slice), at the place p.
type eraseBox struct {
	p              sectionPlace
	t0, t1, s0, s1 float64
}

// holds reports whether the pick at grid index (il, xl), time ms, lies in
// the box: on a section, its trace's centre is inside along the line and
// its time inside down it; on a time slice, the bin's centre is inside
// (whatever its time).
func (b eraseBox) holds(il, xl int, ms float64) bool {
	in := func(c, lo, hi float64) bool { return c >= lo && c <= hi }
	switch b.p.orientation {
	case volume.Inline:
		return il == b.p.line && in(float64(xl)+0.5, b.t0, b.t1) && in(b.p.sampleY(ms), b.s0, b.s1)
	case volume.Crossline:
		return xl == b.p.line && in(float64(il)+0.5, b.t0, b.t1) && in(b.p.sampleY(ms), b.s0, b.s1)
	}
	return in(float64(xl)+0.5, b.t0, b.t1) && in(float64(il)+0.5, b.s0, b.s1)
}

// eraseIn returns h without its picks inside b, the seeds outside b, and
// how many picks and seeds went. h (may be nil) is not changed; with
// nothing erased the result is h itself.
func eraseIn(h *horizon.Horizon, seeds []horizon.Seed, b eraseBox) (*horizon.Horizon, []horizon.Seed, int) {
	n := 0
	var keep []horizon.Seed
	for _, s := range seeds {
		if b.holds(s.Inline, s.Crossline, s.TimeMS) {
			n++
		} else {
			keep = append(keep, s)
		}
	}
	if h == nil {
		return nil, keep, n
	}
	var out *horizon.Horizon
	for k, s := range h.State {
		if s == horizon.Empty || !b.holds(k/h.Crosslines, k%h.Crosslines, h.TimeMS[k]) {
			continue
		}
		if out == nil {
			out = cloneHorizon(h)
		}
		out.TimeMS[k], out.Quality[k], out.State[k] = math.NaN(), float32(math.NaN()), horizon.Empty
		n++
	}
	if out == nil {
		out = h
	}
	return out, keep, n
}

// eraseBoxAt removes, in the background, the active horizon's picks and
// waiting seeds inside the box from (t0, s0) to (t1, s1) of the shown view.
func (v *viewer) eraseBoxAt(t0, s0, t1, s1 float64) {
	target := v.horizons.current()
	p, ok := v.place()
	if target == nil || !ok {
		return
	}
	b := eraseBox{p: p, t0: math.Min(t0, t1), t1: math.Max(t0, t1), s0: math.Min(s0, s1), s1: math.Max(s0, s1)}
	start, seeds := target.H, target.seeds
	v.hzEdit.running = target
	v.setBusy(v.hzEdit.progress, "Erasing in "+target.Name, 0, 0, v.cancelHorizonJob)
	v.jobs.start(laneHorizon, func(j *job) {
		h, keep, n := eraseIn(start, seeds, b)
		picked := 0
		if h != nil {
			picked = h.Picked()
		}
		v.onUI(j, func() {
			v.hzEdit.running = nil
			v.setIdle(v.hzEdit.progress)
			if v.horizons.index(target) < 0 || target.H != start {
				return
			}
			if n == 0 {
				v.showStatus("Nothing of " + target.Name + " in that box")
				return
			}
			target.replace(h, picked, keep, "erase")
			v.showStatus(fmt.Sprintf("Erased %d picks and seeds of %s", n, target.Name))
			v.horizons.notify()
		})
	})
}

// undoActive undoes the active horizon's last tracking or erase; a running
// one is cancelled first.
func (v *viewer) undoActive() {
	target := v.horizons.current()
	if target == nil {
		return
	}
	if v.hzEdit.running == target {
		v.cancelHorizonJob()
	}
	what := target.undoLast()
	if what == "" {
		v.showStatus("Nothing of " + target.Name + " to undo")
		return
	}
	v.showStatus("Undid the last " + what + " of " + target.Name)
	v.horizons.notify()
}
