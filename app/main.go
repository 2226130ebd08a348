// Package app is the quadtrace application: the dispatch here between the
// window (app/viewer) and the commands (app/cli), and the services they
// share: surveys as trace sources (app/volume), styles (app/style), the
// export job (app/export), figures (app/figure) and the version
// (app/version). Only
// packages under app/ import fyne, and only app/viewer among them.
package app

import (
	"fmt"
	"io"
	"maps"
	"os"
	"slices"
	"strings"

	"quadtrace/app/cli"
	"quadtrace/app/viewer"
	"quadtrace/compute"
)

// usage is printed for `quadtrace help`.
const usage = `quadtrace: complex-trace seismic attributes on SEG-Y volumes

usage:
  quadtrace                      open the viewer on the built-in demo survey
  quadtrace FILE.sgy             open the viewer on FILE.sgy
  quadtrace --snapshot OUT.png [FILE.sgy]
                                 open the viewer, write a PNG of the window
                                 once the first views are drawn, and exit
  quadtrace scan FILE [--json]   say what a SEG-Y file holds
  quadtrace headers FILE [--trace N]
                                 print the binary header and one trace header
                                 field by field, with byte positions
  quadtrace attributes [ID]      list the attributes, or one in full
  quadtrace export FILE --attribute ID[,ID...] --out PATH [options]
                                 write attribute volumes as SEG-Y
  quadtrace join PART... --out FILE
                                 join exported parts into one file
  quadtrace figure FILE (--inline N | --crossline N | --time MS) --attribute ID
                 [--overlay ID --opacity X] --out FIG.png [options]
                                 write a report figure without a window
  quadtrace synth OUT.sgy [options]
                                 write the demo survey as SEG-Y
  quadtrace track FILE --seed IL,XL,MS [--seed ...] [--event peak]
                 [--window MS] [--max-phase-jump DEG] [--min-correlation X]
                 --out HORIZON.txt
                                 track a horizon from seed points
  quadtrace map FILE --horizon HORIZON.txt --attribute ID [--window A:B]
                 [--stat rms] --out MAP.png|MAP.txt
                                 map an attribute along a horizon
  quadtrace version              print the version

Every command that opens SEG-Y takes --inline-byte, --crossline-byte,
--offset-byte, --x-byte, --y-byte, --byte-order and --ignore-partial-trace.
Run 'quadtrace COMMAND --help' for a command's options.
`

// commandTable maps each sub-command name to its function.
func commandTable() map[string]func(args []string, stdout, stderr io.Writer) int {
	return map[string]func(args []string, stdout, stderr io.Writer) int{
		"scan":       cli.Scan,
		"headers":    cli.Headers,
		"attributes": cli.Attributes,
		"export":     cli.Export,
		"join":       cli.Join,
		"figure":     cli.Figure,
		"synth":      cli.Synth,
		"version":    cli.Version,
		"track":      cli.Track,
		"map":        cli.Map,
	}
}

// Main runs quadtrace with the command-line arguments args (without the
// program name) and returns the process exit status: 0 on success, 1 when
// the work failed, 2 on a wrong call.
func Main(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		return runViewer(viewer.Options{}, stderr)
	}
	commands := commandTable()
	if run, ok := commands[args[0]]; ok {
		return run(args[1:], stdout, stderr)
	}
	switch args[0] {
	case "help", "-h", "-help", "--help":
		if len(args) == 2 {
			if run, ok := commands[args[1]]; ok {
				return run([]string{"--help"}, stdout, stderr)
			}
		}
		fmt.Fprint(stdout, usage)
		return 0
	case "--version":
		return cli.Version(nil, stdout, stderr)
	case "--snapshot":
		if len(args) < 2 || len(args) > 3 {
			fmt.Fprint(stderr, "quadtrace: --snapshot takes OUT.png and an optional FILE\nRun 'quadtrace --help' for usage.\n")
			return 2
		}
		opt := viewer.Options{Snapshot: args[1]}
		if len(args) == 3 {
			opt.Path = args[2]
		}
		return runViewer(opt, stderr)
	}
	// A single word that names no file but is near a command name is a
	// mistyped command, not a file for the viewer.
	names := slices.Sorted(maps.Keys(commands))
	_, near := compute.Nearest(args[0], names)
	_, statErr := os.Stat(args[0])
	if strings.HasPrefix(args[0], "-") || len(args) > 1 || (near && statErr != nil) {
		fmt.Fprintf(stderr, "quadtrace: unknown command or option %q%s\nRun 'quadtrace --help' for usage.\n", args[0], compute.DidYouMean(args[0], names))
		return 2
	}
	return runViewer(viewer.Options{Path: args[0]}, stderr)
}

func runViewer(opt viewer.Options, stderr io.Writer) int {
	if code, missing := reportNoDisplay(stderr); missing {
		return code
	}
	if err := viewer.Run(opt); err != nil {
		fmt.Fprintln(stderr, "quadtrace:", err)
		return 1
	}
	return 0
}
