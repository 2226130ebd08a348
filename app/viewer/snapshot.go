package viewer

import (
	"bytes"
	"context"
	"fmt"
	"image"
	"image/draw"
	"os"
	"strconv"
	"time"

	"fyne.io/fyne/v2"

	"quadtrace/app/figure"
	"quadtrace/app/outfile"
)

// The snapshot (quadtrace --snapshot OUT.png) is a picture of the real
// window, so that it can be checked on a machine with no one in front of it.
//
// What captures the drawn window: fyne's Canvas().Capture() reads the GL
// front buffer with glReadPixels; under Xvfb with Mesa's software GL that
// buffer reads back fully transparent (one colour, alpha 0), though the
// screen shows the window. The pixels that are really on the screen are the
// X server's: captureWindow reads them with XGetImage on the window, as
// `import -window root` does for the whole screen. The check in
// testdata/snapshot-check.sh holds the window open after the snapshot
// (QUADTRACE_SNAPSHOT_HOLD), grabs the screen with `import -window root`,
// crops it at the window position printed on stderr and compares the two
// pixel by pixel (ImageMagick compare -metric AE): they are identical. It
// also has fyne's Canvas().Capture() written beside them
// (QUADTRACE_SNAPSHOT_GL_CAPTURE) and reports how it differs.

// snapshotTimeout bounds a snapshot run that never gets its first picture.
const snapshotTimeout = 3 * time.Minute

// startSnapshotTimer ends a snapshot run that has not got its picture
// within snapshotTimeout.
func (v *viewer) startSnapshotTimer() {
	time.AfterFunc(snapshotTimeout, func() {
		fyne.Do(func() {
			if !v.snapshotTaken {
				v.snapshotTaken = true
				v.exitErr = fmt.Errorf("snapshot: nothing was drawn within %v", snapshotTimeout)
				v.app.Quit()
			}
		})
	})
}

// maybeSnapshot starts taking the snapshot once the section with its
// attribute and the trace panel have been drawn.
func (v *viewer) maybeSnapshot() {
	if v.opt.Snapshot == "" || v.snapshotTaken || v.sectionDrawn == 0 || v.traceDrawn == 0 {
		return
	}
	if v.data.base == nil || (v.state.plan().Base.ID == amplitudeID && v.state.plan().Overlay == nil) {
		return // no attribute yet
	}
	v.snapshotTaken = true
	go v.takeSnapshot()
}

// takeSnapshot waits for the drawn frame to settle, captures the window,
// writes the PNG and quits. It runs in its own goroutine.
func (v *viewer) takeSnapshot() {
	img, at, err := v.stableCapture()
	if err == nil {
		err = writePNG(v.opt.Snapshot, img)
	}
	if path := os.Getenv("QUADTRACE_SNAPSHOT_GL_CAPTURE"); err == nil && path != "" {
		// For the check script: what fyne's own capture gives at the same
		// moment, to compare with the screen.
		var gl image.Image
		fyne.DoAndWait(func() { gl = v.win.Canvas().Capture() })
		if gl != nil {
			err = writePNG(path, gl)
		}
	}
	if err == nil {
		fmt.Fprintf(os.Stderr, "snapshot: %s: window %dx%d at %d,%d on the screen\n", v.opt.Snapshot, img.Bounds().Dx(), img.Bounds().Dy(), at.X, at.Y)
		if hold, _ := strconv.ParseFloat(os.Getenv("QUADTRACE_SNAPSHOT_HOLD"), 64); hold > 0 {
			time.Sleep(time.Duration(hold * float64(time.Second)))
		}
	}
	fyne.Do(func() {
		if err != nil {
			v.exitErr = err
		}
		v.app.Quit()
	})
}

// stableCapture captures the window until two captures a frame or more apart
// agree and are not blank, so the picture is of a finished frame.
func (v *viewer) stableCapture() (*image.RGBA, image.Point, error) {
	var prev *image.RGBA
	var lastErr error
	for try := 0; try < 40; try++ {
		time.Sleep(250 * time.Millisecond)
		img, at, err := captureWindow(v.win)
		if err != nil {
			lastErr = err
			continue
		}
		if prev != nil && bytes.Equal(prev.Pix, img.Pix) && distinctColours(img, 64) > 16 {
			return img, at, nil
		}
		prev = img
	}
	if lastErr == nil {
		lastErr = fmt.Errorf("the window did not settle into a non-blank picture")
	}
	return nil, image.Point{}, fmt.Errorf("snapshot: %w", lastErr)
}

// distinctColours counts the colours of img, up to limit.
func distinctColours(img *image.RGBA, limit int) int {
	seen := map[[3]uint8]bool{}
	for i := 0; i+3 < len(img.Pix); i += 4 * 7 {
		seen[[3]uint8{img.Pix[i], img.Pix[i+1], img.Pix[i+2]}] = true
		if len(seen) >= limit {
			break
		}
	}
	return len(seen)
}

// writePNG writes img to path through app/outfile (figure.WritePNG).
func writePNG(path string, img image.Image) error {
	rgba, ok := img.(*image.RGBA)
	if !ok {
		rgba = image.NewRGBA(img.Bounds())
		draw.Draw(rgba, rgba.Bounds(), img, img.Bounds().Min, draw.Src)
	}
	if err := figure.Write(context.Background(), path, rgba, 96, outfile.Options{}); err != nil {
		return fmt.Errorf("snapshot: %w", err)
	}
	return nil
}
