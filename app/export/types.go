package export

import (
	"fmt"
	"strconv"
	"strings"
	"time"
)

// Range is an inclusive range of inline or crossline numbers, First <= Last.
type Range struct{ First, Last int }

// contains reports whether n lies in the range; a nil range holds every number.
func (r *Range) contains(n int) bool { return r == nil || (n >= r.First && n <= r.Last) }

// String writes the range as FIRST:LAST, the form the command line takes.
func (r *Range) String() string {
	if r == nil {
		return "all"
	}
	return fmt.Sprintf("%d:%d", r.First, r.Last)
}

// Progress reports how far an export has gone. Done and Total count traces
// of the selection written to every output; BytesDone counts the input bytes
// (trace headers and samples as stored in the input file) of the Done traces.
type Progress struct {
	Done, Total int
	BytesDone   int64
	Elapsed     time.Duration
}

// selectRuns lists, as runs in file order, the traces among n whose inline
// and crossline (from key) lie in the ranges. With both ranges nil it is the
// whole file without reading a header.
func selectRuns(n int, inlines, crosslines *Range, key func(i int) (inline, crossline int, err error)) ([]traceRun, error) {
	if inlines == nil && crosslines == nil {
		if n == 0 {
			return nil, errNoTraces
		}
		return []traceRun{{0, n}}, nil
	}
	var runs []traceRun
	for i := range n {
		il, xl, err := key(i)
		if err != nil {
			return nil, err
		}
		if !inlines.contains(il) || !crosslines.contains(xl) {
			continue
		}
		if k := len(runs) - 1; k >= 0 && runs[k].First+runs[k].Count == i {
			runs[k].Count++
		} else {
			runs = append(runs, traceRun{i, 1})
		}
	}
	if len(runs) == 0 {
		return nil, fmt.Errorf("%w: no trace has inline in %s and crossline in %s", errNoTraces, inlines, crosslines)
	}
	return runs, nil
}

// ParseRange reads an inclusive range "A:B" of inline or crossline numbers.
// A single number "A" is the range A:A.
func ParseRange(s string) (*Range, error) {
	a, b, found := strings.Cut(strings.TrimSpace(s), ":")
	first, err := strconv.Atoi(strings.TrimSpace(a))
	if err != nil {
		return nil, fmt.Errorf("range %q: want FIRST:LAST, two whole numbers", s)
	}
	last := first
	if found {
		if last, err = strconv.Atoi(strings.TrimSpace(b)); err != nil {
			return nil, fmt.Errorf("range %q: want FIRST:LAST, two whole numbers", s)
		}
	}
	if last < first {
		return nil, fmt.Errorf("range %q: last %d is before first %d", s, last, first)
	}
	return &Range{First: first, Last: last}, nil
}
