package cli

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"

	"quadtrace/app/export"
)

// Join runs `quadtrace join PART... --out FILE` with args (after the
// sub-command name) and returns the exit status (0 joined, 1 failed, 2 wrong
// command line, 130 interrupted). It checks the parts and concatenates their
// traces in the order given through the segy writer: see export.Join.
func Join(args []string, stdout, stderr io.Writer) int {
	parts, out, quiet, follow, err := parseJoinArgs(args, stderr)
	if errors.Is(err, errHelp) {
		return exitOK
	}
	if err != nil {
		fmt.Fprintf(stderr, "quadtrace join: %v\n(see quadtrace join --help)\n", err)
		return exitUsage
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	n, err := export.Join(ctx, parts, out, export.JoinOptions{FollowLinks: follow})
	if err != nil {
		if ctx.Err() != nil {
			fmt.Fprintln(stderr, "quadtrace join: interrupted; nothing written")
			return exitInterrupted
		}
		fmt.Fprintf(stderr, "quadtrace join: %v\n", err)
		return exitFailed
	}
	if !quiet {
		fmt.Fprintf(stdout, "%s\n", out)
		fmt.Fprintf(stderr, "quadtrace join: %d traces from %d parts\n", n, len(parts))
	}
	return exitOK
}

// parseJoinArgs reads `join PART... --out FILE`.
func parseJoinArgs(args []string, stderr io.Writer) (parts []string, out string, quiet, follow bool, err error) {
	fs := flag.NewFlagSet("join", flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	fs.StringVar(&out, "out", "", "")
	fs.BoolVar(&quiet, "quiet", false, "")
	fs.BoolVar(&follow, "follow-links", false, "")
	parts, err = parseInterspersed(fs, args)
	if err != nil {
		if errors.Is(err, flag.ErrHelp) {
			fmt.Fprint(stderr, joinUsage)
			return nil, "", false, false, errHelp
		}
		return nil, "", false, false, err
	}
	if len(parts) == 0 {
		return nil, "", false, false, errors.New("no PART given")
	}
	if out == "" {
		return nil, "", false, false, errors.New("--out: no destination given")
	}
	return parts, out, quiet, follow, nil
}

const joinUsage = `usage: quadtrace join PART... --out FILE

Concatenates SEG-Y volumes written by 'quadtrace export --inlines/--crosslines'
in the order given into one volume. The parts must share sample count,
interval, start time and sample format; no trace (inline, crossline) may be
repeated, and none may be missing: when the parts name the volume they were
cut from, their traces must add up to it, otherwise they must fill a regular
grid.

options:
  --out FILE       the joined volume (appears only when complete; a device,
                   FIFO, folder, symbolic link or one of the parts is refused)
  --follow-links   write at the target when --out is a symbolic link
  --quiet          print nothing on success
`
