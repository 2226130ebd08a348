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
	"quadtrace/compute"
	"quadtrace/segy"
)

// Exit statuses of the commands.
const (
	exitOK          = 0
	exitFailed      = 1   // the job failed; the reason is on stderr
	exitUsage       = 2   // the command line is wrong
	exitInterrupted = 130 // SIGINT or SIGTERM: 128 + SIGINT, as shells report it (common practice)
)

// runtimeOverhead is the memory the export process needs beyond its trace
// block budget: the program and Go runtime, the FFT work buffers of the
// compute workers, the writers' buffers, the geometry index of the input,
// and the garbage of finished blocks not yet collected. Export sets the Go
// runtime's soft memory limit to budget + runtimeOverhead, and the
// collector's growth ratio to export.GCPercent, so that the process's peak resident
// memory stays below budget + runtimeOverhead (BenchmarkExportPeakMemory
// measures it on a 1.25 GB volume).
const runtimeOverhead = 64 << 20

// Export runs `quadtrace export` with args (after the sub-command name) and
// returns the exit status: 0 when every output was written, 1 when the job
// failed, 2 for a wrong command line, 130 when interrupted by SIGINT or
// SIGTERM (then nothing is left at the destinations). The written paths go
// to stdout, one a line; progress and errors go to stderr.
func Export(args []string, stdout, stderr io.Writer) int {
	a, err := parseExportArgs(args, stderr)
	if errors.Is(err, errHelp) {
		return exitOK
	}
	if err != nil {
		fmt.Fprintf(stderr, "quadtrace export: %v\n(see quadtrace export --help)\n", err)
		return exitUsage
	}
	var cond compute.Conditioning
	if a.condition != "" {
		if cond, err = compute.ParseConditioning(a.condition); err != nil {
			fmt.Fprintf(stderr, "quadtrace export: --condition: %v\n", err)
			return exitUsage
		}
	}
	job := export.Job{
		Input: a.input,
		SegyOptions: segy.Options{InlineByte: a.inlineByte, CrosslineByte: a.crosslineByte,
			ByteOrder: a.byteOrder},
		Attributes: a.attributes, Params: a.params, Conditioning: cond,
		Output: a.out, Format: a.format, Inlines: a.inlines, Crosslines: a.crosslines,
		BudgetBytes: a.budget, FollowLinks: a.followLinks,
	}

	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
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
		fmt.Fprintf(stderr, "quadtrace export: %v\n", err)
		return exitFailed
	}
	if !a.quiet {
		for _, p := range paths {
			fmt.Fprintln(stdout, p)
		}
	}
	return exitOK
}
