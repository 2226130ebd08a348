package viewer

import (
	"fmt"
	"image/color"
	"sync"

	"quadtrace/app/figure"
	"quadtrace/app/style"
	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/palettes"
	"quadtrace/render"
	"quadtrace/segy"
)

// mapContent is what a map figure shows, copied from the UI so that a job
// can draw it: the values (rows are inlines), how they are coloured and
// labelled, the horizon's times for the contours, and the survey's place on
// the ground. Its slices are never changed once made.
type mapContent struct {
	title, caption string
	values         [][]float32
	attr           *compute.Attribute // nil: the values are the horizon's times in ms
	pal            *palettes.Palette
	clip           float64
	times          [][]float32 // contoured when contourMS > 0
	contourMS      float64
	contours       *contourLines // the contours of times every contourMS, when kept; nil: traced at each draw
	outline        []render.Segment
	ground         *render.GroundGrid
	geo            *render.MapGeo
	inlines        []int
	crosslines     []int
	aspect         float64 // metres per crossline step over metres per inline step
	binM           float64 // metres between neighbouring crosslines (scale bar)
}

// Colours of the lines drawn over maps: contours dark and thin, the
// survey's outline darker and thicker.
var (
	contourInk = render.MapLines{Colour: color.RGBA{20, 20, 20, 170}, Width: 1}
	outlineInk = render.MapLines{Colour: color.RGBA{0, 0, 0, 255}, Width: 2}
)

// mapLayer returns the colour layer of c's values and its legend.
func (c mapContent) mapLayer() (render.Layer, render.Legend) {
	if c.attr != nil {
		l := style.Layer(c.attr, c.values, c.pal, c.clip)
		return l, style.LegendFor(c.attr, l)
	}
	lo, hi := render.PercentileRange(c.values, c.clip, false)
	if !(hi > lo) {
		hi = lo + 1
	}
	l := render.Layer{Data: c.values, Palette: c.pal, Lo: lo, Hi: hi, Opacity: 1}
	return l, render.Legend{Name: "Time", Unit: "ms", Palette: c.pal, Lo: float64(lo), Hi: float64(hi)}
}

// traceContours returns the contour segments of times at every multiple
// of intervalMS over their range.
func traceContours(times [][]float32, intervalMS float64) []render.Segment {
	lo, hi := render.PercentileRange(times, 100, false)
	var segs []render.Segment
	for _, level := range render.ContourLevels(float64(lo), float64(hi), intervalMS) {
		segs = append(segs, render.Contours(times, level)...)
	}
	return segs
}

// contourLines keeps the contours of a horizon's times at one interval,
// traced once (by the first draw that needs them, in its job) and shared
// by every later draw of the same times and interval: a change of
// attribute, statistic or palette redraws the map without tracing them
// again. Safe for concurrent use.
type contourLines struct {
	times      [][]float32
	intervalMS float64
	once       sync.Once
	segs       []render.Segment
}

// serves says whether the kept contours are those of times (equal values;
// NaNs equal) every intervalMS.
func (cl *contourLines) serves(times [][]float32, intervalMS float64) bool {
	if cl.intervalMS != intervalMS || len(cl.times) != len(times) {
		return false
	}
	for r, row := range times {
		kept := cl.times[r]
		if len(kept) != len(row) {
			return false
		}
		for i, t := range row {
			if k := kept[i]; k != t && !(k != k && t != t) {
				return false
			}
		}
	}
	return true
}

// segments returns the contour segments, tracing them on the first call.
func (cl *contourLines) segments() []render.Segment {
	cl.once.Do(func() { cl.segs = traceContours(cl.times, cl.intervalMS) })
	return cl.segs
}

// autoContourMS is a round contour interval giving about ten lines over
// the range of times.
func autoContourMS(times [][]float32) float64 {
	lo, hi := render.PercentileRange(times, 100, false)
	if !(hi > lo) {
		return 0
	}
	return niceStep(float64(hi-lo), 10)
}

// figure lays c out as a report figure of w x h pixels: the map with its
// inline and crossline axes, legend, scale bar, north arrow and corner
// coordinates, ground grid, contours and outline (render.Figure, as the
// window's other figures).
func (c mapContent) figure(w, h int) (render.Figure, error) {
	if len(c.values) == 0 || len(c.inlines) != len(c.values) || len(c.crosslines) == 0 {
		return render.Figure{}, fmt.Errorf("map: nothing to draw")
	}
	layer, legend := c.mapLayer()
	f := render.Figure{
		Title: c.title, Base: layer, Legends: []render.Legend{legend},
		Horizontal: render.Axis{Title: "Crossline", First: float64(c.crosslines[0]), Last: float64(c.crosslines[len(c.crosslines)-1])},
		Vertical:   render.Axis{Title: "Inline", First: float64(c.inlines[0]), Last: float64(c.inlines[len(c.inlines)-1])},
		MapAspect:  c.aspect, Scale: render.ScaleBar{MetresPerTrace: c.binM},
		Geo: c.geo, Ground: c.ground, Caption: c.caption,
		Width: w, Height: h,
	}
	if !(f.MapAspect > 0) {
		f.MapAspect = 1
	}
	if c.contourMS > 0 && c.times != nil {
		// Every level in one set: one rasterisation for all of them.
		set := contourInk
		if c.contours != nil && c.contours.serves(c.times, c.contourMS) {
			set.Segments = c.contours.segments()
		} else {
			set.Segments = traceContours(c.times, c.contourMS)
		}
		f.Lines = append(f.Lines, set)
	}
	if len(c.outline) > 0 {
		set := outlineInk
		set.Segments = c.outline
		f.Lines = append(f.Lines, set)
	}
	return f, nil
}

// groundGrid places the survey's grid on the ground from the coordinates of
// three corner bins (inline-major grid of inlines x crosslines numbers),
// for the ground grid of a map; nil when the survey has no coordinates
// there or the grid is a single line.
func groundGrid(vol figure.Located, inlines, crosslines []int) *render.GroundGrid {
	nv, nh := len(inlines), len(crosslines)
	if nv < 2 || nh < 2 {
		return nil
	}
	x00, y00, ok1 := vol.Coordinates(inlines[0], crosslines[0])
	x01, y01, ok2 := vol.Coordinates(inlines[0], crosslines[nh-1])
	x10, y10, ok3 := vol.Coordinates(inlines[nv-1], crosslines[0])
	if !ok1 || !ok2 || !ok3 {
		return nil
	}
	g := &render.GroundGrid{
		XPerColumn: (x01 - x00) / float64(nh-1), YPerColumn: (y01 - y00) / float64(nh-1),
		XPerRow: (x10 - x00) / float64(nv-1), YPerRow: (y10 - y00) / float64(nv-1),
	}
	// Bin (0, 0)'s centre is at cell coordinates (0.5, 0.5).
	g.X0 = x00 - 0.5*g.XPerColumn - 0.5*g.XPerRow
	g.Y0 = y00 - 0.5*g.YPerColumn - 0.5*g.YPerRow
	if _, labels := g.GroundLines(nh, nv); labels == nil {
		return nil
	}
	return g
}

// mapAspect is the survey's metres per crossline step over metres per
// inline step (1 when unknown), as volume sections give time slices.
func mapAspect(info segy.Info) float64 {
	if info.InlineSpacingM > 0 && info.CrosslineSpacingM > 0 {
		return info.InlineSpacingM / info.CrosslineSpacingM
	}
	return 1
}

// binCaption names the bin size in metres, "" when unknown.
func binCaption(info segy.Info) string {
	if info.InlineSpacingM > 0 && info.CrosslineSpacingM > 0 {
		return fmt.Sprintf("bins %s m x %s m", trimFloat(info.InlineSpacingM), trimFloat(info.CrosslineSpacingM))
	}
	return ""
}

// trimFloat prints x with at most two decimals and no trailing zeros.
func trimFloat(x float64) string {
	s := fmt.Sprintf("%.2f", x)
	for s[len(s)-1] == '0' {
		s = s[:len(s)-1]
	}
	if s[len(s)-1] == '.' {
		s = s[:len(s)-1]
	}
	return s
}

// surveyNumbers are the survey's inline and crossline numbers, by grid
// index (the numbering sections and horizons share).
func surveyNumbers(info segy.Info) (inlines, crosslines []int) {
	return volume.Numbers(info.Inline), volume.Numbers(info.Crossline)
}
