package export

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"time"

	"quadtrace/app/indexcache"
	"quadtrace/app/outfile"
	"quadtrace/compute"
	"quadtrace/segy"
)

// stage is one resolved attribute of a job: what it is (for the textual
// header) and how to compute it on a block of traces into out (the shape
// of in).
type stage struct {
	id, name string
	params   string // NAME=VALUE ... as resolved, "" when it has none
	compute  func(ctx context.Context, in, out compute.Section) error
}

// conditioner is the resolved conditioning of a job; apply nil means none.
type conditioner struct {
	describe string
	apply    func(ctx context.Context, in compute.Section) (compute.Section, error)
}

// plan is a job with its attributes and conditioning resolved. runPlan does
// the work; it is separate from Run so the file handling can be tested with
// attributes of the test's own making.
type plan struct {
	input      string
	options    segy.Options
	stages     []stage
	cond       conditioner
	output     string
	format     int
	inlines    *Range
	crosslines *Range
	budget     int64
	// followLinks writes at the target of a destination that is a
	// symbolic link (refused otherwise, see app/outfile)
	followLinks bool
	indices     *indexcache.Cache // geometry index cache (nil: none)
	source      Source            // when set, read instead of opening input
	stem        string            // names outputs in a folder; "" takes input's stem
}

// fileSource is a SEG-Y file opened by the export as a Source.
type fileSource struct{ *segy.File }

func (f fileSource) Name() string { return f.Path() }

// Source is a survey an export can read other than a SEG-Y file it opens
// itself: the demo survey held in memory by app/volume, for one. Its
// methods must be safe for concurrent use with the caller's other reads.
type Source interface {
	// Name names the survey in the outputs' textual headers.
	Name() string
	// Info describes it as segy.File.Info does a file.
	Info() segy.Info
	// TraceHeader and ReadTrace read trace i (0 to Info().Traces-1).
	TraceHeader(i int) (segy.TraceHeader, error)
	ReadTrace(i int, dst []float32) ([]float32, error)
}

// runPlan exports the stages of p; see Run for the contract.
func runPlan(ctx context.Context, p plan, progress func(Progress)) (paths []string, err error) {
	start := time.Now()
	if len(p.stages) == 0 {
		return nil, errors.New("no attribute chosen")
	}
	if p.format == 0 {
		p.format = 5
	}
	if p.format != 1 && p.format != 5 {
		return nil, fmt.Errorf("sample format %d: want 5 (IEEE float) or 1 (IBM float)", p.format)
	}
	if p.budget == 0 {
		p.budget = DefaultBudget
	}
	if p.budget < 0 {
		return nil, fmt.Errorf("negative memory budget %d", p.budget)
	}

	var (
		src       Source
		newWriter func(w io.Writer, dst string, opt segy.WriteOptions) (*segy.Writer, error)
		inputs    []string
	)
	if p.source != nil {
		src, p.input = p.source, p.source.Name()
		newWriter = func(w io.Writer, dst string, opt segy.WriteOptions) (*segy.Writer, error) {
			in := src.Info()
			return segy.NewWriterSpec(w, dst, segy.NewSpec{Samples: in.Samples, IntervalUS: in.IntervalUS, StartMS: in.StartMS}, opt)
		}
	} else {
		// The input is opened read-only and read with ordinary reads
		// rather than mapped: a mapping of the whole volume would count
		// in the process's resident memory as it is read, defeating the
		// budget.
		fh, err := segy.OpenRegular(p.input) // refuses FIFOs, devices, folders without blocking
		if err != nil {
			return nil, err
		}
		defer fh.Close()
		st, err := fh.Stat()
		if err != nil {
			return nil, err
		}
		f, err := openExact(ctx, fh, st.Size(), p.input, p.options, p.indices)
		if err != nil {
			return nil, err
		}
		defer f.Close()
		src, inputs = fileSource{f}, []string{p.input}
		newWriter = func(w io.Writer, dst string, opt segy.WriteOptions) (*segy.Writer, error) {
			return segy.NewWriter(w, dst, f, opt)
		}
	}
	info := src.Info()
	if info.Traces == 0 {
		return nil, fmt.Errorf("%s: no traces", p.input)
	}
	if info.IntervalUS <= 0 {
		return nil, fmt.Errorf("%s: sample interval unknown (0 in the binary and trace headers)", p.input)
	}

	stem := p.stem
	if stem == "" {
		stem = strings.TrimSuffix(filepath.Base(p.input), filepath.Ext(p.input))
	}
	dsts, err := destinations(p.input, stem, p.output, p.stages)
	if err != nil {
		return nil, err
	}

	runs, err := selectRuns(info.Traces, p.inlines, p.crosslines, headerKeys(src, info.Traces))
	if err != nil {
		return nil, fmt.Errorf("%s: %w", p.input, err)
	}
	total := selectionSize(runs)
	traceBytes := segy.TraceHeaderSize*(1+info.ExtraTraceHeaders) + info.Samples*segy.FormatSize(info.Format)
	perBlock, err := blockSize(p.budget, info.Samples, len(p.stages), p.cond.apply != nil, total)
	if err != nil {
		return nil, err
	}

	// The outputs are one outfile.Set: unnamed temporary files until every
	// one is complete, then all put in place or none (see app/outfile).
	outs := outfile.NewSet(outfile.Options{Inputs: inputs, FollowSymlink: p.followLinks})
	defer func() {
		if err != nil {
			outs.Abort()
		}
	}()
	writers := make([]*segy.Writer, 0, len(p.stages))
	for k, s := range p.stages {
		text := textHeader(headerFacts{stage: s, cond: p.cond.describe, input: p.input, info: info,
			inlines: p.inlines, crosslines: p.crosslines, traces: total, format: p.format})
		of, err := outs.Create(dsts[k])
		if err != nil {
			return nil, err
		}
		w, err := newWriter(of, dsts[k], segy.WriteOptions{Format: p.format, TextHeader: text})
		if err != nil {
			return nil, err
		}
		writers = append(writers, w)
	}

	dt, t0 := float64(info.IntervalUS)*1e-6, info.StartMS*1e-3
	inBytes := int64(traceBytes)
	pl := &pipeline[segy.TraceHeader]{
		runs: runs, samples: info.Samples, blockTraces: perBlock, inFlight: blocksInFlight,
		readRun: readRunOf(src),
		compute: func(ctx context.Context, in [][]float32, reuse [][][]float32) ([][][]float32, error) {
			sec := compute.Section{Traces: in, DT: dt, T0: t0}
			if p.cond.apply != nil {
				var err error
				if sec, err = p.cond.apply(ctx, sec); err != nil {
					return nil, fmt.Errorf("conditioning %s: %w", p.cond.describe, err)
				}
			}
			// The outputs go into the block's buffers of the last time
			// round: fresh memory for every block cost a page fault per
			// 4 KiB written, a quarter of the envelope's time.
			outs := reuse
			if len(outs) != len(p.stages) {
				outs = make([][][]float32, len(p.stages))
			}
			for k, s := range p.stages {
				outs[k] = blockOutput(outs[k], len(sec.Traces), perBlock, info.Samples)
				if err := s.compute(ctx, sec, compute.Section{Traces: outs[k], DT: dt, T0: t0}); err != nil {
					return nil, fmt.Errorf("%s: %w", s.id, err)
				}
			}
			return outs, nil
		},
		write: func(o int, h *segy.TraceHeader, samples []float32) error {
			return writers[o].WriteTrace(*h, samples)
		},
		progress: func(done int) {
			if progress != nil {
				progress(Progress{Done: done, Total: total, BytesDone: int64(done) * inBytes, Elapsed: time.Since(start)})
			}
		},
	}
	if err = pl.run(ctx); err != nil {
		if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
			return nil, err
		}
		return nil, fmt.Errorf("%s: %w", p.input, err)
	}
	for _, w := range writers {
		if err = w.Finish(); err != nil {
			return nil, err
		}
	}
	if err = ctx.Err(); err != nil {
		return nil, err
	}
	if err = outs.Commit(); err != nil {
		return nil, err
	}
	return dsts, nil
}

// headerRunReader is a Source that reads the headers of runs of
// consecutive traces at once (segy.File.TraceHeaders).
type headerRunReader interface {
	TraceHeaders(first int, headers []segy.TraceHeader) error
}

// headerKeys returns the inline and crossline of trace i of src (0 to
// n-1) for selectRuns, which asks for them in file order: from headers
// read selectAhead at a time when src reads runs of headers, else from
// TraceHeader one by one.
func headerKeys(src Source, n int) func(i int) (inline, crossline int, err error) {
	hr, ok := src.(headerRunReader)
	if !ok {
		return func(i int) (int, int, error) {
			h, err := src.TraceHeader(i)
			return h.Inline, h.Crossline, err
		}
	}
	var buf []segy.TraceHeader
	lo := 0 // trace of buf[0]
	return func(i int) (int, int, error) {
		if i < lo || i >= lo+len(buf) {
			lo, buf = i, buf[:0]
			want := min(selectAhead, n-i)
			if cap(buf) < want {
				buf = make([]segy.TraceHeader, want)
			}
			buf = buf[:want]
			if err := hr.TraceHeaders(i, buf); err != nil {
				buf = buf[:0]
				return 0, 0, err
			}
		}
		h := &buf[i-lo]
		return h.Inline, h.Crossline, nil
	}
}

// selectAhead is how many trace headers headerKeys reads at once.
const selectAhead = 1024

// runReader is a Source that reads runs of consecutive traces at once
// (a SEG-Y file: segy.File.ReadTraces, a few reads a run).
type runReader interface {
	ReadTraces(first int, headers []segy.TraceHeader, dst [][]float32) error
}

// readRunOf returns the pipeline's reader of runs of traces from src: its
// ReadTraces when it has one, else TraceHeader and ReadTrace per trace.
func readRunOf(src Source) func(first int, h []segy.TraceHeader, dst [][]float32) error {
	if rr, ok := src.(runReader); ok {
		return rr.ReadTraces
	}
	return func(first int, h []segy.TraceHeader, dst [][]float32) error {
		for k := range dst {
			var err error
			if h[k], err = src.TraceHeader(first + k); err != nil {
				return err
			}
			if dst[k], err = src.ReadTrace(first+k, dst[k]); err != nil {
				return err
			}
		}
		return nil
	}
}

// blockOutput returns n output traces of samples each: prev's first n when
// it has room for them, or else new ones, allocated for a whole block of
// perBlock traces from one backing array so they are reused from then on.
func blockOutput(prev [][]float32, n, perBlock, samples int) [][]float32 {
	if cap(prev) >= n {
		return prev[:n]
	}
	traces := make([][]float32, max(n, perBlock))
	back := make([]float32, len(traces)*samples)
	for i := range traces {
		traces[i] = back[i*samples : (i+1)*samples : (i+1)*samples]
	}
	return traces[:n]
}

// openExact opens the export's input with an exact geometry index, which
// the outputs' textual headers record (source grid, which join checks):
// from the geometry cache when it holds this file version's index (no
// trace header read but the few it verifies), else from every trace
// header, as segy.Open does, and then saved in the cache. The export reads
// every trace afterwards anyway; a sampled hypothesis is never used here.
func openExact(ctx context.Context, r io.ReaderAt, size int64, name string, opt segy.Options, indices *indexcache.Cache) (*segy.File, error) {
	if indices == nil {
		return segy.OpenReaderAtContext(ctx, r, size, name, opt)
	}
	fo := indices.Lookup(name, opt)
	fo.ReadAll = true
	f, err := segy.OpenReaderAtFast(ctx, r, size, name, opt, fo)
	if err != nil {
		return nil, err
	}
	if f.IndexSource() != segy.IndexSaved {
		// best effort: without the entry the next export reads every header again
		if ch, err := f.Check(ctx, nil); err == nil {
			indices.Store(name, opt, ch.Index)
		}
	}
	return f, nil
}

// destinations returns the output path of each stage: output itself for a
// single attribute (or output/<stem>-<id>.sgy when output is an existing
// folder), and output/<stem>-<id>.sgy for several (app/outfile makes the
// folder when it does not exist, and removes it again on failure). It
// refuses a destination that is the input file.
func destinations(input, stem, output string, stages []stage) (dsts []string, err error) {
	named := func(dir string) []string {
		out := make([]string, len(stages))
		for k, s := range stages {
			out[k] = filepath.Join(dir, stem+"-"+s.id+".sgy")
		}
		return out
	}
	st, statErr := os.Stat(output)
	isDir := statErr == nil && st.IsDir()
	switch {
	case len(stages) == 1 && !isDir:
		if strings.HasSuffix(output, string(filepath.Separator)) {
			return nil, fmt.Errorf("output folder %s does not exist", output)
		}
		dsts = []string{output}
	case isDir:
		dsts = named(output)
	case statErr == nil:
		return nil, fmt.Errorf("%d attributes need a folder for --out, and %s is a file", len(stages), output)
	default:
		dsts = named(output)
	}
	for _, d := range dsts {
		if SameFile(d, input) {
			return nil, fmt.Errorf("refusing to write %s: it is the input file", d)
		}
	}
	return dsts, nil
}

// SameFile reports whether paths a and b name the same file: the same
// absolute path, or (when both exist) the same inode through links.
func SameFile(a, b string) bool {
	aa, err1 := filepath.Abs(a)
	bb, err2 := filepath.Abs(b)
	if err1 == nil && err2 == nil && aa == bb {
		return true
	}
	sa, err1 := os.Stat(a)
	sb, err2 := os.Stat(b)
	return err1 == nil && err2 == nil && os.SameFile(sa, sb)
}
