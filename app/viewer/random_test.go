package viewer

import (
	"fmt"
	"image/color"
	"math"
	"math/rand"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"

	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
	"quadtrace/segy/segytest"
)

// TestRandomInteraction drives the window through random actions, as a
// hostile user would: every control, key and pointer event, attribute and
// file switches, cancels, with the results of background jobs arriving in
// between (sometimes all of them, sometimes a part, sometimes none before
// the next action). After each action it checks that nothing panicked and
// that the window is consistent (see checkConsistent).
//
// QUADTRACE_RANDOM_SEED picks the seed (default: the time; the seed is
// printed first, also when a job's panic ends the process);
// QUADTRACE_RANDOM_STEPS the number of actions (default 1000, or 250 under
// the race detector, so that CI on two cores stays within a few minutes;
// set it to a few thousand for a longer run).
func TestRandomInteraction(t *testing.T) {
	seed := time.Now().UnixNano()
	if s := os.Getenv("QUADTRACE_RANDOM_SEED"); s != "" {
		n, err := strconv.ParseInt(s, 10, 64)
		if err != nil {
			t.Fatalf("QUADTRACE_RANDOM_SEED=%q: %v", s, err)
		}
		seed = n
	}
	steps := 1000
	if raceDetector {
		steps = 250 // about a minute and a half on two busy cores
	}
	if s := os.Getenv("QUADTRACE_RANDOM_STEPS"); s != "" {
		n, err := strconv.Atoi(s)
		if err != nil || n < 1 {
			t.Fatalf("QUADTRACE_RANDOM_STEPS=%q is not a positive number", s)
		}
		steps = n
	}
	if testing.Short() {
		steps = min(steps, 200)
	}
	fmt.Fprintf(os.Stderr, "TestRandomInteraction: QUADTRACE_RANDOM_SEED=%d QUADTRACE_RANDOM_STEPS=%d\n", seed, steps)
	rng := rand.New(rand.NewSource(seed))

	files := []string{"", "small.sgy", "small-ps.sgy", "1x1.sgy", "1xN.sgy", "Mx1.sgy", "text.sgy", "tiny.sgy", "shot-gather.sgy"}
	paths := make([]string, len(files))
	for i, f := range files {
		if f != "" {
			paths[i] = segytest.CorpusFile(t, f)
		}
	}
	// And the malformed files of the segy suite, usable or not.
	malformed := t.TempDir()
	for i, c := range segytest.Malformed() {
		if i%3 != 0 { // a third of them keeps the run short
			continue
		}
		p, err := c.Create(malformed)
		if err != nil {
			t.Fatal(err)
		}
		paths = append(paths, p)
	}
	demo := synth.Config{Inlines: 12, Crosslines: 16, Samples: 120, IntervalUS: 4000, Noise: 0.05, Seed: 3}
	v := openDemoViewer(t, demo, fyne.NewSize(1000, 700))

	attrs := compute.Attributes()
	hzDir := t.TempDir()
	var log []string
	fail := func(format string, args ...any) {
		t.Helper()
		tail := log[max(0, len(log)-12):]
		t.Fatalf("seed %d, step %d: %s\nlast actions:\n  %s", seed, len(log), fmt.Sprintf(format, args...), strings.Join(tail, "\n  "))
	}
	actions := []struct {
		name string
		do   func()
	}{
		{"key", func() {
			keys := []fyne.KeyName{fyne.KeyRight, fyne.KeyLeft, fyne.KeyPageDown, fyne.KeyPageUp, fyne.KeyPlus, fyne.KeyMinus, fyne.KeyHome, fyne.KeyUp}
			v.typedKey(&fyne.KeyEvent{Name: keys[rng.Intn(len(keys))]})
		}},
		{"shortcut", func() {
			cmds := v.viewCommands()
			c := cmds[rng.Intn(len(cmds))]
			if c.do != nil {
				c.do()
			}
		}},
		{"orientation", func() { v.ui.orientation.SetSelected(orientationNames[rng.Intn(3)]) }},
		{"attribute", func() { v.ui.attrTree.Select("attr:" + attrs[rng.Intn(len(attrs))].ID) }},
		{"overlay box", func() { test.Tap(v.ui.coRenderCheck) }},
		{"one click", func() { test.Tap(v.ui.oneClick) }},
		{"base layer", func() {
			if !v.ui.baseChoice.Disabled() {
				v.ui.baseChoice.SetSelected(attrs[rng.Intn(len(attrs))].Name)
			}
		}},
		{"clip", func() {
			f := 90 + rng.Float64()*10
			v.ui.clipSlider.SetValue(f)
			v.ui.clipSlider.OnChangeEnded(f)
		}},
		{"opacity", func() {
			f := rng.Float64()
			v.ui.opacitySlider.SetValue(f)
			v.ui.opacitySlider.OnChangeEnded(f)
		}},
		{"checks", func() {
			checks := []fyne.Tappable{v.ui.wiggleCheck, v.ui.followCheck, v.ui.followCursor}
			test.Tap(checks[rng.Intn(len(checks))])
		}},
		{"palette", func() {
			o := v.ui.palettePick.Options
			v.ui.palettePick.SetSelected(o[rng.Intn(len(o))])
		}},
		{"base palette", func() {
			o := v.ui.basePalettePick.Options
			if !v.ui.basePalettePick.Disabled() {
				v.ui.basePalettePick.SetSelected(o[rng.Intn(len(o))])
			}
		}},
		{"click", func() {
			n, m := v.dims()
			v.pickAt(rng.Float64()*float64(n+2)-1, rng.Float64()*float64(m+2)-1)
		}},
		{"tap", func() {
			s := v.ui.section.Size()
			v.ui.section.Tapped(&fyne.PointEvent{Position: fyne.NewPos(rng.Float32()*s.Width, rng.Float32()*s.Height)})
		}},
		{"hover", func() {
			s := v.ui.section.Size()
			v.ui.section.MouseMoved(&desktop.MouseEvent{PointEvent: fyne.PointEvent{Position: fyne.NewPos(rng.Float32()*s.Width, rng.Float32()*s.Height)}})
			if rng.Intn(4) == 0 {
				v.ui.section.MouseOut()
			}
		}},
		{"wheel", func() {
			s := v.ui.section.Size()
			v.ui.section.Scrolled(&fyne.ScrollEvent{PointEvent: fyne.PointEvent{Position: fyne.NewPos(rng.Float32()*s.Width, rng.Float32()*s.Height)}, Scrolled: fyne.Delta{DY: float32(rng.Intn(41) - 20)}})
		}},
		{"drag", func() {
			s := v.ui.section.Size()
			v.ui.section.Dragged(&fyne.DragEvent{PointEvent: fyne.PointEvent{Position: fyne.NewPos(rng.Float32()*s.Width, rng.Float32()*s.Height)}, Dragged: fyne.Delta{DX: float32(rng.Intn(200) - 100), DY: float32(rng.Intn(200) - 100)}})
			v.ui.section.DragEnd()
		}},
		{"cancel", func() {
			if !v.ui.work.box.Hidden {
				test.Tap(v.ui.work.cancel)
			}
		}},
		{"open", func() {
			i := rng.Intn(len(paths))
			if paths[i] == "" {
				v.openDemo()
			} else {
				v.openFile(paths[i])
			}
		}},
		{"line entry", func() {
			texts := []string{"abc", "", "-5", "99999999", "3", "100", strconv.Itoa(rng.Intn(300))}
			s := texts[rng.Intn(len(texts))]
			v.ui.lineEntry.SetText(s)
			v.ui.lineEntry.OnSubmitted(s)
		}},
		{"slider", func() {
			sl := v.ui.lineSlider
			f := sl.Min + rng.Float64()*(sl.Max-sl.Min)
			sl.SetValue(f)
			sl.OnChangeEnded(f)
		}},
		{"parameter", func() {
			for name, e := range v.ui.paramEntries {
				texts := []string{"x", "-1e9", "1e9", "0", "10", "25", "", "NaN"}
				s := texts[rng.Intn(len(texts))]
				e.SetText(s)
				e.OnSubmitted(s)
				_ = name
				break
			}
		}},
		{"conditioning", func() {
			texts := []string{"", "off", "5", "80", "-3", "abc", "1e6", "200"}
			for _, e := range v.ui.condEntries {
				e.SetText(texts[rng.Intn(len(texts))])
			}
			v.applyConditioning()
		}},
		{"offset", func() {
			if o := v.ui.offsetPick.Options; len(o) > 0 && !v.ui.offsetRow.Hidden {
				v.ui.offsetPick.SetSelected(o[rng.Intn(len(o))])
			}
		}},
		{"stretch", func() {
			f := minExaggeration + rng.Float64()*(maxExaggeration-minExaggeration)
			if !v.ui.stretchSlider.Disabled() {
				v.ui.stretchSlider.SetValue(f)
				v.ui.stretchSlider.OnChangeEnded(f)
			}
		}},
		{"resize", func() {
			v.win.Resize(fyne.NewSize(float32(600+rng.Intn(900)), float32(420+rng.Intn(600))))
		}},
		{"history", func() { v.goHistory(rng.Intn(3) - 1) }},
		{"colour range", func() {
			texts := []string{"", "x", "-1e30", "0", "1", "3.5", "1e30", "NaN", "-2"}
			u := v.ui.displayPanel
			u.minEntry.SetText(texts[rng.Intn(len(texts))])
			u.maxEntry.SetText(texts[rng.Intn(len(texts))])
			u.maxEntry.OnSubmitted(u.maxEntry.Text)
		}},
		{"open map", func() {
			// A horizon on the survey's grid with random times (some
			// empty, some off the traces), or an existing one.
			if all := v.horizons.all(); len(all) > 0 && rng.Intn(3) == 0 {
				v.showMap(all[rng.Intn(len(all))])
				return
			}
			h := horizon.New(max(v.info.Inline.Count, 1), max(v.info.Crossline.Count, 1))
			t0 := rng.Float64() * 600
			for k := range h.TimeMS {
				if rng.Intn(5) > 0 {
					h.TimeMS[k], h.Quality[k], h.State[k] = t0+rng.Float64()*40-20, 1, horizon.Tracked
				}
			}
			v.showMap(v.horizons.addSurface("", h, h.Picked()))
		}},
		{"map settings", func() {
			p := v.ui.mapPanel
			if p == nil {
				return
			}
			switch rng.Intn(8) {
			case 0:
				p.showPick.SetSelected([]string{mapShowTime, mapShowAttribute}[rng.Intn(2)])
			case 1:
				p.attrPick.SetSelected(attrs[rng.Intn(len(attrs))].Name)
			case 2:
				p.statPick.SetSelected(statLabels[rng.Intn(len(statLabels))])
			case 3:
				texts := []string{"", "x", "-10", "10", "0", "-40", "80", "1e9", "NaN"}
				p.fromEntry.SetText(texts[rng.Intn(len(texts))])
				p.toEntry.SetText(texts[rng.Intn(len(texts))])
				p.applyWindow()
			case 4:
				if o := p.basePick.Options; len(o) > 0 {
					p.basePick.SetSelected(o[rng.Intn(len(o))])
				}
			case 5:
				p.palettePick.SetSelected(p.palettePick.Options[rng.Intn(len(p.palettePick.Options))])
			case 6:
				test.Tap(p.contourCheck)
			case 7:
				texts := []string{"", "auto", "0", "-1", "0.001", "2", "25", "abc"}
				p.contourEntry.OnSubmitted(texts[rng.Intn(len(texts))])
			}
		}},
		{"map click", func() {
			if p := v.ui.mapPanel; p != nil {
				s := p.view.Size()
				p.view.Tapped(&fyne.PointEvent{Position: fyne.NewPos(rng.Float32()*s.Width, rng.Float32()*s.Height)})
				p.view.MouseMoved(&desktop.MouseEvent{PointEvent: fyne.PointEvent{Position: fyne.NewPos(rng.Float32()*s.Width, rng.Float32()*s.Height)}})
			}
		}},
		{"map cancel or close", func() {
			p := v.ui.mapPanel
			switch {
			case p == nil:
			case !p.work.box.Hidden && rng.Intn(2) == 0:
				test.Tap(p.work.cancel)
			case rng.Intn(3) == 0:
				v.closeMap()
			case len(v.horizons.all()) > 0:
				all := v.horizons.all()
				v.deleteHorizon(all[rng.Intn(len(all))]) // as the Horizons tab does
			}
		}},
		{"map data", func() {
			if p := v.ui.mapPanel; p != nil && p.shownMap != nil {
				if c, err := p.mapContentNow(); err == nil {
					if _, _, err := drawMap(c, 500, 400); err != nil {
						fail("map figure of the shown map: %v", err)
					}
				}
			}
		}},
		// Horizons: tools, seeds, tracking, cancels, erases, undo, the list.
		{"horizon tool", func() {
			v.hzEdit.panel.tool.SetSelected(toolNames[rng.Intn(len(toolNames))])
		}},
		{"seed click", func() {
			v.hzEdit.panel.tool.SetSelected(toolNames[toolSeed])
			// Mostly on the plot (where a seed can land), sometimes anywhere.
			pos, ps := v.ui.section.plotRect(v.ui.section.Size())
			if rng.Intn(4) == 0 {
				pos, ps = fyne.NewPos(0, 0), v.ui.section.Size()
			}
			for i := rng.Intn(3); i >= 0; i-- {
				v.ui.section.Tapped(&fyne.PointEvent{Position: fyne.NewPos(pos.X+rng.Float32()*ps.Width, pos.Y+rng.Float32()*ps.Height)})
				if rng.Intn(2) == 0 {
					v.jobs.wait()
				}
			}
		}},
		{"track", func() { test.Tap(v.hzEdit.panel.track) }},
		{"horizon cancel", func() {
			if !v.hzEdit.progress.box.Hidden {
				test.Tap(v.hzEdit.progress.cancel)
			}
		}},
		{"erase box", func() {
			v.hzEdit.panel.tool.SetSelected(toolNames[toolErase])
			s := v.ui.section.Size()
			for i := rng.Intn(3); i >= 0; i-- {
				v.ui.section.Dragged(&fyne.DragEvent{PointEvent: fyne.PointEvent{Position: fyne.NewPos(rng.Float32()*s.Width, rng.Float32()*s.Height)}, Dragged: fyne.Delta{DX: float32(rng.Intn(300) - 150), DY: float32(rng.Intn(300) - 150)}})
			}
			v.ui.section.DragEnd()
		}},
		{"undo", func() { test.Tap(v.hzEdit.panel.undo) }},
		{"horizon list", func() {
			p := v.hzEdit.panel
			items := v.horizons.all()
			if len(items) == 0 || rng.Intn(4) == 0 {
				test.Tap(p.addButton)
				return
			}
			h := items[rng.Intn(len(items))]
			r := p.rows[h]
			switch rng.Intn(6) {
			case 0:
				test.Tap(r.shown)
			case 1:
				test.Tap(r.name)
			case 2:
				test.Tap(r.remove)
			case 3:
				v.setHorizonColour(h, color.NRGBA{R: uint8(rng.Intn(256)), G: uint8(rng.Intn(256)), B: uint8(rng.Intn(256)), A: 255})
			case 4:
				names := []string{"", " ", "Top sand", "Horizon 1", "Base", h.Name}
				v.renameHorizon(h, names[rng.Intn(len(names))])
			case 5:
				test.Tap(p.clearSeeds)
			}
		}},
		{"tracking settings", func() {
			p := v.hzEdit.panel
			// Mostly settings the tracker takes (so that tracking runs),
			// sometimes one it must refuse with a message.
			good := [][]string{{"4", "8", "12", "30"}, {"0", "40", "90"}, {"0", "0.3", "0.6"}, {"-1", "0", "0.6", "0.9"}}
			bad := []string{"", "x", "-1", "1e9", "NaN", "-0.5", "2"}
			es := []*widget.Entry{p.window, p.phaseJump, p.minEnvelope, p.minCorr}
			for i, e := range es {
				e.SetText(good[i][rng.Intn(len(good[i]))])
			}
			if rng.Intn(5) == 0 {
				es[rng.Intn(len(es))].SetText(bad[rng.Intn(len(bad))])
			}
			es[0].OnSubmitted(es[0].Text)
			p.event.SetSelected(horizon.Events()[rng.Intn(len(horizon.Events()))])
		}},
		{"horizon file", func() {
			items := v.horizons.all()
			if len(items) == 0 {
				return
			}
			path := filepath.Join(hzDir, "h.txt")
			if rng.Intn(2) == 0 {
				v.saveHorizon(items[rng.Intn(len(items))], path)
			} else {
				v.loadHorizon(path)
			}
		}},
		{"figure data", func() {
			if f, err := v.figureFor("t", 400, 300); err == nil {
				if _, err := f.Draw(); err != nil {
					fail("figure of the shown view: %v", err)
				}
			}
		}},
	}
	for step := 0; step < steps; step++ {
		act := actions[rng.Intn(len(actions))]
		log = append(log, act.name)
		func() {
			defer func() {
				if r := recover(); r != nil {
					fail("panic in %s: %v", act.name, r)
				}
			}()
			act.do()
			switch r := rng.Intn(10); {
			case r < 5:
				v.jobs.wait()
				checkConsistent(t, v, fail)
			case r < 8:
				v.jobs.drain()
			}
		}()
	}
	v.jobs.wait()
	checkConsistent(t, v, fail)
	picked := 0
	for _, h := range v.horizons.items {
		if h.H != nil {
			picked += h.H.Picked()
		}
	}
	t.Logf("horizons at the end: %d, %d traces picked; status %q", len(v.horizons.items), picked, v.ui.message.Text)
}

// checkConsistent checks, once every job has finished, that what the
// window shows agrees with itself: the state asks for the shown data (or an
// error says why not), the pick lies inside them, the navigation bar and
// title name the state's view, the legends match the shown layers.
func checkConsistent(t *testing.T, v *viewer, fail func(string, ...any)) {
	t.Helper()
	if v.vol == nil || v.info.Traces == 0 {
		return
	}
	d := v.data
	if d.amp == nil {
		if v.ui.section.message == "" {
			fail("no data shown and no message (status %q, work hidden %v, survey %s)", v.ui.message.Text, v.ui.work.box.Hidden, v.vol.Name())
		}
		return
	}
	if !d.complete() {
		fail("shown data incomplete: plan %+v, over %v", d.plan, d.over != nil)
	}
	req := dataRequestFor(&v.state)
	if !req.satisfied(d) && v.ui.section.message == "" && v.ui.message.Text == "" {
		fail("state asks for %s / %s, data hold %s / %s, and nothing says why", req.baseKey, req.overKey, d.baseKey, d.overKey)
	}
	n, m := v.dims()
	limit := n
	if d.amp.Slice.Orientation == volume.TimeSlice {
		limit = n * m
	}
	if v.state.PickTrace < -1 || v.state.PickTrace >= limit {
		fail("pick %d outside the %d x %d data", v.state.PickTrace, n, m)
	}
	if req.satisfied(d) {
		if !strings.HasPrefix(v.ui.title.Text, v.state.title(v.info)) {
			fail("title %q for %s", v.ui.title.Text, v.state.title(v.info))
		}
		if v.state.Orientation != volume.TimeSlice && v.ui.lineEntry.Text != strconv.Itoa(v.state.number()) {
			fail("line entry %q for line %d", v.ui.lineEntry.Text, v.state.number())
		}
		if v.sectionDrawn > 0 {
			want := 1
			if d.plan.Overlay != nil {
				want = 2
			}
			if got := v.ui.legends.shown(); got != want {
				fail("legends show %d layers, the data have %d", got, want)
			}
		}
	}
	checkMapConsistent(v, fail)
	checkHorizons(v, fail)
	vp := v.state.viewport(n, m)
	for _, x := range []float64{vp.Trace0, vp.Trace1, vp.Sample0, vp.Sample1} {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			fail("viewport %+v", vp)
		}
	}
}

// checkMapConsistent checks, with every job done, that an open map shows
// its horizon or says why not, on the survey's grid, with the section's
// line and the pick where the shown data put them.
func checkMapConsistent(v *viewer, fail func(string, ...any)) {
	p := v.ui.mapPanel
	if p == nil || !p.open {
		return
	}
	if p.hz == nil || v.horizons.index(p.hz) < 0 {
		fail("the map shows a horizon that is not in the list")
	}
	if p.view.message == "" {
		if p.shownMap == nil || p.view.img == nil {
			fail("the map shows no message and no map")
		}
		if p.view.nh != v.info.Crossline.Count || p.view.nv != v.info.Inline.Count {
			fail("map of %d x %d cells on a survey of %d inlines x %d crosslines", p.view.nh, p.view.nv, v.info.Inline.Count, v.info.Crossline.Count)
		}
		if p.shownTop != p.hz.H {
			fail("the map was made along another surface than its horizon's")
		}
	}
	lr, lc, pc, pr := p.view.lineRow, p.view.lineCol, p.view.pickCol, p.view.pickRow
	p.refreshMarks()
	if !same(lr, p.view.lineRow) || !same(lc, p.view.lineCol) || !same(pc, p.view.pickCol) || !same(pr, p.view.pickRow) {
		fail("map marks at row %v col %v pick %v,%v; the shown data put them at %v %v %v,%v", lr, lc, pc, pr, p.view.lineRow, p.view.lineCol, p.view.pickCol, p.view.pickRow)
	}
}

// checkHorizons checks, once every job has finished, that the horizon list
// agrees with itself and with the survey: the active entry exists, every
// surface and seed lies on the survey's grid, undo stays bounded, the
// Horizons tab lists every horizon, no horizon job is still shown as
// running, and hidden horizons are not drawn.
func checkHorizons(v *viewer, fail func(string, ...any)) {
	l := &v.horizons
	if (len(l.items) == 0) != (l.active == -1) || l.active >= len(l.items) {
		fail("active horizon %d of %d", l.active, len(l.items))
	}
	names := map[string]bool{}
	shown := 0
	for _, h := range l.items {
		if names[h.Name] || strings.TrimSpace(h.Name) == "" {
			fail("horizon name %q empty or twice", h.Name)
		}
		names[h.Name] = true
		if h.H != nil && (h.H.Inlines != v.info.Inline.Count || h.H.Crosslines != v.info.Crossline.Count) {
			fail("%s: %d x %d grid on a %d x %d survey", h.Name, h.H.Inlines, h.H.Crosslines, v.info.Inline.Count, v.info.Crossline.Count)
		}
		for _, s := range h.seeds {
			if s.Inline < 0 || s.Inline >= v.info.Inline.Count || s.Crossline < 0 || s.Crossline >= v.info.Crossline.Count {
				fail("%s: seed %+v off the grid", h.Name, s)
			}
		}
		if h.H != nil && h.picked != h.H.Picked() || h.H == nil && h.picked != 0 {
			fail("%s: %d picks counted, %v on the surface", h.Name, h.picked, h.H != nil)
		}
		if len(h.undo) > maxUndo {
			fail("%s: %d undo entries", h.Name, len(h.undo))
		}
		if v.hzEdit.panel.rows[h] == nil {
			fail("%s is not in the Horizons tab", h.Name)
		}
		if !h.Hidden {
			shown++
		}
	}
	if len(v.hzEdit.panel.list.Objects) != len(l.items) {
		fail("the Horizons tab lists %d of %d horizons", len(v.hzEdit.panel.list.Objects), len(l.items))
	}
	if !v.hzEdit.progress.box.Hidden || v.hzEdit.running != nil {
		fail("a horizon job is shown as running with no job left")
	}
	if len(v.ui.section.marks) > shown {
		fail("%d horizons drawn, %d shown", len(v.ui.section.marks), shown)
	}
}
