package cli

import (
	"flag"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"quadtrace/compute"
)

// Attributes runs `quadtrace attributes [--long]`: one attribute per line,
// its id first, then its unit, kind, group and parameters with their
// defaults; --long adds the description and the published source.
func Attributes(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("attributes", flag.ContinueOnError)
	fs.SetOutput(stderr)
	long := fs.Bool("long", false, "add each attribute's description and published source")
	if err := fs.Parse(args); err != nil {
		return 2
	}
	if fs.NArg() != 0 {
		fmt.Fprintln(stderr, "usage: quadtrace attributes [--long]")
		return 2
	}
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	for _, a := range compute.Attributes() {
		unit := a.Unit
		if unit == "" {
			unit = "-"
		}
		params := make([]string, 0, len(a.Params))
		for _, p := range a.Params {
			params = append(params, p.Name+"="+p.Default)
		}
		ps := strings.Join(params, " ")
		if ps == "" {
			ps = "-"
		}
		line := fmt.Sprintf("%s\t%s\t%s\t%s\t%s", a.ID, unit, a.Kind, a.Group, ps)
		if *long {
			line += fmt.Sprintf("\t%s\t%s", a.Description, a.Source)
		}
		fmt.Fprintln(tw, line)
	}
	if err := tw.Flush(); err != nil {
		fmt.Fprintln(stderr, "quadtrace attributes:", err)
		return 1
	}
	return 0
}
