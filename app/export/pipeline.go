package export

import (
	"context"
	"errors"
	"fmt"

	"golang.org/x/sync/errgroup"
)

// traceRun is a run of consecutive trace indices [First, First+Count) of the
// input file. A selection is a list of runs in file order; it stays small
// (one run per inline at most) whatever the size of the volume.
type traceRun struct{ First, Count int }

// selectionSize is the number of traces in the runs.
func selectionSize(runs []traceRun) int {
	n := 0
	for _, r := range runs {
		n += r.Count
	}
	return n
}

// block is one unit of work of the pipeline: a run of consecutive selected
// traces, their headers, and (after the compute stage) one output section
// per attribute. Blocks are recycled through a pool so that the input
// buffers are allocated once per job.
type block[H any] struct {
	first   int         // position of the first trace in the selection
	n       int         // traces used in this block
	index   []int       // file trace index of each trace
	headers []H         // trace header of each trace
	buffers [][]float32 // owned sample buffers, len(buffers) == capacity
	traces  [][]float32 // samples as returned by read, traces[:n]
	// outs are the outputs computed for this block; they stay with the
	// block when it is recycled and go back to compute as its reuse, so
	// that a stream of blocks writes into memory it has already touched.
	outs [][][]float32
}

// pipeline streams the selected traces of a volume through three stages
// running at the same time: a reader that fills blocks of traces in file
// order, a compute stage (which itself uses every core), and a writer that
// hands the outputs to the sinks in trace order. At most inFlight blocks
// exist at once, so memory is bounded by the block size, not the volume.
type pipeline[H any] struct {
	runs        []traceRun
	samples     int // samples per trace (capacity of each buffer)
	blockTraces int // traces per block, >= 1
	inFlight    int // blocks alive at once, >= 1

	// readRun reads the consecutive traces first, first+1, ... (len(dst)
	// of them, at most readPiece): the header of trace first+k into h[k]
	// and its samples into dst[k], a buffer of samples floats owned by the
	// block, which it may replace by a slice of its own.
	readRun func(first int, h []H, dst [][]float32) error
	// compute turns a block of input traces into one block of traces per
	// output, each with len(in) traces. reuse is what compute returned for
	// the same block buffer last time (nil the first time): outputs the
	// writer has finished with, which compute may overwrite and return.
	compute func(ctx context.Context, in [][]float32, reuse [][][]float32) ([][][]float32, error)
	// write writes one trace of output o; calls for one output come in
	// selection order.
	write func(o int, h *H, samples []float32) error
	// progress, if not nil, is called by the writer after each block with
	// the number of traces written for every output so far.
	progress func(done int)
}

// run executes the pipeline until every selected trace is written, ctx is
// cancelled or a stage fails. It returns the first error (ctx.Err() on
// cancellation). All stage goroutines have ended when run returns.
func (p *pipeline[H]) run(ctx context.Context) error {
	if p.blockTraces < 1 || p.inFlight < 1 || p.samples < 1 {
		return fmt.Errorf("export pipeline: bad sizing: %d traces per block, %d blocks, %d samples", p.blockTraces, p.inFlight, p.samples)
	}
	// The three stages share one errgroup: the first error cancels ctx for
	// the others, and Wait returns it once every stage has ended.
	g, ctx := errgroup.WithContext(ctx)

	free := make(chan *block[H], p.inFlight)
	for range p.inFlight {
		b := &block[H]{
			index:   make([]int, p.blockTraces),
			headers: make([]H, p.blockTraces),
			buffers: make([][]float32, p.blockTraces),
			traces:  make([][]float32, p.blockTraces),
		}
		for i := range b.buffers {
			b.buffers[i] = make([]float32, p.samples)
		}
		free <- b
	}
	toCompute := make(chan *block[H], p.inFlight)
	toWrite := make(chan *block[H], p.inFlight)

	g.Go(func() error { // reader
		defer close(toCompute)
		var b *block[H]
		pos := 0
		send := func() error {
			select {
			case toCompute <- b:
				b = nil
				return nil
			case <-ctx.Done():
				return ctx.Err()
			}
		}
		for _, r := range p.runs {
			for i := r.First; i < r.First+r.Count; {
				if b == nil {
					select {
					case b = <-free:
					case <-ctx.Done():
						return ctx.Err()
					}
					b.first, b.n = pos, 0
				}
				if err := ctx.Err(); err != nil {
					return err
				}
				// A piece of the run: what the block has room for, at
				// most readPiece traces, so a cancel is seen between
				// pieces.
				k := b.n
				c := min(r.First+r.Count-i, p.blockTraces-k, readPiece)
				clear(b.headers[k : k+c])
				copy(b.traces[k:k+c], b.buffers[k:k+c])
				if err := p.readRun(i, b.headers[k:k+c], b.traces[k:k+c]); err != nil {
					return err
				}
				for j := range c {
					b.index[k+j] = i + j
				}
				b.n += c
				pos += c
				i += c
				if b.n == p.blockTraces {
					if err := send(); err != nil {
						return err
					}
				}
			}
		}
		if b != nil && b.n > 0 {
			return send()
		}
		return nil
	})
	g.Go(func() error { // compute
		defer close(toWrite)
		for b := range toCompute {
			if err := ctx.Err(); err != nil {
				return err
			}
			outs, err := p.compute(ctx, b.traces[:b.n], b.outs)
			if err != nil {
				return err
			}
			for o, out := range outs {
				if len(out) != b.n {
					return fmt.Errorf("export pipeline: output %d: %d traces computed for a block of %d", o, len(out), b.n)
				}
			}
			b.outs = outs
			select {
			case toWrite <- b:
			case <-ctx.Done():
				return ctx.Err()
			}
		}
		return nil
	})
	done := 0
	g.Go(func() error { // writer
		for b := range toWrite {
			if err := ctx.Err(); err != nil {
				return err
			}
			for o, out := range b.outs {
				for k := 0; k < b.n; k++ {
					if err := p.write(o, &b.headers[k], out[k]); err != nil {
						return err
					}
				}
			}
			done += b.n
			clear(b.traces) // drop references to slices read may have returned
			free <- b
			if p.progress != nil {
				p.progress(done)
			}
		}
		return ctx.Err()
	})
	// A stage that returns early stops reading its channel; every send
	// above also waits on ctx, which errgroup cancels, so no stage blocks.
	if err := g.Wait(); err != nil {
		return err
	}
	if total := selectionSize(p.runs); done != total {
		return fmt.Errorf("export pipeline: %d of %d traces written", done, total)
	}
	return nil
}

// readPiece is the most traces the reader asks readRun for at once: a
// few hundred KiB to a few MiB of a file (segy reads them in runs of
// 256 KiB), little enough that a cancel is seen within a millisecond or so.
const readPiece = 256

// errNoTraces reports an empty selection.
var errNoTraces = errors.New("no traces selected")
