package app

import (
	"fmt"
	"io"
	"os"
	"runtime"
)

// noDisplayMessage is the one line printed instead of opening the window
// when there is no display; it names the commands that need none.
const noDisplayMessage = "quadtrace: the window needs a display (neither DISPLAY nor WAYLAND_DISPLAY is set); " +
	"without one, these commands work: scan, headers, attributes, export, join, figure, synth, track, map, version, help"

// displayMissing reports whether the window cannot open for lack of a
// display on system goos, reading the environment through getenv. On Linux
// and the BSDs fyne's driver talks to an X11 or Wayland server named by
// DISPLAY or WAYLAND_DISPLAY (common practice of X11 and Wayland clients);
// with neither set it cannot open a window (it would panic inside GLFW).
// Windows and macOS draw through their own window system: never missing.
func displayMissing(goos string, getenv func(string) string) bool {
	switch goos {
	case "linux", "freebsd", "netbsd", "openbsd", "dragonfly", "solaris", "illumos":
		return getenv("DISPLAY") == "" && getenv("WAYLAND_DISPLAY") == ""
	}
	return false
}

// reportNoDisplay prints noDisplayMessage to stderr and returns exit
// status 2 (a call that cannot work here) and true when this process has no
// display; it returns 0 and false otherwise.
func reportNoDisplay(stderr io.Writer) (int, bool) {
	if !displayMissing(runtime.GOOS, os.Getenv) {
		return 0, false
	}
	fmt.Fprintln(stderr, noDisplayMessage)
	return 2, true
}
