package viewer

import (
	"image"
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"quadtrace/app/style"
	"quadtrace/render"
	"quadtrace/segy/segytest"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"
)

// TestClipKeptWhilePaging: the colour range of an attribute is taken from
// the first line shown and kept on the next lines, for the section and the
// trace panel alike.
func TestClipKeptWhilePaging(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	env := lookup("envelope")
	first := v.data.over
	wantLo, wantHi := style.Range(env, first.Traces, v.state.ClipPercent)
	key := rangeKey(env, v.data.overParams, v.data.cond, v.state.ClipPercent)
	if r := v.ranges[key]; r != [2]float32{wantLo, wantHi} {
		t.Fatalf("kept envelope range %v, app/style gives %v..%v on inline 3", r, wantLo, wantHi)
	}
	v.stepLine(1)
	v.jobs.wait()
	lo4, hi4 := style.Range(env, v.data.over.Traces, v.state.ClipPercent)
	if lo4 == wantLo && hi4 == wantHi {
		t.Fatal("inline 4 has the same percentile range as inline 3: the test cannot tell")
	}
	if r := v.ranges[key]; r != [2]float32{wantLo, wantHi} {
		t.Errorf("range on inline 4 is %v, want inline 3's %v..%v kept", r, wantLo, wantHi)
	}
	if !samePixels(v.lastSection, expectedSection(t, v)) {
		t.Error("inline 4 is not drawn with the kept range")
	}
	if got := v.ui.legends.rows[0].hi.Text; got != render.FormatTick(float64(wantHi), decimalsFor(wantLo, wantHi)) {
		t.Errorf("legend's high end %q, want the kept %v", got, wantHi)
	}
}

// TestInstantaneousFrequencyFromZero: instantaneous frequency is drawn from
// 0 Hz, and its negative values take one colour of their own.
func TestInstantaneousFrequencyFromZero(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	v.setCoRender(false)
	v.setAttribute("instantaneous-frequency")
	v.jobs.wait()
	base, _ := shownLayers(v.data, &v.state, v.ranges)
	if base.Lo > 0 || base.Lo < -base.Hi/200 {
		t.Errorf("instantaneous frequency drawn from %v to %v Hz, want from 0", base.Lo, base.Hi)
	}
	at := func(x float32) [4]uint8 {
		c := base.Palette.At(float64((x - base.Lo) / (base.Hi - base.Lo)))
		return [4]uint8{c.R, c.G, c.B, c.A}
	}
	neg := [4]uint8{negativeColour.R, negativeColour.G, negativeColour.B, negativeColour.A}
	for _, x := range []float32{-0.01, -5, -1000} {
		if at(x) != neg {
			t.Errorf("%v Hz drawn %v, want the negative colour %v", x, at(x), neg)
		}
	}
	for _, x := range []float32{0, base.Hi / 100, base.Hi} {
		if at(x) == neg {
			t.Errorf("%v Hz drawn in the negative colour", x)
		}
	}
}

// TestFigureFromWindow: wiggles show in a saved figure (pixel check), the
// file is 0644, the default name is safe on every desktop system, and the
// save folder is remembered apart from the open folder.
func TestFigureFromWindow(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	v.setCoRender(false)
	v.setAttribute("instantaneous-phase")
	v.jobs.wait()
	dir := t.TempDir()
	save := func(name string) image.Image {
		t.Helper()
		out := filepath.Join(dir, name)
		v.saveFigure(out, "t", 800, 500, 100)
		v.jobs.wait()
		f, err := os.Open(out)
		if err != nil {
			t.Fatalf("%s not written: %v (status %q)", name, err, v.ui.message.Text)
		}
		defer f.Close()
		if st, _ := f.Stat(); st.Mode().Perm() != 0o644 {
			t.Errorf("%s has mode %v, want 0644 like the figure command's", name, st.Mode().Perm())
		}
		img, err := png.Decode(f)
		if err != nil {
			t.Fatal(err)
		}
		return img
	}
	if fig, err := v.figureFor("t", 800, 500); err != nil || !strings.Contains(fig.Caption, "small.sgy") || !strings.Contains(fig.Caption, "Instantaneous phase (") {
		t.Errorf("figure caption %q (%v), want the file and the attribute with its parameters", fig.Caption, err)
	}
	plain := save("plain.png")
	v.ui.wiggleCheck.SetChecked(true) // the display tab's box
	v.jobs.wait()
	if !v.state.Wiggle {
		t.Fatal("wiggles not switched on")
	}
	wig := save("wiggles.png")
	// Wiggles are drawn in wiggleColour: count pixels near it that the
	// figure without wiggles does not have.
	near := func(img image.Image, x, y int) bool {
		r, g, b, _ := img.At(x, y).RGBA()
		d := func(a uint32, w uint8) bool { return int(a>>8)-int(w) < 25 && int(w)-int(a>>8) < 25 }
		return d(r, wiggleColour.R) && d(g, wiggleColour.G) && d(b, wiggleColour.B)
	}
	extra := 0
	bnd := wig.Bounds()
	for y := bnd.Min.Y; y < bnd.Max.Y; y++ {
		for x := bnd.Min.X; x < bnd.Max.X; x++ {
			if near(wig, x, y) && !near(plain, x, y) {
				extra++
			}
		}
	}
	if extra < 2000 {
		t.Errorf("the figure with wiggles has %d more wiggle-coloured pixels than without, want thousands (5 wiggles over 500 rows)", extra)
	}
	if got := v.app.Preferences().String(prefFigureFolder); got != dir {
		t.Errorf("figure folder kept as %q, want %q", got, dir)
	}
	if recent := v.recentFiles(); len(recent) == 0 || filepath.Dir(recent[0]) == dir {
		t.Errorf("saving a figure changed the open folder: %v", recent)
	}
	for _, title := range []string{"Inline 3: Envelope over amplitude", "Time slice 812.5 ms: Sweetness", "a/b\\c:d*e?f\"g<h>i|j", ""} {
		name := figureFileName(title)
		if strings.ContainsAny(name, ` :/\*?"<>|`) || !strings.HasSuffix(name, ".png") || strings.HasPrefix(name, "-") {
			t.Errorf("figure file name %q for %q is not safe everywhere", name, title)
		}
	}
	if got := figureFileName("Inline 3: Envelope over amplitude"); got != "inline-3-envelope-over-amplitude.png" {
		t.Errorf("file name %q", got)
	}
}

// TestColourRangeEntries types a colour range into the display tab: the
// section, legend and histogram use it, it is kept on the next line, and
// bad entries are refused with the reason beside them.
func TestColourRangeEntries(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	u := v.ui.displayPanel
	if u.histogram.Image == nil || !strings.Contains(u.histNote.Text, "Envelope") {
		t.Fatalf("no histogram of the envelope: %q", u.histNote.Text)
	}
	u.minEntry.SetText("1")
	u.maxEntry.SetText("4")
	u.maxEntry.OnSubmitted("4")
	v.jobs.wait()
	if u.rangeWhy.Visible() {
		t.Fatalf("1 to 4 refused: %q", u.rangeWhy.Text)
	}
	check := func(when string, entries bool) {
		t.Helper()
		_, ov := shownLayers(v.data, &v.state, v.ranges)
		if ov == nil || ov.Lo != 1 || ov.Hi != 4 {
			t.Fatalf("%s: overlay range %v..%v, want 1..4", when, ov.Lo, ov.Hi)
		}
		if v.ui.legends.rows[0].lo.Text != render.FormatTick(1, decimalsFor(1, 4)) || (entries && (u.minEntry.Text != "1" || u.maxEntry.Text != "4")) {
			t.Errorf("%s: legend %q..%q, entries %q..%q", when, v.ui.legends.rows[0].lo.Text, v.ui.legends.rows[0].hi.Text, u.minEntry.Text, u.maxEntry.Text)
		}
		if !samePixels(v.lastSection, expectedSection(t, v)) {
			t.Errorf("%s: section not drawn with 1..4", when)
		}
	}
	check("typed", true)
	v.stepLine(1)
	v.jobs.wait()
	check("next line", true)
	for _, c := range [][2]string{{"x", "4"}, {"1", ""}, {"5", "2"}, {"3", "3"}} {
		u.minEntry.SetText(c[0])
		u.maxEntry.SetText(c[1])
		u.minEntry.OnSubmitted(c[0])
		if !u.rangeWhy.Visible() || u.rangeWhy.Text == "" {
			t.Errorf("range %q..%q accepted", c[0], c[1])
		}
	}
	v.jobs.wait()
	check("after refused entries", false) // the entries keep the refused text beside its reason
}

// TestHistogramMarksRange draws the histogram of known values: bars where
// the values are and the colour range's ends as red lines.
func TestHistogramMarksRange(t *testing.T) {
	data := [][]float32{{0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10}}
	h := histogramOf(render.Layer{Data: data, Lo: 2.5, Hi: 7.5}, 101, 20)
	if h.min != 0 || h.max != 10 {
		t.Fatalf("extent %v..%v, want 0..10", h.min, h.max)
	}
	for _, x := range []int{25, 75} { // 2.5 and 7.5 of 0..10 on 101 pixels
		if c := h.img.RGBAAt(x, 2); c.R < 200 || c.G > 100 {
			t.Errorf("no range line at x=%d: %v", x, c)
		}
	}
	if c := h.img.RGBAAt(50, 19); c.A == 0 {
		t.Error("no bar under the value 5")
	}
}

// TestPaletteListShowsSwatches opens the palette list: each row shows the
// palette's colours beside its name, and choosing a row sets the palette.
func TestPaletteListShowsSwatches(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	c := v.ui.palettePick
	test.Tap(c.button)
	if c.popUp == nil || !c.popUp.Visible() {
		t.Fatal("tapping the palette chooser shows no list")
	}
	list := c.popUp.Content.(*fyne.Container).Objects[0].(*widget.List)
	row := list.CreateItem()
	list.UpdateItem(1, row)
	sw := row.(*fyne.Container).Objects[1].(*canvas.Image)
	want := c.byLabel[c.Options[1]]
	strip, ok := sw.Image.(*image.RGBA)
	if !ok || strip.RGBAAt(0, 0) != want.Table[0] || strip.RGBAAt(255, 0) != want.Table[255] {
		t.Errorf("row 1's swatch does not show %s's colours", c.Options[1])
	}
	other := c.Options[1]
	if other == c.Selected {
		other = c.Options[2]
	}
	for i, o := range c.Options {
		if o == other {
			list.Select(i)
		}
	}
	v.jobs.wait()
	if c.Selected != other || c.popUp.Visible() || paletteLabel(v.state.paletteFor(v.state.plan().Overlay, true)) != other {
		t.Errorf("choosing %q: chooser shows %q, overlay palette %q", other, c.Selected, v.state.paletteFor(v.state.plan().Overlay, true).Name)
	}
}
