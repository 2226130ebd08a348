package viewer

import (
	"context"
	"fmt"
	"image"
	"math"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/render"
	"strings"
)

// dataRequest names the sections a picture needs and the keys that tell
// whether the shown data already hold them.
type dataRequest struct {
	slice                    volume.Slice
	plan                     layerPlan
	baseParams, overParams   map[string]string
	cond                     compute.Conditioning
	ampKey, baseKey, overKey string
	// partial, when not nil, is given the data as far as they are computed
	// while a time slice is filled (see partialData); it is called on the
	// job's goroutine, at most a few times a second, and only when
	// partialWanted (if not nil) says so: a partial slice is made only once
	// the picture of the one before has been drawn, so renders of partial
	// slices (tens of megabytes each on a large survey) never pile up.
	partial       func(shown)
	partialWanted func() bool
}

// dataRequestFor works out the sections state st needs.
func dataRequestFor(st *viewState) dataRequest {
	r := dataRequest{slice: st.slice(), plan: st.plan(), cond: st.Cond}
	r.ampKey = attrKey(r.slice, lookup(amplitudeID), nil, compute.Conditioning{})
	r.baseParams = copyMap(st.Params[r.plan.Base.ID])
	r.baseKey = attrKey(r.slice, r.plan.Base, r.baseParams, r.cond)
	if r.plan.Overlay != nil {
		r.overParams = copyMap(st.Params[r.plan.Overlay.ID])
		r.overKey = attrKey(r.slice, r.plan.Overlay, r.overParams, r.cond)
	}
	return r
}

// satisfied reports whether d already holds what r asks for, complete.
func (r dataRequest) satisfied(d shown) bool {
	return d.ampKey == r.ampKey && d.baseKey == r.baseKey && d.overKey == r.overKey && !d.pending()
}

// fetchData reads and computes the sections of req, reusing those of have
// and of cached whose keys match (never a partial one). progress(label)
// gives the progress callback of a computation; while a time slice is
// filled, req.partial gets the data so far. It runs in a background job.
func fetchData(ctx context.Context, vol survey, req dataRequest, have shown, cached map[string]*volume.Section, progress func(label string) func(done, total int)) (shown, error) {
	var out shown
	reuse := func(key string) *volume.Section {
		if s := cached[key]; s != nil && s.Pending == nil {
			return s
		}
		if s := reused(key, out, have); s != nil && s.Pending == nil {
			return s
		}
		return nil
	}
	get := func(key string, a *compute.Attribute, params map[string]string, c compute.Conditioning) (*volume.Section, error) {
		if s := reuse(key); s != nil {
			return s, nil
		}
		timeSlice := req.slice.Orientation == volume.TimeSlice
		if a.ID == amplitudeID && c.IsZero() && !timeSlice {
			s, err := vol.Read(ctx, req.slice)
			return &s, err
		}
		p, err := a.Resolve(params)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", a.Name, err)
		}
		label := "Computing " + strings.ToLower(a.Name)
		if a.ID == amplitudeID && c.IsZero() {
			label = "Reading amplitude"
		}
		if timeSlice {
			label += " for the whole volume"
		}
		var pf func(int, int)
		if progress != nil {
			pf = progress(label)
		}
		if !timeSlice && out.amp != nil && out.amp.Pending == nil {
			// The amplitude of this section is in hand (read above):
			// computing from it spares the survey a second read and copy
			// of the section (fresh memory, a page fault per 4 KiB).
			s, err := attributeOf(ctx, *out.amp, a, p, c, pf)
			if err != nil {
				return nil, fmt.Errorf("%s: %s %d: %s: %w", vol.Name(), req.slice.Orientation, req.slice.Number, a.ID, err)
			}
			return &s, nil
		}
		if timeSlice && req.partial != nil {
			var thr progressThrottle
			shownPf := pf
			pf = func(done, total int) {
				if shownPf != nil {
					shownPf(done, total)
				}
				if done < total && thr.due(done, total) && (req.partialWanted == nil || req.partialWanted()) {
					if so, ok := vol.AttributeSoFar(req.slice, a, p, c); ok && so.Pending != nil {
						req.partial(partialData(out, req, key, &so))
					}
				}
			}
		}
		s, err := vol.Attribute(ctx, req.slice, a, p, c, pf)
		return &s, err
	}
	var err error
	if out.amp, err = get(req.ampKey, lookup(amplitudeID), nil, compute.Conditioning{}); err != nil {
		return shown{}, err
	}
	out.ampKey = req.ampKey
	if out.base, err = get(req.baseKey, req.plan.Base, req.baseParams, req.cond); err != nil {
		return shown{}, err
	}
	out.baseKey = req.baseKey
	if req.plan.Overlay != nil {
		if out.over, err = get(req.overKey, req.plan.Overlay, req.overParams, req.cond); err != nil {
			return shown{}, err
		}
		out.overKey = req.overKey
	}
	out.plan, out.baseParams, out.overParams, out.cond = req.plan, req.baseParams, req.overParams, req.cond
	return out, nil
}

// attributeOf computes attribute a of the amplitude section amp, after
// conditioning c, keeping amp's axes: what survey.Attribute does for an
// inline or crossline after reading the section. amp is not changed.
func attributeOf(ctx context.Context, amp volume.Section, a *compute.Attribute, p compute.Params, c compute.Conditioning, progress func(done, total int)) (volume.Section, error) {
	in := amp.Section
	if !c.IsZero() {
		var err error
		if in, err = c.Apply(ctx, in, nil); err != nil {
			return volume.Section{}, err
		}
	}
	out, err := a.Compute(ctx, in, p, progress)
	if err != nil {
		return volume.Section{}, err
	}
	amp.Section = out
	return amp, nil
}

// pending reports whether some cell of d is not computed yet (a time slice
// drawn while it is filled).
func (d shown) pending() bool {
	return (d.amp != nil && d.amp.Pending != nil) || (d.base != nil && d.base.Pending != nil) || (d.over != nil && d.over.Pending != nil)
}

// reused returns the section with key among those made so far (out) and
// those shown now (have), or nil.
func reused(key string, out, have shown) *volume.Section {
	switch {
	case key == out.ampKey && out.amp != nil:
		return out.amp
	case key == have.ampKey && have.amp != nil:
		return have.amp
	case key == have.baseKey && have.base != nil:
		return have.base
	case key == have.overKey && have.over != nil:
		return have.over
	}
	return nil
}

// partialData is the data of req as far as they are computed: the
// sections made so far (out), so for the layer with key, and for the
// layers not reached yet a grid of so's shape with every cell pending.
func partialData(out shown, req dataRequest, key string, so *volume.Section) shown {
	pendingGrid := func() *volume.Section {
		ni, nx := len(so.Traces), 0
		if ni > 0 {
			nx = len(so.Traces[0])
		}
		nan := float32(math.NaN())
		vals, flags := make([]float32, ni*nx), make([]bool, ni*nx)
		for k := range vals {
			vals[k], flags[k] = nan, true
		}
		p := *so
		p.Traces, p.Pending = make([][]float32, ni), make([][]bool, ni)
		for i := range ni {
			p.Traces[i], p.Pending[i] = vals[i*nx:(i+1)*nx:(i+1)*nx], flags[i*nx:(i+1)*nx:(i+1)*nx]
		}
		return &p
	}
	var blank *volume.Section
	pick := func(k string, have *volume.Section) *volume.Section {
		switch {
		case k == key:
			return so
		case have != nil:
			return have
		case blank == nil:
			blank = pendingGrid()
		}
		return blank
	}
	d := shown{ampKey: req.ampKey, baseKey: req.baseKey, plan: req.plan, baseParams: req.baseParams, overParams: req.overParams, cond: req.cond}
	d.amp = pick(req.ampKey, out.amp)
	d.base = pick(req.baseKey, out.base)
	if req.plan.Overlay != nil {
		d.overKey = req.overKey
		d.over = pick(req.overKey, out.over)
	}
	return d
}

// requestData starts a job that reads and computes whatever the state needs
// and the shown data lack; it cancels any such job still running.
func (v *viewer) requestData() {
	if v.vol == nil {
		return
	}
	req := dataRequestFor(&v.state)
	if req.satisfied(v.data) {
		v.setIdle(v.ui.work)
		v.jobs.cancel("data")
		v.requestRender()
		return
	}
	have, cached := v.data, v.cache.snapshot()
	cancel := func() {
		v.jobs.cancel("data")
		v.setIdle(v.ui.work)
		v.backToShown()
	}
	v.setBusy(v.ui.work, "Reading "+strings.ToLower(v.state.title(v.info)), 0, 0, cancel)
	v.setFocus()
	v.startWithSurvey("data", func(j *job, vol survey) {
		var thr progressThrottle
		progress := func(label string) func(done, total int) {
			return func(done, total int) {
				if thr.due(done, total) {
					v.onUI(j, func() { v.setBusy(v.ui.work, label, done, total, cancel) })
				}
			}
		}
		req.partial = func(d shown) {
			v.onUI(j, func() { v.showData(d, false) })
		}
		req.partialWanted = func() bool { return v.jobs.active("render") == 0 }
		out, err := fetchData(j.ctx, vol, req, have, cached, progress)
		if j.ctx.Err() != nil {
			return
		}
		v.onUI(j, func() {
			v.setIdle(v.ui.work)
			if err != nil {
				v.ui.section.setMessage(err.Error())
				v.showStatus(err.Error())
				v.failSnapshot(err)
				return
			}
			v.showData(out, true)
		})
	})
}

// showData makes d the shown data and draws them: the final data of a
// request (kept in the section cache, recorded in the view history, trace
// panel redrawn) or, final false, a time slice as far as it is computed,
// drawn with its pending cells hatched while the job goes on.
func (v *viewer) showData(d shown, final bool) {
	newShape := v.data.amp == nil || sectionShape(v.data.amp) != sectionShape(d.amp)
	before, hadPick := v.pickedKeys()
	v.data = d
	v.shownState = v.state.dataFields()
	if final {
		v.cache.put(d.ampKey, d.amp)
		v.cache.put(d.baseKey, d.base)
		v.cache.put(d.overKey, d.over)
	}
	if newShape {
		n, m := v.dims()
		v.state.fit(n, m)
	}
	v.placePick(before, hadPick)
	if final {
		v.recordView()
	}
	v.refreshNavigation()
	v.requestRender()
	if final {
		v.requestTrace()
	}
}

// setFocus tells the survey where the view is, so whole-volume work
// (time slices of attributes) starts there: the shown line, or for a time
// slice the picked trace, else the last inline and crossline shown.
func (v *viewer) setFocus() {
	const none = math.MinInt // on no survey: no preference along that axis
	switch v.state.Orientation {
	case volume.Inline:
		v.vol.SetFocus(v.state.Inline, none, v.state.SampleIndex)
	case volume.Crossline:
		v.vol.SetFocus(none, v.state.Crossline, v.state.SampleIndex)
	default:
		if k, ok := v.pickedKeys(); ok {
			v.vol.SetFocus(k.inline, k.crossline, v.state.SampleIndex)
			return
		}
		v.vol.SetFocus(v.state.Inline, v.state.Crossline, v.state.SampleIndex)
	}
}

// backToShown undoes the requested change whose data were cancelled, so the
// controls name what the picture shows.
func (v *viewer) backToShown() {
	v.histPending, v.wantPick = -1, nil
	if v.data.amp == nil {
		return
	}
	v.state.restoreDataFields(v.shownState)
	v.refreshControls()
	v.showStatus("Cancelled; still showing " + strings.ToLower(v.state.title(v.info)))
}

// sectionShape is the size of a section's grid.
func sectionShape(s *volume.Section) [3]int {
	if s == nil || len(s.Traces) == 0 {
		return [3]int{}
	}
	return [3]int{int(s.Slice.Orientation), len(s.Traces), len(s.Traces[0])}
}

// dims is the shown section's size along the view's horizontal and vertical
// axes: traces by samples for a section, crosslines by inlines for a map.
func (v *viewer) dims() (int, int) {
	s := v.data.amp
	if s == nil || len(s.Traces) == 0 {
		return 0, 0
	}
	if s.Slice.Orientation == volume.TimeSlice {
		return len(s.Traces[0]), len(s.Traces)
	}
	return len(s.Traces), len(s.Traces[0])
}

// renderRequest is everything a render job needs, copied from the UI.
type renderRequest struct {
	state         viewState
	plan          layerPlan
	data          shown
	ranges        map[string][2]float32
	width, height int
}

// renderResult is a rendered section with what the view needs to label it.
type renderResult struct {
	img       *image.RGBA
	vp        render.Viewport
	axes      sectionAxes
	aspect    float64
	base, ov  render.Layer
	hasOv     bool
	newRanges map[string][2]float32
	hist      valueHistogram // of the layer the colour control sets
	pending   bool           // cells not computed yet are hatched
}

// requestRender renders the shown data at the section view's size in the
// background and shows it.
func (v *viewer) requestRender() {
	if !v.data.complete() {
		return
	}
	w, h := v.ui.section.plotPixels()
	st := v.state
	st.Params, st.Palettes = nil, nil // not needed, and not to be shared
	req := renderRequest{state: st, plan: v.data.plan, data: v.data, ranges: copyRanges(v.ranges), width: w, height: h}
	basePal := v.state.paletteFor(req.plan.Base, false)
	var ovPal = basePal
	if req.plan.Overlay != nil {
		ovPal = v.state.paletteFor(req.plan.Overlay, true)
	}
	v.jobs.start("render", func(j *job) {
		res := renderSection(req, basePal, ovPal)
		v.onUI(j, func() {
			for k, r := range res.newRanges {
				// the first range found on complete data is kept; a time
				// slice still being computed may show only a corner
				if _, ok := v.ranges[k]; !ok && !res.pending {
					v.ranges[k] = r
				}
			}
			v.lastSection = res.img
			v.ui.section.setImage(res.img, res.vp, res.axes, res.aspect)
			v.ui.section.setPick(v.pickPoint())
			v.sectionDrawn++
			v.ui.legends.refresh(req.plan, res, &v.state)
			v.ui.displayPanel.setHistogram(res.hist, colourLayer(req.plan))
			if !res.pending {
				v.maybeSnapshot()
			}
		})
	})
}

// pickPoint is where the pick is in the shown data: the trace index along
// a section (row NaN), or the column and row of a time slice's grid; NaN
// column: nothing picked.
func (v *viewer) pickPoint() (col, row float64) {
	d, p := v.data.amp, v.state.PickTrace
	if d == nil || p < 0 || len(d.Traces) == 0 {
		return math.NaN(), math.NaN()
	}
	if d.Slice.Orientation == volume.TimeSlice {
		n := max(len(d.Traces[0]), 1)
		return float64(p % n), float64(p / n)
	}
	return float64(p), math.NaN()
}
