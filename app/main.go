// Package app is the quadtrace application: the command dispatch, the batch
// commands (in app/batch), the data glue between segy, compute and render (in
// app/volume) and the fyne viewer (in app/viewer). Only app/... imports fyne.
package app

import (
	"fmt"
	"io"
)

// Main runs quadtrace with the command-line arguments args (without the
// program name) and returns the process exit status.
func Main(args []string, stdout, stderr io.Writer) int {
	fmt.Fprintln(stderr, "quadtrace: not built yet")
	return 2
}
