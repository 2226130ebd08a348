package viewer

import (
	"context"
	"image"
	"image/color"
	"math"
	"path/filepath"
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/test"

	"quadtrace/app/style"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/palettes"
	"quadtrace/render"
	"quadtrace/segy/segytest"
)

// openViewer starts a viewer on the fyne test driver with path opened and
// waits until its jobs are done.
func openViewer(t *testing.T, path string) *viewer {
	t.Helper()
	a := test.NewTempApp(t)
	v := newViewer(a, Options{Path: path}, newQueuedJobs())
	v.win.Resize(fyne.NewSize(1400, 900))
	v.start()
	v.jobs.wait()
	t.Cleanup(func() {
		v.jobs.close()
		v.jobs.wait()
		if v.vol != nil {
			v.vol.Close()
		}
	})
	if v.vol == nil {
		t.Fatalf("open %s: no survey; status %q", path, v.ui.message.Text)
	}
	return v
}

// corpusValue is the documented sample rule of small.sgy (segy-corpus README):
// sample k of (il, xl) = il + xl/100 + k*1e-5.
func corpusValue(il, xl, k int) float64 {
	return float64(il) + float64(xl)/100 + float64(k)*1e-5
}

// near reports whether a sample read from the corpus equals the rule's
// value to the precision of a 4-byte IBM float: its hexadecimal mantissa
// keeps at least 21 significant bits (SEG-Y rev 1, format code 1), a
// relative error under 2^-20.
func near(got float32, want float64) bool {
	return math.Abs(float64(got)-want) <= math.Abs(want)*math.Exp2(-20)
}

// expectedSection renders the viewer's current data with render and the
// shared style directly, as the section view should show it.
func expectedSection(t *testing.T, v *viewer) *image.RGBA {
	t.Helper()
	st := v.state
	pl := st.plan()
	img := image.NewRGBA(v.lastSection.Bounds())
	// The colour range is the one kept for the survey and attribute (taken
	// from the first section shown), when there is one.
	kept := func(l *render.Layer, a *compute.Attribute, params map[string]string) {
		if r, ok := v.ranges[rangeKey(a, params, v.data.cond, st.ClipPercent)]; ok {
			l.Lo, l.Hi = r[0], r[1]
		}
	}
	base := style.Layer(pl.Base, v.data.base.Traces, st.paletteFor(pl.Base, false), st.ClipPercent)
	kept(&base, pl.Base, v.data.baseParams)
	var ov *render.Layer
	if pl.Overlay != nil {
		o := style.Overlay(pl.Overlay, v.data.over.Traces, st.paletteFor(pl.Overlay, true), st.ClipPercent, st.Opacity, st.OpacityFollowsValue)
		kept(&o, pl.Overlay, v.data.overParams)
		ov = &o
	}
	n, m := v.dims()
	render.DrawSection(img, base, ov, nil, st.viewport(n, m))
	return img
}

// canvasPixel is the colour the window's canvas shows at the centre of
// pixel (x, y) of the section image.
func canvasPixel(t *testing.T, v *viewer, shot image.Image, x, y int) color.RGBA {
	t.Helper()
	origin := fyne.CurrentApp().Driver().AbsolutePositionForObject(v.ui.section)
	pos, size := v.ui.section.plotRect(v.ui.section.Size())
	b := v.lastSection.Bounds()
	px := origin.X + pos.X + (float32(x)+0.5)*size.Width/float32(b.Dx())
	py := origin.Y + pos.Y + (float32(y)+0.5)*size.Height/float32(b.Dy())
	scale := v.win.Canvas().Scale()
	return toRGBA(shot.At(int(px*scale), int(py*scale)))
}

// assertCanvasShowsSection checks that the window's canvas shows the
// viewer's last rendered section at a grid of points.
func assertCanvasShowsSection(t *testing.T, v *viewer) {
	t.Helper()
	shot := v.win.Canvas().Capture()
	b := v.lastSection.Bounds()
	for _, fx := range []float64{0.1, 0.3, 0.5, 0.7, 0.9} {
		for _, fy := range []float64{0.1, 0.5, 0.9} {
			x, y := int(fx*float64(b.Dx())), int(fy*float64(b.Dy()))
			want := v.lastSection.RGBAAt(x, y)
			got := canvasPixel(t, v, shot, x, y)
			if colourDistance(want, got) > 6 {
				t.Errorf("canvas at section pixel (%d,%d) shows %v, the rendered section has %v", x, y, got, want)
			}
		}
	}
}

func colourDistance(a, b color.RGBA) int {
	d := func(x, y uint8) int {
		if x > y {
			return int(x - y)
		}
		return int(y - x)
	}
	return max(d(a.R, b.R), d(a.G, b.G), d(a.B, b.B))
}

func samePixels(a, b *image.RGBA) bool {
	return a.Bounds() == b.Bounds() && string(a.Pix) == string(b.Pix)
}

// TestOpenStepPickAndClick drives the window as an interpreter would on
// small.sgy: open, step one inline forward and back with the keyboard, pick
// an attribute in the tree, switch co-rendering off, click a trace.
func TestOpenStepPickAndClick(t *testing.T) {
	path := segytest.CorpusFile(t, "small.sgy")
	v := openViewer(t, path)

	// Opened on the middle inline (3 of 1..5), envelope over amplitude.
	if v.state.Orientation != volume.Inline || v.state.Inline != 3 {
		t.Fatalf("opened on %s, want inline 3", v.state.title(v.info))
	}
	if got := v.data.amp.Traces[0][0]; !near(got, corpusValue(3, 20, 0)) {
		t.Errorf("inline 3, crossline 20, sample 0 = %v, corpus README says %v", got, corpusValue(3, 20, 0))
	}
	if !strings.HasPrefix(v.ui.title.Text, "Inline 3") || v.ui.lineEntry.Text != "3" {
		t.Errorf("title %q, entry %q; want inline 3 shown", v.ui.title.Text, v.ui.lineEntry.Text)
	}
	if v.lastSection == nil || v.sectionDrawn == 0 {
		t.Fatal("no section drawn after opening")
	}
	if !samePixels(v.lastSection, expectedSection(t, v)) {
		t.Error("the drawn section differs from render's output for the same layers")
	}
	assertCanvasShowsSection(t, v)
	first := v.lastSection
	if recent := v.recentFiles(); len(recent) == 0 || filepath.Base(recent[0]) != "small.sgy" {
		t.Errorf("recent files %v, want small.sgy first", recent)
	}

	// Step forward with the keyboard.
	v.win.Canvas().OnTypedKey()(&fyne.KeyEvent{Name: fyne.KeyRight})
	v.jobs.wait()
	if v.state.Inline != 4 {
		t.Fatalf("after Right: inline %d, want 4", v.state.Inline)
	}
	if got, want := v.data.amp.Traces[4][49], corpusValue(4, 24, 49); !near(got, want) {
		t.Errorf("inline 4, crossline 24, sample 49 = %v, want %v", got, want)
	}
	if v.ui.lineEntry.Text != "4" {
		t.Errorf("entry shows %q after stepping, want 4", v.ui.lineEntry.Text)
	}
	if !samePixels(v.lastSection, expectedSection(t, v)) {
		t.Error("inline 4: the drawn section differs from render's output")
	}
	// Back again: the very same picture as at first.
	v.win.Canvas().OnTypedKey()(&fyne.KeyEvent{Name: fyne.KeyLeft})
	v.jobs.wait()
	if v.state.Inline != 3 || !near(v.data.amp.Traces[0][0], corpusValue(3, 20, 0)) {
		t.Fatalf("after Left: inline %d, first sample %v", v.state.Inline, v.data.amp.Traces[0][0])
	}
	if !samePixels(v.lastSection, first) {
		t.Error("stepping forward and back did not give the first picture again")
	}
	// Past the last inline the step stops at 5.
	v.win.Canvas().OnTypedKey()(&fyne.KeyEvent{Name: fyne.KeyPageDown})
	v.jobs.wait()
	if v.state.Inline != 5 {
		t.Errorf("Page Down from 3 in 1..5: inline %d, want 5", v.state.Inline)
	}
	v.win.Canvas().OnTypedKey()(&fyne.KeyEvent{Name: fyne.KeyPageUp})
	v.jobs.wait()
	if v.state.Inline != 1 {
		t.Errorf("Page Up from 5: inline %d, want 1", v.state.Inline)
	}
	v.goToLine(3)
	v.jobs.wait()

	// Pick an attribute in the tree.
	before := v.lastSection
	v.ui.attrTree.Select("attr:instantaneous-phase")
	v.jobs.wait()
	if v.state.AttributeID != "instantaneous-phase" {
		t.Fatalf("attribute %q after picking instantaneous phase (refreshing %v)", v.state.AttributeID, v.ui.attributePanel.refreshing)
	}
	if v.win.Canvas().Focused() != v.ui.section {
		t.Error("after picking an attribute the section does not have the keyboard")
	}
	pl := v.state.plan()
	if pl.Overlay == nil || pl.Overlay.ID != "instantaneous-phase" || pl.Base.ID != amplitudeID {
		t.Fatalf("plan %+v, want phase over amplitude", pl)
	}
	a, _ := compute.Lookup("instantaneous-phase")
	want, err := a.Compute(context.Background(), v.data.amp.Section, compute.Params{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for i := range want.Traces {
		for k := range want.Traces[i] {
			g, w := v.data.over.Traces[i][k], want.Traces[i][k]
			if g != w && !(math.IsNaN(float64(g)) && math.IsNaN(float64(w))) {
				t.Fatalf("phase trace %d sample %d: shown %v, compute gives %v", i, k, g, w)
			}
		}
	}
	if samePixels(v.lastSection, before) {
		t.Error("picking instantaneous phase did not change the picture")
	}
	if !samePixels(v.lastSection, expectedSection(t, v)) {
		t.Error("phase over amplitude: the drawn section differs from render's output")
	}
	if !strings.Contains(v.ui.title.Text, "Instantaneous phase over amplitude") {
		t.Errorf("title %q does not name the layers", v.ui.title.Text)
	}
	if !strings.Contains(v.ui.attrAbout.Text, "Source:") {
		t.Errorf("attribute description %q lacks its source", v.ui.attrAbout.Text)
	}

	// Co-rendering off: the phase alone, on the cyclic palette.
	over := v.lastSection
	test.Tap(v.ui.coRenderCheck)
	v.jobs.wait()
	if v.state.CoRender || v.state.plan().Overlay != nil || v.state.plan().Base.ID != "instantaneous-phase" {
		t.Fatalf("co-rendering still on: %+v", v.state.plan())
	}
	if samePixels(v.lastSection, over) {
		t.Error("switching co-rendering off did not change the picture")
	}
	if !samePixels(v.lastSection, expectedSection(t, v)) {
		t.Error("phase alone: the drawn section differs from render's output")
	}
	assertCanvasShowsSection(t, v)
	if p := v.state.paletteFor(lookup("instantaneous-phase"), false); paletteName(v.ui.palettePick.Selected) != p.Name || p.Family != palettes.Cyclic {
		t.Errorf("palette control shows %q, the layer uses %q", v.ui.palettePick.Selected, p.Name)
	}

	// Click the second trace: the trace panel shows crossline 21.
	origin := fyne.CurrentApp().Driver().AbsolutePositionForObject(v.ui.section)
	pos, size := v.ui.section.plotRect(v.ui.section.Size())
	vp := v.ui.section.vp
	x := origin.X + pos.X + float32((1.5-vp.Trace0)/(vp.Trace1-vp.Trace0))*size.Width
	y := origin.Y + pos.Y + size.Height/2
	test.TapCanvas(v.win.Canvas(), fyne.NewPos(x, y))
	v.jobs.wait()
	if v.state.PickTrace != 1 {
		t.Fatalf("picked trace %d after clicking the second trace", v.state.PickTrace)
	}
	if v.ui.trace.img == nil || !hasLabel(v.ui.trace.labels, "Inline 3, crossline 21") {
		t.Errorf("trace panel labels %v, want a picture of crossline 21", labelTexts(v.ui.trace.labels))
	}
	if !hasLabel(v.ui.trace.labels, "Instantaneous phase") {
		t.Errorf("trace panel labels %v lack the attribute curve", labelTexts(v.ui.trace.labels))
	}
	// Hovering reads the values under the cursor.
	v.ui.section.MouseMoved(&desktop.MouseEvent{PointEvent: fyne.PointEvent{Position: fyne.NewPos(x-origin.X, pos.Y+1)}})
	if got := v.ui.cursor.Text; !strings.Contains(got, "IL 3  XL 21  t 0 ms") || !strings.Contains(got, "amplitude 3.21") {
		t.Errorf("status bar %q, want IL 3 XL 21 at 0 ms with amplitude 3.21", got)
	}
	// Asked to follow the cursor, the trace panel moves with it.
	test.Tap(v.ui.followCursor)
	x4 := pos.X + float32((3.5-vp.Trace0)/(vp.Trace1-vp.Trace0))*size.Width
	v.ui.section.MouseMoved(&desktop.MouseEvent{PointEvent: fyne.PointEvent{Position: fyne.NewPos(x4, pos.Y+size.Height/2)}})
	v.jobs.wait()
	if !v.state.FollowCursor || v.state.PickTrace != 3 || !hasLabel(v.ui.trace.labels, "Inline 3, crossline 23") {
		t.Errorf("following the cursor over crossline 23: pick %d, labels %v", v.state.PickTrace, labelTexts(v.ui.trace.labels))
	}
}

func hasLabel(ls []plotLabel, prefix string) bool {
	for _, l := range ls {
		if strings.HasPrefix(l.Text, prefix) {
			return true
		}
	}
	return false
}

func labelTexts(ls []plotLabel) []string {
	var out []string
	for _, l := range ls {
		out = append(out, l.Text)
	}
	return out
}

// TestEnvelopeOverAmplitudeOneClick checks the one-click co-rendering and
// the opacity controls.
func TestEnvelopeOverAmplitudeOneClick(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	v.setAttribute(amplitudeID)
	v.jobs.wait()
	if v.state.plan().Overlay != nil {
		t.Fatal("amplitude alone has an overlay")
	}
	alone := v.lastSection
	v.envelopeOverAmplitude()
	v.jobs.wait()
	pl := v.state.plan()
	if pl.Overlay == nil || pl.Overlay.ID != "envelope" || pl.Base.ID != amplitudeID || !v.state.OpacityFollowsValue {
		t.Fatalf("one click gave %+v, follows %v", pl, v.state.OpacityFollowsValue)
	}
	if samePixels(alone, v.lastSection) {
		t.Error("envelope over amplitude looks like amplitude alone")
	}
	// Opacity 0 shows the base alone (render blends nothing).
	v.ui.opacitySlider.SetValue(0)
	v.ui.opacitySlider.OnChangeEnded(0)
	v.jobs.wait()
	if !samePixels(v.lastSection, expectedSection(t, v)) {
		t.Error("opacity 0: the drawn section differs from render's output")
	}
	if v.ui.legends.shown() != 2 { // a heading and a bar per layer
		t.Errorf("legend strip shows %d layers, want 2", v.ui.legends.shown())
	}
}

// TestTimeSliceAndCrossline switches orientation and checks the data and
// the axes against the corpus value rule.
func TestTimeSliceAndCrossline(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	v.ui.orientation.SetSelected("Crossline")
	v.jobs.wait()
	if v.state.Orientation != volume.Crossline || v.state.Crossline != 22 {
		t.Fatalf("crossline view at %d, want the middle crossline 22", v.state.Crossline)
	}
	if got, want := v.data.amp.Traces[0][7], corpusValue(1, 22, 7); !near(got, want) {
		t.Errorf("crossline 22, inline 1, sample 7 = %v, want %v", got, want)
	}
	if v.ui.section.axes.HTitle != "Inline" {
		t.Errorf("crossline section's horizontal axis is %q", v.ui.section.axes.HTitle)
	}
	v.ui.orientation.SetSelected("Time slice")
	v.jobs.wait()
	if v.state.Orientation != volume.TimeSlice || v.state.SampleIndex != 25 {
		t.Fatalf("time slice at sample %d, want 25", v.state.SampleIndex)
	}
	// Traces[i][j] is inline InlineKeys[i], crossline Keys[j].
	if got, want := v.data.amp.Traces[2][3], corpusValue(3, 23, 25); !near(got, want) {
		t.Errorf("time slice at 100 ms, inline 3, crossline 23 = %v, want %v", got, want)
	}
	if v.ui.lineEntry.Text != "100" {
		t.Errorf("time slice entry shows %q, want 100 (ms)", v.ui.lineEntry.Text)
	}
	// The map keeps square bins: 5 x 5 cells in a square plot.
	_, size := v.ui.section.plotRect(v.ui.section.Size())
	if math.Abs(float64(size.Width/size.Height)-1) > 0.02 {
		t.Errorf("map plot %v is not square for a 5 x 5 grid", size)
	}
	if v.traceDrawn == 0 || !hasLabel(v.ui.trace.labels, "Inline 3, crossline 22") {
		t.Errorf("time slice trace panel labels %v, want the centre trace", labelTexts(v.ui.trace.labels))
	}
	// Typing a time moves to its sample.
	v.ui.lineEntry.SetText("160")
	v.ui.lineEntry.OnSubmitted("160")
	v.jobs.wait()
	if v.state.SampleIndex != 40 {
		t.Errorf("typing 160 ms gave sample %d, want 40 (4 ms sampling)", v.state.SampleIndex)
	}
}

// TestPrestackOffsetChoice opens a pre-stack file and picks the second
// offset.
func TestPrestackOffsetChoice(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small-ps.sgy"))
	if len(v.info.Offsets) != 2 {
		t.Fatalf("small-ps.sgy has %d offsets, the README says 2", len(v.info.Offsets))
	}
	if v.ui.offsetRow.Hidden {
		t.Error("the offset choice is hidden for a pre-stack file")
	}
	first := v.data.amp
	v.ui.offsetPick.SetSelected(v.ui.offsetPick.Options[1])
	v.jobs.wait()
	if v.state.Offset != v.info.Offsets[1] || v.data.amp.Slice.Offset != v.info.Offsets[1] {
		t.Fatalf("offset %d shown, want %d", v.data.amp.Slice.Offset, v.info.Offsets[1])
	}
	if first.Traces[0][0] == v.data.amp.Traces[0][0] {
		t.Error("the second offset shows the same samples as the first")
	}
}

// TestZoomPanAndFit drives the wheel, a drag and the fit button.
func TestZoomPanAndFit(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	origin := fyne.CurrentApp().Driver().AbsolutePositionForObject(v.ui.section)
	pos, size := v.ui.section.plotRect(v.ui.section.Size())
	centre := fyne.NewPos(origin.X+pos.X+size.Width/2, origin.Y+pos.Y+size.Height/2)
	// fyne's test.Scroll leaves the event position unset, so the wheel
	// event goes to the section view directly, at its centre.
	v.ui.section.Scrolled(&fyne.ScrollEvent{PointEvent: fyne.PointEvent{Position: fyne.NewPos(pos.X+size.Width/2, pos.Y+size.Height/2)}, Scrolled: fyne.Delta{DY: 10}})
	v.jobs.wait()
	if v.state.Zoom <= 1 {
		t.Fatalf("zoom %v after wheel forward", v.state.Zoom)
	}
	vp := v.ui.section.vp
	if !(vp.Trace1-vp.Trace0 < 5) || math.Abs((vp.Trace0+vp.Trace1)/2-2.5) > 1e-9 {
		t.Errorf("zoomed view %+v should be narrower than 5 traces, about the centre", vp)
	}
	test.Drag(v.win.Canvas(), centre, 40, 0)
	v.jobs.wait()
	if got := v.ui.section.vp; !(got.Trace0 < vp.Trace0) {
		t.Errorf("dragging right should show earlier traces: %+v -> %+v", vp, got)
	}
	v.fitView()
	v.jobs.wait()
	if got := v.ui.section.vp; got != (render.Viewport{Trace0: 0, Trace1: 5, Sample0: 0, Sample1: 50}) {
		t.Errorf("fit shows %+v, want the whole 5 x 50 section", got)
	}
}

// TestPalettePreferenceKept checks that a palette choice is stored in the
// preferences and used again for the next survey.
func TestPalettePreferenceKept(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	var other string
	for _, o := range v.ui.palettePick.Options {
		if o != v.ui.palettePick.Selected {
			other = o
			break
		}
	}
	v.ui.palettePick.SetSelected(other)
	v.jobs.wait()
	if got := paletteLabel(v.state.paletteFor(v.state.plan().Overlay, true)); got != other {
		t.Fatalf("overlay palette %q, want %q", got, other)
	}
	v.openFile(segytest.CorpusFile(t, "small-lsb.sgy"))
	v.jobs.wait()
	if got := paletteLabel(v.state.paletteFor(v.state.plan().Overlay, true)); got != other {
		t.Errorf("after reopening, overlay palette %q, want the kept %q", got, other)
	}
	// small-lsb.sgy holds the same values little-endian (corpus README).
	if got := v.data.amp.Traces[0][0]; !near(got, corpusValue(3, 20, 0)) {
		t.Errorf("small-lsb.sgy inline 3 first sample %v, want %v", got, corpusValue(3, 20, 0))
	}
}

// TestDropOpensSegyFile drops a text file and then a SEG-Y file on the
// window: only the SEG-Y file is opened.
func TestDropOpensSegyFile(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	readme, _ := filepath.Abs(segytest.CorpusFile(t, "README.md"))
	v.dropped(fyne.NewPos(10, 10), []fyne.URI{storage.NewFileURI(readme)})
	v.jobs.wait()
	if v.vol.Path() != segytest.CorpusFile(t, "small.sgy") || !strings.Contains(v.ui.message.Text, ".sgy") {
		t.Errorf("dropping a README: survey %q, status %q", v.vol.Path(), v.ui.message.Text)
	}
	tiny, _ := filepath.Abs(segytest.CorpusFile(t, "tiny.sgy"))
	v.dropped(fyne.NewPos(10, 10), []fyne.URI{storage.NewFileURI(tiny)})
	v.jobs.wait()
	if v.vol.Path() != tiny || v.info.Traces != 6 {
		t.Errorf("dropping tiny.sgy opened %q with %d traces, want tiny.sgy with 6", v.vol.Path(), v.info.Traces)
	}
	if r := v.recentFiles(); len(r) < 2 || r[0] != tiny {
		t.Errorf("recent files %v, want tiny.sgy first", r)
	}
}

// TestRescanWithOtherHeaderBytes reads small.sgy again with the inline and
// crossline byte locations swapped (189 and 193 are its real ones, corpus
// README): the survey then runs over "inlines" 20..24.
func TestRescanWithOtherHeaderBytes(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	v.ui.byteEntries["inline"].SetText("193")
	v.ui.byteEntries["crossline"].SetText("189")
	v.ui.byteOrder.SetSelected("big")
	v.rescan()
	v.jobs.wait()
	if in := v.info; in.Inline.Min != 20 || in.Inline.Max != 24 || in.Crossline.Min != 1 || in.Crossline.Max != 5 {
		t.Fatalf("after swapping the bytes: inlines %+v, crosslines %+v", in.Inline, in.Crossline)
	}
	if v.state.Inline != 22 || !strings.HasPrefix(v.ui.title.Text, "Inline 22") {
		t.Errorf("shows %q, want the middle of 20..24", v.ui.title.Text)
	}
	// Sample k of (il, xl) is still il + xl/100 + k*1e-5 with the file's own
	// numbering: "inline" 22 is crossline 22, its first trace inline 1.
	if got := v.data.amp.Traces[0][0]; !near(got, corpusValue(1, 22, 0)) {
		t.Errorf("first sample %v, want %v", got, corpusValue(1, 22, 0))
	}
	// A bad byte number is refused with a message and changes nothing.
	v.ui.byteEntries["inline"].SetText("400")
	v.rescan()
	v.jobs.wait()
	if v.info.Inline.Min != 20 || !strings.Contains(v.ui.message.Text, "inline byte") {
		t.Errorf("byte 400 accepted, or no message: %q", v.ui.message.Text)
	}
}

// TestBadFileShowsError opens a file with no traces: the window says so and
// keeps going.
func TestBadFileShowsError(t *testing.T) {
	a := test.NewTempApp(t)
	v := newViewer(a, Options{Path: segytest.CorpusFile(t, "text.sgy")}, newQueuedJobs())
	v.start()
	v.jobs.wait()
	defer v.jobs.close()
	if !strings.Contains(v.ui.section.message, "no traces") || !strings.Contains(v.ui.message.Text, "text.sgy") {
		t.Errorf("no error shown for a file without traces: section %q, status %q", v.ui.section.message, v.ui.message.Text)
	}
}

// TestOpensEveryCorpusFile opens each corpus file: every one with traces
// is drawn with its trace panel, including the one-line and one-trace
// surveys the corpus README says must open.
func TestOpensEveryCorpusFile(t *testing.T) {
	for _, name := range []string{"small.sgy", "small-lsb.sgy", "tiny.sgy", "normal-small.sgy", "small-ps.sgy", "1x1.sgy", "1xN.sgy", "Mx1.sgy", "multi-text.sgy", "shot-gather.sgy"} {
		t.Run(name, func(t *testing.T) {
			v := openViewer(t, segytest.CorpusFile(t, name))
			if v.sectionDrawn == 0 || v.traceDrawn == 0 {
				t.Errorf("%s: section drawn %d times, trace panel %d; status %q, section %q", name, v.sectionDrawn, v.traceDrawn, v.ui.message.Text, v.ui.section.message)
			}
			n, m := v.dims()
			if n*m == 0 || n != len(v.data.amp.Traces) {
				t.Errorf("%s: shown section %d x %d", name, n, m)
			}
		})
	}
}

// slowSurvey is a survey whose attribute computations wait until they are
// cancelled, like a whole-volume time slice on a large file.
type slowSurvey struct {
	survey
	started chan struct{}
}

func (s *slowSurvey) Attribute(ctx context.Context, sl volume.Slice, a *compute.Attribute, p compute.Params, c compute.Conditioning, progress func(done, total int)) (volume.Section, error) {
	if sl.Orientation != volume.TimeSlice {
		return s.survey.Attribute(ctx, sl, a, p, c, progress)
	}
	progress(1, 100)
	close(s.started)
	<-ctx.Done()
	return volume.Section{}, ctx.Err()
}

// TestCancelLongJob starts a time slice whose attribute takes long, checks
// the progress and cancel button show while the window stays usable, then
// cancels: the picture and the controls stay on the inline shown before.
func TestCancelLongJob(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	slow := &slowSurvey{survey: v.vol, started: make(chan struct{})}
	v.vol = slow
	before := v.lastSection
	v.ui.orientation.SetSelected("Time slice")
	<-slow.started
	v.jobs.drain() // shows the progress report; the job itself still waits
	if v.ui.work.box.Hidden || v.ui.work.bar.Hidden || v.ui.work.cancel.Disabled() {
		t.Fatalf("no progress or cancel shown for a long computation (box hidden %v)", v.ui.work.box.Hidden)
	}
	if !strings.Contains(v.ui.work.label.Text, "whole volume") {
		t.Errorf("progress label %q does not say the whole volume is computed", v.ui.work.label.Text)
	}
	test.Tap(v.ui.work.cancel)
	v.jobs.wait()
	if v.state.Orientation != volume.Inline || v.ui.orientation.Selected != "Inline" || !strings.HasPrefix(v.ui.title.Text, "Inline 3") {
		t.Errorf("after cancel: orientation %v, selector %q, title %q; want inline 3 as shown", v.state.Orientation, v.ui.orientation.Selected, v.ui.title.Text)
	}
	if v.lastSection != before || !v.ui.work.box.Hidden {
		t.Error("cancelling changed the picture or left the progress shown")
	}
	if !strings.Contains(v.ui.message.Text, "Cancelled") {
		t.Errorf("status %q after cancelling", v.ui.message.Text)
	}
}
