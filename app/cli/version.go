package cli

import (
	"fmt"
	"io"

	"quadtrace/app/version"
)

// Version runs `quadtrace version`: the program's version on stdout.
func Version(args []string, stdout, stderr io.Writer) int {
	c := newCommand("version", "", "Prints the version of quadtrace.", stdout, stderr)
	pos, code, done := c.parse(args)
	if done {
		return code
	}
	if len(pos) != 0 {
		return c.usage("takes no arguments, got %d", len(pos))
	}
	fmt.Fprintln(stdout, "quadtrace", version.Version)
	return exitOK
}
