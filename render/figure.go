package render

import (
	"errors"
	"fmt"
	"image"
	"image/color"
	"image/draw"
	"math"
	"strconv"

	"quadtrace/palettes"
)

// Axis labels one direction of a figure: Title is printed beside the axis;
// First and Last are the values at the centres of the first and last trace
// (or sample, inline, crossline). Last may be smaller than First.
type Axis struct {
	Title       string
	First, Last float64
}

// ScaleBar asks for a scale bar; MetresPerTrace is the distance between
// neighbouring traces (crosslines on a map). 0 means no bar.
type ScaleBar struct {
	MetresPerTrace float64
}

// Legend is a colour key: Name and Unit head it, Palette spans Lo..Hi.
// A Cyclic legend is drawn as a ring on which Lo and Hi meet.
type Legend struct {
	Name, Unit string
	Palette    *palettes.Palette
	Lo, Hi     float64
	Cyclic     bool
}

// Figure is a report figure: a section or map with title, axes, legends
// and scale bar on a white page.
type Figure struct {
	Title   string
	Base    Layer
	Overlay *Layer
	Wiggle  *WiggleStyle
	// Horizontal labels traces (sections) or crosslines (maps); Vertical
	// labels time in ms (sections) or inlines (maps).
	Horizontal, Vertical Axis
	// MapAspect > 0 draws Base.Data as a map, Data[inline][crossline], with
	// this aspect (metres per crossline step / metres per inline step).
	MapAspect float64
	// View is the window of a section shown; the zero value shows it all.
	// Maps always show the whole grid.
	View    Viewport
	Scale   ScaleBar
	Legends []Legend // base first, overlay second
	Width   int      // pixels of the whole figure
	Height  int
	// Caption is one line under everything else: the file or survey and
	// the attributes' parameters; "" draws none.
	Caption string
	// Geo, for a map whose survey has coordinates, adds a north arrow and
	// the X/Y coordinates of the map's corners; nil draws neither.
	Geo *MapGeo
	// Lines are drawn over a map (MapAspect > 0) in map cell coordinates
	// (contours, the survey's outline), in order, before the ground grid.
	Lines []MapLines
	// Ground, for a map, draws lines of equal projected X and Y over it,
	// labelled in metres; nil draws none.
	Ground *GroundGrid
}

// MapGeo places a map on the ground.
type MapGeo struct {
	// NorthDegrees is the direction of grid north on the page, clockwise
	// from straight up.
	NorthDegrees float64
	// Corners label the map's top-left, top-right, bottom-left and
	// bottom-right cells, e.g. "X 612000 Y 7130000"; "" leaves one out.
	Corners [4]string
}

// Colours of the page (common practice for print: black on white).
var (
	pageColour  = color.RGBA{255, 255, 255, 255}
	inkColour   = color.RGBA{25, 25, 25, 255}
	frameColour = color.RGBA{60, 60, 60, 255}
)

// ScaleBarLayout is where a figure's scale bar goes and what it measures.
type ScaleBarLayout struct {
	Metres         float64         // the length the bar stands for, a nice round number
	PixelsPerMetre float64         // horizontal scale of the plot
	Bar            image.Rectangle // the bar itself; Bar.Dx() = round(Metres*PixelsPerMetre)
	Label          string          // e.g. "500 m" or "2 km"
}

// FigureLayout is the geometry Figure.Draw uses, exported so that callers
// and tests can find things in the image.
type FigureLayout struct {
	FontSize float64         // label text size in pixels
	Plot     image.Rectangle // the data area (for a map: the letterboxed map)
	Title    image.Rectangle // empty without a title
	ScaleBar ScaleBarLayout  // zero without a scale bar
	Caption  image.Rectangle // empty without a caption
	North    image.Rectangle // the north arrow's square; empty without one
	Legends  []image.Rectangle
	// LegendText holds, per legend, the box of its heading text.
	LegendText []image.Rectangle
	// HorizontalTicks and VerticalTicks are the tick values and their pixel
	// positions along x and y.
	HorizontalTicks, VerticalTicks []Tick
}

// Tick is one labelled tick mark.
type Tick struct {
	Value float64
	Pixel float64
	Label string
}

// Minimum figure size in pixels.
const minFigureWidth, minFigureHeight = 240, 180

// cells returns the horizontal and vertical cell counts and the window.
func (f Figure) cells() (nh, nv int, vp Viewport) {
	if f.MapAspect > 0 {
		nh, nv = dims(f.Base.Data, true)
		return nh, nv, Viewport{0, float64(nh), 0, float64(nv)}
	}
	nh, nv = dims(f.Base.Data, false)
	return nh, nv, f.View.resolve(nh, nv)
}

// Layout computes where everything goes without drawing.
func (f Figure) Layout() (FigureLayout, error) {
	lay, _, err := f.layout()
	return lay, err
}

func (f Figure) layout() (FigureLayout, typeface, error) {
	var lay FigureLayout
	if f.Width < minFigureWidth || f.Height < minFigureHeight {
		return lay, typeface{}, fmt.Errorf("figure %dx%d: want at least %dx%d pixels", f.Width, f.Height, minFigureWidth, minFigureHeight)
	}
	nh, nv, vp := f.cells()
	if nh == 0 || nv == 0 {
		return lay, typeface{}, errors.New("figure: the base layer has no data")
	}
	if !vp.valid() {
		return lay, typeface{}, fmt.Errorf("figure: view %+v is not a window", f.View)
	}
	if f.Base.Palette == nil && f.Wiggle == nil {
		return lay, typeface{}, errors.New("figure: the base layer has no palette and there are no wiggles")
	}
	for i, l := range f.Legends {
		if l.Palette == nil {
			return lay, typeface{}, fmt.Errorf("figure: legend %d (%s): no palette", i, l.Name)
		}
	}
	if s := f.Scale.MetresPerTrace; s < 0 || math.IsNaN(s) || math.IsInf(s, 0) {
		return lay, typeface{}, fmt.Errorf("figure: scale bar: %v metres per trace", s)
	}

	fs := math.Round(math.Min(math.Max(math.Min(float64(f.Width), float64(f.Height))/55, 11), 32))
	lay.FontSize = fs
	tf, err := newTypeface(fs, math.Round(fs*1.3))
	if err != nil {
		return lay, tf, err
	}
	lineH := int(math.Ceil(fs * 1.35))
	pad := int(fs * 0.8)
	tickLen := int(math.Max(3, fs*0.4))

	top := pad
	if f.Title != "" {
		th := int(math.Ceil(fs * 1.3 * 1.35))
		lay.Title = image.Rect(pad, top, f.Width-pad, top+th)
		top += th + pad/2
	}
	// Horizontal axis above the plot: title line, label line, ticks.
	plotTop := top + 2*lineH + tickLen
	// Footer for scale bar and legends.
	footerH := 0
	if len(f.Legends) > 0 || f.Scale.MetresPerTrace > 0 {
		footerH = int(fs * 6)
	}
	captionH := 0
	if f.Caption != "" {
		captionH = lineH
		lay.Caption = image.Rect(pad, f.Height-pad-lineH, f.Width-pad, f.Height-pad)
	}
	plotBottom := f.Height - pad - footerH - captionH
	if footerH > 0 {
		plotBottom -= pad
	}
	// Left margin from the widest vertical label at a provisional height.
	vTicks := axisTicks(tf, f.Vertical, nv, vp.Sample0, vp.Sample1, float64(plotBottom-plotTop), false)
	labelW := 0
	for _, t := range vTicks {
		labelW = max(labelW, textWidth(tf.label, t.Label))
	}
	left := pad + lineH + labelW + tickLen + int(fs*0.4)
	right := f.Width - pad - int(fs*1.5)
	if right-left < 60 || plotBottom-plotTop < 60 {
		return lay, tf, fmt.Errorf("figure %dx%d: too small for its axes and legends", f.Width, f.Height)
	}
	area := image.Rect(left, plotTop, right, plotBottom)
	lay.Plot = area
	if f.MapAspect > 0 {
		lay.Plot = MapRect(area, nv, nh, f.MapAspect)
	}
	p := lay.Plot
	if f.Geo != nil && f.MapAspect > 0 && !math.IsNaN(f.Geo.NorthDegrees) && !math.IsInf(f.Geo.NorthDegrees, 0) {
		lay.North = northDisc(tf, p)
	}
	lay.HorizontalTicks = axisTicks(tf, f.Horizontal, nh, vp.Trace0, vp.Trace1, float64(p.Dx()), true)
	for i := range lay.HorizontalTicks {
		lay.HorizontalTicks[i].Pixel += float64(p.Min.X)
	}
	lay.VerticalTicks = axisTicks(tf, f.Vertical, nv, vp.Sample0, vp.Sample1, float64(p.Dy()), false)
	for i := range lay.VerticalTicks {
		lay.VerticalTicks[i].Pixel += float64(p.Min.Y)
	}

	// Footer: scale bar at the left, legends after it.
	if footerH > 0 {
		footer := image.Rect(left, f.Height-pad-captionH-footerH, right, f.Height-pad-captionH)
		x := footer.Min.X
		if m := f.Scale.MetresPerTrace; m > 0 {
			ppm := float64(p.Dx()) / ((vp.Trace1 - vp.Trace0) * m)
			metres := niceAtMost(float64(p.Dx()) / 4 / ppm)
			px := int(math.Round(metres * ppm))
			barH := max(4, int(fs*0.55))
			y0 := footer.Min.Y + lineH + int(fs*0.3)
			lay.ScaleBar = ScaleBarLayout{
				Metres: metres, PixelsPerMetre: ppm,
				Bar:   image.Rect(x, y0, x+px, y0+barH),
				Label: metresLabel(metres),
			}
			x += px + textWidth(tf.label, lay.ScaleBar.Label)/2 + int(fs*3)
		}
		if n := len(f.Legends); n > 0 {
			w := min(int(fs*20), (footer.Max.X-x)/n-int(fs))
			if w < int(fs*6) {
				return lay, tf, fmt.Errorf("figure %dx%d: no room for %d legends", f.Width, f.Height, n)
			}
			for _, l := range f.Legends {
				box := image.Rect(x, footer.Min.Y, x+w, footer.Max.Y)
				lay.Legends = append(lay.Legends, box)
				lay.LegendText = append(lay.LegendText, legendHeadingBox(tf, l, box))
				x += w + int(fs*2)
			}
		}
	}
	return lay, tf, nil
}

// niceAtMost returns the largest 1, 2 or 5 times a power of ten not above x
// (for a scale bar of round length; common practice).
func niceAtMost(x float64) float64 {
	if !(x > 0) || math.IsInf(x, 0) {
		return 0
	}
	p := math.Pow(10, math.Floor(math.Log10(x)))
	for _, m := range []float64{5, 2, 1} {
		if m*p <= x*(1+1e-12) {
			return m * p
		}
	}
	return p
}

// metresLabel prints a distance in m, or km from 1000 m on.
func metresLabel(m float64) string {
	if m >= 1000 {
		return strconv.FormatFloat(m/1000, 'f', -1, 64) + " km"
	}
	return strconv.FormatFloat(m, 'f', -1, 64) + " m"
}

// axisTicks picks nice tick values for an axis whose n cells run from
// First (centre of cell 0) to Last (centre of cell n-1), shown in the cell
// window c0..c1 over length pixels. Pixel positions are from the start of
// the plot. Horizontal axes space labels by their width, vertical ones by
// the line height.
func axisTicks(tf typeface, a Axis, n int, c0, c1, length float64, horizontal bool) []Tick {
	if n <= 0 || !(length > 0) {
		return nil
	}
	toPixel := func(c float64) float64 { return (c - c0) / (c1 - c0) * length }
	if n == 1 || a.First == a.Last {
		c := 0.5
		if px := toPixel(c); px >= 0 && px <= length {
			return []Tick{{a.First, px, FormatTick(a.First, TickDecimals(math.Abs(a.First)))}}
		}
		return nil
	}
	perCell := (a.Last - a.First) / float64(n-1)
	valueAt := func(c float64) float64 { return a.First + (c-0.5)*perCell }
	cellOf := func(v float64) float64 { return 0.5 + (v-a.First)/perCell }
	v0, v1 := valueAt(c0), valueAt(c1)
	m := tf.label.Metrics()
	lineH := float64((m.Ascent + m.Descent).Ceil())
	spacing := 2.5 * lineH
	if horizontal {
		w := math.Max(float64(textWidth(tf.label, FormatTick(v0, 0))), float64(textWidth(tf.label, FormatTick(v1, 0))))
		spacing = w + 2*lineH
	}
	var ticks []Tick
	for maxTicks := max(2, int(length/spacing)); maxTicks >= 1; maxTicks-- {
		vals := NiceTicks(v0, v1, maxTicks)
		if len(vals) == 0 {
			return nil
		}
		dec := 0
		if len(vals) > 1 {
			dec = TickDecimals(math.Abs(vals[1] - vals[0]))
		}
		ticks = ticks[:0]
		widest := 0.0
		for _, v := range vals {
			lbl := FormatTick(v, dec)
			widest = math.Max(widest, float64(textWidth(tf.label, lbl)))
			ticks = append(ticks, Tick{v, toPixel(cellOf(v)), lbl})
		}
		if !horizontal || len(ticks) < 2 {
			break
		}
		gap := math.Abs(ticks[1].Pixel - ticks[0].Pixel)
		if gap >= widest+lineH { // labels do not crowd
			break
		}
	}
	return ticks
}

// Draw renders the figure on a white page.
func (f Figure) Draw() (*image.RGBA, error) {
	lay, tf, err := f.layout()
	if err != nil {
		return nil, err
	}
	img := image.NewRGBA(image.Rect(0, 0, f.Width, f.Height))
	draw.Draw(img, img.Bounds(), image.NewUniform(pageColour), image.Point{}, draw.Src)

	p := lay.Plot
	if f.MapAspect > 0 {
		drawMap(img, p, f.Base, f.Overlay, f.MapAspect)
		nh, nv, _ := f.cells()
		DrawMapLines(img, p, nh, nv, f.Lines)
		if f.Ground != nil {
			var avoid []image.Rectangle
			if f.Geo != nil {
				for _, b := range geoLabelBoxes(tf, *f.Geo, p) {
					if !b.Empty() {
						avoid = append(avoid, b.Inset(-2))
					}
				}
			}
			if !lay.North.Empty() {
				avoid = append(avoid, lay.North.Inset(-2))
			}
			drawGroundGrid(img, tf, *f.Ground, p, nh, nv, avoid)
		}
	} else {
		drawSection(img, p, f.Base, f.Overlay, f.Wiggle, f.View)
	}
	strokeRect(img, p.Inset(-1), frameColour)

	fs := lay.FontSize
	lineH := int(math.Ceil(fs * 1.35))
	tickLen := int(math.Max(3, fs*0.4))
	asc := tf.label.Metrics().Ascent.Ceil()
	desc := tf.label.Metrics().Descent.Ceil()

	if f.Title != "" {
		tAsc := tf.title.Metrics().Ascent.Ceil()
		drawText(img, tf.title, inkColour, f.Title, (lay.Title.Min.X+lay.Title.Max.X)/2, lay.Title.Min.Y+tAsc, anchorCentre)
	}
	// Horizontal axis along the top edge.
	for _, t := range lay.HorizontalTicks {
		x := int(math.Round(t.Pixel))
		fillRect(img, image.Rect(x, p.Min.Y-1-tickLen, x+1, p.Min.Y-1), frameColour)
		drawText(img, tf.label, inkColour, t.Label, x, p.Min.Y-1-tickLen-desc-2, anchorCentre)
	}
	if f.Horizontal.Title != "" {
		drawText(img, tf.label, inkColour, f.Horizontal.Title, (p.Min.X+p.Max.X)/2, p.Min.Y-1-tickLen-lineH-desc-2, anchorCentre)
	}
	// Vertical axis along the left edge.
	labelRight := p.Min.X - 1 - tickLen - int(fs*0.3)
	widest := 0
	for _, t := range lay.VerticalTicks {
		y := int(math.Round(t.Pixel))
		fillRect(img, image.Rect(p.Min.X-1-tickLen, y, p.Min.X-1, y+1), frameColour)
		drawText(img, tf.label, inkColour, t.Label, labelRight, y+(asc-desc)/2, anchorRight)
		widest = max(widest, textWidth(tf.label, t.Label))
	}
	if f.Vertical.Title != "" {
		drawTextUp(img, tf.label, inkColour, f.Vertical.Title, labelRight-widest-lineH/2-int(fs*0.2), (p.Min.Y+p.Max.Y)/2)
	}
	if sb := lay.ScaleBar; sb.Metres > 0 {
		drawScaleBar(img, tf, sb)
	}
	if f.Caption != "" {
		drawText(img, tf.label, inkColour, f.Caption, lay.Caption.Min.X, lay.Caption.Max.Y-desc, anchorLeft)
	}
	if f.Geo != nil && f.MapAspect > 0 {
		drawGeo(img, tf, *f.Geo, p, lay.North)
	}
	for i, l := range f.Legends {
		if l.Cyclic {
			drawRingLegend(img, tf, l, lay.Legends[i])
		} else {
			drawBarLegend(img, tf, l, lay.Legends[i])
		}
	}
	return img, nil
}

// fillRect paints r in c.
func fillRect(img *image.RGBA, r image.Rectangle, c color.RGBA) {
	draw.Draw(img, r, image.NewUniform(c), image.Point{}, draw.Src)
}

// strokeRect draws a one-pixel outline just inside r.
func strokeRect(img *image.RGBA, r image.Rectangle, c color.RGBA) {
	fillRect(img, image.Rect(r.Min.X, r.Min.Y, r.Max.X, r.Min.Y+1), c)
	fillRect(img, image.Rect(r.Min.X, r.Max.Y-1, r.Max.X, r.Max.Y), c)
	fillRect(img, image.Rect(r.Min.X, r.Min.Y, r.Min.X+1, r.Max.Y), c)
	fillRect(img, image.Rect(r.Max.X-1, r.Min.Y, r.Max.X, r.Max.Y), c)
}

// drawScaleBar draws the bar in four alternating black and white parts
// with an outline, "0" above its left end and its length above its right
// end.
func drawScaleBar(img *image.RGBA, tf typeface, sb ScaleBarLayout) {
	b := sb.Bar
	fillRect(img, b, inkColour)
	for k := range 4 {
		if k%2 == 1 {
			x0 := b.Min.X + k*b.Dx()/4
			x1 := b.Min.X + (k+1)*b.Dx()/4
			fillRect(img, image.Rect(x0, b.Min.Y+1, x1, b.Max.Y-1), pageColour)
		}
	}
	desc := tf.label.Metrics().Descent.Ceil()
	drawText(img, tf.label, inkColour, "0", b.Min.X, b.Min.Y-desc-3, anchorCentre)
	drawText(img, tf.label, inkColour, sb.Label, b.Max.X, b.Min.Y-desc-3, anchorCentre)
}

// legendHeading is "Name (unit)", or just the name.
func legendHeading(l Legend) string {
	if l.Unit == "" {
		return l.Name
	}
	return l.Name + " (" + l.Unit + ")"
}

// legendHeadingBox is where the heading text of a legend is drawn.
func legendHeadingBox(tf typeface, l Legend, box image.Rectangle) image.Rectangle {
	asc := tf.label.Metrics().Ascent.Ceil()
	if l.Cyclic {
		x, y := ringHeadingOrigin(tf, box)
		return textBox(tf.label, legendHeading(l), x, y, anchorLeft)
	}
	return textBox(tf.label, legendHeading(l), box.Min.X, box.Min.Y+asc, anchorLeft)
}

// drawBarLegend draws a horizontal colour bar with the heading above and
// nice tick labels below.
func drawBarLegend(img *image.RGBA, tf typeface, l Legend, box image.Rectangle) {
	fs := float64(tf.label.Metrics().Height.Ceil())
	asc := tf.label.Metrics().Ascent.Ceil()
	drawText(img, tf.label, inkColour, legendHeading(l), box.Min.X, box.Min.Y+asc, anchorLeft)
	margin := int(fs)
	bar := image.Rect(box.Min.X+margin/2, box.Min.Y+int(fs*1.5), box.Max.X-margin, box.Min.Y+int(fs*2.6))
	for x := bar.Min.X; x < bar.Max.X; x++ {
		t := (float64(x-bar.Min.X) + 0.5) / float64(bar.Dx())
		fillRect(img, image.Rect(x, bar.Min.Y, x+1, bar.Max.Y), l.Palette.At(t))
	}
	strokeRect(img, bar.Inset(-1), frameColour)
	lo, hi := l.Lo, l.Hi
	if lo == hi || math.IsNaN(lo) || math.IsNaN(hi) {
		drawText(img, tf.label, inkColour, FormatTick(lo, 2), (bar.Min.X+bar.Max.X)/2, bar.Max.Y+asc+int(fs*0.4), anchorCentre)
		return
	}
	maxTicks := max(2, bar.Dx()/max(1, 2*textWidth(tf.label, FormatTick(math.Max(math.Abs(lo), math.Abs(hi)), 1))+int(fs)))
	vals := NiceTicks(lo, hi, maxTicks)
	dec := 0
	if len(vals) > 1 {
		dec = TickDecimals(math.Abs(vals[1] - vals[0]))
	}
	for _, v := range vals {
		x := bar.Min.X + int(math.Round((v-lo)/(hi-lo)*float64(bar.Dx())))
		x = min(max(x, bar.Min.X), bar.Max.X-1)
		fillRect(img, image.Rect(x, bar.Max.Y+1, x+1, bar.Max.Y+1+int(fs*0.3)), frameColour)
		drawText(img, tf.label, inkColour, FormatTick(v, dec), x, bar.Max.Y+asc+int(fs*0.45), anchorCentre)
	}
}

// ringGeometry returns the centre and outer radius of a ring legend in box.
func ringGeometry(tf typeface, box image.Rectangle) (cx, cy, r float64) {
	lineH := float64((tf.label.Metrics().Ascent + tf.label.Metrics().Descent).Ceil())
	r = math.Max(6, (float64(box.Dy())-2*lineH)/2-2)
	labelW := float64(textWidth(tf.label, "-180"))
	cx = float64(box.Min.X) + labelW + 6 + r
	cy = float64(box.Min.Y+box.Max.Y) / 2
	return cx, cy, r
}

// ringHeadingOrigin is the left end of the heading baseline of a ring
// legend: to the right of the ring and its right-hand label.
func ringHeadingOrigin(tf typeface, box image.Rectangle) (x, y int) {
	cx, cy, r := ringGeometry(tf, box)
	labelW := float64(textWidth(tf.label, "-180"))
	asc := tf.label.Metrics().Ascent.Ceil()
	return int(cx+r+labelW+12) + 4, int(cy) + asc/2
}

// drawRingLegend draws a cyclic legend: an annulus on which the value runs
// clockwise from Lo at the top back round to Hi at the top again, so the
// wrap is visible as a seamless join; the top label names both ends
// ("±180" when Lo = -Hi) and a short mark shows where they meet.
func drawRingLegend(img *image.RGBA, tf typeface, l Legend, box image.Rectangle) {
	cx, cy, r := ringGeometry(tf, box)
	inner := r * 0.55
	// Ring pixels, with a one-pixel soft edge.
	for y := int(cy - r - 1); y <= int(cy+r+1); y++ {
		for x := int(cx - r - 1); x <= int(cx+r+1); x++ {
			dx, dy := float64(x)+0.5-cx, float64(y)+0.5-cy
			d := math.Hypot(dx, dy)
			cover := math.Min(math.Max(r-d+0.5, 0), 1) * math.Min(math.Max(d-inner+0.5, 0), 1)
			if cover <= 0 {
				continue
			}
			frac := math.Atan2(dx, -dy) / (2 * math.Pi) // clockwise from top
			if frac < 0 {
				frac++
			}
			c := l.Palette.At(frac)
			if cover < 1 {
				bg := img.RGBAAt(x, y)
				c = color.RGBA{
					uint8(float64(c.R)*cover + float64(bg.R)*(1-cover)),
					uint8(float64(c.G)*cover + float64(bg.G)*(1-cover)),
					uint8(float64(c.B)*cover + float64(bg.B)*(1-cover)), 255}
			}
			img.SetRGBA(x, y, c)
		}
	}
	// Mark the wrap at the top.
	fillRect(img, image.Rect(int(cx), int(cy-r-3), int(cx)+1, int(cy-inner+1)), inkColour)

	asc := tf.label.Metrics().Ascent.Ceil()
	desc := tf.label.Metrics().Descent.Ceil()
	span := l.Hi - l.Lo
	dec := 0
	if span != 0 {
		dec = TickDecimals(math.Abs(span) / 4)
	}
	top := FormatTick(l.Lo, dec) + " | " + FormatTick(l.Hi, dec)
	if l.Lo == -l.Hi && l.Hi != 0 {
		top = "±" + FormatTick(l.Hi, dec)
	}
	drawText(img, tf.label, inkColour, top, int(cx), int(cy-r)-desc-4, anchorCentre)
	drawText(img, tf.label, inkColour, FormatTick(l.Lo+span/4, dec), int(cx+r)+6, int(cy)+asc/2-1, anchorLeft)
	drawText(img, tf.label, inkColour, FormatTick(l.Lo+span/2, dec), int(cx), int(cy+r)+asc+3, anchorCentre)
	drawText(img, tf.label, inkColour, FormatTick(l.Lo+3*span/4, dec), int(cx-r)-6, int(cy)+asc/2-1, anchorRight)
	hx, hy := ringHeadingOrigin(tf, box)
	drawText(img, tf.label, inkColour, legendHeading(l), hx, hy, anchorLeft)
}
