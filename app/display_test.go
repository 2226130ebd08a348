package app

import (
	"bytes"
	"runtime"
	"strings"
	"testing"
)

// TestDisplayMissing checks the decision table: Linux and the BSDs need
// DISPLAY (X11) or WAYLAND_DISPLAY (Wayland); Windows and macOS never lack
// a display.
func TestDisplayMissing(t *testing.T) {
	env := func(kv ...string) func(string) string {
		return func(k string) string {
			for i := 0; i+1 < len(kv); i += 2 {
				if kv[i] == k {
					return kv[i+1]
				}
			}
			return ""
		}
	}
	for _, c := range []struct {
		goos string
		env  func(string) string
		want bool
	}{
		{"linux", env(), true},
		{"linux", env("DISPLAY", ""), true},
		{"linux", env("DISPLAY", ":0"), false},
		{"linux", env("WAYLAND_DISPLAY", "wayland-0"), false},
		{"freebsd", env(), true},
		{"openbsd", env("DISPLAY", ":1"), false},
		{"windows", env(), false},
		{"darwin", env(), false},
	} {
		if got := displayMissing(c.goos, c.env); got != c.want {
			t.Errorf("%s, DISPLAY %q, WAYLAND_DISPLAY %q: missing %v, want %v", c.goos, c.env("DISPLAY"), c.env("WAYLAND_DISPLAY"), got, c.want)
		}
	}
}

// TestNoDisplayOneLine runs Main in-process with no display: the viewer
// calls (no argument, a file, --snapshot) print the one line and exit 2
// without starting fyne. The commands the line names must all be commands.
func TestNoDisplayOneLine(t *testing.T) {
	if !displayMissing(runtime.GOOS, func(string) string { return "" }) {
		t.Skipf("%s draws through its own window system; no display check applies", runtime.GOOS)
	}
	t.Setenv("DISPLAY", "")
	t.Setenv("WAYLAND_DISPLAY", "")
	for _, args := range [][]string{nil, {"some.sgy"}, {"--snapshot", "out.png"}} {
		var out, errb bytes.Buffer
		code := Main(args, &out, &errb)
		if code != 2 || out.Len() != 0 || errb.String() != noDisplayMessage+"\n" {
			t.Errorf("quadtrace %v: exit %d, stdout %q, stderr %q; want exit 2, nothing, the one no-display line", args, code, out.String(), errb.String())
		}
	}
	_, list, ok := strings.Cut(noDisplayMessage, "these commands work: ")
	if !ok {
		t.Fatalf("the message names no commands: %q", noDisplayMessage)
	}
	for _, word := range strings.Split(list, ", ") {
		var out, errb bytes.Buffer
		Main([]string{word, "--help"}, &out, &errb)
		if strings.Contains(errb.String(), "unknown call") || strings.Contains(errb.String(), "display") {
			t.Errorf("%q, named as working without a display, is not a command: %q", word, errb.String())
		}
	}
}
