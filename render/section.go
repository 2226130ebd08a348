package render

import (
	"encoding/binary"
	"image"
	"image/color"
	"math"
	"runtime"
	"sync"
	"sync/atomic"

	"quadtrace/palettes"
)

// Layer is one attribute drawn as variable density.
type Layer struct {
	// Data holds the values, Data[trace][sample] for a section and
	// Data[inline][crossline] for a map. Rows may differ in length; missing
	// values read as NaN.
	Data [][]float32
	// Palette colours the values. A nil palette on the base layer leaves a
	// white background (for a wiggle-only display); on an overlay it
	// disables the overlay.
	Palette *palettes.Palette
	// Lo and Hi are the values mapped to the palette's ends; values outside
	// clip to the ends (a cyclic palette wraps instead). Lo == Hi maps every
	// value to the palette's middle.
	Lo, Hi float32
	// Opacity (0..1) is used for an overlay only; the base layer is opaque.
	Opacity float64
	// OpacityFollowsValue multiplies an overlay's opacity by
	// |v| / max(|Lo|, |Hi|), clipped to [0,1], so that weak values fade out.
	OpacityFollowsValue bool
}

// Viewport is the window of the data shown, in cell coordinates: trace i
// (or crossline i) covers [i, i+1) horizontally and sample j (or inline j)
// covers [j, j+1) vertically, so the whole of an n x m section is
// {0, n, 0, m}. The zero value means the whole section. Parts of the window
// outside the data show as gaps.
type Viewport struct {
	Trace0, Trace1, Sample0, Sample1 float64
}

// resolve fills a zero viewport with the whole data extent.
func (vp Viewport) resolve(nh, nv int) Viewport {
	if vp == (Viewport{}) {
		return Viewport{0, float64(nh), 0, float64(nv)}
	}
	return vp
}

// valid reports whether the window has positive finite extent.
func (vp Viewport) valid() bool {
	for _, v := range []float64{vp.Trace0, vp.Trace1, vp.Sample0, vp.Sample1} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return vp.Trace1 > vp.Trace0 && vp.Sample1 > vp.Sample0
}

// GapColor returns one of the two greys of the checkerboard that shows
// missing data (NaN, or outside the section) at pixel (x, y): a pattern no
// palette produces, in 4-pixel squares.
func GapColor(x, y int) color.RGBA {
	if (x/4+y/4)&1 == 0 {
		return color.RGBA{0xa8, 0xa8, 0xa8, 0xff}
	}
	return color.RGBA{0xc8, 0xc8, 0xc8, 0xff}
}

// DrawSection draws a section (Data[trace][sample], traces left to right,
// samples top to bottom) into the whole of dst: the base layer as variable
// density, the overlay blended over it, then wiggles. Values are
// interpolated bilinearly between trace and sample centres; a NaN next to
// the pixel falls back to the nearest value, so gaps neither grow nor
// shrink. Column stripes of pixels are shared among runtime.GOMAXPROCS workers.
// Nothing is drawn when dst is empty, the base has no traces or the
// viewport is not a positive finite window.
func DrawSection(dst *image.RGBA, base Layer, overlay *Layer, wiggle *WiggleStyle, vp Viewport) {
	drawSection(dst, dst.Bounds(), base, overlay, wiggle, vp)
}

func drawSection(dst *image.RGBA, r image.Rectangle, base Layer, overlay *Layer, wiggle *WiggleStyle, vp Viewport) {
	r = r.Intersect(dst.Bounds())
	nh, nv := dims(base.Data, false)
	if r.Empty() || nh == 0 {
		return
	}
	vp = vp.resolve(nh, nv)
	if !vp.valid() {
		return
	}
	drawDensity(dst, r, base, overlay, vp, false)
	if wiggle != nil {
		drawWiggles(dst, r, base, *wiggle, vp)
	}
}

// DrawMap draws a time slice grid Data[inline][crossline] with crosslines
// left to right and inlines top to bottom, keeping equal metres per pixel in
// both directions: aspect is the distance between neighbouring crosslines
// divided by the distance between neighbouring inlines (1 for square bins;
// values <= 0 or non-finite are taken as 1). The map is centred in dst
// (see MapRect); the letterbox bars are left untouched.
func DrawMap(dst *image.RGBA, base Layer, overlay *Layer, aspect float64) {
	drawMap(dst, dst.Bounds(), base, overlay, aspect)
}

func drawMap(dst *image.RGBA, area image.Rectangle, base Layer, overlay *Layer, aspect float64) {
	nx, ni := dims(base.Data, true)
	r := MapRect(area, ni, nx, aspect).Intersect(dst.Bounds())
	if r.Empty() {
		return
	}
	drawDensity(dst, r, base, overlay, Viewport{0, float64(nx), 0, float64(ni)}, true)
}

// MapRect returns the largest rectangle centred in area that shows an
// inlines x crosslines grid at equal metres per pixel (aspect as in
// DrawMap). It is empty when the grid is.
func MapRect(area image.Rectangle, inlines, crosslines int, aspect float64) image.Rectangle {
	if inlines <= 0 || crosslines <= 0 || area.Empty() {
		return image.Rectangle{}
	}
	if !(aspect > 0) || math.IsInf(aspect, 0) {
		aspect = 1
	}
	// In units of one inline spacing: width = crosslines*aspect, height = inlines.
	wu, hu := float64(crosslines)*aspect, float64(inlines)
	scale := math.Min(float64(area.Dx())/wu, float64(area.Dy())/hu)
	w, h := int(math.Round(wu*scale)), int(math.Round(hu*scale))
	w, h = max(min(w, area.Dx()), 1), max(min(h, area.Dy()), 1)
	x0 := area.Min.X + (area.Dx()-w)/2
	y0 := area.Min.Y + (area.Dy()-h)/2
	return image.Rect(x0, y0, x0+w, y0+h)
}

// dims returns the horizontal and vertical cell counts of data: traces and
// the longest trace for a section, or crosslines (longest row) and inlines
// for a map.
func dims(data [][]float32, transposed bool) (nh, nv int) {
	longest := 0
	for _, row := range data {
		longest = max(longest, len(row))
	}
	if transposed {
		return longest, len(data)
	}
	return len(data), longest
}

// axisMap holds, for each pixel along one axis, the two cells to
// interpolate between, the weight of the second and the nearest cell; -1
// marks pixels outside the data. When pixels are no smaller than cells
// (the data are shrunk) the axis samples the nearest cell: interpolating
// would add no detail, only cost.
type axisMap struct {
	i0, i1, near []int32
	w            []float32
	nearest      bool
}

// newAxisMap maps n pixels onto the cell window [c0, c1) of cells cells.
func newAxisMap(n int, c0, c1 float64, cells int) axisMap {
	step := (c1 - c0) / float64(n)
	m := axisMap{make([]int32, n), make([]int32, n), make([]int32, n), make([]float32, n), step >= 1}
	for p := range n {
		c := c0 + (float64(p)+0.5)*step // cell coordinate of the pixel centre
		if c < 0 || c >= float64(cells) {
			m.i0[p], m.i1[p], m.near[p] = -1, -1, -1
			continue
		}
		m.near[p] = int32(c)
		if m.nearest {
			m.i0[p], m.i1[p] = m.near[p], m.near[p]
			continue
		}
		pos := c - 0.5 // position relative to cell centres
		i := math.Floor(pos)
		w := pos - i
		i0, i1 := int(i), int(i)+1
		if i0 < 0 {
			i0, w = 0, 0
		}
		if i1 > cells-1 {
			i1, w = cells-1, 0
		}
		m.i0[p], m.i1[p], m.w[p] = int32(i0), int32(i1), float32(w)
	}
	return m
}

// colourMap turns values into palette colours quickly: the table and the
// affine map from value to table position.
type colourMap struct {
	table  *[256]color.RGBA
	lo     float32
	scale  float32 // 256 / (hi - lo); 0 when hi == lo or not finite
	offset float32 // lo * scale
	// split is sqrt(256 / (hi - lo)) when the scale itself overflows
	// float32 (a range below about 7.5e-37: denormal data); index then
	// computes (v - lo) * split * split, whose factors stay finite.
	split  float32
	cyclic bool
	absMax float32 // max(|lo|, |hi|), for OpacityFollowsValue
}

func newColourMap(l *Layer) colourMap {
	cm := colourMap{table: &l.Palette.Table, lo: l.Lo, cyclic: l.Palette.Family == palettes.Cyclic}
	d := float64(l.Hi) - float64(l.Lo)
	switch sc := 256 / d; {
	case d == 0 || math.IsNaN(d) || math.IsInf(d, 0) || math.IsNaN(float64(l.Lo)):
	case sc > math.MaxFloat32 || float64(l.Lo)*sc > math.MaxFloat32 || float64(l.Lo)*sc < -math.MaxFloat32:
		cm.split = float32(math.Sqrt(sc))
	default:
		cm.scale = float32(sc)
		cm.offset = l.Lo * cm.scale
	}
	cm.absMax = max(float32(math.Abs(float64(l.Lo))), float32(math.Abs(float64(l.Hi))))
	return cm
}

// index returns the table index of v (v must not be NaN), the same entry
// Palette.At((v-Lo)/(Hi-Lo)) gives. It is in 0..255 for every float32 v,
// Inf included.
func (cm *colourMap) index(v float32) int {
	var f float32
	switch {
	case cm.scale != 0:
		f = v*cm.scale - cm.offset
	case cm.split != 0:
		f = (v - cm.lo) * cm.split * cm.split
	default:
		return 128
	}
	if cm.cyclic {
		if f != f || f > 1e9 || f < -1e9 { // Inf or huge: no meaningful phase
			return 128
		}
		f -= 256 * float32(math.Floor(float64(f)/256))
		k := int(f)
		if k > 255 || k < 0 {
			k = 0
		}
		return k
	}
	if !(f > 0) { // also NaN (Inf - Inf)
		return 0
	}
	if f >= 255 {
		return 255
	}
	return int(f)
}

// sampler reads interpolated values of a layer along one row of pixels.
type sampler struct {
	data       [][]float32
	transposed bool
	h, v       axisMap
}

// at returns data at horizontal cell i and vertical cell j, NaN if missing.
func (s *sampler) at(i, j int32) float32 {
	if s.transposed {
		i, j = j, i
	}
	if row := s.data[i]; int(j) < len(row) {
		return row[j]
	}
	return float32(math.NaN())
}

// columns returns, for a sampler that takes the nearest cell of an
// untransposed grid, the trace under each pixel column x0..x0+len(cols)-1
// (nil outside the data), so that rows of a stripe need not look the
// traces up again; ok is false for other samplers.
func (s *sampler) columns(cols [][]float32, x0 int) (ok bool) {
	if !(s.h.nearest && s.v.nearest && !s.transposed) {
		return false
	}
	for x, i := range s.h.near[x0 : x0+len(cols)] {
		cols[x] = nil
		if i >= 0 {
			cols[x] = s.data[i]
		}
	}
	return true
}

// rowFromColumns fills out with row y from the traces columns returned.
func (s *sampler) rowFromColumns(out []float32, cols [][]float32, y int) {
	nan := float32(math.NaN())
	jn := s.v.near[y]
	if s.v.i0[y] < 0 {
		jn = -1
	}
	for x, tr := range cols[:len(out)] {
		if jn >= 0 && int(jn) < len(tr) {
			out[x] = tr[jn]
		} else {
			out[x] = nan
		}
	}
}

// row fills out with the values of pixel row y from column x0 on
// (len(out) columns).
func (s *sampler) row(out []float32, y, x0 int) {
	nan := float32(math.NaN())
	j0, j1, jn, wv := s.v.i0[y], s.v.i1[y], s.v.near[y], s.v.w[y]
	if j0 < 0 {
		for x := range out {
			out[x] = nan
		}
		return
	}
	hi0, hi1, hw, hn := s.h.i0[x0:x0+len(out)], s.h.i1[x0:x0+len(out)], s.h.w[x0:x0+len(out)], s.h.near[x0:x0+len(out)]
	if s.h.nearest && s.v.nearest && !s.transposed {
		for x, i := range hn {
			if tr := s.data[max(i, 0)]; i >= 0 && int(jn) < len(tr) {
				out[x] = tr[jn]
			} else {
				out[x] = nan
			}
		}
		return
	}
	for x := range out {
		i0 := hi0[x]
		if i0 < 0 {
			out[x] = nan
			continue
		}
		i1, wh := hi1[x], hw[x]
		var a0, a1, b0, b1 float32
		if !s.transposed {
			ta, tb := s.data[i0], s.data[i1]
			if int(j1) < len(ta) && int(j1) < len(tb) {
				a0, a1, b0, b1 = ta[j0], ta[j1], tb[j0], tb[j1]
			} else {
				a0, a1, b0, b1 = s.at(i0, j0), s.at(i0, j1), s.at(i1, j0), s.at(i1, j1)
			}
		} else {
			ra, rb := s.data[j0], s.data[j1]
			if int(i1) < len(ra) && int(i1) < len(rb) {
				a0, b0, a1, b1 = ra[i0], ra[i1], rb[i0], rb[i1]
			} else {
				a0, a1, b0, b1 = s.at(i0, j0), s.at(i0, j1), s.at(i1, j0), s.at(i1, j1)
			}
		}
		va := a0 + wv*(a1-a0)
		vb := b0 + wv*(b1-b0)
		v := va + wh*(vb-va)
		if v != v { // a NaN neighbour: take the nearest cell as it is
			v = s.at(hn[x], jn)
		}
		out[x] = v
	}
}

// stripeWidth is the width in pixels of the column stripes the workers
// take. A stripe walks down all rows; the few traces it reads stay in the
// cache while their samples are used by successive rows.
const stripeWidth = 64

// drawDensity draws base and overlay into r of dst.
func drawDensity(dst *image.RGBA, r image.Rectangle, base Layer, overlay *Layer, vp Viewport, transposed bool) {
	w, h := r.Dx(), r.Dy()
	nh, nv := dims(base.Data, transposed)
	hm := newAxisMap(w, vp.Trace0, vp.Trace1, nh)
	vm := newAxisMap(h, vp.Sample0, vp.Sample1, nv)
	baseS := sampler{data: base.Data, transposed: transposed, h: hm, v: vm}
	var baseCM colourMap
	if base.Palette != nil {
		baseCM = newColourMap(&base)
	}

	var overS sampler
	var overCM colourMap
	var alpha, invAbsMax float32
	var follow bool
	useOverlay := overlay != nil && overlay.Palette != nil && overlay.Opacity > 0
	if useOverlay {
		onh, onv := dims(overlay.Data, transposed)
		ohm, ovm := hm, vm
		if onh != nh || onv != nv { // a grid of another size over the same window
			ohm = newAxisMap(w, vp.Trace0/float64(nh)*float64(onh), vp.Trace1/float64(nh)*float64(onh), onh)
			ovm = newAxisMap(h, vp.Sample0/float64(nv)*float64(onv), vp.Sample1/float64(nv)*float64(onv), onv)
		}
		useOverlay = onh > 0
		overS = sampler{data: overlay.Data, transposed: transposed, h: ohm, v: ovm}
		overCM = newColourMap(overlay)
		alpha = float32(math.Min(overlay.Opacity, 1))
		if overlay.OpacityFollowsValue {
			follow = true
			if overCM.absMax == 0 || overCM.absMax != overCM.absMax {
				alpha = 0 // every value is zero: nothing of the overlay shows
			} else {
				// in float64 and capped: 1/absMax overflows float32 for
				// denormal ranges, and Inf*0 would be NaN
				invAbsMax = float32(min(1/float64(overCM.absMax), math.MaxFloat32))
			}
		}
	}

	// The base palette as opaque RGBA pixels packed in memory order, so
	// each pixel is one 4-byte store.
	var baseWords [256]uint32
	if base.Palette != nil {
		for i, c := range baseCM.table {
			baseWords[i] = uint32(c.R) | uint32(c.G)<<8 | uint32(c.B)<<16 | 0xff<<24
		}
	}

	var next atomic.Int64
	stripes := (w + stripeWidth - 1) / stripeWidth
	workers := max(1, min(runtime.GOMAXPROCS(0), stripes))
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			baseBuf := make([]float32, stripeWidth)
			overBuf := make([]float32, stripeWidth)
			baseCols := make([][]float32, stripeWidth)
			overCols := make([][]float32, stripeWidth)
			for {
				x0 := int(next.Add(1)-1) * stripeWidth
				if x0 >= w {
					return
				}
				sw := min(stripeWidth, w-x0)
				baseRow, overRow := baseBuf[:sw], overBuf[:sw]
				baseFast := baseS.columns(baseCols[:sw], x0)
				overFast := useOverlay && overS.columns(overCols[:sw], x0)
				for y := range h {
					py := r.Min.Y + y
					px0 := r.Min.X + x0
					pix := dst.Pix[dst.PixOffset(px0, py):]
					if baseFast {
						baseS.rowFromColumns(baseRow, baseCols, y)
					} else {
						baseS.row(baseRow, y, x0)
					}
					if base.Palette == nil {
						for x := range baseRow {
							p := pix[4*x : 4*x+4 : 4*x+4]
							p[0], p[1], p[2], p[3] = 255, 255, 255, 255
						}
					} else {
						for x, v := range baseRow {
							var word uint32
							if v == v {
								word = baseWords[baseCM.index(v)]
							} else {
								c := GapColor(px0+x, py)
								word = uint32(c.R) | uint32(c.G)<<8 | uint32(c.B)<<16 | 0xff<<24
							}
							binary.LittleEndian.PutUint32(pix[4*x:], word)
						}
					}
					if !useOverlay {
						continue
					}
					if overFast {
						overS.rowFromColumns(overRow, overCols, y)
					} else {
						overS.row(overRow, y, x0)
					}
					for x, v := range overRow {
						if v != v {
							continue
						}
						a := alpha
						if follow {
							// |v| by clearing the sign bit, scaled to 0..1.
							a *= min(math.Float32frombits(math.Float32bits(v)&0x7fffffff)*invAbsMax, 1)
						}
						ai := uint32(int32(a*256 + 0.5)) // via int32: Go's float-to-uint32 conversion is slow
						if ai == 0 || ai > 256 {         // > 256: a NaN weight (Inf values)
							continue
						}
						c := overCM.table[overCM.index(v)]
						p := pix[4*x : 4*x+4 : 4*x+4]
						bi := 256 - ai
						p[0] = uint8((uint32(c.R)*ai + uint32(p[0])*bi) >> 8)
						p[1] = uint8((uint32(c.G)*ai + uint32(p[1])*bi) >> 8)
						p[2] = uint8((uint32(c.B)*ai + uint32(p[2])*bi) >> 8)
					}
				}
			}
		}()
	}
	wg.Wait()
}
