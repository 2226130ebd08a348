package render

import (
	"image"
	"image/color"
	"math"
	"testing"
)

// grid samples f at the cell centres of a rows x cols map.
func grid(rows, cols int, f func(x, y float64) float64) [][]float32 {
	out := make([][]float32, rows)
	for r := range out {
		out[r] = make([]float32, cols)
		for c := range out[r] {
			out[r][c] = float32(f(float64(c)+0.5, float64(r)+0.5))
		}
	}
	return out
}

func segLength(s Segment) float64 { return math.Hypot(s.X1-s.X0, s.Y1-s.Y0) }

// The contour of a plane z = a x + b y at a level is the straight line
// a x + b y = level (closed form): linear interpolation along the edges is
// exact for a linear function, so every end point lies on it, and the
// pieces add up to the line's length between the outermost cell centres.
func TestContoursOfAPlane(t *testing.T) {
	const a, b = 0.7, -0.3
	rows, cols := 40, 60
	data := grid(rows, cols, func(x, y float64) float64 { return a*x + b*y })
	for _, level := range []float64{-5, 0.35, 10, 20.123} {
		segs := Contours(data, level)
		if len(segs) == 0 {
			t.Fatalf("level %v: no segments", level)
		}
		total := 0.0
		for _, s := range segs {
			for _, p := range [][2]float64{{s.X0, s.Y0}, {s.X1, s.Y1}} {
				if d := math.Abs(a*p[0] + b*p[1] - level); d > 1e-4 { // float32 samples
					t.Fatalf("level %v: end point %v is %g off the line", level, p, d)
				}
				if p[0] < 0.5-1e-9 || p[0] > float64(cols)-0.5+1e-9 || p[1] < 0.5-1e-9 || p[1] > float64(rows)-0.5+1e-9 {
					t.Fatalf("level %v: end point %v outside the cell centres", level, p)
				}
			}
			total += segLength(s)
		}
		// The chord of the line a x + b y = level through the rectangle of
		// cell centres [0.5, cols-0.5] x [0.5, rows-0.5].
		want := chord(a, b, level, 0.5, float64(cols)-0.5, 0.5, float64(rows)-0.5)
		if math.Abs(total-want) > 1e-3*want {
			t.Errorf("level %v: segments add up to %.5f cells, the line's chord is %.5f", level, total, want)
		}
	}
}

// chord is the length of the line a x + b y = c inside [x0,x1] x [y0,y1]
// (b != 0), found by clipping its parametric form.
func chord(a, b, c, x0, x1, y0, y1 float64) float64 {
	// y = (c - a x) / b; clip x so that y stays inside.
	lo, hi := x0, x1
	ya, yb := (c-a*x0)/b, (c-a*x1)/b
	if ya > yb {
		ya, yb = yb, ya
	}
	// x where y crosses y0 and y1.
	xs := []float64{(c - b*y0) / a, (c - b*y1) / a}
	if xs[0] > xs[1] {
		xs[0], xs[1] = xs[1], xs[0]
	}
	lo, hi = math.Max(lo, xs[0]), math.Min(hi, xs[1])
	if hi <= lo {
		return 0
	}
	return (hi - lo) * math.Hypot(1, a/b)
}

// The contour of the paraboloid z = (x-cx)² + (y-cy)² at level r² is the
// circle of radius r about (cx, cy) (closed form). Linear interpolation of
// the quadratic along an edge of one cell misses by at most h²/8 times its
// second derivative 2, i.e. 1/4 in z, which is 1/(8r) in radius; the
// pieces are chords of at most about one cell, each short of its arc by
// about 1/(24r²) of it. So the length is the circumference within
// 1/(8r²) + 1/(24r²) = 1/(6r²) of it.
func TestContoursOfAParaboloid(t *testing.T) {
	const cx, cy = 31.3, 24.8
	data := grid(50, 64, func(x, y float64) float64 { return (x-cx)*(x-cx) + (y-cy)*(y-cy) })
	for _, r := range []float64{3.5, 10, 20.2} {
		segs := Contours(data, r*r)
		total := 0.0
		for _, s := range segs {
			for _, p := range [][2]float64{{s.X0, s.Y0}, {s.X1, s.Y1}} {
				d := math.Hypot(p[0]-cx, p[1]-cy)
				if math.Abs(d-r) > 1/(8*r)+1e-4 {
					t.Fatalf("radius %v: end point %v at distance %.5f from the centre", r, p, d)
				}
			}
			total += segLength(s)
		}
		if want := 2 * math.Pi * r; math.Abs(total-want) > want/(6*r*r) {
			t.Errorf("radius %v: contour length %.4f, circumference %.4f", r, total, want)
		}
	}
}

// A gap stops the contour: no segment touches a square with a NaN corner;
// a saddle gives two segments that do not cross.
func TestContoursGapsAndSaddles(t *testing.T) {
	data := grid(10, 10, func(x, y float64) float64 { return x })
	data[4][4] = float32(math.NaN())
	for _, s := range Contours(data, 4.2) {
		for _, p := range [][2]float64{{s.X0, s.Y0}, {s.X1, s.Y1}} {
			if p[1] > 3.5 && p[1] < 5.5 {
				t.Errorf("segment %+v enters a square with the NaN cell at (4.5, 4.5)", s)
			}
		}
	}
	// Saddle: corners 1 0 / 0 1 with mean 0.5 above level 0.4: the two
	// ones join through the centre, so the segments cut off the zeros.
	saddle := [][]float32{{1, 0}, {0, 1}}
	segs := Contours(saddle, 0.4)
	if len(segs) != 2 {
		t.Fatalf("saddle: %d segments, want 2", len(segs))
	}
	for _, s := range segs {
		mx, my := (s.X0+s.X1)/2, (s.Y0+s.Y1)/2
		// Each segment lies nearer a zero corner (top right (1.5, 0.5) or
		// bottom left (0.5, 1.5)) than the centre (1, 1).
		dTR, dBL := math.Hypot(mx-1.5, my-0.5), math.Hypot(mx-0.5, my-1.5)
		if math.Min(dTR, dBL) > math.Hypot(mx-1, my-1) {
			t.Errorf("saddle segment %+v does not cut off a low corner", s)
		}
	}
	if len(Contours(saddle, 0.6)) != 2 {
		t.Errorf("saddle at 0.6: want 2 segments")
	}
}

func TestContourLevels(t *testing.T) {
	got := ContourLevels(12.5, 31, 5)
	want := []float64{15, 20, 25, 30}
	if len(got) != len(want) {
		t.Fatalf("levels %v, want %v", got, want)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Fatalf("levels %v, want %v", got, want)
		}
	}
	for _, bad := range [][3]float64{{0, 1, 0}, {0, 1, -1}, {0, 1e9, 1}, {math.NaN(), 1, 1}, {2, 1, 1}, {0, 1, math.Inf(1)}} {
		if l := ContourLevels(bad[0], bad[1], bad[2]); l != nil {
			t.Errorf("ContourLevels%v = %v, want nil", bad, l)
		}
	}
}

// The outline of an L-shaped set of live cells runs along their outer
// edges: its length is the L's perimeter.
func TestOutline(t *testing.T) {
	live := [][]bool{
		{true, false, false},
		{true, false, false},
		{true, true, true},
	}
	total := 0.0
	for _, s := range Outline(live) {
		total += segLength(s)
	}
	if total != 12 { // 3 + 1 + 2 + 2 + 1 + ... perimeter of the L: 3+3+1+2+2+1
		t.Errorf("outline length %v, want 12", total)
	}
	full := [][]bool{{true, true}, {true, true}}
	total = 0
	for _, s := range Outline(full) {
		total += segLength(s)
		if s.X0 != 0 && s.X0 != 2 && s.Y0 != 0 && s.Y0 != 2 {
			t.Errorf("inner edge %+v in the outline of a full grid", s)
		}
	}
	if total != 8 {
		t.Errorf("outline of a 2x2 grid %v long, want 8", total)
	}
}

// DrawMapLines puts a line where its cell coordinates say, inside the
// map's rectangle only.
func TestDrawMapLines(t *testing.T) {
	img := image.NewRGBA(image.Rect(0, 0, 120, 100))
	p := image.Rect(10, 20, 110, 70) // 10 x 5 cells of 10 x 10 pixels
	red := color.RGBA{255, 0, 0, 255}
	DrawMapLines(img, p, 10, 5, []MapLines{{Segments: []Segment{{0, 2.5, 10, 2.5}, {-5, 1, -1, 1}}, Colour: red, Width: 2}})
	if c := img.RGBAAt(60, 45); c.R < 200 || c.G > 50 {
		t.Errorf("pixel on the line (row 2.5 -> y 45) is %v", c)
	}
	if c := img.RGBAAt(60, 30); c.R != 0 {
		t.Errorf("pixel off the line is %v", c)
	}
	if c := img.RGBAAt(5, 45); c.R != 0 {
		t.Errorf("pixel outside the map rectangle is %v", c)
	}
}

// A dashed line alternates Dash pixels of ink and Dash pixels of gap.
func TestDrawMapLinesDashed(t *testing.T) {
	img := image.NewRGBA(image.Rect(0, 0, 100, 20))
	DrawMapLines(img, img.Bounds(), 100, 20, []MapLines{{Segments: []Segment{{0, 10.5, 100, 10.5}}, Colour: color.RGBA{0, 0, 255, 255}, Width: 1, Dash: 10}})
	for x := 0; x < 100; x++ {
		inked := img.RGBAAt(x, 10).B > 100
		if (x%20 >= 1 && x%20 <= 8) != inked && x%20 >= 1 && x%20 <= 8 || x%20 >= 11 && x%20 <= 18 && inked {
			t.Fatalf("pixel %d: inked %v, want dashes on [0,10) and gaps on [10,20) of every 20 pixels", x, inked)
		}
	}
}
