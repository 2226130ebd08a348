package cli

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"runtime/debug"
	"strings"
	"syscall"

	"quadtrace/app/export"
	"quadtrace/app/indexcache"
	"quadtrace/compute"
	"quadtrace/segy"
)

// runtimeOverhead is the memory the export process needs beyond its trace
// block budget: the program and Go runtime, the FFT work buffers of the
// compute workers, the writers' buffers, the geometry index of the input,
// and the garbage of finished blocks not yet collected. Export sets the Go
// runtime's soft memory limit to budget + runtimeOverhead, and the
// collector's growth ratio to export.GCPercent, so that the process's peak
// resident memory stays below budget + runtimeOverhead
// (BenchmarkExportPeakMemory measures it on a 1.25 GB volume).
const runtimeOverhead = 64 << 20

const exportAbout = `Computes attributes for every trace of the SEG-Y volume FILE and writes one
SEG-Y volume per attribute: PATH is the file for one attribute, the folder for
several (files named <FILE stem>-<ID>.sgy; folders are made as needed). Memory
stays within the budget whatever the size of FILE. The written paths are
printed on stdout; an output that is the input is refused, and existing
outputs are replaced only when the new ones are complete.`

// exportArgs is the export command line as read, before the input file is
// opened. Flags may come before or after FILE.
type exportArgs struct {
	input      string
	attributes []string
	params     map[string]string
	condition  string
	out        string
	format     int
	inlines    *export.Range
	crosslines *export.Range
	budget     int64
	progress   progressMode
	quiet      bool // --quiet: no progress, no list of written paths
	follow     bool // --follow-links: write at the target of a symbolic link --out
	segy       segy.Options
}

// newExportCommand declares the export command's options into a and
// returns the command and a function that checks and completes a once
// the flags are parsed.
func newExportCommand(a *exportArgs, stdout, stderr io.Writer) (*command, func(pos []string) error) {
	c := newCommand("export", "FILE --attribute ID[,ID...] --out PATH [options]", exportAbout, stdout, stderr)
	fs := c.fs
	var (
		attrs, params                     multiFlag
		format, inl, xl, budget, progress string
		quiet                             bool
	)
	fs.Var(&attrs, "attribute", "attribute ids, comma-separated (see 'quadtrace attributes'); repeatable")
	fs.Var(&params, "param", "set a parameter NAME=VALUE of every chosen attribute that has it; repeatable")
	fs.StringVar(&a.condition, "condition", "", "conditioning before the attributes: bandpass=LOW-HIGH (Hz), agc=WINDOW (ms), comma-separated")
	fs.StringVar(&a.out, "out", "", "destination file (one attribute) or folder (several)")
	fs.StringVar(&format, "format", "ieee", "sample format of the outputs: ieee (code 5) or ibm (code 1)")
	fs.StringVar(&inl, "inlines", "", "export only inlines `A:B` (inclusive)")
	fs.StringVar(&xl, "crosslines", "", "export only crosslines `A:B` (inclusive)")
	fs.StringVar(&budget, "budget", "", "memory for trace blocks, e.g. 256M or 1G (default 256M)")
	fs.StringVar(&progress, "progress", "", "progress on stderr: bar, json or none (default bar, shown only on a terminal)")
	fs.BoolVar(&quiet, "quiet", false, "no progress and no list of written paths (same as --progress none)")
	fs.BoolVar(&a.follow, "follow-links", false, "write at the target when --out is a symbolic link")
	c.segyFlags()
	return c, func(pos []string) error {
		switch len(pos) {
		case 0:
			return errors.New("no input FILE given")
		case 1:
			a.input = pos[0]
		default:
			return fmt.Errorf("one input FILE expected, got %d: %s", len(pos), strings.Join(pos, " "))
		}
		for _, s := range attrs {
			for id := range strings.SplitSeq(s, ",") {
				if id = strings.TrimSpace(id); id != "" {
					a.attributes = append(a.attributes, id)
				}
			}
		}
		if len(a.attributes) == 0 {
			return errors.New("--attribute: no attribute id given")
		}
		var err error
		if a.params, err = compute.ParseParams(params); err != nil {
			return fmt.Errorf("--param: %w", err)
		}
		if a.out == "" {
			return errors.New("--out: no destination given")
		}
		if a.format, err = parseFormat(format); err != nil {
			return err
		}
		if inl != "" {
			if a.inlines, err = export.ParseRange(inl); err != nil {
				return fmt.Errorf("--inlines: %w", err)
			}
		}
		if xl != "" {
			if a.crosslines, err = export.ParseRange(xl); err != nil {
				return fmt.Errorf("--crosslines: %w", err)
			}
		}
		a.budget = export.DefaultBudget
		if budget != "" {
			if a.budget, err = parseBytes(budget); err != nil {
				return fmt.Errorf("--budget: %w", err)
			}
		}
		switch {
		case quiet && progress != "" && progress != string(progressNone):
			return fmt.Errorf("--quiet and --progress %s contradict each other", progress)
		case quiet:
			a.progress, a.quiet = progressNone, true
		case progress == "":
			a.progress = progressBar
		default:
			switch m := progressMode(progress); m {
			case progressBar, progressJSON, progressNone:
				a.progress = m
			default:
				return fmt.Errorf("--progress %q: want bar, json or none", progress)
			}
		}
		a.segy, err = c.segy()
		return err
	}
}

// parseExportArgs reads the export command line (for tests). done
// reports help or a reported usage error.
func parseExportArgs(args []string, stdout, stderr io.Writer) (*exportArgs, int, bool) {
	a, _, code, done := parseCommand(newExportCommand, args, stdout, stderr)
	return a, code, done
}

// parseFormat maps ieee/ibm (or the SEG-Y format codes 5 and 1) to the code.
func parseFormat(s string) (int, error) {
	switch strings.ToLower(strings.TrimSpace(s)) {
	case "ieee", "5":
		return 5, nil
	case "ibm", "1":
		return 1, nil
	}
	return 0, fmt.Errorf("--format %q: want ieee (SEG-Y format code 5) or ibm (code 1)", s)
}

// Export runs `quadtrace export` with args (after the sub-command name) and
// returns the exit status: 0 when every output was written, 1 when the job
// failed, 2 for a wrong command line (unknown attribute ids and parameter
// names included), 130 when interrupted by SIGINT or SIGTERM (then nothing
// is left at the destinations). The written paths go to stdout, one a
// line; progress and errors go to stderr.
func Export(args []string, stdout, stderr io.Writer) int {
	// Signals are caught from the start, so that one sent while the
	// arguments are checked or the input is opened still ends the export
	// with status 130 and nothing written.
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	a, c, code, done := parseCommand(newExportCommand, args, stdout, stderr)
	if done {
		return code
	}
	attrs := make([]*compute.Attribute, len(a.attributes))
	for i, id := range a.attributes {
		var err error
		if attrs[i], err = lookupAttribute("attribute", id); err != nil {
			return c.usage("%v", err)
		}
	}
	if _, err := compute.ResolveAll(attrs, a.params); err != nil {
		return c.usage("--param: %v", err)
	}
	var cond compute.Conditioning
	if a.condition != "" {
		var err error
		if cond, err = compute.ParseConditioning(a.condition); err != nil {
			return c.usage("--condition: %v", err)
		}
	}
	if err := prepareExportOutput(a.out, len(a.attributes), a.input, a.follow); err != nil {
		return c.fail(a.input, err)
	}
	job := export.Job{
		Input: a.input, SegyOptions: a.segy,
		Attributes: a.attributes, Params: a.params, Conditioning: cond,
		Output: a.out, Format: a.format, Inlines: a.inlines, Crosslines: a.crosslines,
		BudgetBytes: a.budget, FollowLinks: a.follow,
		IndexCache: indexcache.Default(), // a second export of the same file reads no header before the traces
	}

	// The process is the export's own: bound its heap by the budget unless
	// the user tuned the runtime through the environment.
	if _, set := os.LookupEnv("GOMEMLIMIT"); !set {
		defer debug.SetMemoryLimit(debug.SetMemoryLimit(a.budget + runtimeOverhead))
	}
	if _, set := os.LookupEnv("GOGC"); !set {
		defer debug.SetGCPercent(debug.SetGCPercent(export.GCPercent))
	}
	// Only the CPUs a scheduler granted: Slurm's SLURM_CPUS_PER_TASK besides
	// the affinity and CPU quota Go follows itself.
	restoreCPUs, err := export.LimitCPUs(os.Getenv)
	if err != nil {
		fmt.Fprintf(stderr, "quadtrace export: %v\n", err)
		return exitUsage
	}
	defer restoreCPUs()

	var bar reporter
	paths, err := export.Run(ctx, job, func(p export.Progress) {
		if bar == nil { // the total is known once the input is open
			bar = newReporter(a.progress, stderr, strings.Join(a.attributes, ","), p.Total)
		}
		bar.report(p)
	})
	if bar != nil {
		bar.finish()
	}
	if err != nil {
		if ctx.Err() != nil {
			fmt.Fprintln(stderr, "quadtrace export: interrupted; nothing written, destinations left as they were")
			return exitInterrupted
		}
		return c.fail(a.input, err)
	}
	if !a.quiet {
		for _, p := range paths {
			fmt.Fprintln(stdout, p)
		}
	}
	return exitOK
}

// prepareExportOutput checks --out before the export starts: a single
// attribute's file goes through prepareOutput; a folder output (several
// attributes, or an existing folder) is checked file by file by the job,
// which names the files inside it (app/outfile makes the folder).
func prepareExportOutput(out string, attributes int, input string, follow bool) error {
	if st, err := os.Stat(out); (err == nil && st.IsDir()) || attributes > 1 {
		return nil
	}
	return prepareOutput(out, follow, input)
}
