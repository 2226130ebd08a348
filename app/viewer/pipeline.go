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

// satisfied reports whether d already holds what r asks for.
func (r dataRequest) satisfied(d shown) bool {
	return d.ampKey == r.ampKey && d.baseKey == r.baseKey && d.overKey == r.overKey
}

// fetchData reads and computes the sections of req, reusing those of have
// and of cached whose keys match. progress(label) gives the progress callback of a
// computation. It runs in a background job.
func fetchData(ctx context.Context, vol survey, req dataRequest, have shown, cached map[string]*volume.Section, progress func(label string) func(done, total int)) (shown, error) {
	var out shown
	reuse := func(key string) *volume.Section {
		if s := cached[key]; s != nil {
			return s
		}
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
	get := func(key string, a *compute.Attribute, params map[string]string, c compute.Conditioning) (*volume.Section, error) {
		if s := reuse(key); s != nil {
			return s, nil
		}
		if a.ID == amplitudeID && c.IsZero() {
			s, err := vol.Read(ctx, req.slice)
			return &s, err
		}
		p, err := a.Resolve(params)
		if err != nil {
			return nil, fmt.Errorf("%s: %w", a.Name, err)
		}
		label := "Computing " + strings.ToLower(a.Name)
		if req.slice.Orientation == volume.TimeSlice {
			label += " for the whole volume"
		}
		var pf func(int, int)
		if progress != nil {
			pf = progress(label)
		}
		if req.slice.Orientation != volume.TimeSlice && out.amp != nil {
			// The amplitude of this section is in hand (read above):
			// computing from it spares the survey a second read and copy
			// of the section (fresh memory, a page fault per 4 KiB).
			s, err := attributeOf(ctx, *out.amp, a, p, c, pf)
			if err != nil {
				return nil, fmt.Errorf("%s: %s %d: %s: %w", vol.Name(), req.slice.Orientation, req.slice.Number, a.ID, err)
			}
			return &s, nil
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
	v.startWithSurvey("data", func(j *job, vol survey) {
		var thr progressThrottle
		progress := func(label string) func(done, total int) {
			return func(done, total int) {
				if thr.due(done, total) {
					v.onUI(j, func() { v.setBusy(v.ui.work, label, done, total, cancel) })
				}
			}
		}
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
			newShape := v.data.amp == nil || sectionShape(v.data.amp) != sectionShape(out.amp)
			before, hadPick := v.pickedKeys()
			v.data = out
			v.shownState = v.state.dataFields()
			v.cache.put(out.ampKey, out.amp)
			v.cache.put(out.baseKey, out.base)
			v.cache.put(out.overKey, out.over)
			if newShape {
				n, m := v.dims()
				v.state.fit(n, m)
			}
			v.placePick(before, hadPick)
			v.recordView()
			v.refreshNavigation()
			v.requestRender()
			v.requestTrace()
		})
	})
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
				if _, ok := v.ranges[k]; !ok { // the first range found is kept
					v.ranges[k] = r
				}
			}
			v.lastSection = res.img
			v.ui.section.setImage(res.img, res.vp, res.axes, res.aspect)
			v.ui.section.setPick(v.pickPoint())
			v.sectionDrawn++
			v.ui.legends.refresh(req.plan, res, &v.state)
			v.ui.displayPanel.setHistogram(res.hist, colourLayer(req.plan))
			v.maybeSnapshot()
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
