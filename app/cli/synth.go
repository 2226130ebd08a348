package cli

import (
	"context"
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
	c := newCommand("synth", "OUT.sgy [options]", `Generates the invented demo survey (Corrowdeep 3D, Halvane Basin) and writes
it as a SEG-Y revision 1 file. The same seed gives the same survey.`, stdout, stderr)
	fs := c.fs
	fs.IntVar(&cfg.Inlines, "inlines", cfg.Inlines, "number of inlines")
	fs.IntVar(&cfg.Crosslines, "crosslines", cfg.Crosslines, "number of crosslines")
	fs.IntVar(&cfg.Samples, "samples", cfg.Samples, "samples per trace")
	intervalMS := fs.Float64("interval", float64(cfg.IntervalUS)/1000, "sample interval in ms (2 or 4)")
	fs.Float64Var(&cfg.Noise, "noise", cfg.Noise, "noise level relative to the signal's RMS")
	fs.Int64Var(&cfg.Seed, "seed", cfg.Seed, "random seed (the same seed gives the same survey)")
	format := fs.String("format", "ieee", "sample format: ieee (format 5) or ibm (format 1)")
	repeat := fs.Int("repeat", 1, "write the survey's inlines this many times, inline numbers continuing\n(large test files; memory holds one copy)")
	pos, code, done := c.parse(args)
	if done {
		return code
	}
	if len(pos) != 1 {
		return c.usage("want one OUT.sgy, got %d arguments", len(pos))
	}
	out := pos[0]
	cfg.IntervalUS = int(*intervalMS*1000 + 0.5)
	if err := cfg.Validate(); err != nil {
		return c.usage("%v", err)
	}
	if *repeat < 1 {
		return c.usage("--repeat %d: want at least 1", *repeat)
	}
	f, err := parseFormat(*format)
	if err != nil {
		return c.usage("%v", err)
	}
	if err := prepareOutput(out, false); err != nil {
		return c.fail(out, err)
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	s, err := synth.Generate(ctx, cfg, nil)
	if err != nil {
		return c.fail("", err)
	}
	if err := volume.WriteSurveyRepeated(ctx, out, s, segy.WriteOptions{Format: f}, *repeat); err != nil {
		return c.fail(out, err)
	}
	fmt.Fprintf(stdout, "%s: %d inlines x %d crosslines x %d samples at %g ms (%s, %s)\n",
		out, *repeat*cfg.Inlines, cfg.Crosslines, cfg.Samples, float64(cfg.IntervalUS)/1000, s.Name, s.Basin)
	return exitOK
}
