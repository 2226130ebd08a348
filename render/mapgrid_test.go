package render

import (
	"math"
	"strconv"
	"strings"
	"testing"
)

// On a grid turned 30 degrees from north with 25 m bins, every line of
// equal X (or Y) runs where the affine placement gives that X (or Y) at
// both of its ends, ends on the map's border, and lines come at the round
// spacing asked for (closed form of the affine map).
func TestGroundLinesOnATurnedGrid(t *testing.T) {
	a := 30 * math.Pi / 180
	g := GroundGrid{
		X0: 612000, Y0: 7130000,
		XPerColumn: 25 * math.Sin(a), YPerColumn: 25 * math.Cos(a),
		XPerRow: 25 * math.Sin(a+math.Pi/2), YPerRow: 25 * math.Cos(a+math.Pi/2),
		SpacingM: 500,
	}
	nh, nv := 200, 150
	segs, labels := g.GroundLines(nh, nv)
	if len(segs) < 10 || len(segs) != len(labels) {
		t.Fatalf("%d lines, %d labels", len(segs), len(labels))
	}
	onBorder := func(x, y float64) bool {
		const e = 1e-6
		return math.Abs(x) < e || math.Abs(y) < e || math.Abs(x-float64(nh)) < e || math.Abs(y-float64(nv)) < e
	}
	for i, s := range segs {
		name, num, _ := strings.Cut(labels[i], " ")
		v, err := strconv.ParseFloat(num, 64)
		if err != nil || math.Mod(v, 500) != 0 {
			t.Fatalf("label %q is not a multiple of 500 m", labels[i])
		}
		for _, p := range [][2]float64{{s.X0, s.Y0}, {s.X1, s.Y1}} {
			x := g.X0 + p[0]*g.XPerColumn + p[1]*g.XPerRow
			y := g.Y0 + p[0]*g.YPerColumn + p[1]*g.YPerRow
			got := x
			if name == "Y" {
				got = y
			}
			if math.Abs(got-v) > 1e-6 {
				t.Errorf("line %q: end %v lies at %s %.3f", labels[i], p, name, got)
			}
			if !onBorder(p[0], p[1]) {
				t.Errorf("line %q: end %v is not on the map's border", labels[i], p)
			}
		}
	}
	if s, _ := (GroundGrid{}).GroundLines(nh, nv); s != nil {
		t.Errorf("a degenerate grid gave lines")
	}
	if sp := (GroundGrid{XPerColumn: 25, YPerRow: -25}).Spacing(200, 150); sp != 1000 {
		t.Errorf("automatic spacing %v for a 5000 x 3750 m map, want 1000", sp)
	}
}
