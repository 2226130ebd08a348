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
	"strings"

	"quadtrace/app/cli"
	"quadtrace/app/version"
	"quadtrace/app/viewer"
)

// usage is printed for `quadtrace help` and on a wrong call.
const usage = `quadtrace: complex-trace seismic attributes on SEG-Y volumes

usage:
  quadtrace                      open the viewer on the built-in demo survey
  quadtrace FILE.sgy             open the viewer on FILE.sgy
  quadtrace --snapshot OUT.png [FILE.sgy]
                                 open the viewer, write a PNG of the window
                                 once the first views are drawn, and exit
  quadtrace scan FILE [--json]   say what a SEG-Y file holds
  quadtrace attributes           list the attributes, one per line, id first
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

Run 'quadtrace COMMAND --help' for a command's options.
`

// Main runs quadtrace with the command-line arguments args (without the
// program name) and returns the process exit status: 0 on success, 1 when
// the work failed, 2 on a wrong call.
func Main(args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		return runViewer(viewer.Options{}, stderr)
	}
	switch args[0] {
	case "help", "-h", "--help":
		fmt.Fprint(stdout, usage)
		return 0
	case "version", "--version":
		fmt.Fprintln(stdout, "quadtrace", version.Version)
		return 0
	case "scan":
		return cli.Scan(args[1:], stdout, stderr)
	case "attributes":
		return cli.Attributes(args[1:], stdout, stderr)
	case "export":
		return cli.Export(args[1:], stdout, stderr)
	case "join":
		return cli.Join(args[1:], stdout, stderr)
	case "figure":
		return cli.Figure(args[1:], stdout, stderr)
	case "synth":
		return cli.Synth(args[1:], stdout, stderr)
	case "track":
		return cli.Track(args[1:], stdout, stderr)
	case "map":
		return cli.Map(args[1:], stdout, stderr)
	case "--snapshot":
		if len(args) < 2 || len(args) > 3 {
			fmt.Fprint(stderr, "quadtrace: --snapshot takes OUT.png and an optional FILE\n")
			return 2
		}
		opt := viewer.Options{Snapshot: args[1]}
		if len(args) == 3 {
			opt.Path = args[2]
		}
		return runViewer(opt, stderr)
	}
	if strings.HasPrefix(args[0], "-") || len(args) > 1 {
		fmt.Fprintf(stderr, "quadtrace: unknown call %q\n\n%s", strings.Join(args, " "), usage)
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
