package cli

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"

	"quadtrace/app/volume"
	"quadtrace/compute/synth"
	"quadtrace/segy"
)

// Synth runs `quadtrace synth OUT.sgy [--inlines N --crosslines N --samples
// N --interval MS --noise X --seed S] [--format ieee|ibm]`: it generates the
// demo survey and writes it as a SEG-Y revision 1 file through the segy
// writer (temporary file renamed into place when complete).
func Synth(args []string, stdout, stderr io.Writer) int {
	cfg := synth.DefaultConfig()
	fs := flag.NewFlagSet("synth", flag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.IntVar(&cfg.Inlines, "inlines", cfg.Inlines, "number of inlines")
	fs.IntVar(&cfg.Crosslines, "crosslines", cfg.Crosslines, "number of crosslines")
	fs.IntVar(&cfg.Samples, "samples", cfg.Samples, "samples per trace")
	intervalMS := fs.Float64("interval", float64(cfg.IntervalUS)/1000, "sample interval in ms (2 or 4)")
	fs.Float64Var(&cfg.Noise, "noise", cfg.Noise, "noise level relative to the signal's RMS")
	fs.Int64Var(&cfg.Seed, "seed", cfg.Seed, "random seed (the same seed gives the same survey)")
	format := fs.String("format", "ieee", "sample format: ieee (format 5) or ibm (format 1)")
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: quadtrace synth OUT.sgy [--inlines N] [--crosslines N] [--samples N] [--interval MS] [--noise X] [--seed S] [--format ieee|ibm]")
		fs.PrintDefaults()
	}
	pos, err := parseArgs(fs, args)
	if err != nil {
		return 2
	}
	if len(pos) != 1 {
		fs.Usage()
		return 2
	}
	fail := func(code int, err error) int {
		fmt.Fprintln(stderr, "quadtrace synth:", err)
		return code
	}
	cfg.IntervalUS = int(*intervalMS*1000 + 0.5)
	if err := cfg.Validate(); err != nil {
		return fail(2, err)
	}
	wopt, err := formatOption(*format)
	if err != nil {
		return fail(2, err)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	s, err := synth.Generate(ctx, cfg, nil)
	if err != nil {
		return fail(1, err)
	}
	if err := volume.WriteSurvey(ctx, pos[0], s, wopt); err != nil {
		return fail(1, err)
	}
	fmt.Fprintf(stdout, "%s: %d inlines x %d crosslines x %d samples at %g ms (%s, %s)\n",
		pos[0], cfg.Inlines, cfg.Crosslines, cfg.Samples, float64(cfg.IntervalUS)/1000, s.Name, s.Basin)
	return 0
}

// formatOption maps a --format word to the writer's options.
func formatOption(word string) (segy.WriteOptions, error) {
	switch word {
	case "ieee":
		return segy.WriteOptions{Format: 5}, nil
	case "ibm":
		return segy.WriteOptions{Format: 1}, nil
	}
	return segy.WriteOptions{}, fmt.Errorf("--format %q: want ieee or ibm", word)
}
