package render

import (
	"image"
	"image/color"
	"math"
)

// Contour lines and outlines for maps. Coordinates are map cell
// coordinates, as in Viewport: crossline (column) c covers [c, c+1) across
// and inline (row) r covers [r, r+1) down, so the value of cell (r, c)
// stands at its centre (c+0.5, r+0.5).

// Segment is a straight piece of line from (X0, Y0) to (X1, Y1) in map cell
// coordinates (X across, Y down).
type Segment struct{ X0, Y0, X1, Y1 float64 }

// MapLines is a set of segments drawn over a map in one colour and width
// (pixels), solid, or dashed when Dash > 0 (dashes and gaps Dash pixels
// long).
type MapLines struct {
	Segments []Segment
	Colour   color.RGBA
	Width    float64
	Dash     float64
}

// maxContourLevels bounds the levels ContourLevels returns, so a tiny
// interval over a large range cannot ask for millions of lines.
const maxContourLevels = 400

// ContourLevels returns the multiples of step inside [lo, hi], lowest
// first; nil when step is not a positive number, the range is not finite
// or it would take more than 400 levels.
func ContourLevels(lo, hi, step float64) []float64 {
	if !(step > 0) || math.IsInf(step, 0) || math.IsNaN(lo) || math.IsNaN(hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0) || hi < lo {
		return nil
	}
	k0, k1 := math.Ceil(lo/step), math.Floor(hi/step)
	if k1-k0+1 > maxContourLevels {
		return nil
	}
	var out []float64
	for k := k0; k <= k1; k++ {
		out = append(out, k*step)
	}
	return out
}

// Contours returns the contour line of data (Data[row][column], a map as in
// Layer) at level, as segments, by marching squares (Lorensen and Cline,
// 1987, in its two-dimensional form): each square between four
// neighbouring cell centres is cut where the level crosses its edges, the
// crossing placed by linear interpolation along the edge. A corner counts
// as above when its value is at least the level. The ambiguous squares
// (two opposite corners above, two below) are resolved by the mean of the
// four corners: the corners on its side of the level are joined through
// the square's centre. Squares with a NaN or infinite corner are left out,
// so contours stop at gaps and at the map's edge (the outermost half cell).
// Rows shorter than the longest count as NaN beyond their end.
func Contours(data [][]float32, level float64) []Segment {
	var out []Segment
	at := func(r, c int) float64 {
		if c >= len(data[r]) {
			return math.NaN()
		}
		return float64(data[r][c])
	}
	for r := 0; r+1 < len(data); r++ {
		n := min(len(data[r]), len(data[r+1]))
		for c := 0; c+1 < n; c++ {
			// Corners clockwise from the top left, at cell centres.
			v := [4]float64{at(r, c), at(r, c+1), at(r+1, c+1), at(r+1, c)}
			x := [4]float64{float64(c) + 0.5, float64(c) + 1.5, float64(c) + 1.5, float64(c) + 0.5}
			y := [4]float64{float64(r) + 0.5, float64(r) + 0.5, float64(r) + 1.5, float64(r) + 1.5}
			finite := true
			var above [4]bool
			for i, z := range v {
				if math.IsNaN(z) || math.IsInf(z, 0) {
					finite = false
					break
				}
				above[i] = z >= level
			}
			if !finite {
				continue
			}
			// Crossing on edge e, from corner e to corner e+1 (top, right,
			// bottom, left).
			var px, py [4]float64
			var cut [4]bool
			count := 0
			for e := range 4 {
				a, b := e, (e+1)%4
				if above[a] == above[b] {
					continue
				}
				t := (level - v[a]) / (v[b] - v[a])
				px[e], py[e] = x[a]+t*(x[b]-x[a]), y[a]+t*(y[b]-y[a])
				cut[e] = true
				count++
			}
			seg := func(e0, e1 int) {
				out = append(out, Segment{px[e0], py[e0], px[e1], py[e1]})
			}
			switch count {
			case 2:
				var es []int
				for e := range 4 {
					if cut[e] {
						es = append(es, e)
					}
				}
				seg(es[0], es[1])
			case 4:
				centre := (v[0]+v[1]+v[2]+v[3])/4 >= level
				if centre == above[0] {
					// The top-left corner's side joins through the
					// centre: cut off the top-right and bottom-left
					// corners.
					seg(0, 1) // top, right: around the top-right corner
					seg(2, 3) // bottom, left: around the bottom-left corner
				} else {
					seg(3, 0) // left, top: around the top-left corner
					seg(1, 2) // right, bottom: around the bottom-right corner
				}
			}
		}
	}
	return out
}

// Outline returns the edges of the cells where live is true that border a
// cell where it is false or the edge of the grid (live[row][column]; rows
// may differ in length, missing cells are not live): the outline of a
// survey's traces on its map, along cell edges.
func Outline(live [][]bool) []Segment {
	is := func(r, c int) bool {
		return r >= 0 && r < len(live) && c >= 0 && c < len(live[r]) && live[r][c]
	}
	var out []Segment
	for r := range live {
		for c := range live[r] {
			if !live[r][c] {
				continue
			}
			x0, y0, x1, y1 := float64(c), float64(r), float64(c+1), float64(r+1)
			if !is(r-1, c) {
				out = append(out, Segment{x0, y0, x1, y0})
			}
			if !is(r+1, c) {
				out = append(out, Segment{x0, y1, x1, y1})
			}
			if !is(r, c-1) {
				out = append(out, Segment{x0, y0, x0, y1})
			}
			if !is(r, c+1) {
				out = append(out, Segment{x1, y0, x1, y1})
			}
		}
	}
	return out
}

// DrawMapLines draws line sets over a map of nh x nv cells shown in the
// pixel rectangle p of dst (as Figure.Layout's Plot), in order, clipped to
// p.
func DrawMapLines(dst *image.RGBA, p image.Rectangle, nh, nv int, sets []MapLines) {
	if nh <= 0 || nv <= 0 || p.Empty() {
		return
	}
	sub, ok := dst.SubImage(p.Intersect(dst.Bounds())).(*image.RGBA)
	if !ok || sub.Bounds().Empty() {
		return
	}
	sx, sy := float64(p.Dx())/float64(nh), float64(p.Dy())/float64(nv)
	for _, set := range sets {
		if len(set.Segments) == 0 {
			continue
		}
		xs := make([]float64, 0, 3*len(set.Segments))
		ys := make([]float64, 0, 3*len(set.Segments))
		nan := math.NaN()
		for _, s := range set.Segments {
			x0, y0 := float64(p.Min.X)+s.X0*sx, float64(p.Min.Y)+s.Y0*sy
			x1, y1 := float64(p.Min.X)+s.X1*sx, float64(p.Min.Y)+s.Y1*sy
			l := math.Hypot(x1-x0, y1-y0)
			if set.Dash <= 0 || l <= set.Dash {
				xs = append(xs, x0, x1, nan)
				ys = append(ys, y0, y1, nan)
				continue
			}
			for a := 0.0; a < l; a += 2 * set.Dash {
				b := math.Min(a+set.Dash, l)
				xs = append(xs, x0+(x1-x0)*a/l, x0+(x1-x0)*b/l, nan)
				ys = append(ys, y0+(y1-y0)*a/l, y0+(y1-y0)*b/l, nan)
			}
		}
		w := set.Width
		if !(w > 0) {
			w = 1
		}
		StrokePolyline(sub, xs, ys, w, set.Colour)
	}
}
