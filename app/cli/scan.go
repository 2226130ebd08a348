// Package cli holds quadtrace's window-free commands: scan, attributes,
// export, join, figure and synth. Each command takes its arguments without
// the command name, writes results to stdout and errors to stderr, and
// returns the exit status (0 done, 1 failed, 2 wrong call).
package cli

import (
	"encoding/json"
	"fmt"
	"io"
	"strings"

	"quadtrace/segy"
)

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
	c := newCommand("scan", "FILE [--json] [options]", `Opens the SEG-Y file FILE read-only and says what it holds: revision, sample
format, byte order, sampling, geometry (inlines, crosslines, offsets, missing
and duplicate traces, bin spacing, coordinate extent), amplitudes from a
sample of traces, warnings, and the textual header.`, stdout, stderr)
	asJSON := c.fs.Bool("json", false, "print one JSON object instead of text")
	c.segyFlags()
	f, code, done := c.openOne(args)
	if done {
		return code
	}
	defer f.Close()
	rep := newScanReport(f.Path(), f.Info())
	if *asJSON {
		enc := json.NewEncoder(stdout)
		enc.SetIndent("", "  ")
		if err := enc.Encode(rep); err != nil {
			return c.fail("", err)
		}
		return exitOK
	}
	writeScanText(stdout, rep)
	return exitOK
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
