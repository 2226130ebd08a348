package viewer

import (
	"context"
	"fmt"
	"image"
	"math"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/widget"

	"quadtrace/app/figure"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/compute/horizon"
	"quadtrace/palettes"
	"quadtrace/render"
)

// The map view: a panel beside the section showing a horizon as a map,
// either its time or an attribute along it (the value on the horizon, or a
// statistic over a window around it or down to a second horizon), with
// contours of its time, the survey's outline, a ground grid in metres, a
// north arrow, a scale bar and a legend. Clicking the map moves the
// section there; the section's place and the pick show on the map.
//
// Work runs in two lanes: "map" computes (the attribute strips along the
// horizon, see mapdata.go, then the map from them), "map-render" draws the
// figure at the view's size. A change of statistic, of the window inside
// the kept strips, of palette or contours does not compute the attribute
// again.

// mapShow names what the map shows.
const (
	mapShowTime      = "Time of the horizon"
	mapShowAttribute = "Attribute along it"
)

// statLabels are the statistics as the panel names them, in horizon.Stat
// order (Value first).
var statLabels = []string{"Value on the horizon", "Mean", "Mean of |value|", "RMS", "Largest |value|", "Smallest |value|"}

// noBase is the base-horizon choice of a window around the horizon.
const noBase = "— (window around the horizon)"

// mapSettings is what the map panel asks for.
type mapSettings struct {
	attribute    bool // the attribute along the horizon, not its time
	attrID       string
	stat         horizon.Stat
	fromMS, toMS float64
	base         *namedHorizon // nil: a window around the horizon
	palette      string        // palette name; "" is the default for what is shown
	contours     bool
	contourMS    float64 // contour interval; 0 picks one
}

// mapPanel is the map view with its controls. It belongs to the UI
// goroutine; jobs get copies of what they need.
type mapPanel struct {
	v       *viewer
	content fyne.CanvasObject
	view    *mapView
	open    bool
	hz      *namedHorizon
	set     mapSettings

	heading      *widget.Label
	showPick     *widget.Select
	attrPick     *widget.Select
	statPick     *widget.Select
	fromEntry    *widget.Entry
	toEntry      *widget.Entry
	basePick     *widget.Select
	palettePick  *widget.Select
	contourCheck *widget.Check
	contourEntry *widget.Entry
	readout      *widget.Label
	work         *progressItem

	// What the map shows, and what it was made from.
	strips    *mapStrips // conditioned attributes (whole traces)
	stripsVol survey
	// Unconditioned attributes: the amplitude slab along slabTop and the
	// attribute computed on it (attrSlabKey: attribute and parameters).
	slab        *horizon.Slab
	slabVol     survey
	slabTop     *horizon.Horizon
	attrSlab    *horizon.AttributeSlab
	attrSlabKey string
	shownMap    *horizon.AttributeMap // the values shown, inline-major
	shownTop    *horizon.Horizon      // the surface they were made along
	// contours: the contour lines of the last map drawn, kept while the
	// horizon's times and the interval stay the same.
	contours  *contourLines
	madeFor   survey     // the survey the map was asked for
	madeKey   string     // the attribute key it was asked with (attrKey)
	content0  mapContent // the content last drawn
	outline   []render.Segment
	outlineOf survey
	drawn     int // maps drawn so far (tests)
}

// showMap shows horizon h as a map beside the section (the seam the
// horizon list calls).
func (v *viewer) showMap(h *namedHorizon) {
	if h == nil {
		return
	}
	p := v.ui.mapPanel
	if p == nil {
		p = newMapPanel(v)
		v.ui.mapPanel = p
		v.horizons.onChange(p.horizonsChanged)
	}
	if !p.open {
		p.open = true
		v.ui.workArea.Objects = []fyne.CanvasObject{container.NewHSplit(v.ui.workspace, p.content)}
		v.ui.workArea.Refresh()
	}
	if p.hz != h {
		p.hz = h
		p.set.base = nil
	}
	p.refreshControls()
	p.request()
	p.refreshMarks()
}

// closeMap takes the map view away and stops its work.
func (v *viewer) closeMap() {
	p := v.ui.mapPanel
	if p == nil || !p.open {
		return
	}
	v.jobs.cancel("map")
	v.jobs.cancel("map-render")
	v.setIdle(p.work)
	p.open = false
	v.ui.workArea.Objects = []fyne.CanvasObject{v.ui.workspace}
	v.ui.workArea.Refresh()
}

func newMapPanel(v *viewer) *mapPanel {
	p := &mapPanel{v: v, view: newMapView(), work: newProgressItem()}
	p.set = mapSettings{attrID: "envelope", stat: horizon.RMS, fromMS: -10, toMS: 10, contours: true}
	p.view.onTap = p.tapped
	p.view.onHover = p.hover
	p.view.onResize = p.render
	p.heading = widget.NewLabel("")
	p.heading.TextStyle.Bold = true
	p.heading.Truncation = fyne.TextTruncateEllipsis
	p.showPick = widget.NewSelect([]string{mapShowTime, mapShowAttribute}, func(s string) {
		if a := s == mapShowAttribute; s != "" && a != p.set.attribute {
			p.set.attribute = a
			p.set.palette = ""
			p.refreshControls()
			p.request()
		}
	})
	var names []string
	for _, a := range compute.Attributes() {
		names = append(names, a.Name)
	}
	p.attrPick = widget.NewSelect(names, func(name string) {
		for _, a := range compute.Attributes() {
			if a.Name == name && a.ID != p.set.attrID {
				p.set.attrID = a.ID
				p.set.palette = ""
				p.refreshControls()
				p.request()
			}
		}
	})
	p.statPick = widget.NewSelect(statLabels, func(s string) {
		if i := slices.Index(statLabels, s); i >= 0 && horizon.Stat(i+1) != p.set.stat {
			p.set.stat = horizon.Stat(i + 1)
			p.refreshControls()
			p.request()
		}
	})
	p.fromEntry, p.toEntry = widget.NewEntry(), widget.NewEntry()
	window := func(string) { p.applyWindow() }
	p.fromEntry.OnSubmitted, p.toEntry.OnSubmitted = window, window
	p.basePick = widget.NewSelect(nil, func(s string) {
		var base *namedHorizon
		for _, h := range p.v.horizons.all() {
			if h.Name == s && h != p.hz {
				base = h
			}
		}
		if base != p.set.base {
			p.set.base = base
			p.refreshControls()
			p.request()
		}
	})
	p.palettePick = widget.NewSelect(paletteNames(), func(s string) {
		if s != p.set.palette && s != "" {
			p.set.palette = s
			p.render()
		}
	})
	p.contourCheck = widget.NewCheck("Contours of time every", func(on bool) {
		if on != p.set.contours {
			p.set.contours = on
			p.render()
		}
	})
	p.contourEntry = widget.NewEntry()
	p.contourEntry.SetPlaceHolder("auto")
	p.contourEntry.OnSubmitted = func(s string) { p.applyContourInterval(s) }
	p.readout = widget.NewLabel("Point at the map to read it; click to show that trace in the section")
	p.readout.Truncation = fyne.TextTruncateEllipsis
	load := widget.NewButton("Load horizon…", p.showLoadDialog)
	saveFig := widget.NewButton("Save figure…", p.showSaveFigureDialog)
	saveGrid := widget.NewButton("Save grid…", p.showSaveGridDialog)
	closeBtn := widget.NewButton("Close map", v.closeMap)
	form := container.New(layoutForm(),
		widget.NewLabel("Show"), p.showPick,
		widget.NewLabel("Attribute"), p.attrPick,
		widget.NewLabel("Statistic"), p.statPick,
		widget.NewLabel("Window (ms)"), container.NewGridWithColumns(4, widget.NewLabel("from"), p.fromEntry, widget.NewLabel("to"), p.toEntry),
		widget.NewLabel("Down to"), p.basePick,
		widget.NewLabel("Palette"), p.palettePick,
		p.contourCheck, container.NewBorder(nil, nil, nil, widget.NewLabel("ms"), p.contourEntry),
	)
	// Two by two, so that the panel stays narrow beside the section.
	buttons := container.NewGridWithColumns(2, load, saveFig, saveGrid, closeBtn)
	// The controls scroll when the panel is made narrow or short, so that
	// they never push the window wider than the screen.
	top := container.NewVScroll(container.NewVBox(p.heading, form, buttons))
	top.SetMinSize(fyne.NewSize(0, 150))
	controls := container.NewHScroll(top)
	bottom := container.NewVBox(p.work.box, p.readout)
	split := container.NewVSplit(controls, container.NewBorder(nil, bottom, nil, nil, p.view))
	split.Offset = 0.35
	p.content = split
	return p
}

// layoutForm is a two-column grid of labels and controls.
func layoutForm() fyne.Layout { return &formColumns{} }

// formColumns lays objects out in rows of two: a label column as wide as
// the widest label, the control taking the rest.
type formColumns struct{}

func (formColumns) Layout(objs []fyne.CanvasObject, size fyne.Size) {
	lw := float32(0)
	for i := 0; i < len(objs); i += 2 {
		lw = max(lw, objs[i].MinSize().Width)
	}
	y := float32(0)
	for i := 0; i+1 < len(objs); i += 2 {
		h := max(objs[i].MinSize().Height, objs[i+1].MinSize().Height)
		objs[i].Move(fyne.NewPos(0, y))
		objs[i].Resize(fyne.NewSize(lw, h))
		objs[i+1].Move(fyne.NewPos(lw+4, y))
		objs[i+1].Resize(fyne.NewSize(max(size.Width-lw-4, 0), h))
		y += h + 2
	}
}

func (formColumns) MinSize(objs []fyne.CanvasObject) fyne.Size {
	lw, cw, h := float32(0), float32(0), float32(0)
	for i := 0; i+1 < len(objs); i += 2 {
		lw = max(lw, objs[i].MinSize().Width)
		cw = max(cw, objs[i+1].MinSize().Width)
		h += max(objs[i].MinSize().Height, objs[i+1].MinSize().Height) + 2
	}
	return fyne.NewSize(lw+4+cw, h)
}

// paletteNames lists our palettes and their reversed forms.
func paletteNames() []string {
	var out []string
	for _, p := range palettes.All() {
		out = append(out, p.Name, p.Name+"-r")
	}
	return out
}

// refreshControls sets the controls from the settings.
func (p *mapPanel) refreshControls() {
	s := p.set
	name := "(no horizon)"
	if p.hz != nil {
		name = p.hz.Name
	}
	p.heading.SetText("Map of " + name)
	show := mapShowTime
	if s.attribute {
		show = mapShowAttribute
	}
	p.showPick.SetSelected(show)
	a := lookup(s.attrID)
	p.attrPick.SetSelected(a.Name)
	p.statPick.SetSelected(statLabels[s.stat-1])
	p.fromEntry.SetText(strconv.FormatFloat(s.fromMS, 'g', -1, 64))
	p.toEntry.SetText(strconv.FormatFloat(s.toMS, 'g', -1, 64))
	opts := []string{noBase}
	for _, h := range p.v.horizons.all() {
		if h != p.hz && h.H != nil {
			opts = append(opts, h.Name)
		}
	}
	p.basePick.SetOptions(opts)
	if s.base != nil {
		p.basePick.SetSelected(s.base.Name)
	} else {
		p.basePick.SetSelected(noBase)
	}
	p.palettePick.SetSelected(p.paletteName())
	p.contourCheck.SetChecked(s.contours)
	if s.contourMS > 0 {
		p.contourEntry.SetText(strconv.FormatFloat(s.contourMS, 'g', -1, 64))
	} else {
		p.contourEntry.SetText("")
	}
	for _, w := range []fyne.Disableable{p.attrPick, p.statPick} {
		setEnabled(w, s.attribute)
	}
	window := s.attribute && s.stat != horizon.Value
	for _, w := range []fyne.Disableable{p.fromEntry, p.toEntry, p.basePick} {
		setEnabled(w, window)
	}
}

func setEnabled(w fyne.Disableable, on bool) {
	if on {
		w.Enable()
	} else {
		w.Disable()
	}
}

// paletteName is the palette the map uses: the one chosen, else the
// attribute's default (app/style), else for times the sequential default.
func (p *mapPanel) paletteName() string {
	if p.set.palette != "" {
		return p.set.palette
	}
	if p.set.attribute {
		return p.v.state.paletteFor(lookup(p.set.attrID), false).Name
	}
	return palettes.Default(palettes.Sequential).Name
}

// applyWindow reads the window entries; a bad entry is refused with its
// reason and the window kept.
func (p *mapPanel) applyWindow() {
	from, err1 := strconv.ParseFloat(strings.TrimSpace(p.fromEntry.Text), 64)
	to, err2 := strconv.ParseFloat(strings.TrimSpace(p.toEntry.Text), 64)
	spec := horizon.MapSpec{Stat: p.set.stat, FromMS: from, ToMS: to}
	if p.set.base != nil {
		spec.Base = p.set.base.H
	}
	err := spec.Validate()
	switch {
	case err1 != nil || err2 != nil:
		err = fmt.Errorf("window %q to %q ms: want two numbers", p.fromEntry.Text, p.toEntry.Text)
	case err == nil && (math.Abs(from) > 10000 || math.Abs(to) > 10000):
		err = fmt.Errorf("window %g to %g ms: keep it within 10 s of the horizon", from, to)
	}
	if err != nil {
		p.v.showStatus(err.Error())
		p.refreshControls()
		return
	}
	if from == p.set.fromMS && to == p.set.toMS {
		return
	}
	p.set.fromMS, p.set.toMS = from, to
	p.request()
}

// applyContourInterval reads the contour interval ("" or "auto": chosen
// from the times).
func (p *mapPanel) applyContourInterval(s string) {
	s = strings.TrimSpace(s)
	ms := 0.0
	if s != "" && s != "auto" {
		x, err := strconv.ParseFloat(s, 64)
		if err != nil || !(x > 0) || math.IsInf(x, 0) {
			p.v.showStatus(fmt.Sprintf("contour interval %q: want a positive number of ms, or nothing for a round one", s))
			p.refreshControls()
			return
		}
		ms = x
	}
	p.set.contourMS = ms
	p.render()
}

// horizonsChanged follows the window's horizon list: a removed horizon
// closes its map, a re-tracked one is mapped again.
func (p *mapPanel) horizonsChanged() {
	if !p.open {
		return
	}
	if p.hz != nil && p.v.horizons.index(p.hz) < 0 {
		p.v.closeMap()
		return
	}
	if p.set.base != nil && (p.v.horizons.index(p.set.base) < 0 || p.set.base.H == nil) {
		p.set.base = nil
	}
	p.refreshControls()
	// Asked for again: what is kept (keyed by the surfaces, which are
	// replaced, never changed in place) serves when only a name or a
	// colour changed.
	p.request()
}

// baseH is the base horizon's surface, nil without one.
func (p *mapPanel) baseH() *horizon.Horizon {
	if p.set.base == nil {
		return nil
	}
	return p.set.base.H
}

// spec is the map asked for.
func (p *mapPanel) spec() horizon.MapSpec {
	s := horizon.MapSpec{Stat: p.set.stat, FromMS: p.set.fromMS, ToMS: p.set.toMS, Base: p.baseH()}
	if s.Stat == horizon.Value {
		s.FromMS, s.ToMS, s.Base = 0, 0, nil
	}
	return s
}

// attrSetup is the attribute the map computes with the window's parameters
// and conditioning, and the key of its strips.
func (p *mapPanel) attrSetup() (*compute.Attribute, compute.Params, compute.Conditioning, string, error) {
	v := p.v
	a := lookup(p.set.attrID)
	params := v.state.params(a.ID)
	res, err := a.Resolve(params)
	if err != nil {
		return nil, compute.Params{}, compute.Conditioning{}, "", err
	}
	key := attrKey(volume.Slice{Offset: v.state.Offset}, a, params, v.state.Cond)
	return a, res, v.state.Cond, key, nil
}

// request makes the map the settings ask for: the horizon's times at once,
// an attribute map from the kept strips when they serve, else after
// computing them in the "map" lane.
func (p *mapPanel) request() {
	v := p.v
	if !p.open || p.hz == nil {
		return
	}
	h := p.hz.H
	if p.madeFor != v.vol {
		// Another survey: nothing made for the one before applies.
		p.shownMap, p.shownTop, p.strips, p.stripsVol = nil, nil, nil, nil
		p.releaseAttrSlab()
		p.slab, p.slabVol, p.slabTop = nil, nil, nil
		p.view.setMessage("Computing the map…")
	}
	p.madeFor = v.vol
	switch {
	case v.vol == nil:
		p.fail("No survey is open")
		return
	case h == nil:
		p.fail(p.hz.Name + " has no picks yet: track it first")
		return
	case h.Inlines != v.info.Inline.Count || h.Crosslines != v.info.Crossline.Count:
		p.fail(fmt.Sprintf("%s lies on a %d x %d grid, the survey has %d x %d traces", p.hz.Name, h.Inlines, h.Crosslines, v.info.Inline.Count, v.info.Crossline.Count))
		return
	}
	p.ensureOutline()
	if !p.set.attribute {
		v.jobs.cancel("map")
		v.setIdle(p.work)
		p.shownMap = &horizon.AttributeMap{Inlines: h.Inlines, Crosslines: h.Crosslines, Values: flatten(timeMap(h))}
		p.shownTop = h
		p.render()
		return
	}
	spec := p.spec()
	a, params, cond, key, err := p.attrSetup()
	if err != nil {
		p.fail(err.Error())
		return
	}
	p.madeKey = key
	if v.info.IntervalUS <= 0 {
		p.fail("The survey gives no sample interval: attributes cannot be mapped")
		return
	}
	cancel := func() {
		v.jobs.cancel("map")
		v.setIdle(p.work)
		p.view.setMessage("Map cancelled: change a setting to compute it again")
	}
	label := "Computing " + strings.ToLower(a.Name) + " along " + p.hz.Name
	var mapper mapJob
	var heavy bool
	if cond.IsZero() {
		mapper, heavy = p.slabMaker(h, spec, a, params, key)
	} else {
		mapper, heavy = p.stripsMaker(h, spec, a, params, cond, key)
	}
	if heavy {
		v.setBusy(p.work, label, 0, 0, cancel)
	}
	v.startWithSurvey("map", func(j *job, vol survey) {
		var thr progressThrottle
		m, keep, err := mapper(j.ctx, vol, func(done, total int) {
			if thr.due(done, total) {
				v.onUI(j, func() { v.setBusy(p.work, label, done, total, cancel) })
			}
		})
		if j.ctx.Err() != nil {
			return
		}
		v.onUI(j, func() {
			v.setIdle(p.work)
			if err != nil {
				p.fail(err.Error())
				return
			}
			keep()
			p.shownMap, p.shownTop = m, h
			p.render()
		})
	})
}

// slabMaker returns the job that maps an unconditioned attribute along h
// through compute/horizon's slab: the amplitude read once around the
// horizon (kept while the horizon, the window's reach and the attribute's
// margin allow), the attribute computed on its stretches (kept per
// attribute and parameters), and the map made from that (a change of
// statistic or window only runs AttributeSlab.Map). Inside the window the
// slab's attribute agrees with the whole traces' (horizon.SlabMarginMS,
// TestSlabMatchesWholeTraces); the amplitude itself is identical.
func (p *mapPanel) slabMaker(h *horizon.Horizon, spec horizon.MapSpec, a *compute.Attribute, params compute.Params, key string) (mapJob, bool) {
	v := p.v
	above, below := float64(stripMarginMS), float64(stripMarginMS)
	if spec.Stat != horizon.Value {
		above, below = math.Max(above, -spec.FromMS), math.Max(below, spec.ToMS)
		if spec.Base != nil {
			below = math.Max(below, maxThicknessMS(h, spec.Base)+spec.ToMS)
		}
	}
	margin := horizon.SlabMarginMS(a, params)
	slab, attrSlab := p.slab, p.attrSlab
	if slab != nil {
		ss := slab.Spec()
		if p.slabVol != v.vol || p.slabTop != h || ss.AboveMS < above || ss.BelowMS < below || ss.MarginMS < margin {
			slab, attrSlab = nil, nil
		}
	}
	if attrSlab != nil && p.attrSlabKey != key {
		attrSlab = nil
	}
	if attrSlab != nil {
		// The job's hold on the kept attribute (a later attribute
		// may otherwise reuse its memory while the job maps it).
		attrSlab.Retain()
	}
	offset := v.state.Offset
	heavy := slab == nil || attrSlab == nil
	run := func(ctx context.Context, vol survey, progress func(int, int)) (*horizon.AttributeMap, func(), error) {
		if slab == nil {
			src, err := newSurveySource(vol, offset)
			if err != nil {
				return nil, nil, err
			}
			// Room to widen the window without reading the traces again.
			ss := horizon.SlabSpec{AboveMS: above + stripMarginMS/2, BelowMS: below + stripMarginMS/2, MarginMS: margin}
			if slab, err = horizon.NewSlab(ctx, src, h, ss, progress); err != nil {
				return nil, nil, err
			}
		}
		if attrSlab == nil {
			var err error
			if attrSlab, err = slab.Attribute(ctx, a, params); err != nil {
				return nil, nil, err
			}
		}
		m, err := attrSlab.Map(spec)
		if err != nil {
			attrSlab.Release()
			return nil, nil, err
		}
		// keep hands the job's hold to the panel (a job that is no longer
		// current never keeps: its hold is left to the garbage collector).
		return m, func() {
			p.slab, p.slabVol, p.slabTop = slab, vol, h
			if p.attrSlab == attrSlab {
				attrSlab.Release()
			} else {
				p.releaseAttrSlab()
				p.attrSlab = attrSlab
			}
			p.attrSlabKey = key
		}, nil
	}
	return run, heavy
}

// releaseAttrSlab drops the panel's hold on the kept attribute slab: its
// memory goes to the next attribute computed on the slab once no job maps
// it any more.
func (p *mapPanel) releaseAttrSlab() {
	if p.attrSlab != nil {
		p.attrSlab.Release()
		p.attrSlab = nil
	}
}

// mapJob makes a map in a job: the map, and a function the UI goroutine
// runs to keep what was computed for the next change.
type mapJob func(ctx context.Context, vol survey, progress func(done, total int)) (*horizon.AttributeMap, func(), error)

// maxThicknessMS is the largest time from top down to base over the
// traces both pick (0 when none).
func maxThicknessMS(top, base *horizon.Horizon) float64 {
	t := 0.0
	for k, s := range top.State {
		if s != horizon.Empty && base.State[k] != horizon.Empty {
			if d := base.TimeMS[k] - top.TimeMS[k]; d > t {
				t = d
			}
		}
	}
	return t
}

// stripsMaker returns the job that maps a conditioned attribute along h:
// the attribute computed on whole traces through the survey's attribute
// path (the one the sections use, conditioning included), inline by
// inline, and kept as strips around the horizon (mapdata.go).
func (p *mapPanel) stripsMaker(h *horizon.Horizon, spec horizon.MapSpec, a *compute.Attribute, params compute.Params, cond compute.Conditioning, key string) (mapJob, bool) {
	v := p.v
	strips := p.strips
	if p.stripsVol != v.vol || !strips.serves(key, h, spec) {
		strips = nil
	}
	info := v.info
	g := horizon.Grid{Inlines: info.Inline.Count, Crosslines: info.Crossline.Count, Samples: info.Samples, DT: float64(info.IntervalUS) * 1e-6, T0: info.StartMS * 1e-3}
	inlines, _ := surveyNumbers(info)
	offset := v.state.Offset
	heavy := strips == nil
	return func(ctx context.Context, vol survey, progress func(int, int)) (*horizon.AttributeMap, func(), error) {
		if strips == nil {
			var err error
			strips, err = computeStrips(ctx, g, key, h, spec.Base, spec.FromMS, spec.ToMS, surveyInlines(vol, inlines, offset, a, params, cond), progress)
			if err != nil {
				return nil, nil, err
			}
		}
		m, err := strips.mapOf(ctx, spec)
		return m, func() { p.strips, p.stripsVol = strips, vol }, err
	}, heavy
}

// fail shows why there is no map.
func (p *mapPanel) fail(msg string) {
	// A map job still running was asked for before (another horizon, or
	// this one before it lost its picks): cancelled, so it cannot land
	// after this and show its map under this message's horizon.
	p.v.jobs.cancel("map")
	p.v.setIdle(p.work)
	p.v.jobs.cancel("map-render")
	p.shownMap, p.shownTop = nil, nil
	p.content0 = mapContent{}
	p.view.setMessage(msg)
}

// ensureOutline finds, once per survey, the outline of its traces: the
// bins that hold a trace, from the amplitude time slice at the middle
// sample (missing traces read as NaN there).
func (p *mapPanel) ensureOutline() {
	v := p.v
	if p.outlineOf == v.vol {
		return
	}
	p.outlineOf, p.outline = v.vol, nil
	sample := v.info.Samples / 2
	offset := v.state.Offset
	v.startWithSurvey("map-outline", func(j *job, vol survey) {
		sec, err := vol.Read(j.ctx, volume.Slice{Orientation: volume.TimeSlice, Number: sample, Offset: offset})
		if err != nil {
			return // no outline; the map shows without one
		}
		live := make([][]bool, len(sec.Traces))
		for r, row := range sec.Traces {
			live[r] = make([]bool, len(row))
			for c, x := range row {
				live[r][c] = !math.IsNaN(float64(x))
			}
		}
		segs := render.Outline(live)
		v.onUI(j, func() {
			if p.outlineOf == vol {
				p.outline = segs
				p.render()
			}
		})
	})
}

// flatten joins rows into one inline-major slice.
func flatten(rows [][]float32) []float32 {
	var out []float32
	for _, r := range rows {
		out = append(out, r...)
	}
	return out
}

// mapContentNow is the content of the map shown, for drawing.
func (p *mapPanel) mapContentNow() (mapContent, error) {
	v := p.v
	m := p.shownMap
	if m == nil || p.hz == nil || p.shownTop == nil || v.vol == nil {
		return mapContent{}, fmt.Errorf("no map is shown")
	}
	if m.Inlines != v.info.Inline.Count || m.Crosslines != v.info.Crossline.Count {
		return mapContent{}, fmt.Errorf("the map was made for another survey")
	}
	pal, err := palettes.ByName(p.paletteName())
	if err != nil {
		return mapContent{}, err
	}
	inlines, crosslines := surveyNumbers(v.info)
	c := mapContent{
		values: rows(m), pal: pal, clip: v.state.ClipPercent, outline: p.outline,
		inlines: inlines, crosslines: crosslines, aspect: mapAspect(v.info), binM: v.info.InlineSpacingM,
	}
	if located, ok := v.vol.(figure.Located); ok {
		c.geo = figure.MapGeo(located, inlines, crosslines)
		c.ground = groundGrid(located, inlines, crosslines)
	}
	name := filepath.Base(v.vol.Name())
	c.title = "Time of " + p.hz.Name
	var caption []string
	caption = append(caption, name)
	if p.set.attribute {
		a, params, cond, _, err := p.attrSetup()
		if err != nil {
			return mapContent{}, err
		}
		c.attr = a
		c.title = a.Name + " along " + p.hz.Name + ": " + p.statText()
		caption = []string{figure.Caption(name, []*compute.Attribute{a}, []compute.Params{params}, cond)}
	}
	if p.set.contours {
		c.times = timeMap(p.shownTop)
		c.contourMS = p.set.contourMS
		if c.contourMS == 0 {
			c.contourMS = autoContourMS(c.times)
		}
		if c.contourMS > 0 {
			caption = append(caption, "contours of time every "+trimFloat(c.contourMS)+" ms")
			if p.contours == nil || !p.contours.serves(c.times, c.contourMS) {
				p.contours = &contourLines{times: c.times, intervalMS: c.contourMS}
			}
			c.contours = p.contours
		}
	}
	if b := binCaption(v.info); b != "" {
		caption = append(caption, b)
	}
	c.caption = strings.Join(caption, " · ")
	return c, nil
}

// statText describes the statistic and its window.
func (p *mapPanel) statText() string {
	s := p.spec()
	t := strings.ToLower(statLabels[s.Stat-1])
	if s.Stat == horizon.Value {
		return t
	}
	if p.set.base != nil {
		return fmt.Sprintf("%s from %s ms to %s %+g ms", t, trimFloat(s.FromMS), p.set.base.Name, s.ToMS)
	}
	return fmt.Sprintf("%s over %s to %s ms", t, trimFloat(s.FromMS), trimFloat(s.ToMS))
}

// render draws the map figure at the view's size in the "map-render" lane.
func (p *mapPanel) render() {
	if !p.open || p.shownMap == nil {
		return
	}
	c, err := p.mapContentNow()
	if err != nil {
		p.view.setMessage(err.Error())
		return
	}
	w, h := p.view.pixels()
	v := p.v
	v.jobs.start("map-render", func(j *job) {
		img, plot, err := drawMap(c, max(w, 300), max(h, 240))
		v.onUI(j, func() {
			if err != nil {
				p.view.setMessage(err.Error())
				return
			}
			p.content0 = c
			p.view.setImage(img, plot, len(c.crosslines), len(c.inlines))
			p.drawn++
			p.refreshMarks()
		})
	})
}

// drawMap draws c at w x h pixels and returns the image with the map's
// rectangle in it.
func drawMap(c mapContent, w, h int) (*image.RGBA, image.Rectangle, error) {
	f, err := c.figure(w, h)
	if err != nil {
		return nil, image.Rectangle{}, err
	}
	lay, err := f.Layout()
	if err != nil {
		return nil, image.Rectangle{}, err
	}
	img, err := f.Draw()
	if err != nil {
		return nil, image.Rectangle{}, err
	}
	return img, lay.Plot, nil
}

// refreshMarks places the section's line and the pick on the map from the
// data the window shows. The window calls it whenever the navigation
// changes, also when another survey is opened or the data are shown with
// other parameters or conditioning: then the map is asked for again (the
// horizon may not fit the new survey's grid; an attribute map follows the
// window's parameters and conditioning).
func (p *mapPanel) refreshMarks() {
	if p == nil || !p.open {
		return
	}
	v := p.v
	if p.madeFor != v.vol {
		p.request()
	} else if p.set.attribute {
		// The window's parameters or conditioning of the attribute changed.
		if _, _, _, key, err := p.attrSetup(); err == nil && key != p.madeKey {
			p.request()
		}
	}
	lineRow, lineCol, pc, pr := math.NaN(), math.NaN(), math.NaN(), math.NaN()
	inlines, crosslines := surveyNumbers(v.info)
	if d := v.data.amp; d != nil {
		switch d.Slice.Orientation {
		case volume.Inline:
			if i := slices.Index(inlines, d.Slice.Number); i >= 0 {
				lineRow = float64(i) + 0.5
			}
		case volume.Crossline:
			if i := slices.Index(crosslines, d.Slice.Number); i >= 0 {
				lineCol = float64(i) + 0.5
			}
		}
	}
	if k, ok := v.pickedKeys(); ok {
		r, c := slices.Index(inlines, k.inline), slices.Index(crosslines, k.crossline)
		if r >= 0 && c >= 0 {
			pc, pr = float64(c)+0.5, float64(r)+0.5
		}
	}
	p.view.setMarks(lineRow, lineCol, pc, pr)
}

// cellKeys are the inline and crossline numbers of map cell (col, row).
func (p *mapPanel) cellKeys(col, row float64) (pickKeys, bool) {
	inlines, crosslines := surveyNumbers(p.v.info)
	r, c := int(math.Floor(row)), int(math.Floor(col))
	if r < 0 || r >= len(inlines) || c < 0 || c >= len(crosslines) {
		return pickKeys{}, false
	}
	return pickKeys{inlines[r], crosslines[c]}, true
}

// tapped moves the section to the tapped trace.
func (p *mapPanel) tapped(col, row float64) {
	k, ok := p.cellKeys(col, row)
	if !ok {
		return
	}
	ms := math.NaN()
	if h := p.shownTop; h != nil {
		ms, _ = h.At(int(math.Floor(row)), int(math.Floor(col)))
	}
	p.v.showTraceAt(k, ms)
}

// hover reads the map under the pointer.
func (p *mapPanel) hover(col, row float64, inside bool) {
	k, ok := p.cellKeys(col, row)
	if !inside || !ok || p.shownMap == nil {
		p.readout.SetText("Point at the map to read it; click to show that trace in the section")
		return
	}
	r, c := int(math.Floor(row)), int(math.Floor(col))
	t := "IL " + strconv.Itoa(k.inline) + "  XL " + strconv.Itoa(k.crossline)
	if p.shownTop != nil {
		ms, _ := p.shownTop.At(r, c)
		t += "  time " + fmtValue(float32(ms)) + " ms"
	}
	if p.set.attribute && r*p.shownMap.Crosslines+c < len(p.shownMap.Values) {
		t += "  " + strings.ToLower(lookup(p.set.attrID).Name) + " " + fmtValue(p.shownMap.Values[r*p.shownMap.Crosslines+c])
	}
	p.readout.SetText(t)
}

// showTraceAt moves the section to the trace at k, keeping the view's
// orientation (an inline goes to k's inline, a crossline to its crossline,
// a time slice stays), and picks it, at time ms when it is a number (the
// horizon's time there). It goes through the place's usual path: the
// wanted pick is placed when the data arrive, and the view enters the
// Back/Forward history.
func (v *viewer) showTraceAt(k pickKeys, ms float64) {
	if v.vol == nil {
		return
	}
	v.state.Inline, v.state.Crossline = k.inline, k.crossline
	if !math.IsNaN(ms) && v.info.IntervalUS > 0 {
		if s := v.sampleOfMS(ms); s >= 0 && s < v.info.Samples {
			v.state.PickSample = s
		}
	}
	if dataRequestFor(&v.state).satisfied(v.data) {
		// Already shown (e.g. a time slice, or the same line): pick it.
		if i := pickIn(v.data.amp, k); i >= 0 {
			v.state.PickTrace = i
			v.ui.section.setPick(v.pickPoint())
			v.requestTrace()
		}
		v.refreshNavigation()
		return
	}
	v.wantPick = &k
	v.state.PickTrace = -1
	v.refreshControls()
	v.requestData()
}
