// Package cli holds quadtrace's window-free commands: scan, attributes,
// export, join, figure and synth. Each command takes its arguments without
// the command name, writes results to stdout and errors to stderr, and
// returns the exit status (0 done, 1 failed, 2 wrong call).
package cli

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"strings"
	"syscall"

	"quadtrace/segy"
)

// segyFlags registers the header-location and byte-order overrides shared
// by every command that opens a SEG-Y file, and returns a function that
// reads them back as segy.Options once the flags are parsed.
func segyFlags(fs *flag.FlagSet) func() (segy.Options, error) {
	il := fs.Int("inline-byte", 0, "trace-header byte of the inline number (default 189)")
	xl := fs.Int("crossline-byte", 0, "trace-header byte of the crossline number (default 193)")
	off := fs.Int("offset-byte", 0, "trace-header byte of the offset (default 37)")
	cx := fs.Int("x-byte", 0, "trace-header byte of the CDP X coordinate (default 181)")
	cy := fs.Int("y-byte", 0, "trace-header byte of the CDP Y coordinate (default 185)")
	order := fs.String("byte-order", "", "byte order: big or little (default: detect)")
	return func() (segy.Options, error) {
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
		return segy.Options{InlineByte: *il, CrosslineByte: *xl, OffsetByte: *off, CDPXByte: *cx, CDPYByte: *cy, ByteOrder: *order}, nil
	}
}

// parseArgs parses flags that may stand before or after the positional
// arguments (Go's flag package stops at the first positional one) and
// returns the positional arguments in order.
func parseArgs(fs *flag.FlagSet, args []string) ([]string, error) {
	var pos []string
	for {
		if err := fs.Parse(args); err != nil {
			return nil, err
		}
		args = fs.Args()
		if len(args) == 0 {
			return pos, nil
		}
		pos = append(pos, args[0])
		args = args[1:]
	}
}

// scanReport is the JSON form of `quadtrace scan --json`: the keys are part
// of the command's contract for scripts.
type scanReport struct {
	File              string      `json:"file"`
	Revision          string      `json:"revision"`
	Format            int         `json:"format"`
	FormatName        string      `json:"format_name"`
	ByteOrder         string      `json:"byte_order"`
	Samples           int         `json:"samples"`
	IntervalUS        int         `json:"interval_us"`
	StartMS           float64     `json:"start_ms"`
	Traces            int         `json:"traces"`
	Layout            string      `json:"layout"`
	Inline            rangeReport `json:"inline"`
	Crossline         rangeReport `json:"crossline"`
	Offsets           []int       `json:"offsets"`
	MissingTraces     int         `json:"missing_traces"`
	DuplicateTraces   int         `json:"duplicate_traces"`
	InlineSpacingM    float64     `json:"bin_spacing_along_inline_m"`
	CrosslineSpacingM float64     `json:"bin_spacing_along_crossline_m"`
	Extent            [4]float64  `json:"coordinate_extent"`
	Amplitude         ampReport   `json:"amplitude"`
	Warnings          []string    `json:"warnings"`
	TextHeader        []string    `json:"text_header"`
}

type rangeReport struct {
	Min   int `json:"min"`
	Max   int `json:"max"`
	Step  int `json:"step"`
	Count int `json:"count"`
}

type ampReport struct {
	Min float64 `json:"min"`
	Max float64 `json:"max"`
	RMS float64 `json:"rms"`
}

func newScanReport(path string, in segy.Info) scanReport {
	r := func(g segy.Range) rangeReport { return rangeReport{g.Min, g.Max, g.Step, g.Count} }
	offsets := in.Offsets
	if offsets == nil {
		offsets = []int{}
	}
	warnings := in.Warnings
	if warnings == nil {
		warnings = []string{}
	}
	text := in.TextHeaders
	if text == nil {
		text = []string{}
	}
	return scanReport{
		File: path, Revision: in.Revision, Format: in.Format, FormatName: in.FormatName,
		ByteOrder: in.ByteOrder, Samples: in.Samples, IntervalUS: in.IntervalUS, StartMS: in.StartMS,
		Traces: in.Traces, Layout: string(in.Layout), Inline: r(in.Inline), Crossline: r(in.Crossline),
		Offsets: offsets, MissingTraces: in.MissingTraces, DuplicateTraces: in.DuplicateTraces,
		InlineSpacingM: in.InlineSpacingM, CrosslineSpacingM: in.CrosslineSpacingM,
		Extent:    [4]float64{in.MinX, in.MinY, in.MaxX, in.MaxY},
		Amplitude: ampReport{in.AmplitudeMin, in.AmplitudeMax, in.AmplitudeRMS},
		Warnings:  warnings, TextHeader: text,
	}
}

// Scan runs `quadtrace scan FILE [--json]`: it opens FILE read-only and
// prints what it holds.
func Scan(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("scan", flag.ContinueOnError)
	fs.SetOutput(stderr)
	asJSON := fs.Bool("json", false, "print one JSON object instead of text")
	options := segyFlags(fs)
	fs.Usage = func() {
		fmt.Fprintln(stderr, "usage: quadtrace scan FILE [--json] [--inline-byte N] [--crossline-byte N] [--offset-byte N] [--x-byte N] [--y-byte N] [--byte-order big|little]")
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
	opt, err := options()
	if err != nil {
		fmt.Fprintln(stderr, "quadtrace scan:", err)
		return 2
	}
	// SIGINT and SIGTERM stop the header scan of a large file.
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	f, err := segy.OpenContext(ctx, pos[0], opt)
	if ctx.Err() != nil {
		if f != nil {
			f.Close()
		}
		fmt.Fprintln(stderr, "quadtrace scan: interrupted")
		return exitInterrupted
	}
	if err != nil {
		fmt.Fprintln(stderr, "quadtrace scan:", err)
		return 1
	}
	defer f.Close()
	rep := newScanReport(pos[0], f.Info())
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		if err := enc.Encode(rep); err != nil {
			fmt.Fprintln(stderr, "quadtrace scan:", err)
			return 1
		}
		return 0
	}
	writeScanText(stdout, rep)
	return 0
}

// writeScanText prints the report for a person: facts first, the textual
// header last.
func writeScanText(w io.Writer, r scanReport) {
	p := func(label, format string, a ...any) {
		fmt.Fprintf(w, "%-22s "+format+"\n", append([]any{label + ":"}, a...)...)
	}
	p("file", "%s", r.File)
	p("SEG-Y revision", "%s", r.Revision)
	p("sample format", "%d (%s)", r.Format, r.FormatName)
	p("byte order", "%s-endian", r.ByteOrder)
	p("samples per trace", "%d", r.Samples)
	p("sample interval", "%g ms", float64(r.IntervalUS)/1000)
	p("first sample", "%g ms", r.StartMS)
	if r.Samples > 0 {
		p("last sample", "%g ms", r.StartMS+float64(r.Samples-1)*float64(r.IntervalUS)/1000)
	}
	p("traces", "%d", r.Traces)
	p("layout", "%s", r.Layout)
	rg := func(g rangeReport) string {
		if g.Count == 0 {
			return "none"
		}
		return fmt.Sprintf("%d to %d step %d (%d lines)", g.Min, g.Max, g.Step, g.Count)
	}
	p("inlines", "%s", rg(r.Inline))
	p("crosslines", "%s", rg(r.Crossline))
	if len(r.Offsets) > 1 {
		p("offsets", "%d: %v", len(r.Offsets), r.Offsets)
	}
	p("missing traces", "%d", r.MissingTraces)
	p("duplicate traces", "%d", r.DuplicateTraces)
	if r.InlineSpacingM > 0 || r.CrosslineSpacingM > 0 {
		p("bin spacing", "%.2f m along inline, %.2f m along crossline", r.InlineSpacingM, r.CrosslineSpacingM)
		p("coordinate extent", "X %.2f to %.2f, Y %.2f to %.2f", r.Extent[0], r.Extent[2], r.Extent[1], r.Extent[3])
	} else {
		p("coordinates", "none in the trace headers")
	}
	p("amplitude", "min %.6g, max %.6g, rms %.6g (from a sample of traces)", r.Amplitude.Min, r.Amplitude.Max, r.Amplitude.RMS)
	for _, warn := range r.Warnings {
		p("warning", "%s", warn)
	}
	for i, t := range r.TextHeader {
		if i == 0 {
			fmt.Fprintln(w, "\ntextual header:")
		} else {
			fmt.Fprintf(w, "\nextended textual header %d:\n", i)
		}
		for _, line := range strings.Split(strings.TrimRight(t, " \n"), "\n") {
			fmt.Fprintln(w, "  "+strings.TrimRight(line, " "))
		}
	}
}
