package cli

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"

	"quadtrace/app/export"
	"quadtrace/segy"
)

const joinAbout = `Concatenates SEG-Y volumes written by 'quadtrace export --inlines/--crosslines'
in the order given into one volume. The parts must share sample count,
interval, start time and sample format; no trace (inline, crossline) may be
repeated, and none may be missing: when the parts name the volume they were
cut from, their traces must add up to it, otherwise they must fill a regular
grid. FILE may not be one of the parts; it is written to a temporary file
and renamed into place when complete.`

// joinArgs is a parsed join command line.
type joinArgs struct {
	parts  []string
	out    string
	quiet  bool
	follow bool
	segy   segy.Options
}

// newJoinCommand declares the join command's options into a.
func newJoinCommand(a *joinArgs, stdout, stderr io.Writer) (*command, func(pos []string) error) {
	c := newCommand("join", "PART... --out FILE [options]", joinAbout, stdout, stderr)
	c.fs.StringVar(&a.out, "out", "", "the joined volume")
	c.fs.BoolVar(&a.quiet, "quiet", false, "print nothing on success")
	c.fs.BoolVar(&a.follow, "follow-links", false, "write at the target when --out is a symbolic link")
	c.segyFlags()
	return c, func(pos []string) error {
		if len(pos) == 0 {
			return errors.New("no PART given")
		}
		if a.out == "" {
			return errors.New("--out: no destination given")
		}
		a.parts = pos
		var err error
		a.segy, err = c.segy()
		return err
	}
}

// parseJoinArgs reads `join PART... --out FILE` (for tests).
func parseJoinArgs(args []string, stdout, stderr io.Writer) (*joinArgs, int, bool) {
	a, _, code, done := parseCommand(newJoinCommand, args, stdout, stderr)
	return a, code, done
}

// Join runs `quadtrace join PART... --out FILE` with args (after the
// sub-command name) and returns the exit status (0 joined, 1 failed, 2
// wrong command line, 130 interrupted). It checks the parts and
// concatenates their traces in the order given through the segy writer:
// see export.Join.
func Join(args []string, stdout, stderr io.Writer) int {
	a, c, code, done := parseCommand(newJoinCommand, args, stdout, stderr)
	if done {
		return code
	}
	if err := prepareOutput(a.out, a.follow, a.parts...); err != nil {
		return c.fail(a.out, err)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	n, err := export.Join(ctx, a.parts, a.out, export.JoinOptions{FollowLinks: a.follow, Segy: a.segy})
	if err != nil {
		if ctx.Err() != nil {
			fmt.Fprintln(stderr, "quadtrace join: interrupted; nothing written")
			return exitInterrupted
		}
		return c.fail("", err)
	}
	if !a.quiet {
		fmt.Fprintf(stdout, "%s\n", a.out)
		fmt.Fprintf(stderr, "quadtrace join: %d traces from %d parts\n", n, len(a.parts))
	}
	return exitOK
}
