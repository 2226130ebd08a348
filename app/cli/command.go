package cli

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"io/fs"
	"os"
	"os/signal"
	"strings"
	"syscall"

	"quadtrace/compute"
	"quadtrace/segy"
)

// Exit statuses of every command (the `go` command's convention: 0 done, 1
// failed, 2 wrong call; 130 is 128 + SIGINT, as shells report an
// interrupted process, common practice).
const (
	exitOK          = 0
	exitFailed      = 1
	exitUsage       = 2
	exitInterrupted = 130
)

// command is the one toolkit every quadtrace command is built with: a flag
// set whose flags may stand before or after the positional arguments, help
// on stdout with exit 0, usage errors on stderr with one line pointing at
// --help and exit 2, and failures as one line `quadtrace NAME: FILE: ...`
// with exit 1.
type command struct {
	name     string
	synopsis string // what follows "quadtrace NAME" in the usage line
	about    string // a paragraph saying what the command does
	fs       *flag.FlagSet
	stdout   io.Writer
	stderr   io.Writer
	segy     func() (segy.Options, error) // set by segyFlags
}

// newCommand starts a command's flag set.
func newCommand(name, synopsis, about string, stdout, stderr io.Writer) *command {
	fs := flag.NewFlagSet(name, flag.ContinueOnError)
	fs.SetOutput(io.Discard)
	return &command{name: name, synopsis: synopsis, about: about, fs: fs, stdout: stdout, stderr: stderr}
}

// help prints the usage, the description and every option to stdout.
func (c *command) help() {
	fmt.Fprintf(c.stdout, "usage: quadtrace %s %s\n\n%s\n", c.name, c.synopsis, strings.TrimSpace(c.about))
	n := 0
	c.fs.VisitAll(func(*flag.Flag) { n++ })
	if n > 0 {
		fmt.Fprintln(c.stdout, "\noptions:")
		c.fs.SetOutput(c.stdout)
		c.fs.PrintDefaults()
		c.fs.SetOutput(io.Discard)
	}
}

// parse reads args. It returns the positional arguments in order and
// done == false to go on; done == true means help was printed (code 0) or
// the call was wrong (code 2, reported).
func (c *command) parse(args []string) (pos []string, code int, done bool) {
	for {
		if err := c.fs.Parse(args); err != nil {
			if errors.Is(err, flag.ErrHelp) {
				c.help()
				return nil, exitOK, true
			}
			return nil, c.usage("%s", c.flagError(err)), true
		}
		rest := c.fs.Args()
		if len(rest) == 0 {
			return pos, 0, false
		}
		if rest[0] == "--" {
			return append(pos, rest[1:]...), 0, false
		}
		pos = append(pos, rest[0])
		args = rest[1:]
	}
}

// flagError rewrites the flag package's message for an unknown option into
// ours, with the nearest option suggested.
func (c *command) flagError(err error) string {
	msg := err.Error()
	if name, ok := strings.CutPrefix(msg, "flag provided but not defined: -"); ok {
		var names []string
		c.fs.VisitAll(func(f *flag.Flag) { names = append(names, f.Name) })
		if near, ok := compute.Nearest(name, names); ok {
			return fmt.Sprintf("unknown option --%s (did you mean --%s?)", name, near)
		}
		return fmt.Sprintf("unknown option --%s", name)
	}
	return msg
}

// usage reports a wrong call: what is wrong, then one line pointing at
// --help. It returns exitUsage.
func (c *command) usage(format string, a ...any) int {
	fmt.Fprintf(c.stderr, "quadtrace %s: %s\nRun 'quadtrace %s --help' for usage.\n", c.name, c.trim(fmt.Sprintf(format, a...)), c.name)
	return exitUsage
}

// fail reports a failed job as one line `quadtrace NAME: FILE: reason`
// and returns exitFailed. file may be ""; a reason that already starts
// with the file's name, or is an *fs.PathError about it, is not prefixed
// twice.
func (c *command) fail(file string, err error) int {
	fmt.Fprintln(c.stderr, c.failure(file, err))
	return exitFailed
}

// trim drops a leading "NAME: " that a lower layer put on its message, so
// the command's name is not printed twice.
func (c *command) trim(msg string) string {
	return strings.TrimPrefix(msg, c.name+": ")
}

// end ends the command with err: a usage error when code is exitUsage,
// otherwise a failure naming no file.
func (c *command) end(code int, err error) int {
	if code == exitUsage {
		return c.usage("%v", err)
	}
	return c.fail("", err)
}

func (c *command) failure(file string, err error) string {
	msg := c.trim(err.Error())
	var pe *fs.PathError
	if errors.As(err, &pe) && (file == "" || pe.Path == file) && msg == pe.Error() {
		file, msg = pe.Path, pe.Op+": "+pe.Err.Error()
	}
	if file != "" {
		if !strings.HasPrefix(msg, file+":") && !strings.HasPrefix(msg, file+" ") {
			msg = file + ": " + msg
		}
	}
	return "quadtrace " + c.name + ": " + msg
}

// segyFlags registers the header-location, byte-order and partial-trace
// options shared by every command that opens a SEG-Y file; c.segy reads
// them back once the flags are parsed.
func (c *command) segyFlags() {
	fs := c.fs
	il := fs.Int("inline-byte", 0, "trace-header byte of the inline number (default 189)")
	xl := fs.Int("crossline-byte", 0, "trace-header byte of the crossline number (default 193)")
	off := fs.Int("offset-byte", 0, "trace-header byte of the offset (default 37)")
	cx := fs.Int("x-byte", 0, "trace-header byte of the CDP X coordinate (default 181)")
	cy := fs.Int("y-byte", 0, "trace-header byte of the CDP Y coordinate (default 185)")
	order := fs.String("byte-order", "", "byte order: big or little (default: detect)")
	partial := fs.Bool("ignore-partial-trace", false, "open a file whose last trace is cut short, ignoring that trace")
	c.segy = func() (segy.Options, error) {
		switch *order {
		case "", "big", "little":
		default:
			return segy.Options{}, fmt.Errorf("--byte-order %q: want big or little", *order)
		}
		for _, b := range []struct {
			name string
			v    int
		}{{"inline-byte", *il}, {"crossline-byte", *xl}, {"offset-byte", *off}, {"x-byte", *cx}, {"y-byte", *cy}} {
			if b.v != 0 && (b.v < 1 || b.v > 237) {
				return segy.Options{}, fmt.Errorf("--%s %d: a 4-byte field starts at byte 1 to 237 of the 240-byte trace header", b.name, b.v)
			}
		}
		return segy.Options{InlineByte: *il, CrosslineByte: *xl, OffsetByte: *off, CDPXByte: *cx, CDPYByte: *cy,
			ByteOrder: *order, IgnorePartialTrace: *partial}, nil
	}
}

// openOne parses args of a command that takes one SEG-Y FILE and opens it
// read-only with the SEG-Y options given. done means the command has
// finished (help, a usage error or a failure, reported) with code.
func (c *command) openOne(args []string) (f *segy.File, code int, done bool) {
	pos, code, done := c.parse(args)
	if done {
		return nil, code, true
	}
	if len(pos) != 1 {
		return nil, c.usage("want one FILE, got %d arguments", len(pos)), true
	}
	opt, err := c.segy()
	if err != nil {
		return nil, c.usage("%v", err), true
	}
	// SIGINT and SIGTERM stop the header scan of a large file.
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	f, err = segy.OpenContext(ctx, pos[0], opt)
	if ctx.Err() != nil {
		if f != nil {
			f.Close()
		}
		fmt.Fprintf(c.stderr, "quadtrace %s: interrupted\n", c.name)
		return nil, exitInterrupted, true
	}
	if err != nil {
		return nil, c.fail(pos[0], err), true
	}
	return f, exitOK, false
}

// parseCommand builds a command with build, parses args and completes the
// arguments (build's second result). done means help was printed or a
// usage error reported, with code.
func parseCommand[A any](build func(*A, io.Writer, io.Writer) (*command, func([]string) error), args []string, stdout, stderr io.Writer) (a *A, c *command, code int, done bool) {
	a = new(A)
	c, finish := build(a, stdout, stderr)
	pos, code, done := c.parse(args)
	if done {
		return nil, c, code, true
	}
	if err := finish(pos); err != nil {
		return nil, c, c.usage("%v", err), true
	}
	return a, c, exitOK, false
}

// multiFlag collects a repeatable string flag.
type multiFlag []string

func (m *multiFlag) String() string     { return strings.Join(*m, ",") }
func (m *multiFlag) Set(s string) error { *m = append(*m, s); return nil }

// lookupAttribute finds an attribute for a command-line option; an unknown
// id is refused with the nearest one suggested (compute.Lookup).
func lookupAttribute(option, id string) (*compute.Attribute, error) {
	a, err := compute.Lookup(id)
	if err != nil {
		return nil, fmt.Errorf("--%s: %w (see 'quadtrace attributes')", option, err)
	}
	return a, nil
}
