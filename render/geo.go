package render

import (
	"image"
	"image/color"
	"math"

	"golang.org/x/image/vector"
)

// northDisc is the square, inside the map rectangle p near its top right
// corner (below that corner's label), that holds the north arrow.
func northDisc(tf typeface, p image.Rectangle) image.Rectangle {
	fs := float64(tf.label.Metrics().Height.Ceil())
	r := int(fs * 1.6)
	cx := p.Max.X - r - int(fs*0.6)
	cy := p.Min.Y + r + int(fs*2.4)
	return image.Rect(cx-r, cy-r, cx+r, cy+r)
}

// geoLabelBoxes returns the boxes of the corner labels of g inside the map
// rectangle p (empty where a corner has no label, or where it would
// overlap another), in Corners order.
func geoLabelBoxes(tf typeface, g MapGeo, p image.Rectangle) [4]image.Rectangle {
	fs := float64(tf.label.Metrics().Height.Ceil())
	asc := tf.label.Metrics().Ascent.Ceil()
	desc := tf.label.Metrics().Descent.Ceil()
	pad := int(fs * 0.3)
	var out [4]image.Rectangle
	at := [4]struct {
		x, y          int
		right, bottom bool
	}{{p.Min.X, p.Min.Y, false, false}, {p.Max.X, p.Min.Y, true, false}, {p.Min.X, p.Max.Y, false, true}, {p.Max.X, p.Max.Y, true, true}}
	for k, s := range g.Corners {
		if s == "" {
			continue
		}
		w := textWidth(tf.label, s)
		x0, y0 := at[k].x+pad, at[k].y+pad
		if at[k].right {
			x0 = at[k].x - pad - w - 2*pad
		}
		if at[k].bottom {
			y0 = at[k].y - pad - asc - desc - 2*pad
		}
		out[k] = image.Rect(x0, y0, x0+w+2*pad, y0+asc+desc+2*pad)
	}
	// On a small map the labels would overlap: keep the top-left and
	// bottom-left ones, then the others that fit.
	for _, pair := range [][2]int{{2, 0}, {1, 0}, {3, 2}, {3, 1}} {
		if out[pair[0]].Overlaps(out[pair[1]]) {
			out[pair[0]] = image.Rectangle{}
		}
	}
	return out
}

// drawGeo draws, inside the map rectangle p, a north arrow in the disc
// (see northDisc) and the corners' coordinate labels on white boxes.
func drawGeo(img *image.RGBA, tf typeface, g MapGeo, p, disc image.Rectangle) {
	fs := float64(tf.label.Metrics().Height.Ceil())
	asc := tf.label.Metrics().Ascent.Ceil()
	desc := tf.label.Metrics().Descent.Ceil()
	pad := int(fs * 0.3)
	boxes := geoLabelBoxes(tf, g, p)
	label := func(k int) {
		if g.Corners[k] == "" || boxes[k].Empty() {
			return
		}
		box := boxes[k]
		fillRect(img, box, pageColour)
		strokeRect(img, box, frameColour)
		drawText(img, tf.label, inkColour, g.Corners[k], box.Min.X+pad, box.Min.Y+pad+asc, anchorLeft)
	}
	for k := range g.Corners {
		label(k)
	}
	if math.IsNaN(g.NorthDegrees) || math.IsInf(g.NorthDegrees, 0) {
		return
	}
	// The arrow on a white square: shaft and head towards north, "N"
	// beyond the head.
	r := float64(disc.Dx()) / 2
	cx, cy := float64(disc.Min.X)+r, float64(disc.Min.Y)+r
	a := g.NorthDegrees * math.Pi / 180
	ux, uy := math.Sin(a), -math.Cos(a) // page direction of north (y down)
	fillRect(img, disc, pageColour)
	strokeRect(img, disc, frameColour)
	tipX, tipY := cx+ux*r*0.45, cy+uy*r*0.45
	tailX, tailY := cx-ux*r*0.75, cy-uy*r*0.75
	StrokePolyline(img, []float64{tailX, tipX}, []float64{tailY, tipY}, math.Max(1.5, fs/8), inkColour)
	// Head: a triangle at the tip.
	hx, hy := -uy, ux // perpendicular
	h := r * 0.35
	// The head lies inside the disc: only the disc is rasterised.
	if b := disc.Intersect(img.Bounds()); !b.Empty() {
		ox, oy := float64(b.Min.X), float64(b.Min.Y)
		z := vector.NewRasterizer(b.Dx(), b.Dy())
		z.MoveTo(float32(tipX-ox), float32(tipY-oy))
		z.LineTo(float32(tipX-ux*h+hx*h*0.5-ox), float32(tipY-uy*h+hy*h*0.5-oy))
		z.LineTo(float32(tipX-ux*h-hx*h*0.5-ox), float32(tipY-uy*h-hy*h*0.5-oy))
		z.ClosePath()
		z.Draw(img, b, image.NewUniform(color.RGBA(inkColour)), image.Point{})
	}
	nx, ny := cx+ux*r*0.72, cy+uy*r*0.72
	drawText(img, tf.label, inkColour, "N", int(nx), int(ny)+(asc-desc)/2, anchorCentre)
}
