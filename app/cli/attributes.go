package cli

import (
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"quadtrace/compute"
)

// Attributes runs `quadtrace attributes [--long] [ID]`: without ID, one
// attribute per line, its id first, then its unit, kind, group and
// parameters with their defaults (--long adds the description and the
// published source); with ID, that attribute in full: each parameter with
// its unit, range or choices, default and meaning, and the attribute's
// kind, unit and formula source.
func Attributes(args []string, stdout, stderr io.Writer) int {
	c := newCommand("attributes", "[--long] [ID]", `Lists the attributes quadtrace computes, one per line, id first; with ID,
prints that attribute's parameters (units, ranges, defaults), its kind and
the published source of its formula.`, stdout, stderr)
	long := c.fs.Bool("long", false, "add each attribute's description and published source")
	pos, code, done := c.parse(args)
	if done {
		return code
	}
	switch len(pos) {
	case 0:
	case 1:
		a, err := compute.Lookup(pos[0])
		if err != nil {
			return c.usage("%v", err)
		}
		writeAttribute(stdout, a)
		return exitOK
	default:
		return c.usage("want at most one ID, got %d arguments", len(pos))
	}
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	for _, a := range compute.Attributes() {
		params := make([]string, 0, len(a.Params))
		for _, p := range a.Params {
			params = append(params, p.Name+"="+p.Default)
		}
		line := fmt.Sprintf("%s\t%s\t%s\t%s\t%s", a.ID, orDash(a.Unit), a.Kind, a.Group, orDash(strings.Join(params, " ")))
		if *long {
			line += fmt.Sprintf("\t%s\t%s", a.Description, a.Source)
		}
		fmt.Fprintln(tw, line)
	}
	if err := tw.Flush(); err != nil {
		return c.fail("", err)
	}
	return exitOK
}

func orDash(s string) string {
	if s == "" {
		return "-"
	}
	return s
}

// writeAttribute prints one attribute in full.
func writeAttribute(w io.Writer, a *compute.Attribute) {
	fmt.Fprintf(w, "%s (%s)\n", a.ID, a.Name)
	fmt.Fprintf(w, "  %s\n", a.Description)
	fmt.Fprintf(w, "  unit:    %s\n", orDash(a.Unit))
	fmt.Fprintf(w, "  kind:    %s\n", a.Kind)
	fmt.Fprintf(w, "  group:   %s\n", a.Group)
	fmt.Fprintf(w, "  formula: %s\n", orDash(a.Source))
	if len(a.Params) == 0 {
		fmt.Fprintln(w, "  parameters: none")
		return
	}
	fmt.Fprintln(w, "  parameters (set with --param NAME=VALUE):")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "    name\tunit\tallowed\tdefault\tmeaning")
	for _, p := range a.Params {
		allowed := strings.Join(p.Choices, " | ")
		if p.Choices == nil {
			allowed = fmt.Sprintf("%g to %g", p.Min, p.Max)
		}
		fmt.Fprintf(tw, "    %s\t%s\t%s\t%s\t%s\n", p.Name, orDash(p.Unit), allowed, p.Default, p.Description)
	}
	tw.Flush()
}
