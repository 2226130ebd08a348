package compute

import (
	"context"
	"runtime"
	"sync"
	"sync/atomic"
)

// forEachTrace runs job(w, i) for every trace index i in [0, total) on a
// pool of runtime.GOMAXPROCS workers. newWorker is called once per worker
// goroutine and its result (work buffers, FFT plans) is passed to every job
// that goroutine runs, so hot loops allocate nothing.
//
// It stops early and returns ctx.Err() when ctx is cancelled, or the first
// error a job returns. progress (may be nil) is called serially with a
// non-decreasing count of finished traces, at most about 200 times plus a
// final call with done == total.
func forEachTrace[W any](ctx context.Context, total int, newWorker func() W, job func(w W, i int) error, progress func(done, total int)) error {
	if total == 0 {
		if progress != nil {
			progress(0, 0)
		}
		return ctx.Err()
	}
	workers := runtime.GOMAXPROCS(0)
	if workers > total {
		workers = total
	}
	step := total / 200
	if step < 1 {
		step = 1
	}
	var (
		next     atomic.Int64
		done     atomic.Int64
		mu       sync.Mutex
		reported int
		firstErr error
		errOnce  sync.Once
		wg       sync.WaitGroup
		stop     atomic.Bool
	)
	report := func(d int, final bool) {
		if progress == nil {
			return
		}
		mu.Lock()
		if d > reported && (final || d-reported >= step) {
			reported = d
			progress(d, total)
		}
		mu.Unlock()
	}
	fail := func(err error) {
		errOnce.Do(func() { firstErr = err })
		stop.Store(true)
	}
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			w := newWorker()
			for !stop.Load() {
				if err := ctx.Err(); err != nil {
					fail(err)
					return
				}
				i := int(next.Add(1) - 1)
				if i >= total {
					return
				}
				if err := job(w, i); err != nil {
					fail(err)
					return
				}
				report(int(done.Add(1)), false)
			}
		}()
	}
	wg.Wait()
	if firstErr != nil {
		return firstErr
	}
	report(total, true)
	return nil
}

// forEachPair is forEachTrace over the traces taken two at a time: job(w,
// i, pair) handles trace i and, when pair is set, trace i+1 (an odd total
// leaves the last trace alone). progress counts traces, as forEachTrace's.
func forEachPair[W any](ctx context.Context, total int, newWorker func() W, job func(w W, i int, pair bool) error, progress func(done, total int)) error {
	var pp func(done, pairs int)
	if progress != nil {
		pp = func(done, _ int) { progress(min(2*done, total), total) }
	}
	if total == 0 {
		if progress != nil {
			progress(0, 0)
		}
		return ctx.Err()
	}
	return forEachTrace(ctx, (total+1)/2, newWorker, func(w W, k int) error {
		return job(w, 2*k, 2*k+1 < total)
	}, pp)
}
