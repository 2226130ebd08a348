package export

import (
	"fmt"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"

	"quadtrace/app/version"
	"quadtrace/segy"
)

// headerFacts is what the textual header of an exported volume records.
type headerFacts struct {
	stage               stage
	cond                string
	input               string
	info                segy.Info
	inlines, crosslines *Range
	traces              int
	format              int
}

// textHeader writes the 40-line textual header of an exported volume in our
// own wording. Lines start with "C" and the line number, and line 40 reads
// "END TEXTUAL HEADER", as SEG-Y revision 1 (2002), section 3.1 asks (line
// 39 names the revision, "SEG Y REV1", the layout the segy writer uses).
//
// Lines 7 and 8 are records the join command reads back: the source volume
// (its name, trace count and numbering) and the part (the ranges exported).
// The source's own textual header follows, as many of its lines as fit.
func textHeader(f headerFacts) string {
	var body []string
	add := func(format string, a ...any) { body = append(body, fmt.Sprintf(format, a...)) }
	add("quadtrace %s attribute volume", version.Version)
	add("attribute: %s (%s)", f.stage.id, f.stage.name)
	params := f.stage.params
	if params == "" {
		params = "none"
	}
	for i, chunk := range wrapWords("parameters: "+params, 75) {
		if i < 3 {
			add("%s", chunk)
		}
	}
	cond := f.cond
	if cond == "" {
		cond = "none"
	}
	add("conditioning: %s", clip(cond, 60))
	add("source file: %s", clip(filepath.Base(f.input), 60))
	add("source: %d traces; inlines %s; crosslines %s", f.info.Traces, rangeRecord(f.info.Inline), rangeRecord(f.info.Crossline))
	add("part: inlines %s; crosslines %s; %d traces", f.inlines, f.crosslines, f.traces)
	add("samples: %d at %d us from %g ms; format %d", f.info.Samples, f.info.IntervalUS, f.info.StartMS, f.format)
	add("source textual header:")
	var src []string
	if len(f.info.TextHeaders) > 0 {
		src = strings.Split(f.info.TextHeaders[0], "\n")
	}
	for _, l := range src {
		if len(body) >= 38 {
			break
		}
		if strings.TrimSpace(l) == "" {
			continue
		}
		add("| %s", clip(strings.TrimRight(l, " "), 73))
	}
	for len(body) < 38 {
		add("")
	}
	body = append(body, "SEG Y REV1", "END TEXTUAL HEADER")
	var b strings.Builder
	for i, l := range body {
		line := fmt.Sprintf("C%2d %s", i+1, l)
		b.WriteString(clip(strings.TrimRight(line, " "), 80))
		if i < len(body)-1 {
			b.WriteByte('\n')
		}
	}
	return b.String()
}

// rangeRecord writes a numbering as MIN:MAX:STEP.
func rangeRecord(r segy.Range) string { return fmt.Sprintf("%d:%d:%d", r.Min, r.Max, r.Step) }

// clip cuts s to at most n bytes of printable ASCII (other bytes become '?',
// so the header survives the EBCDIC conversion).
func clip(s string, n int) string {
	b := []byte(s)
	for i, c := range b {
		if c < 0x20 || c > 0x7e {
			b[i] = '?'
		}
	}
	if len(b) > n {
		b = b[:n]
	}
	return string(b)
}

// wrapWords cuts s at spaces into lines of at most width bytes (a longer
// word is cut).
func wrapWords(s string, width int) []string {
	var lines []string
	line := ""
	for _, w := range strings.Fields(s) {
		switch {
		case line == "":
			line = w
		case len(line)+1+len(w) <= width:
			line += " " + w
		default:
			lines = append(lines, line)
			line = "  " + w
		}
		for len(line) > width {
			lines = append(lines, line[:width])
			line = "  " + line[width:]
		}
	}
	if line != "" {
		lines = append(lines, line)
	}
	return lines
}

// partRecord is what join reads back from lines "source file:", "source:"
// and "part:" of an exported volume's textual header.
type partRecord struct {
	attribute, params, cond   string // "attribute:", "parameters:" (wrapped lines joined), "conditioning:"
	sourceFile                string
	sourceTraces              int
	sourceInline, sourceXline segy.Range
	inlines, crosslines       *Range // nil: all
	traces                    int
}

var (
	reSourceFile = regexp.MustCompile(`(?m)^C\s*\d+ source file: (.*?)\s*$`)
	reSource     = regexp.MustCompile(`(?m)^C\s*\d+ source: (\d+) traces; inlines (-?\d+):(-?\d+):(-?\d+); crosslines (-?\d+):(-?\d+):(-?\d+)\s*$`)
	reAttribute  = regexp.MustCompile(`(?m)^C\s*\d+ attribute: (.*?)\s*$`)
	reParams     = regexp.MustCompile(`(?s)\nC\s*\d+ parameters: (.*?)\nC\s*\d+ conditioning: ([^\n]*)`)
	reCardStart  = regexp.MustCompile(`(?m)^C\s*\d+ `)
	rePart       = regexp.MustCompile(`(?m)^C\s*\d+ part: inlines (all|-?\d+:-?\d+); crosslines (all|-?\d+:-?\d+); (\d+) traces\s*$`)
)

// parsePartRecord reads the records of textHeader back; ok is false when
// the text holds none (a volume not written by the export).
func parsePartRecord(text string) (rec partRecord, ok bool) {
	f := reSourceFile.FindStringSubmatch(text)
	s := reSource.FindStringSubmatch(text)
	p := rePart.FindStringSubmatch(text)
	if f == nil || s == nil || p == nil {
		return rec, false
	}
	n := func(t string) int { v, _ := strconv.Atoi(t); return v }
	rec.sourceFile = f[1]
	rec.sourceTraces = n(s[1])
	rec.sourceInline = segy.Range{Min: n(s[2]), Max: n(s[3]), Step: n(s[4])}
	rec.sourceXline = segy.Range{Min: n(s[5]), Max: n(s[6]), Step: n(s[7])}
	rng := func(t string) (*Range, bool) {
		if t == "all" {
			return nil, true
		}
		r, err := ParseRange(t)
		return r, err == nil
	}
	var ok1, ok2 bool
	rec.inlines, ok1 = rng(p[1])
	rec.crosslines, ok2 = rng(p[2])
	rec.traces = n(p[3])
	if a := reAttribute.FindStringSubmatch(text); a != nil {
		rec.attribute = a[1]
	}
	if m := reParams.FindStringSubmatch(text); m != nil {
		rec.params = strings.Join(strings.Fields(reCardStart.ReplaceAllString(m[1], "")), " ")
		rec.cond = strings.TrimSpace(m[2])
	}
	return rec, ok1 && ok2
}
