package viewer

import (
	"image"
	"image/color"
	"math"

	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/palettes"
	"quadtrace/render"
)

// renderSection draws the requested layers at the requested pixel size:
// sections through render.DrawSection with the state's viewport, time slices
// through render.DrawMap on the part of the grid in view. It runs in a
// background job.
func renderSection(req renderRequest, basePal, ovPal *palettes.Palette) renderResult {
	st, pl, d := req.state, req.plan, req.data
	res := renderResult{newRanges: map[string][2]float32{}}
	rangeOf := func(a *compute.Attribute, params map[string]string, cond compute.Conditioning, data [][]float32) (float32, float32) {
		k := rangeKey(a, params, cond, st.ClipPercent)
		if r, ok := req.ranges[k]; ok {
			return r[0], r[1]
		}
		if r, ok := res.newRanges[k]; ok {
			return r[0], r[1]
		}
		lo, hi := displayRange(a, data, st.ClipPercent)
		res.newRanges[k] = [2]float32{lo, hi}
		return lo, hi
	}
	if marksNegative(pl.Base) {
		basePal = markNegative(basePal)
	}
	res.base = render.Layer{Data: d.base.Traces, Palette: basePal, Opacity: 1}
	res.base.Lo, res.base.Hi = rangeOf(pl.Base, d.baseParams, d.cond, d.base.Traces)
	var ov *render.Layer
	if pl.Overlay != nil && d.over != nil {
		if marksNegative(pl.Overlay) {
			ovPal = markNegative(ovPal)
		}
		res.ov = render.Layer{Data: d.over.Traces, Palette: ovPal, Opacity: clamp(st.Opacity, 0, 1), OpacityFollowsValue: st.OpacityFollowsValue}
		res.ov.Lo, res.ov.Hi = rangeOf(pl.Overlay, d.overParams, d.cond, d.over.Traces)
		res.hasOv = true
		ov = &res.ov
	}
	amp := d.amp
	if amp.Slice.Orientation == volume.TimeSlice {
		nx, ny := len(amp.Traces[0]), len(amp.Traces)
		vp := st.viewport(nx, ny)
		c0, c1 := int(math.Floor(vp.Trace0+1e-9)), int(math.Ceil(vp.Trace1-1e-9))
		r0, r1 := int(math.Floor(vp.Sample0+1e-9)), int(math.Ceil(vp.Sample1-1e-9))
		res.vp = render.Viewport{Trace0: float64(c0), Trace1: float64(c1), Sample0: float64(r0), Sample1: float64(r1)}
		aspect := amp.MapAspect
		if !(aspect > 0) {
			aspect = 1
		}
		// The plot area keeps the map's shape; the image fills it.
		res.aspect = float64(c1-c0) * aspect / float64(r1-r0)
		w, h := fitAspect(req.width, req.height, res.aspect)
		res.img = image.NewRGBA(image.Rect(0, 0, w, h))
		base := res.base
		base.Data = cropGrid(base.Data, r0, r1, c0, c1)
		if ov != nil {
			o := *ov
			o.Data = cropGrid(o.Data, r0, r1, c0, c1)
			ov = &o
		}
		render.DrawMap(res.img, base, ov, aspect)
		if d.pending() {
			res.pending = hatchPending(res.img, render.MapRect(res.img.Bounds(), r1-r0, c1-c0, aspect), d, r0, r1, c0, c1)
		}
		res.axes = sectionAxes{HTitle: "Crossline", VTitle: "Inline", HKeys: amp.Keys, VKeys: amp.InlineKeys}
		res.hist = histogramOf(res.colourLayer(), histogramWidth, histogramHeight)
		return res
	}
	n, m := len(amp.Traces), len(amp.Traces[0])
	res.vp = st.viewport(n, m)
	res.img = image.NewRGBA(image.Rect(0, 0, req.width, req.height))
	var wig *render.WiggleStyle
	if st.Wiggle {
		wig = &render.WiggleStyle{Color: wiggleColour, Fill: true, Gain: 1}
		if pl.Base.ID != amplitudeID || d.base != d.amp {
			wig.Data = amp.Traces
			_, hi := rangeOf(lookup(amplitudeID), nil, compute.Conditioning{}, amp.Traces)
			wig.Clip = float64(hi)
		}
	}
	render.DrawSection(res.img, res.base, ov, wig, res.vp)
	h := "Crossline"
	if amp.Slice.Orientation == volume.Crossline {
		h = "Inline"
	}
	res.axes = sectionAxes{HTitle: h, VTitle: "Time (ms)", HKeys: amp.Keys, T0MS: amp.T0 * 1000, DTMS: amp.DT * 1000}
	res.hist = histogramOf(res.colourLayer(), histogramWidth, histogramHeight)
	return res
}

// The hatch over cells of a time slice not computed yet: light grey with
// darker diagonal lines, unlike any palette's colours and the background.
var (
	pendingLight = color.RGBA{208, 208, 208, 255}
	pendingDark  = color.RGBA{150, 150, 150, 255}
)

// hatchPending hatches the pixels of rect (the map of rows r0..r1 and
// columns c0..c1 of the grid) whose cell is pending in any layer of d, and
// reports whether any was.
func hatchPending(img *image.RGBA, rect image.Rectangle, d shown, r0, r1, c0, c1 int) bool {
	var masks [][][]bool
	for _, s := range []*volume.Section{d.amp, d.base, d.over} {
		if s != nil && s.Pending != nil {
			masks = append(masks, s.Pending)
		}
	}
	ni, nx := r1-r0, c1-c0
	if len(masks) == 0 || rect.Empty() || ni <= 0 || nx <= 0 {
		return false
	}
	any := false
	for py := rect.Min.Y; py < rect.Max.Y; py++ {
		row := r0 + (py-rect.Min.Y)*ni/rect.Dy()
		for px := rect.Min.X; px < rect.Max.X; px++ {
			col := c0 + (px-rect.Min.X)*nx/rect.Dx()
			for _, m := range masks {
				if row < len(m) && col < len(m[row]) && m[row][col] {
					c := pendingLight
					if (px+py)%8 < 2 {
						c = pendingDark
					}
					img.SetRGBA(px, py, c)
					any = true
					break
				}
			}
		}
	}
	return any
}

// wiggleColour draws amplitude wiggles, on screen and in figures.
var wiggleColour = color.RGBA{20, 20, 20, 255}

// fitAspect is the largest w x h inside width x height with w/h = aspect.
func fitAspect(width, height int, aspect float64) (int, int) {
	if !(aspect > 0) || width <= 0 || height <= 0 {
		return max(width, 1), max(height, 1)
	}
	if float64(width)/float64(height) > aspect {
		return max(int(math.Round(float64(height)*aspect)), 1), height
	}
	return width, max(int(math.Round(float64(width)/aspect)), 1)
}

// cropGrid returns rows r0..r1 and columns c0..c1 of g without copying
// samples.
func cropGrid(g [][]float32, r0, r1, c0, c1 int) [][]float32 {
	r0, r1 = max(r0, 0), min(r1, len(g))
	out := make([][]float32, 0, max(r1-r0, 0))
	for _, row := range g[r0:r1] {
		a, b := min(c0, len(row)), min(c1, len(row))
		out = append(out, row[a:b])
	}
	return out
}

// colourLayer is the layer whose colours the colour control sets: the
// overlay when there is one, else the base.
func (r renderResult) colourLayer() render.Layer {
	if r.hasOv {
		return r.ov
	}
	return r.base
}

// colourLayer is the attribute of plan pl whose colours the colour control
// sets.
func colourLayer(pl layerPlan) *compute.Attribute {
	if pl.Overlay != nil {
		return pl.Overlay
	}
	return pl.Base
}

// The histogram picture's size in pixels.
const histogramWidth, histogramHeight = 240, 56
