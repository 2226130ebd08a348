package cli

import (
	"bufio"
	"encoding/json"
	"strings"
	"testing"
	"time"

	"quadtrace/app/export"
)

// Checks: --progress json writes one JSON object per line: the first report
// at once, then at most one per interval, the final count always, and a
// last line marked finished; rates and time left follow from the counts.
func TestJSONProgressLines(t *testing.T) {
	var b strings.Builder
	r := newReporter(progressJSON, &b, "envelope", 1000)
	for done := 100; done <= 1000; done += 100 {
		r.report(export.Progress{Done: done, Total: 1000, BytesDone: int64(done) * 1000, Elapsed: time.Duration(done) * time.Millisecond})
	}
	r.finish()
	var lines []progressLine
	sc := bufio.NewScanner(strings.NewReader(b.String()))
	for sc.Scan() {
		var l progressLine
		if err := json.Unmarshal(sc.Bytes(), &l); err != nil {
			t.Fatalf("line %q is not one JSON object: %v", sc.Text(), err)
		}
		lines = append(lines, l)
	}
	// Reports every 100 ms with a 200 ms interval: 100, 300, 500, 700, 900,
	// then 1000 (the end) and the finished line.
	wantDone := []int{100, 300, 500, 700, 900, 1000, 1000}
	if len(lines) != len(wantDone) {
		t.Fatalf("%d lines, want %d:\n%s", len(lines), len(wantDone), b.String())
	}
	for i, l := range lines {
		if l.Done != wantDone[i] || l.Total != 1000 || l.Description != "envelope" {
			t.Errorf("line %d: %+v, want done %d of 1000", i, l, wantDone[i])
		}
		if l.Finished != (i == len(lines)-1) {
			t.Errorf("line %d: finished %v", i, l.Finished)
		}
	}
	// 500 traces of 1000 bytes in 0.5 s: 1000 traces/s, 1 MB/s, 0.5 s left.
	if l := lines[2]; l.TracesPerS != 1000 || l.MBPerS != 1 || l.RemainingS != 0.5 {
		t.Errorf("rates at 500 traces: %+v", l)
	}
}

// Checks: the bar stays silent when stderr is not a terminal (a
// strings.Builder here), as the issue asks.
func TestBarQuietOffTerminal(t *testing.T) {
	var b strings.Builder
	r := newReporter(progressBar, &b, "envelope", 10)
	r.report(export.Progress{Done: 5, Total: 10, Elapsed: time.Second})
	r.finish()
	if b.Len() != 0 {
		t.Errorf("bar wrote %q to a non-terminal", b.String())
	}
}
