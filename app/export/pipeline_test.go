package export

import (
	"context"
	"errors"
	"fmt"
	"sync/atomic"
	"testing"
)

// fakeHeader stands in for the segy trace header in the pipeline tests.
type fakeHeader struct{ index int }

// fakeVolume runs the pipeline on an invented volume whose trace i holds
// i*1000+k at sample k, with two outputs: twice the input and input+1.
type fakeVolume struct {
	samples   int
	read      atomic.Int64 // traces read
	runs      atomic.Int64 // calls of readRun
	written   atomic.Int64 // traces written to output 0
	maxAhead  atomic.Int64 // largest read - written seen by the reader
	reused    atomic.Int64 // output traces computed into a reused buffer
	failRead  int          // trace index whose read fails, -1 for none
	failWrite int          // trace index whose write fails, -1 for none
	cancelAt  int          // trace index at which read cancels, -1 for none
	cancel    context.CancelFunc
	got       [2][]fakeTrace
}

type fakeTrace struct {
	index   int
	samples []float32
}

func (v *fakeVolume) pipeline(runs []traceRun, blockTraces int) *pipeline[fakeHeader] {
	return &pipeline[fakeHeader]{
		runs: runs, samples: v.samples, blockTraces: blockTraces, inFlight: blocksInFlight,
		readRun: func(first int, hs []fakeHeader, dst [][]float32) error {
			if len(dst) > readPiece || len(hs) != len(dst) {
				return fmt.Errorf("readRun asked for %d traces with %d headers (at most %d)", len(dst), len(hs), readPiece)
			}
			v.runs.Add(1)
			for t := range dst {
				i := first + t
				if i == v.failRead {
					return fmt.Errorf("trace %d: invented read failure", i)
				}
				if i == v.cancelAt {
					v.cancel()
				}
				if len(dst[t]) != v.samples || hs[t] != (fakeHeader{}) {
					return fmt.Errorf("trace %d: handed a buffer of %d samples and a used header", i, len(dst[t]))
				}
				ahead := v.read.Add(1) - v.written.Load()
				for {
					m := v.maxAhead.Load()
					if ahead <= m || v.maxAhead.CompareAndSwap(m, ahead) {
						break
					}
				}
				hs[t].index = i
				for k := range dst[t] {
					dst[t][k] = float32(i*1000 + k)
				}
			}
			return nil
		},
		// Outputs handed back for reuse are overwritten in place, so a
		// block recycled before the writer is done with it shows as
		// wrong output values.
		compute: func(ctx context.Context, in [][]float32, reuse [][][]float32) ([][][]float32, error) {
			outs := make([][][]float32, 2)
			for o := range outs {
				outs[o] = make([][]float32, len(in))
				for t, tr := range in {
					var y []float32
					if reuse != nil && t < len(reuse[o]) && len(reuse[o][t]) == len(tr) {
						y = reuse[o][t]
						v.reused.Add(1)
					} else {
						y = make([]float32, len(tr))
					}
					for k, x := range tr {
						if o == 0 {
							y[k] = 2 * x
						} else {
							y[k] = x + 1
						}
					}
					outs[o][t] = y
				}
			}
			return outs, nil
		},
		write: func(o int, h *fakeHeader, s []float32) error {
			if h.index == v.failWrite {
				return fmt.Errorf("trace %d: invented write failure", h.index)
			}
			if o == 0 {
				v.written.Add(1)
			}
			v.got[o] = append(v.got[o], fakeTrace{h.index, append([]float32(nil), s...)})
			return nil
		},
	}
}

func TestPipelineWritesEverySelectedTraceInOrder(t *testing.T) {
	cases := []struct {
		name        string
		runs        []traceRun
		blockTraces int
	}{
		{"one run, blocks divide it", []traceRun{{0, 120}}, 10},
		{"one run, last block short", []traceRun{{0, 101}}, 7},
		{"block larger than the volume", []traceRun{{0, 5}}, 64},
		{"one trace per block", []traceRun{{3, 9}}, 1},
		{"several runs, blocks straddle them", []traceRun{{2, 5}, {20, 3}, {40, 11}}, 4},
		// readRun gets pieces of at most readPiece traces, never across
		// a gap of the selection or a block's end
		{"long run read in pieces", []traceRun{{0, 3*readPiece + 17}}, 2*readPiece + 5},
		{"runs with gaps inside large blocks", []traceRun{{1, readPiece + 3}, {readPiece + 10, 1}, {readPiece + 12, 2 * readPiece}}, 3 * readPiece},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			v := &fakeVolume{samples: 6, failRead: -1, failWrite: -1, cancelAt: -1}
			p := v.pipeline(c.runs, c.blockTraces)
			var reports []int
			p.progress = func(done int) { reports = append(reports, done) }
			if err := p.run(context.Background()); err != nil {
				t.Fatal(err)
			}
			var want []int
			for _, r := range c.runs {
				for i := r.First; i < r.First+r.Count; i++ {
					want = append(want, i)
				}
			}
			for o := range 2 {
				if len(v.got[o]) != len(want) {
					t.Fatalf("output %d: %d traces written, want %d", o, len(v.got[o]), len(want))
				}
				for n, tr := range v.got[o] {
					if tr.index != want[n] {
						t.Fatalf("output %d: trace %d of the output is input trace %d, want %d", o, n, tr.index, want[n])
					}
					for k, y := range tr.samples {
						x := float32(want[n]*1000 + k)
						if (o == 0 && y != 2*x) || (o == 1 && y != x+1) {
							t.Fatalf("output %d trace %d sample %d = %v from input %v", o, n, k, y, x)
						}
					}
				}
			}
			if len(reports) == 0 || reports[len(reports)-1] != len(want) {
				t.Errorf("progress reports %v, want the last to be %d", reports, len(want))
			}
			for i := 1; i < len(reports); i++ {
				if reports[i] <= reports[i-1] {
					t.Errorf("progress went %d then %d", reports[i-1], reports[i])
				}
			}
			blocks := (len(want) + c.blockTraces - 1) / c.blockTraces
			if blocks > blocksInFlight && v.reused.Load() == 0 {
				t.Errorf("%d blocks through %d block buffers, and no output buffer was reused", blocks, blocksInFlight)
			}
			// one call per piece: a piece ends at a run's end, a block's
			// end or after readPiece traces
			pieces := int64(blocks + len(c.runs) + len(want)/readPiece)
			if n := v.runs.Load(); n > pieces {
				t.Errorf("%d readRun calls for %d traces in %d runs and %d blocks, at most %d expected", n, len(want), len(c.runs), blocks, pieces)
			}
			if limit := int64(blocksInFlight * c.blockTraces); v.maxAhead.Load() > limit {
				t.Errorf("reader ran %d traces ahead of the writer, more than %d blocks of %d", v.maxAhead.Load(), blocksInFlight, c.blockTraces)
			}
		})
	}
}

func TestPipelineStopsOnFailureAndCancellation(t *testing.T) {
	cases := []struct {
		name                          string
		failRead, failWrite, cancelAt int
		want                          string
	}{
		{"read fails", 57, -1, -1, "trace 57: invented read failure"},
		{"write fails", -1, 33, -1, "trace 33: invented write failure"},
		{"cancelled", -1, -1, 64, context.Canceled.Error()},
		{"cancelled in the middle of a large block", -1, -1, 300, context.Canceled.Error()},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			v := &fakeVolume{samples: 4, failRead: c.failRead, failWrite: c.failWrite, cancelAt: c.cancelAt}
			ctx, cancel := context.WithCancel(context.Background())
			defer cancel()
			v.cancel = cancel
			block := 8
			if c.cancelAt == 300 {
				block = 900
			}
			err := v.pipeline([]traceRun{{0, 2000}}, block).run(ctx)
			if err == nil || err.Error() != c.want {
				t.Fatalf("error %v, want %q", err, c.want)
			}
			if n := v.read.Load(); n >= 2000 {
				t.Errorf("%d traces read after the pipeline stopped: it kept going", n)
			}
			// the reader stops at the end of the piece it was reading
			if n := v.read.Load(); c.cancelAt >= 0 && n > int64(c.cancelAt+readPiece) {
				t.Errorf("cancelled at trace %d, and the reader went on to read %d traces", c.cancelAt, n)
			}
		})
	}
}

func TestPipelineComputeErrorAndShortOutput(t *testing.T) {
	v := &fakeVolume{samples: 4, failRead: -1, failWrite: -1, cancelAt: -1}
	p := v.pipeline([]traceRun{{0, 100}}, 10)
	p.compute = func(ctx context.Context, in [][]float32, _ [][][]float32) ([][][]float32, error) {
		return nil, errors.New("invented compute failure")
	}
	if err := p.run(context.Background()); err == nil || err.Error() != "invented compute failure" {
		t.Errorf("compute failure: error %v", err)
	}
	p = v.pipeline([]traceRun{{0, 100}}, 10)
	p.compute = func(ctx context.Context, in [][]float32, _ [][][]float32) ([][][]float32, error) {
		return [][][]float32{in[:len(in)-1]}, nil
	}
	if err := p.run(context.Background()); err == nil {
		t.Error("a compute stage returning fewer traces than it was given was not caught")
	}
}
