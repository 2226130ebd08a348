// Command quadtrace is a desktop viewer and batch tool for complex-trace
// seismic attributes on SEG-Y volumes.
//
// With no arguments it opens the viewer on the built-in demo survey; with a
// file path it opens that file; with a sub-command (scan, attributes, export,
// figure, synth, join) it runs a batch job and exits. See README.md.
package main

import (
	"os"

	"quadtrace/app"
)

func main() {
	os.Exit(app.Main(os.Args[1:], os.Stdout, os.Stderr))
}
