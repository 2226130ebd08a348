//go:build linux && cgo && !wayland

package viewer

/*
#cgo LDFLAGS: -lX11
#include <X11/Xlib.h>
#include <X11/Xutil.h>

static void qtDestroyImage(XImage *im) { XDestroyImage(im); }
static unsigned long qtPixel(XImage *im, int x, int y) { return XGetPixel(im, x, y); }
static int qtIgnoreErrors(Display *d, XErrorEvent *e) { return 0; }
static void qtQuietErrors(void) { XSetErrorHandler(qtIgnoreErrors); }
*/
import "C"

import (
	"fmt"
	"image"
	"image/color"
	"math/bits"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/driver"
)

// captureWindow returns the pixels of w as the X server holds them (what is
// on the screen in the window's area), with the window's position on the
// root window. It reads them with XGetImage through a connection of its own,
// the way a screen grab does: fyne's Canvas().Capture() reads the GL front
// buffer, which under Xvfb's software GL comes back empty (see snapshot.go).
func captureWindow(w fyne.Window) (*image.RGBA, image.Point, error) {
	var handle uintptr
	nw, ok := w.(driver.NativeWindow)
	if !ok {
		return nil, image.Point{}, fmt.Errorf("capture: the window has no native handle")
	}
	fyne.DoAndWait(func() {
		nw.RunNative(func(ctx any) {
			if x, ok := ctx.(driver.X11WindowContext); ok {
				handle = x.WindowHandle
			}
		})
	})
	if handle == 0 {
		return nil, image.Point{}, fmt.Errorf("capture: not an X11 window")
	}
	C.qtQuietErrors()
	d := C.XOpenDisplay(nil)
	if d == nil {
		return nil, image.Point{}, fmt.Errorf("capture: cannot open the X display")
	}
	defer C.XCloseDisplay(d)
	win := C.Window(handle)
	var attr C.XWindowAttributes
	if C.XGetWindowAttributes(d, win, &attr) == 0 {
		return nil, image.Point{}, fmt.Errorf("capture: window %#x: no attributes", handle)
	}
	var rx, ry C.int
	var child C.Window
	C.XTranslateCoordinates(d, win, C.XDefaultRootWindow(d), 0, 0, &rx, &ry, &child)
	width, height := int(attr.width), int(attr.height)
	// XGetImage of a window fails when part of it lies off the screen (a
	// size restored from a larger monitor): say so instead of guessing.
	var rootAttr C.XWindowAttributes
	if C.XGetWindowAttributes(d, C.XDefaultRootWindow(d), &rootAttr) != 0 {
		sw, sh := int(rootAttr.width), int(rootAttr.height)
		if int(rx) < 0 || int(ry) < 0 || int(rx)+width > sw || int(ry)+height > sh {
			return nil, image.Point{}, fmt.Errorf("capture: the window (%dx%d at %d,%d) does not fit on the %dx%d screen; make it smaller or move it fully on screen", width, height, int(rx), int(ry), sw, sh)
		}
	}
	im := C.XGetImage(d, C.Drawable(win), 0, 0, C.uint(width), C.uint(height), C.AllPlanes, C.ZPixmap)
	if im == nil {
		return nil, image.Point{}, fmt.Errorf("capture: window %#x: XGetImage failed (is it mapped?)", handle)
	}
	defer C.qtDestroyImage(im)
	rm, gm, bm := uint64(im.red_mask), uint64(im.green_mask), uint64(im.blue_mask)
	if rm == 0 || gm == 0 || bm == 0 {
		return nil, image.Point{}, fmt.Errorf("capture: window %#x: visual without colour masks", handle)
	}
	channel := func(p, mask uint64) uint8 {
		v := (p & mask) >> bits.TrailingZeros64(mask)
		top := 64 - bits.LeadingZeros64(mask>>bits.TrailingZeros64(mask)) // bits in the channel
		if top >= 8 {
			return uint8(v >> (top - 8))
		}
		return uint8(v << (8 - top))
	}
	out := image.NewRGBA(image.Rect(0, 0, width, height))
	for y := 0; y < height; y++ {
		for x := 0; x < width; x++ {
			p := uint64(C.qtPixel(im, C.int(x), C.int(y)))
			out.SetRGBA(x, y, color.RGBA{channel(p, rm), channel(p, gm), channel(p, bm), 255})
		}
	}
	return out, image.Pt(int(rx), int(ry)), nil
}
