package render

import (
	"image"
	"image/color"
	"math"
	"strconv"
)

// GroundGrid places a map's cells on the ground, so that lines of equal
// projected X and Y (eastings and northings, metres) can be drawn over it:
// the ground position of map cell coordinates (x, y) (as in Segment) is
// (X0 + x*XPerColumn + y*XPerRow, Y0 + x*YPerColumn + y*YPerRow). A survey
// grid is such an affine map of its bin centres (common practice for a
// regular 3D survey).
type GroundGrid struct {
	X0, Y0                 float64 // ground position of cell coordinates (0, 0), the map's top-left corner
	XPerColumn, YPerColumn float64 // change per crossline step (one cell across)
	XPerRow, YPerRow       float64 // change per inline step (one cell down)
	// SpacingM is the distance between grid lines in metres; 0 picks a
	// round one giving a few lines across the map.
	SpacingM float64
}

// gridInk is the colour of the ground grid: a light grey, dashed and thin,
// apart from the contours (dark, solid) and readable over dark palettes.
var gridInk = color.RGBA{235, 235, 235, 190}

// gridDash is the length in pixels of the ground grid's dashes and gaps.
const gridDash = 6

// valid reports whether g maps cells onto a non-degenerate ground grid.
func (g GroundGrid) valid() bool {
	det := g.XPerColumn*g.YPerRow - g.XPerRow*g.YPerColumn
	for _, v := range []float64{g.X0, g.Y0, g.XPerColumn, g.YPerColumn, g.XPerRow, g.YPerRow, g.SpacingM} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return g.SpacingM >= 0 && math.Abs(det) > 1e-12
}

// Spacing returns the distance between grid lines for a map of nh x nv
// cells: SpacingM when set, else the largest 1-2-5 round distance that
// fits three times along the map's shorter side.
func (g GroundGrid) Spacing(nh, nv int) float64 {
	if g.SpacingM > 0 {
		return g.SpacingM
	}
	across := math.Hypot(g.XPerColumn, g.YPerColumn) * float64(nh)
	down := math.Hypot(g.XPerRow, g.YPerRow) * float64(nv)
	return niceAtMost(math.Min(across, down) / 3)
}

// GroundLines returns the grid lines of equal X (first) and equal Y at
// multiples of the spacing that cross a map of nh x nv cells, as segments
// in cell coordinates clipped to the map, with their labels ("X 612000",
// "Y 7130000"). It returns nothing for a degenerate grid or one that
// would need more than 200 lines.
func (g GroundGrid) GroundLines(nh, nv int) (segs []Segment, labels []string) {
	if !g.valid() || nh <= 0 || nv <= 0 {
		return nil, nil
	}
	step := g.Spacing(nh, nv)
	if !(step > 0) {
		return nil, nil
	}
	w, h := float64(nh), float64(nv)
	corners := [][2]float64{{0, 0}, {w, 0}, {0, h}, {w, h}}
	for axis, name := range []string{"X", "Y"} {
		// value(x, y) = v0 + a x + b y on the map.
		v0, a, b := g.X0, g.XPerColumn, g.XPerRow
		if axis == 1 {
			v0, a, b = g.Y0, g.YPerColumn, g.YPerRow
		}
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, c := range corners {
			v := v0 + a*c[0] + b*c[1]
			lo, hi = math.Min(lo, v), math.Max(hi, v)
		}
		levels := ContourLevels(lo, hi, step)
		if len(levels) > 100 {
			return nil, nil
		}
		for _, v := range levels {
			if s, ok := clipLine(a, b, v-v0, w, h); ok {
				segs = append(segs, s)
				labels = append(labels, name+" "+strconv.FormatFloat(v, 'f', -1, 64))
			}
		}
	}
	return segs, labels
}

// clipLine returns the part of the line a x + b y = c inside [0,w] x [0,h].
func clipLine(a, b, c, w, h float64) (Segment, bool) {
	var pts [][2]float64
	add := func(x, y float64) {
		const eps = 1e-9
		if x >= -eps && x <= w+eps && y >= -eps && y <= h+eps {
			pts = append(pts, [2]float64{x, y})
		}
	}
	if b != 0 {
		add(0, c/b)
		add(w, (c-a*w)/b)
	}
	if a != 0 {
		add(c/a, 0)
		add((c-b*h)/a, h)
	}
	if len(pts) < 2 {
		return Segment{}, false
	}
	// The two points farthest apart (corners may appear twice).
	best, bi, bj := -1.0, 0, 1
	for i := range pts {
		for j := i + 1; j < len(pts); j++ {
			if d := math.Hypot(pts[i][0]-pts[j][0], pts[i][1]-pts[j][1]); d > best {
				best, bi, bj = d, i, j
			}
		}
	}
	if best <= 0 {
		return Segment{}, false
	}
	return Segment{pts[bi][0], pts[bi][1], pts[bj][0], pts[bj][1]}, true
}

// drawGroundGrid draws g's lines over the map in p (nh x nv cells) with a
// label at the end of each line that lies lower or, on a tie, further
// right, inside the map on a white box; a label that would overlap one of
// avoid (the corner labels, the north arrow) or an earlier one is left
// out.
func drawGroundGrid(img *image.RGBA, tf typeface, g GroundGrid, p image.Rectangle, nh, nv int, avoid []image.Rectangle) {
	segs, labels := g.GroundLines(nh, nv)
	if len(segs) == 0 {
		return
	}
	DrawMapLines(img, p, nh, nv, []MapLines{{Segments: segs, Colour: gridInk, Width: 1.2, Dash: gridDash}})
	sx, sy := float64(p.Dx())/float64(nh), float64(p.Dy())/float64(nv)
	asc := tf.label.Metrics().Ascent.Ceil()
	desc := tf.label.Metrics().Descent.Ceil()
	placed := append([]image.Rectangle(nil), avoid...)
	for i, s := range segs {
		x, y := s.X1, s.Y1
		if s.Y0 > s.Y1 || (s.Y0 == s.Y1 && s.X0 > s.X1) {
			x, y = s.X0, s.Y0
		}
		px, py := p.Min.X+int(x*sx), p.Min.Y+int(y*sy)
		wdt := textWidth(tf.label, labels[i])
		box := image.Rect(px-wdt/2-2, py-asc-desc-4, px+wdt/2+2, py)
		// Keep the box inside the map and off the labels already placed.
		if box.Min.X < p.Min.X {
			box = box.Add(image.Pt(p.Min.X-box.Min.X, 0))
		}
		if box.Max.X > p.Max.X {
			box = box.Add(image.Pt(p.Max.X-box.Max.X, 0))
		}
		if box.Max.Y > p.Max.Y {
			box = box.Add(image.Pt(0, p.Max.Y-box.Max.Y))
		}
		if box.Min.Y < p.Min.Y {
			box = box.Add(image.Pt(0, p.Min.Y-box.Min.Y))
		}
		clash := false
		for _, q := range placed {
			if q.Overlaps(box) {
				clash = true
				break
			}
		}
		if clash {
			continue
		}
		placed = append(placed, box)
		fillRect(img, box, pageColour)
		strokeRect(img, box, frameColour)
		drawText(img, tf.label, inkColour, labels[i], (box.Min.X+box.Max.X)/2, box.Max.Y-desc-2, anchorCentre)
	}
}
