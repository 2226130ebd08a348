package export

import (
	"context"
	"errors"
	"fmt"
	"os"
	"slices"
	"strings"

	"quadtrace/app/outfile"
	"quadtrace/segy"
)

// joinPart is one open part of a join.
type joinPart struct {
	path string
	fh   *os.File
	f    *segy.File
	info segy.Info
	rec  partRecord
	has  bool // rec was found in the textual header
}

// Join checks the parts and writes their traces, in the order given, to out
// through the segy writer (a temporary file renamed into place when
// complete; out is refused when it is one of the parts). It returns the
// number of traces written.
//
// The checks: every part has the sample count, interval, start time and
// sample format of the first; no (inline, crossline) occurs twice, within a
// part or across parts; and no trace is missing. Missing is decided from
// the records the export writes in the textual header ("source:" and
// "part:" lines): when every part comes from the same source volume and
// their traces add up to its trace count, the parts hold the whole source.
// Otherwise the parts must fill the regular grid spanned by their inline
// and crossline numbers (steps from the numbering), and the first hole is
// reported.
func Join(ctx context.Context, paths []string, out string, opt JoinOptions) (int, error) {
	if len(paths) == 0 {
		return 0, errors.New("no part given")
	}
	for _, p := range paths {
		if SameFile(out, p) {
			return 0, fmt.Errorf("refusing to write %s: it is one of the parts", out)
		}
	}
	parts := make([]*joinPart, 0, len(paths))
	defer func() {
		for _, p := range parts {
			p.f.Close()
			p.fh.Close()
		}
	}()
	for _, path := range paths {
		if err := ctx.Err(); err != nil {
			return 0, err
		}
		fh, err := segy.OpenRegular(path) // refuses FIFOs, devices, folders without blocking
		if err != nil {
			return 0, err
		}
		st, err := fh.Stat()
		if err != nil {
			fh.Close()
			return 0, err
		}
		f, err := segy.OpenReaderAtContext(ctx, fh, st.Size(), path, opt.Segy)
		if err != nil {
			fh.Close()
			return 0, err
		}
		p := &joinPart{path: path, fh: fh, f: f, info: f.Info()}
		if len(p.info.TextHeaders) > 0 {
			p.rec, p.has = parsePartRecord(p.info.TextHeaders[0])
		}
		parts = append(parts, p)
	}
	if err := checkJoinSampling(parts); err != nil {
		return 0, err
	}
	if err := checkJoinRecords(parts); err != nil {
		return 0, err
	}
	if err := checkJoinRepeats(ctx, parts); err != nil {
		return 0, err
	}
	total, full, err := checkJoinComplete(parts)
	if err != nil {
		return 0, err
	}

	first := parts[0]
	text := ""
	if len(first.info.TextHeaders) > 0 {
		text = first.info.TextHeaders[0]
		if first.has {
			text = rewritePartLine(text, full, total)
		}
	}
	inputs := slices.Clone(paths)
	of, err := outfile.Create(out, outfile.Options{Inputs: inputs, FollowSymlink: opt.FollowLinks})
	if err != nil {
		return 0, err
	}
	defer of.Abort()
	w, err := segy.NewWriter(of, out, first.f, segy.WriteOptions{Format: first.info.Format, TextHeader: text})
	if err != nil {
		return 0, err
	}
	buf := make([]float32, first.info.Samples)
	for _, p := range parts {
		for i := range p.info.Traces {
			if i%1024 == 0 && ctx.Err() != nil {
				return 0, ctx.Err()
			}
			h, err := p.f.TraceHeader(i)
			if err != nil {
				return 0, err
			}
			if buf, err = p.f.ReadTrace(i, buf); err != nil {
				return 0, err
			}
			if err := w.WriteTrace(h, buf); err != nil {
				return 0, err
			}
		}
	}
	if err := w.Finish(); err != nil {
		return 0, err
	}
	if err := ctx.Err(); err != nil {
		return 0, err
	}
	if err := of.Commit(); err != nil {
		return 0, err
	}
	return total, nil
}

// JoinOptions adjust Join.
type JoinOptions struct {
	// Segy gives the header byte locations and byte order of the parts.
	Segy segy.Options
	// FollowLinks writes at the target of an output that is a symbolic
	// link; by default such an output is refused (app/outfile).
	FollowLinks bool
}

// checkJoinRecords requires the export records of the parts to agree: all
// parts carry them or none does; and those that do name the same
// attribute, parameters, conditioning and source volume (file, trace
// count, numbering) as part 1. The error names the part that differs.
func checkJoinRecords(parts []*joinPart) error {
	a := parts[0]
	for k, p := range parts {
		if p.has != a.has {
			lacking, lk, having, hk := p, k+1, a, 1
			if !a.has {
				lacking, lk, having, hk = a, 1, p, k+1
			}
			return fmt.Errorf("part %d (%s) has no export records (lines \"source:\" and \"part:\") in its textual header but part %d (%s) has: they are not parts of one export",
				lk, lacking.path, hk, having.path)
		}
	}
	if !a.has {
		return nil
	}
	return eachAgainstFirst(parts, func(first, p *joinPart) string {
		r, q := first.rec, p.rec
		switch {
		case q.attribute != r.attribute:
			return fmt.Sprintf("attribute %s, part 1 has %s", q.attribute, r.attribute)
		case q.params != r.params:
			return fmt.Sprintf("parameters %q, part 1 has %q", q.params, r.params)
		case q.cond != r.cond:
			return fmt.Sprintf("conditioning %q, part 1 has %q", q.cond, r.cond)
		case q.sourceFile != r.sourceFile:
			return fmt.Sprintf("source file %s, part 1 has %s", q.sourceFile, r.sourceFile)
		case q.sourceTraces != r.sourceTraces || q.sourceInline != r.sourceInline || q.sourceXline != r.sourceXline:
			return fmt.Sprintf("source of %d traces, inlines %s, crosslines %s; part 1 records %d traces, inlines %s, crosslines %s",
				q.sourceTraces, rangeRecord(q.sourceInline), rangeRecord(q.sourceXline), r.sourceTraces, rangeRecord(r.sourceInline), rangeRecord(r.sourceXline))
		}
		return ""
	})
}

// eachAgainstFirst compares every part with part 1 through differ (which
// says what differs, "" for nothing) and returns the first difference as
// an error naming the part.
func eachAgainstFirst(parts []*joinPart, differ func(first, p *joinPart) string) error {
	for k, p := range parts[1:] {
		if what := differ(parts[0], p); what != "" {
			return fmt.Errorf("part %d (%s): %s", k+2, p.path, what)
		}
	}
	return nil
}

// checkJoinSampling requires every part to share the first one's sampling
// and sample format, and the format to be one the writer writes.
func checkJoinSampling(parts []*joinPart) error {
	a := parts[0].info
	if a.Format != 1 && a.Format != 5 {
		return fmt.Errorf("part 1 (%s): sample format %d; join writes 1 (IBM) or 5 (IEEE), the formats of the export", parts[0].path, a.Format)
	}
	return eachAgainstFirst(parts, func(first, p *joinPart) string {
		a, b := first.info, p.info
		switch {
		case b.Samples != a.Samples:
			return fmt.Sprintf("%d samples per trace, part 1 has %d", b.Samples, a.Samples)
		case b.IntervalUS != a.IntervalUS:
			return fmt.Sprintf("sample interval %d us, part 1 has %d us", b.IntervalUS, a.IntervalUS)
		case b.StartMS != a.StartMS:
			return fmt.Sprintf("first sample at %g ms, part 1 at %g ms", b.StartMS, a.StartMS)
		case b.Format != a.Format:
			return fmt.Sprintf("sample format %d, part 1 has %d", b.Format, a.Format)
		}
		return ""
	})
}

// checkJoinRepeats fails on a trace position that occurs twice within a
// part (the geometry scan counts them) or in two parts. Across parts only
// those with overlapping inline and crossline extents are compared, each
// trace of one looked up in the other's index, so no set of all positions
// is built.
func checkJoinRepeats(ctx context.Context, parts []*joinPart) error {
	for k, p := range parts {
		if p.info.DuplicateTraces > 0 {
			return fmt.Errorf("part %d (%s): %d traces repeat an inline/crossline position already in it", k+1, p.path, p.info.DuplicateTraces)
		}
	}
	overlap := func(a, b segy.Range) bool { return a.Min <= b.Max && b.Min <= a.Max }
	for k, p := range parts {
		for m := k + 1; m < len(parts); m++ {
			q := parts[m]
			if !overlap(p.info.Inline, q.info.Inline) || !overlap(p.info.Crossline, q.info.Crossline) {
				continue
			}
			for i := range p.info.Traces {
				if i%4096 == 0 && ctx.Err() != nil {
					return ctx.Err()
				}
				h, err := p.f.TraceHeader(i)
				if err != nil {
					return err
				}
				if _, dup := q.f.TraceIndex(h.Inline, h.Crossline, h.Offset); dup {
					return fmt.Errorf("trace at inline %d crossline %d is in part %d (%s) and again in part %d (%s)",
						h.Inline, h.Crossline, k+1, p.path, m+1, q.path)
				}
			}
		}
	}
	return nil
}

// checkJoinComplete decides that no trace is missing (see join) and returns
// the number of traces and whether they are the whole source volume.
func checkJoinComplete(parts []*joinPart) (total int, whole bool, err error) {
	for _, p := range parts {
		total += p.info.Traces
	}
	a := parts[0].rec
	sameSource := true
	for k, p := range parts {
		if !p.has || p.rec.sourceFile != a.sourceFile || p.rec.sourceTraces != a.sourceTraces ||
			p.rec.sourceInline != a.sourceInline || p.rec.sourceXline != a.sourceXline {
			sameSource = false
			break
		}
		if p.rec.traces != p.info.Traces {
			return 0, false, fmt.Errorf("part %d (%s): its textual header records %d traces but it holds %d", k+1, p.path, p.rec.traces, p.info.Traces)
		}
	}
	if sameSource && total == a.sourceTraces {
		return total, true, nil
	}

	// The grid to fill: the source's, as recorded in every part (the
	// parts must cover its first and last lines too); without records, the
	// regular grid spanned by the parts.
	var il, xl segy.Range
	if sameSource {
		il, xl = a.sourceInline, a.sourceXline
	}
	for k, p := range parts {
		if sameSource {
			break
		}
		if k == 0 {
			il, xl = p.info.Inline, p.info.Crossline
			continue
		}
		il.Min, il.Max = min(il.Min, p.info.Inline.Min), max(il.Max, p.info.Inline.Max)
		xl.Min, xl.Max = min(xl.Min, p.info.Crossline.Min), max(xl.Max, p.info.Crossline.Max)
	}
	if !sameSource {
		il.Step, xl.Step = 0, 0
		for _, p := range parts {
			il.Step = gcd(gcd(il.Step, p.info.Inline.Step), p.info.Inline.Min-il.Min)
			xl.Step = gcd(gcd(xl.Step, p.info.Crossline.Step), p.info.Crossline.Min-xl.Min)
		}
	}
	count := func(r segy.Range) int {
		if r.Step == 0 {
			return 1
		}
		return (r.Max-r.Min)/r.Step + 1
	}
	cells := count(il) * count(xl)
	if len(parts[0].info.Offsets) == 0 && total == cells {
		return total, false, nil
	}
	why := ""
	if sameSource {
		why = fmt.Sprintf("the parts hold %d of the %d traces of %s, and ", total, a.sourceTraces, a.sourceFile)
		if gaps := inlinesInNoPart(parts, a.sourceInline); gaps != "" {
			why = fmt.Sprintf("the parts hold %d of the %d traces of %s; no part holds inlines %s (their part is missing), and ",
				total, a.sourceTraces, a.sourceFile, gaps)
		}
	}
	step := func(r segy.Range) int { return max(r.Step, 1) }
	const maxProbe = 50_000_000
	probes := 0
	for i := il.Min; i <= il.Max && probes < maxProbe; i += step(il) {
		for x := xl.Min; x <= xl.Max && probes < maxProbe; x += step(xl) {
			probes++
			found := false
			for _, p := range parts {
				if _, ok := p.f.TraceIndex(i, x, 0); ok {
					found = true
					break
				}
			}
			if !found {
				return 0, false, fmt.Errorf("%sthey do not fill the grid of inlines %d:%d and crosslines %d:%d: the trace at inline %d crossline %d is missing",
					why, il.Min, il.Max, xl.Min, xl.Max, i, x)
			}
		}
	}
	return 0, false, fmt.Errorf("%sthey hold %d traces, not the %d positions of the grid of inlines %d:%d and crosslines %d:%d",
		why, total, cells, il.Min, il.Max, xl.Min, xl.Max)
}

// inlinesInNoPart lists, as FIRST:LAST ranges separated by commas, the
// inlines of the source's range src that no part's recorded inline range
// ("part: inlines A:B; crosslines all") holds: the inlines of parts that
// are missing. It returns "" when a part records a crossline range or all
// inlines (then the gaps are not whole inlines), or when every inline is
// held.
func inlinesInNoPart(parts []*joinPart, src segy.Range) string {
	for _, p := range parts {
		if p.rec.inlines == nil || p.rec.crosslines != nil {
			return ""
		}
	}
	step := max(src.Step, 1)
	var gaps []string
	first, last := 0, 0
	open := false
	flush := func() {
		if open {
			gaps = append(gaps, fmt.Sprintf("%d:%d", first, last))
			open = false
		}
	}
	for i, n := src.Min, 0; i <= src.Max && n < 1_000_000; i, n = i+step, n+1 {
		held := false
		for _, p := range parts {
			if p.rec.inlines.contains(i) {
				held = true
				break
			}
		}
		switch {
		case held:
			flush()
		case open:
			last = i
		default:
			first, last, open = i, i, true
		}
	}
	flush()
	return strings.Join(gaps, ", ")
}

// gcd is the greatest common divisor of |a| and |b| (gcd(0, b) = |b|).
func gcd(a, b int) int {
	if a < 0 {
		a = -a
	}
	if b < 0 {
		b = -b
	}
	for b != 0 {
		a, b = b, a%b
	}
	return a
}

// rewritePartLine replaces the "part:" record of an export's textual header
// by one describing the joined volume: the whole source, or the traces
// joined.
func rewritePartLine(text string, whole bool, traces int) string {
	return rePart.ReplaceAllStringFunc(text, func(line string) string {
		prefix := line[:strings.Index(line, "part:")]
		if whole {
			return fmt.Sprintf("%spart: inlines all; crosslines all; %d traces", prefix, traces)
		}
		return fmt.Sprintf("%sjoined: %d traces", prefix, traces)
	})
}
