package cli

import (
	"encoding/json"
	"fmt"
	"io"
	"os"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"

	"quadtrace/app/export"
)

// progressMode names how the export command reports progress.
type progressMode string

const (
	progressBar  progressMode = "bar"  // a bar on the terminal, nothing when stderr is not one
	progressJSON progressMode = "json" // one JSON object per line on stderr
	progressNone progressMode = "none"
)

// progressLine is the JSON object written once per line in --progress json
// mode. Rates and time left are zero until they can be estimated.
type progressLine struct {
	Done        int     `json:"done"`
	Total       int     `json:"total"`
	BytesDone   int64   `json:"bytes_done"`
	ElapsedS    float64 `json:"elapsed_s"`
	TracesPerS  float64 `json:"traces_per_s"`
	MBPerS      float64 `json:"mb_per_s"`
	RemainingS  float64 `json:"remaining_s"`
	Finished    bool    `json:"finished"`
	Description string  `json:"what"`
}

// reporter turns Progress values into what the user sees.
type reporter interface {
	report(export.Progress)
	finish()
}

// newReporter builds the reporter for mode writing to w. The bar is shown
// only when w is a terminal.
func newReporter(mode progressMode, w io.Writer, description string, total int) reporter {
	switch mode {
	case progressJSON:
		return &jsonReporter{enc: json.NewEncoder(w), what: description, every: 200 * time.Millisecond}
	case progressBar:
		if isTerminal(w) {
			return newBarReporter(w, description, total)
		}
	}
	return noReporter{}
}

// isTerminal reports whether w is a file open on a terminal.
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	return ok && term.IsTerminal(int(f.Fd()))
}

type noReporter struct{}

func (noReporter) report(export.Progress) {}
func (noReporter) finish()                {}

// jsonReporter writes a progressLine at most every `every`, plus the first
// and the last one.
type jsonReporter struct {
	enc   *json.Encoder
	what  string
	every time.Duration
	last  time.Duration
	sent  bool
	final export.Progress
}

func (r *jsonReporter) report(p export.Progress) {
	r.final = p
	if r.sent && p.Elapsed-r.last < r.every && p.Done < p.Total {
		return
	}
	r.write(p, false)
}

func (r *jsonReporter) write(p export.Progress, finished bool) {
	r.sent, r.last = true, p.Elapsed
	l := progressLine{Done: p.Done, Total: p.Total, BytesDone: p.BytesDone, ElapsedS: p.Elapsed.Seconds(), Finished: finished, Description: r.what}
	if s := p.Elapsed.Seconds(); s > 0 && p.Done > 0 {
		l.TracesPerS = float64(p.Done) / s
		l.MBPerS = float64(p.BytesDone) / 1e6 / s
		l.RemainingS = float64(p.Total-p.Done) / l.TracesPerS
	}
	_ = r.enc.Encode(l) // progress is advisory: a closed pipe must not stop the export
}

func (r *jsonReporter) finish() {
	if r.final.Done == r.final.Total && r.final.Total > 0 {
		r.write(r.final, true)
	}
}

// barReporter draws a progressbar/v3 bar: traces done of total, traces per
// second, input MB/s and the predicted time left.
type barReporter struct {
	bar *progressbar.ProgressBar
	w   io.Writer
}

func newBarReporter(w io.Writer, description string, total int) *barReporter {
	bar := progressbar.NewOptions(total,
		progressbar.OptionSetWriter(w),
		progressbar.OptionSetDescription(description),
		progressbar.OptionShowCount(),
		progressbar.OptionShowIts(),
		progressbar.OptionSetItsString("traces"),
		progressbar.OptionSetPredictTime(true),
		progressbar.OptionSetElapsedTime(true),
		progressbar.OptionThrottle(100*time.Millisecond),
		progressbar.OptionSetWidth(30),
		progressbar.OptionShowDescriptionAtLineEnd(),
	)
	return &barReporter{bar: bar, w: w}
}

func (r *barReporter) report(p export.Progress) {
	if s := p.Elapsed.Seconds(); s > 0 {
		r.bar.Describe(fmt.Sprintf("%.0f MB/s", float64(p.BytesDone)/1e6/s))
	}
	_ = r.bar.Set(p.Done)
}

func (r *barReporter) finish() {
	_ = r.bar.Finish()
	fmt.Fprintln(r.w)
}
