package viewer

import (
	"bufio"
	"context"
	"fmt"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"

	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
	"quadtrace/palettes"
)

// mapTestViewer starts a viewer on a small demo survey (12 inlines x 16
// crosslines x 120 samples at 4 ms) in a 1500 x 900 window on fyne's test
// driver (openDemoViewer).
func mapTestViewer(t *testing.T) *viewer {
	t.Helper()
	v := openDemoViewer(t, synth.Config{Inlines: 12, Crosslines: 16, Samples: 120, IntervalUS: 4000, Noise: 0.05, Seed: 3}, fyne.NewSize(1500, 900))
	if v.vol == nil {
		t.Fatalf("demo survey not open: %q", v.ui.message.Text)
	}
	return v
}

// planeTime is the known horizon of the map tests: a plane dipping along
// both grid directions (ms at grid index il, xl).
func planeTime(il, xl float64) float64 { return 150 + 3*il + 2*xl }

// planeHorizon adds the plane horizon to the window's list, empty on every
// ninth trace.
func planeHorizon(v *viewer) *namedHorizon { return planeHorizonBelow(v, "Plane", 0) }

// planeHorizonBelow adds the plane horizon moved down by shiftMS, named
// name (made whole before it enters the list: surfaces in the list are
// never changed in place).
func planeHorizonBelow(v *viewer, name string, shiftMS float64) *namedHorizon {
	h := horizon.New(v.info.Inline.Count, v.info.Crossline.Count)
	for il := range h.Inlines {
		for xl := range h.Crosslines {
			k := il*h.Crosslines + xl
			if k%9 == 4 {
				continue
			}
			h.TimeMS[k], h.Quality[k], h.State[k] = planeTime(float64(il), float64(xl))+shiftMS, 1, horizon.Tracked
		}
	}
	return v.horizons.addSurface(name, h, h.Picked())
}

// wholeTraceMap is horizon.Map over the survey's whole attribute traces
// (inline sections through the volume's attribute path): the reference a
// map shown in the window must equal. horizon.Map itself is checked against
// numpy in compute/horizon (testdata/horizon/map_stats.py).
func wholeTraceMap(t *testing.T, v *viewer, id string, h *horizon.Horizon, spec horizon.MapSpec) *horizon.AttributeMap {
	t.Helper()
	return wholeTraceMapCond(t, v, id, compute.Conditioning{}, h, spec)
}

// wholeTraceMapCond is wholeTraceMap with conditioning before the
// attribute.
func wholeTraceMapCond(t *testing.T, v *viewer, id string, cond compute.Conditioning, h *horizon.Horizon, spec horizon.MapSpec) *horizon.AttributeMap {
	t.Helper()
	a := lookup(id)
	p, err := a.Resolve(nil)
	if err != nil {
		t.Fatal(err)
	}
	inlines, _ := surveyNumbers(v.info)
	var data [][]float32
	for _, il := range inlines {
		sec, err := v.vol.Attribute(context.Background(), volume.Slice{Orientation: volume.Inline, Number: il}, a, p, cond, nil)
		if err != nil {
			t.Fatal(err)
		}
		data = append(data, sec.Traces...)
	}
	src, err := horizon.NewTraces(data, h.Inlines, h.Crosslines, float64(v.info.IntervalUS)*1e-6, v.info.StartMS*1e-3)
	if err != nil {
		t.Fatal(err)
	}
	m, err := horizon.Map(context.Background(), src, h, spec, nil)
	if err != nil {
		t.Fatal(err)
	}
	return m
}

func sameMap(t *testing.T, what string, got, want *horizon.AttributeMap) {
	t.Helper()
	if got == nil || len(got.Values) != len(want.Values) {
		t.Fatalf("%s: map %v, want %d values", what, got, len(want.Values))
	}
	for k := range want.Values {
		a, e := float64(got.Values[k]), float64(want.Values[k])
		if math.IsNaN(a) != math.IsNaN(e) || !math.IsNaN(e) && math.Abs(a-e) > 1e-6*math.Max(1, math.Abs(e)) {
			t.Fatalf("%s: trace %d shows %v, horizon.Map gives %v", what, k, a, e)
		}
	}
}

// nearMap checks a map made on a horizon slab (the attribute on stretches
// around the horizon) against the whole-trace map by the slab's own
// documented agreement (compute/horizon's TestSlabMatchesWholeTraces): on
// at least 99 % of the traces within 2 % of size, the largest absolute
// value of the whole-trace attribute near the horizon; empty on the same
// traces.
func nearMap(t *testing.T, what string, got, want, size *horizon.AttributeMap) {
	t.Helper()
	if got == nil || len(got.Values) != len(want.Values) {
		t.Fatalf("%s: map %v, want %d values", what, got, len(want.Values))
	}
	bad, n := 0, 0
	for k := range want.Values {
		a, e := float64(got.Values[k]), float64(want.Values[k])
		if math.IsNaN(a) != math.IsNaN(e) {
			t.Fatalf("%s: trace %d shows %v, horizon.Map gives %v", what, k, a, e)
		}
		if math.IsNaN(e) {
			continue
		}
		n++
		if math.Abs(a-e) > 0.02*float64(size.Values[k]) {
			bad++
		}
	}
	if n == 0 || bad > n/100 {
		t.Fatalf("%s: %d of %d traces differ from the whole-trace map by more than 2 %% of the attribute's size", what, bad, n)
	}
}

// canvasAt is the colour the map view's image shows at the centre of cell
// coordinates (col, row) (fractional), and the exact cell coordinates of
// that pixel's centre.
func imagePixelAt(p *mapPanel, col, row float64) (x, y int, cx, cy float64) {
	pl := p.view.plot
	x = pl.Min.X + int(col/float64(p.view.nh)*float64(pl.Dx()))
	y = pl.Min.Y + int(row/float64(p.view.nv)*float64(pl.Dy()))
	cx = (float64(x-pl.Min.X) + 0.5) / float64(pl.Dx()) * float64(p.view.nh)
	cy = (float64(y-pl.Min.Y) + 0.5) / float64(pl.Dy()) * float64(p.view.nv)
	return
}

// TestMapShowsHorizonValues maps a known (plane) horizon: its time map
// holds the horizon's times and the picture shows, at the pixels of chosen
// cells, the palette's colour of the plane's time there (the bilinear
// interpolation of a plane is the plane). Attribute maps equal horizon.Map
// over the whole attribute traces (exactly for the amplitude and for
// conditioned attributes, within the slab's documented agreement for the
// envelope), and a change of statistic or of the window inside what is
// kept computes nothing again.
func TestMapShowsHorizonValues(t *testing.T) {
	v := mapTestViewer(t)
	nh := planeHorizon(v)
	v.showMap(nh)
	v.jobs.wait()
	p := v.ui.mapPanel
	if p == nil || !p.open || p.drawn == 0 || p.view.img == nil {
		t.Fatalf("no map shown (message %q)", p.view.message)
	}
	if p.view.nh != 16 || p.view.nv != 12 {
		t.Fatalf("map of %d x %d cells, want 16 crosslines x 12 inlines", p.view.nh, p.view.nv)
	}
	for k, x := range p.shownMap.Values {
		want := nh.H.TimeMS[k]
		if nh.H.State[k] == horizon.Empty {
			want = math.NaN()
		}
		if !same(float64(x), float64(float32(want))) {
			t.Fatalf("time map trace %d: %v, horizon %v", k, x, want)
		}
	}
	// The picture, contours off: pixels inside cells whose four neighbours
	// hold picks show the plane's time at that pixel.
	p.contourCheck.SetChecked(false)
	v.jobs.wait()
	// The same content without what is drawn over the cells (north arrow,
	// corner labels, ground grid, outline), at the view's size: the plot
	// rectangle is the view's.
	bare := p.content0
	bare.geo, bare.ground, bare.outline = nil, nil, nil
	img, plot, err := drawMap(bare, p.view.img.Bounds().Dx(), p.view.img.Bounds().Dy())
	if err != nil || plot != p.view.plot {
		t.Fatalf("map drawn without decorations: %v, plot %v, view's %v", err, plot, p.view.plot)
	}
	layer, _ := p.content0.mapLayer()
	pal := layer.Palette
	checked := 0
	for k := 0; k < nh.H.Inlines*nh.H.Crosslines; k += 5 {
		il, xl := k/nh.H.Crosslines, k%nh.H.Crosslines
		live := il > 0 && xl > 0 && il < nh.H.Inlines-1 && xl < nh.H.Crosslines-1
		for _, d := range [][2]int{{0, 0}, {0, 1}, {1, 0}, {1, 1}, {-1, 0}, {0, -1}, {-1, -1}, {1, -1}, {-1, 1}} {
			if _, s := nh.H.At(il+d[0], xl+d[1]); s == horizon.Empty {
				live = false
			}
		}
		if !live {
			continue
		}
		x, y, cx, cy := imagePixelAt(p, float64(xl)+0.5, float64(il)+0.5)
		want := planeTime(cy-0.5, cx-0.5)
		tv := (want - float64(layer.Lo)) / float64(layer.Hi-layer.Lo)
		wc := pal.At(tv)
		got := img.RGBAAt(x, y)
		if colourDistance(wc, got) > 8 {
			t.Errorf("cell inline index %d crossline index %d (pixel %d,%d): colour %v, the palette gives %v for %.2f ms", il, xl, x, y, got, wc, want)
		}
		checked++
	}
	if checked < 5 {
		t.Fatalf("only %d cells checked", checked)
	}

	// The attribute along the horizon. The amplitude itself is mapped from
	// the slab's stretches exactly as from whole traces, for every
	// statistic; a change of statistic or of the window inside the slab
	// computes nothing again.
	p.showPick.SetSelected(mapShowAttribute)
	p.attrPick.SetSelected(lookup("amplitude").Name)
	p.statPick.SetSelected(statLabels[horizon.RMS-1])
	p.fromEntry.SetText("-10")
	p.toEntry.SetText("10")
	p.applyWindow()
	v.jobs.wait()
	sameMap(t, "amplitude RMS -10..10 ms", p.shownMap, wholeTraceMap(t, v, "amplitude", nh.H, horizon.MapSpec{Stat: horizon.RMS, FromMS: -10, ToMS: 10}))
	slab, attrSlab := p.slab, p.attrSlab
	if slab == nil || attrSlab == nil {
		t.Fatal("no slab kept")
	}
	for stat := horizon.Value; stat <= horizon.MinAbs; stat++ {
		p.statPick.SetSelected(statLabels[stat-1])
		v.jobs.wait()
		spec := horizon.MapSpec{Stat: stat, FromMS: -10, ToMS: 10}
		if stat == horizon.Value {
			spec = horizon.MapSpec{Stat: stat}
		}
		sameMap(t, "amplitude "+stat.String(), p.shownMap, wholeTraceMap(t, v, "amplitude", nh.H, spec))
		if p.slab != slab || p.attrSlab != attrSlab {
			t.Fatalf("a change of statistic to %v computed the attribute again", stat)
		}
	}
	p.fromEntry.SetText("-30")
	p.toEntry.SetText("4")
	p.applyWindow()
	v.jobs.wait()
	if p.attrSlab != attrSlab {
		t.Errorf("a window inside the kept slab computed the attribute again")
	}
	sameMap(t, "amplitude min-abs -30..4", p.shownMap, wholeTraceMap(t, v, "amplitude", nh.H, horizon.MapSpec{Stat: horizon.MinAbs, FromMS: -30, ToMS: 4}))
	// Another attribute is computed on the same slab (no trace read again)
	// and agrees with the whole traces as the slab promises.
	p.statPick.SetSelected(statLabels[horizon.RMS-1])
	p.attrPick.SetSelected(lookup("envelope").Name)
	v.jobs.wait()
	if p.slab != slab || p.attrSlab == attrSlab {
		t.Errorf("a change of attribute: slab kept %v, attribute kept %v", p.slab == slab, p.attrSlab == attrSlab)
	}
	size := wholeTraceMap(t, v, "envelope", nh.H, horizon.MapSpec{Stat: horizon.MaxAbs, FromMS: -30, ToMS: 30})
	nearMap(t, "envelope RMS -30..4", p.shownMap, wholeTraceMap(t, v, "envelope", nh.H, horizon.MapSpec{Stat: horizon.RMS, FromMS: -30, ToMS: 4}), size)
	// With conditioning the attribute comes from whole traces through the
	// survey's attribute path (as the section shows it): equal to
	// horizon.Map over those traces.
	cond := compute.Conditioning{AGCWindowMS: 120}
	v.state.Cond = cond
	v.requestData()
	v.jobs.wait()
	if p.strips == nil {
		t.Fatal("conditioning: the map did not follow the window's conditioning")
	}
	sameMap(t, "envelope RMS -30..4 after AGC", p.shownMap, wholeTraceMapCond(t, v, "envelope", cond, nh.H, horizon.MapSpec{Stat: horizon.RMS, FromMS: -30, ToMS: 4}))
	strips := p.strips
	p.statPick.SetSelected(statLabels[horizon.MaxAbs-1])
	v.jobs.wait()
	if p.strips != strips {
		t.Errorf("conditioning: a change of statistic computed the attribute again")
	}
	sameMap(t, "envelope max-abs -30..4 after AGC", p.shownMap, wholeTraceMapCond(t, v, "envelope", cond, nh.H, horizon.MapSpec{Stat: horizon.MaxAbs, FromMS: -30, ToMS: 4}))
	// A bad window is refused with its reason and the map kept.
	p.fromEntry.SetText("abc")
	p.applyWindow()
	if p.set.fromMS != -30 || p.fromEntry.Text != "-30" || v.ui.message.Text == "" {
		t.Errorf("bad window: from %v, entry %q, status %q", p.set.fromMS, p.fromEntry.Text, v.ui.message.Text)
	}
}

// TestMapBetweenHorizons maps the RMS amplitude between the plane and a
// second horizon 24 ms deeper, against horizon.Map.
func TestMapBetweenHorizons(t *testing.T) {
	v := mapTestViewer(t)
	top := planeHorizon(v)
	base := planeHorizonBelow(v, "Deeper", 24)
	v.showMap(top)
	p := v.ui.mapPanel
	p.showPick.SetSelected(mapShowAttribute)
	p.attrPick.SetSelected(lookup("amplitude").Name)
	p.statPick.SetSelected(statLabels[horizon.RMS-1])
	p.basePick.SetSelected("Deeper")
	v.jobs.wait()
	if p.set.base != base {
		t.Fatalf("base horizon %v not chosen (options %v)", p.set.base, p.basePick.Options)
	}
	sameMap(t, "amplitude RMS between horizons", p.shownMap, wholeTraceMap(t, v, "amplitude", top.H, horizon.MapSpec{Stat: horizon.RMS, FromMS: -10, ToMS: 10, Base: base.H}))
}

// TestMapClickMovesSection taps map cells: the section goes to the tapped
// inline (or, on a crossline view, crossline) with the tapped trace
// picked, at the horizon's time there.
func TestMapClickMovesSection(t *testing.T) {
	v := mapTestViewer(t)
	nh := planeHorizon(v)
	v.showMap(nh)
	v.jobs.wait()
	p := v.ui.mapPanel
	inlines, crosslines := surveyNumbers(v.info)
	tap := func(il, xl int) {
		p.view.Tapped(&fyne.PointEvent{Position: p.view.toWidget(float64(xl)+0.5, float64(il)+0.5)})
		v.jobs.wait()
	}
	tap(2, 11)
	if v.state.Orientation != volume.Inline || v.state.Inline != inlines[2] {
		t.Fatalf("after the tap: %v %d, want inline %d", v.state.Orientation, v.state.Inline, inlines[2])
	}
	if k, ok := v.pickedKeys(); !ok || k != (pickKeys{inlines[2], crosslines[11]}) {
		t.Fatalf("picked %+v, want inline %d crossline %d", k, inlines[2], crosslines[11])
	}
	if want := v.sampleOfMS(planeTime(2, 11)); v.state.PickSample != want {
		t.Errorf("picked sample %d, want %d (the horizon's time)", v.state.PickSample, want)
	}
	// Same inline, another crossline: only the pick moves.
	tap(2, 3)
	if k, _ := v.pickedKeys(); k != (pickKeys{inlines[2], crosslines[3]}) {
		t.Errorf("picked %+v on the same inline, want crossline %d", k, crosslines[3])
	}
	v.ui.orientation.SetSelected("Crossline")
	v.jobs.wait()
	shownBefore := v.state.Crossline
	tap(9, 7)
	if v.state.Orientation != volume.Crossline || v.state.Crossline != crosslines[7] {
		t.Fatalf("crossline view after the tap: %v %d, want crossline %d", v.state.Orientation, v.state.Crossline, crosslines[7])
	}
	if k, _ := v.pickedKeys(); k != (pickKeys{inlines[9], crosslines[7]}) {
		t.Errorf("picked %+v, want inline %d crossline %d", k, inlines[9], crosslines[7])
	}
	// Back returns to the crossline shown before (the tap went through
	// the view history).
	v.goHistory(-1)
	v.jobs.wait()
	if v.state.Orientation != volume.Crossline || v.state.Crossline != shownBefore {
		t.Errorf("Back after the map's tap shows %v %d, want crossline %d", v.state.Orientation, v.state.Crossline, shownBefore)
	}
	// A tap outside the map does nothing.
	before := v.state
	p.view.Tapped(&fyne.PointEvent{Position: fyne.NewPos(1, 1)})
	v.jobs.wait()
	if v.state.Inline != before.Inline || v.state.PickTrace != before.PickTrace {
		t.Errorf("a tap off the map moved the section")
	}
}

// TestMapLineFollowsNavigation: the section's place is a line on the map
// (a row for an inline, a column for a crossline, none on a time slice)
// and the pick a cross, both following the navigation.
func TestMapLineFollowsNavigation(t *testing.T) {
	v := mapTestViewer(t)
	v.showMap(planeHorizon(v))
	v.jobs.wait()
	p := v.ui.mapPanel
	inlines, crosslines := surveyNumbers(v.info)
	row := func(n int) float64 {
		for i, x := range inlines {
			if x == n {
				return float64(i) + 0.5
			}
		}
		return math.NaN()
	}
	if p.view.lineRow != row(v.state.Inline) || !math.IsNaN(p.view.lineCol) {
		t.Fatalf("line at row %v col %v, want row %v (inline %d)", p.view.lineRow, p.view.lineCol, row(v.state.Inline), v.state.Inline)
	}
	v.stepLine(3)
	v.jobs.wait()
	if p.view.lineRow != row(v.state.Inline) {
		t.Errorf("after three inlines forward: line at row %v, want %v", p.view.lineRow, row(v.state.Inline))
	}
	v.pickAt(4.5, 30)
	v.jobs.wait()
	if p.view.pickCol != 4.5 || p.view.pickRow != row(v.state.Inline) {
		t.Errorf("pick cross at %v,%v, want 4.5,%v", p.view.pickCol, p.view.pickRow, row(v.state.Inline))
	}
	v.ui.orientation.SetSelected("Crossline")
	v.jobs.wait()
	if !math.IsNaN(p.view.lineRow) || p.view.lineCol != 4.5 || v.state.Crossline != crosslines[4] {
		t.Errorf("crossline %d: line at row %v col %v, want column 4.5", v.state.Crossline, p.view.lineRow, p.view.lineCol)
	}
	v.ui.orientation.SetSelected("Time slice")
	v.jobs.wait()
	if !math.IsNaN(p.view.lineRow) || !math.IsNaN(p.view.lineCol) || p.view.pickCol != 4.5 {
		t.Errorf("time slice: line at row %v col %v, pick col %v", p.view.lineRow, p.view.lineCol, p.view.pickCol)
	}
	// The canvas lines are where the marks say.
	v.ui.orientation.SetSelected("Inline")
	v.jobs.wait()
	r := test.WidgetRenderer(p.view).(*mapRenderer)
	want := p.view.toWidget(0, p.view.lineRow)
	if l := r.lines[1]; l.Hidden || math.Abs(float64(l.Position1.Y-want.Y)) > 0.5 {
		t.Errorf("section line drawn at y %v (hidden %v), want %v", l.Position1.Y, l.Hidden, want.Y)
	}
	v.closeMap()
	if p.open || len(v.ui.workArea.Objects) != 1 || v.ui.workArea.Objects[0] != v.ui.workspace {
		t.Errorf("the map is still shown after closing it")
	}
}

// TestMapContoursOfThePlane: the time contours drawn over the map lie on
// the plane's lines of equal time (closed form), at the interval asked,
// also after the interval changes (the panel keeps the contours traced for
// one interval and horizon: a change of interval or of the horizon's times
// must not draw the kept ones), and a redraw with nothing changed draws
// the kept ones.
func TestMapContoursOfThePlane(t *testing.T) {
	v := mapTestViewer(t)
	v.showMap(planeHorizon(v))
	v.jobs.wait()
	p := v.ui.mapPanel
	check := func(interval float64) *contourLines {
		t.Helper()
		txt := strconv.FormatFloat(interval, 'g', -1, 64)
		p.contourEntry.SetText(txt)
		p.contourEntry.OnSubmitted(txt)
		v.jobs.wait()
		c, err := p.mapContentNow()
		if err != nil {
			t.Fatal(err)
		}
		f, err := c.figure(900, 700)
		if err != nil {
			t.Fatal(err)
		}
		n := 0
		for _, set := range f.Lines {
			if set.Colour != contourInk.Colour {
				continue
			}
			for _, s := range set.Segments {
				t0, t1 := planeTime(s.Y0-0.5, s.X0-0.5), planeTime(s.Y1-0.5, s.X1-0.5)
				if math.Abs(t0-t1) > 1e-3 || math.Abs(math.Mod(t0+interval/2, interval)-interval/2) > 1e-3 {
					t.Fatalf("contour segment %+v runs from %.4f to %.4f ms, not along a multiple of %g ms", s, t0, t1, interval)
				}
				n++
			}
		}
		if n < 50*5/int(interval) {
			t.Errorf("%d contour segments every %g ms", n, interval)
		}
		return c.contours
	}
	first := check(5)
	if again := check(5); again != first || again == nil {
		t.Errorf("a redraw with the same horizon and interval traced the contours again")
	}
	check(10)
	check(5)
	p.contourEntry.OnSubmitted("-2")
	if p.set.contourMS != 5 {
		t.Errorf("a negative contour interval was taken: %v", p.set.contourMS)
	}
	// Other times on the same grid: the kept contours do not serve them.
	c, err := p.mapContentNow()
	if err != nil {
		t.Fatal(err)
	}
	shifted := make([][]float32, len(c.times))
	for r, row := range c.times {
		shifted[r] = make([]float32, len(row))
		for i, x := range row {
			shifted[r][i] = x + 2.5
		}
	}
	if c.contours.serves(shifted, 5) || c.contours.serves(c.times, 10) || !c.contours.serves(c.times, 5) {
		t.Errorf("kept contours serve other times or another interval, or not their own")
	}
}

// TestMapSaves writes the map as a figure (PNG through figure.Write) and as
// a text grid (horizon.WriteMap's format), and reads both back.
func TestMapSaves(t *testing.T) {
	v := mapTestViewer(t)
	nh := planeHorizon(v)
	v.showMap(nh)
	v.jobs.wait()
	p := v.ui.mapPanel
	dir := t.TempDir()
	fig := filepath.Join(dir, "maps", "plane.png")
	p.saveFigure(fig)
	v.jobs.wait()
	f, err := os.Open(fig)
	if err != nil {
		t.Fatalf("figure not written: %v (status %q)", err, v.ui.message.Text)
	}
	img, err := png.Decode(f)
	f.Close()
	if err != nil || img.Bounds().Dx() != mapFigureWidth || img.Bounds().Dy() != mapFigureHeight {
		t.Fatalf("figure: %v, %v", err, img)
	}
	grid := filepath.Join(dir, "plane.txt")
	p.saveGrid(grid)
	v.jobs.wait()
	g, err := os.Open(grid)
	if err != nil {
		t.Fatalf("grid not written: %v (status %q)", err, v.ui.message.Text)
	}
	defer g.Close()
	sc := bufio.NewScanner(g)
	sc.Scan()
	if sc.Text() != horizon.MapHeader {
		t.Fatalf("grid header %q", sc.Text())
	}
	rowsRead := 0
	inlines, crosslines := surveyNumbers(v.info)
	for sc.Scan() {
		var il, xl int
		var x, y, val float64
		if _, err := fmt.Sscan(sc.Text(), &il, &xl, &x, &y, &val); err != nil {
			t.Fatalf("grid line %q: %v", sc.Text(), err)
		}
		i, j := il-inlines[0], xl-crosslines[0]
		if want := planeTime(float64(i), float64(j)); math.Abs(val-want) > 1e-3 {
			t.Fatalf("grid at inline %d crossline %d: %v, the horizon's time is %v", il, xl, val, want)
		}
		if wx, wy, _ := v.vol.(interface {
			Coordinates(int, int) (float64, float64, bool)
		}).Coordinates(il, xl); math.Abs(wx-x) > 0.01 || math.Abs(wy-y) > 0.01 {
			t.Fatalf("grid at inline %d crossline %d: x, y %v %v, survey %v %v", il, xl, x, y, wx, wy)
		}
		rowsRead++
	}
	if rowsRead != nh.H.Picked() {
		t.Errorf("grid holds %d rows, the horizon %d picks", rowsRead, nh.H.Picked())
	}
	// The survey's own file is never overwritten; a folder is refused.
	p.saveGrid(dir)
	v.jobs.wait()
	if st, err := os.Stat(dir); err != nil || !st.IsDir() {
		t.Fatalf("saving over a folder: %v", err)
	}
}

// TestMapLoadsHorizonFile reads a horizon file written by compute/horizon
// into the window's list and maps it; a malformed one is refused naming
// its line.
func TestMapLoadsHorizonFile(t *testing.T) {
	v := mapTestViewer(t)
	src := horizon.New(v.info.Inline.Count, v.info.Crossline.Count)
	for k := range src.TimeMS {
		src.TimeMS[k], src.Quality[k], src.State[k] = 200+float64(k%7), 0.9, horizon.Tracked
	}
	path := filepath.Join(t.TempDir(), "top-sand.txt")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := horizon.Write(f, src.Picks(layoutOf(t, v))); err != nil {
		t.Fatal(err)
	}
	f.Close()
	v.loadHorizonFile(path)
	v.jobs.wait()
	p := v.ui.mapPanel
	if p == nil || p.hz == nil || p.hz.Name != "top-sand" || p.shownMap == nil {
		t.Fatalf("horizon file not mapped (status %q)", v.ui.message.Text)
	}
	for k, x := range p.shownMap.Values {
		if float64(x) != src.TimeMS[k] {
			t.Fatalf("trace %d: %v, file %v", k, x, src.TimeMS[k])
		}
	}
	bad := filepath.Join(t.TempDir(), "bad.txt")
	os.WriteFile(bad, []byte(horizon.Header+"\n1000 2000 0 0 12,5 1 seed\n"), 0o644)
	v.loadHorizonFile(bad)
	v.jobs.wait()
	if msg := v.ui.message.Text; !strings.Contains(msg, "line 2") {
		t.Errorf("malformed horizon file: status %q does not name line 2", msg)
	}
}

// The palette of a map is ours: every choice is one of palettes.All.
func TestMapPalettesAreOurs(t *testing.T) {
	for _, n := range paletteNames() {
		if _, err := palettes.ByName(n); err != nil {
			t.Errorf("palette choice %q: %v", n, err)
		}
	}
}

// layoutOf is the survey's numbering for horizon files.
func layoutOf(t *testing.T, v *viewer) horizon.Layout {
	t.Helper()
	src, err := newSurveySource(v.vol, v.state.Offset)
	if err != nil {
		t.Fatal(err)
	}
	return src.layout()
}

// A horizon without picks, or on another grid than the survey's, shows why
// there is no map instead of one; opening another survey closes the map
// (its horizons belong to the survey they were picked on).
func TestMapRefusesWhatDoesNotFit(t *testing.T) {
	v := mapTestViewer(t)
	empty := v.horizons.add()
	v.showMap(empty)
	v.jobs.wait()
	p := v.ui.mapPanel
	if !strings.Contains(p.view.message, "no picks") || p.shownMap != nil {
		t.Errorf("empty horizon: message %q", p.view.message)
	}
	wrong := v.horizons.addSurface("Wrong grid", horizon.New(v.info.Inline.Count+1, v.info.Crossline.Count), 0)
	v.showMap(wrong)
	v.jobs.wait()
	if !strings.Contains(p.view.message, "grid") || p.shownMap != nil {
		t.Errorf("horizon on another grid: message %q", p.view.message)
	}
	v.showMap(planeHorizon(v))
	v.jobs.wait()
	if p.shownMap == nil || p.view.message != "" {
		t.Fatalf("plane horizon not mapped: %q", p.view.message)
	}
	v.openDemo()
	v.jobs.wait()
	if p.open {
		t.Errorf("the map stays open on a new survey")
	}
}

// The Horizons tab's Map button of a horizon with picks opens the map view
// of that horizon (a second horizon's button switches the map to it); an
// empty horizon has no Map button.
func TestMapButtonOpensMap(t *testing.T) {
	v := mapTestViewer(t)
	plane := planeHorizon(v)
	lower := planeHorizonBelow(v, "Lower", 20)
	test.Tap(v.hzEdit.panel.addButton)
	empty := v.horizons.current()
	rows := v.hzEdit.panel.rows
	if !rows[plane].mapBtn.Visible() || !rows[lower].mapBtn.Visible() || rows[empty].mapBtn.Visible() {
		t.Fatalf("Map buttons shown: picked %v %v, empty %v", rows[plane].mapBtn.Visible(), rows[lower].mapBtn.Visible(), rows[empty].mapBtn.Visible())
	}
	if v.ui.mapPanel != nil && v.ui.mapPanel.open {
		t.Fatal("the map view is open before any Map button was pressed")
	}
	for _, nh := range []*namedHorizon{plane, lower} {
		test.Tap(rows[nh].mapBtn)
		v.jobs.wait()
		p := v.ui.mapPanel
		if p == nil || !p.open || p.hz != nh || p.view.img == nil || p.shownTop != nh.H {
			t.Fatalf("after pressing Map of %s: no map of it shown", nh.Name)
		}
	}
}

// Asking for the map of a horizon without picks while an attribute map of
// another horizon is still being computed shows the refusal, and the
// computation still running does not land over it with the other
// horizon's map (found by TestRandomInteraction, seed 1796190966887915688:
// "the map was made along another surface than its horizon's").
func TestMapRefusalNotOverwrittenByRunningMap(t *testing.T) {
	v := mapTestViewer(t)
	plane := planeHorizon(v)
	v.showMap(plane)
	v.jobs.wait()
	p := v.ui.mapPanel
	p.showPick.SetSelected(mapShowAttribute) // starts the attribute map in the "map" lane
	empty := v.horizons.add()
	v.showMap(empty) // before that map is done
	v.jobs.wait()
	if p.hz != empty || !strings.Contains(p.view.message, "no picks") || p.shownMap != nil || p.shownTop != nil {
		t.Errorf("map of %s: message %q, a map shown %v (along the plane: %v)", p.hz.Name, p.view.message, p.shownMap != nil, p.shownTop == plane.H)
	}
	if !p.work.box.Hidden {
		t.Error("the map's progress still shows with no map job left")
	}
}
