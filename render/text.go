package render

import (
	"fmt"
	"image"
	"image/color"
	"image/draw"

	"golang.org/x/image/font"
	"golang.org/x/image/font/gofont/gobold"
	"golang.org/x/image/font/gofont/goregular"
	"golang.org/x/image/font/opentype"
	"golang.org/x/image/math/fixed"
)

// typeface holds the two faces a figure uses, at its sizes in pixels.
type typeface struct {
	label, title font.Face
}

// newTypeface parses the Go fonts (golang.org/x/image/font/gofont) and
// makes faces of the given pixel sizes. Faces are not safe for concurrent
// use, so each figure makes its own.
func newTypeface(labelPx, titlePx float64) (typeface, error) {
	reg, err := opentype.Parse(goregular.TTF)
	if err != nil {
		return typeface{}, fmt.Errorf("font goregular: %w", err)
	}
	bold, err := opentype.Parse(gobold.TTF)
	if err != nil {
		return typeface{}, fmt.Errorf("font gobold: %w", err)
	}
	label, err := opentype.NewFace(reg, &opentype.FaceOptions{Size: labelPx, DPI: 72, Hinting: font.HintingFull})
	if err != nil {
		return typeface{}, fmt.Errorf("font goregular at %.1f px: %w", labelPx, err)
	}
	title, err := opentype.NewFace(bold, &opentype.FaceOptions{Size: titlePx, DPI: 72, Hinting: font.HintingFull})
	if err != nil {
		return typeface{}, fmt.Errorf("font gobold at %.1f px: %w", titlePx, err)
	}
	return typeface{label, title}, nil
}

// textAnchor says which point of the text box (x, y) names.
type textAnchor int

const (
	anchorLeft   textAnchor = iota // x is the left edge
	anchorCentre                   // x is the middle
	anchorRight                    // x is the right edge
)

// textWidth returns the advance width of s in pixels.
func textWidth(face font.Face, s string) int {
	return font.MeasureString(face, s).Ceil()
}

// textBox returns the rectangle s occupies when drawn by drawText with
// the same arguments: from the ascent above the baseline to the descent
// below it.
func textBox(face font.Face, s string, x, baseline int, a textAnchor) image.Rectangle {
	m := face.Metrics()
	w := textWidth(face, s)
	x0 := x
	switch a {
	case anchorCentre:
		x0 = x - w/2
	case anchorRight:
		x0 = x - w
	}
	return image.Rect(x0, baseline-m.Ascent.Ceil(), x0+w, baseline+m.Descent.Ceil())
}

// drawText draws s with its baseline at y, placed horizontally by a.
func drawText(dst draw.Image, face font.Face, col color.Color, s string, x, baseline int, a textAnchor) {
	r := textBox(face, s, x, baseline, a)
	d := font.Drawer{Dst: dst, Src: image.NewUniform(col), Face: face, Dot: fixed.P(r.Min.X, baseline)}
	d.DrawString(s)
}

// drawTextUp draws s rotated a quarter turn anticlockwise (reading bottom
// to top), centred on (cx, cy).
func drawTextUp(dst *image.RGBA, face font.Face, col color.Color, s string, cx, cy int) {
	m := face.Metrics()
	w := textWidth(face, s)
	h := m.Ascent.Ceil() + m.Descent.Ceil()
	if w == 0 || h == 0 {
		return
	}
	mask := image.NewAlpha(image.Rect(0, 0, w, h))
	d := font.Drawer{Dst: mask, Src: image.Opaque, Face: face, Dot: fixed.P(0, m.Ascent.Ceil())}
	d.DrawString(s)
	// Rotate: mask (x, y) -> (y, w-1-x).
	rot := image.NewAlpha(image.Rect(0, 0, h, w))
	for y := range h {
		for x := range w {
			rot.Pix[rot.PixOffset(y, w-1-x)] = mask.Pix[mask.PixOffset(x, y)]
		}
	}
	r := image.Rect(cx-h/2, cy-w/2, cx-h/2+h, cy-w/2+w)
	draw.DrawMask(dst, r, image.NewUniform(col), image.Point{}, rot, image.Point{}, draw.Over)
}
