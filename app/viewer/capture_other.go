//go:build !(linux && cgo && !wayland)

package viewer

import (
	"fmt"
	"image"
	"image/draw"

	"fyne.io/fyne/v2"
)

// captureWindow falls back to fyne's own capture of the GL front buffer on
// platforms without X11 (it works with hardware GL drivers).
func captureWindow(w fyne.Window) (*image.RGBA, image.Point, error) {
	var img image.Image
	fyne.DoAndWait(func() { img = w.Canvas().Capture() })
	if img == nil {
		return nil, image.Point{}, fmt.Errorf("capture: no image")
	}
	out := image.NewRGBA(img.Bounds())
	draw.Draw(out, out.Bounds(), img, img.Bounds().Min, draw.Src)
	return out, image.Point{}, nil
}
