package viewer

import (
	"context"
	"sync"
	"sync/atomic"
	"time"

	"fyne.io/fyne/v2"
)

// jobs runs the viewer's work off the UI goroutine. Work is sorted into
// lanes (open a file, read and compute a section, render it, the trace
// panel, ...); a lane runs at most one job that matters at a time: starting
// a job cancels the lane's previous job, whose results are then dropped, so a
// stale request never delays or overwrites a fresh one.
type jobs struct {
	root    context.Context
	stop    context.CancelFunc
	running atomic.Int64 // jobs whose goroutine has not returned
	mu      sync.Mutex
	lanes   map[string]*laneState

	// post hands a function to the UI goroutine: fyne.Do in the window.
	// Tests set it to queue the functions and run them on the test's own
	// goroutine in wait, which stands in for the single UI goroutine (fyne's
	// test driver would run them at once on the job's goroutine instead).
	post   func(func())
	queued []func()
}

type laneState struct {
	gen    uint64
	cancel context.CancelFunc
	active int // goroutines of the lane not returned yet, cancelled ones too
}

func newJobs() *jobs {
	ctx, stop := context.WithCancel(context.Background())
	return &jobs{root: ctx, stop: stop, lanes: map[string]*laneState{}, post: fyne.Do}
}

// newQueuedJobs returns jobs whose UI functions wait in a queue until wait
// runs them (for tests).
func newQueuedJobs() *jobs {
	js := newJobs()
	js.post = func(f func()) {
		js.mu.Lock()
		js.queued = append(js.queued, f)
		js.mu.Unlock()
	}
	return js
}

// do runs f on the UI goroutine.
func (js *jobs) do(f func()) { js.post(f) }

// job is the handle a running job uses to hand results to the UI.
type job struct {
	ctx  context.Context
	js   *jobs
	lane string
	gen  uint64
}

// current reports whether this job is still the newest of its lane and has
// not been cancelled. (It does not look at ctx, which is released when the
// job's goroutine returns, before its last fyne.Do callback has run.)
func (j *job) current() bool {
	j.js.mu.Lock()
	defer j.js.mu.Unlock()
	return j.js.lanes[j.lane].gen == j.gen
}

// ui runs f on the UI goroutine (through fyne.Do) if the job is still
// current when f gets there.
func (j *job) ui(f func()) {
	j.js.post(func() {
		if j.current() {
			f()
		}
	})
}

// start cancels the lane's running job and starts run in a new goroutine.
func (js *jobs) start(lane string, run func(j *job)) {
	js.mu.Lock()
	ls := js.lanes[lane]
	if ls == nil {
		ls = &laneState{}
		js.lanes[lane] = ls
	}
	if ls.cancel != nil {
		ls.cancel()
	}
	ctx, cancel := context.WithCancel(js.root)
	ls.gen++
	ls.cancel = cancel
	j := &job{ctx: ctx, js: js, lane: lane, gen: ls.gen}
	js.running.Add(1)
	ls.active++
	js.mu.Unlock()
	go func() {
		defer js.running.Add(-1)
		defer func() {
			js.mu.Lock()
			ls.active--
			js.mu.Unlock()
		}()
		defer cancel()
		run(j)
	}()
}

// active says how many goroutines of the lane have not returned, the
// cancelled ones that are still finishing included.
func (js *jobs) active(lane string) int {
	js.mu.Lock()
	defer js.mu.Unlock()
	if ls := js.lanes[lane]; ls != nil {
		return ls.active
	}
	return 0
}

// background runs f in a goroutine outside every lane: it is never
// cancelled, and wait waits for it like for a job.
func (js *jobs) background(f func()) {
	js.running.Add(1)
	go func() {
		defer js.running.Add(-1)
		f()
	}()
}

// cancel stops the lane's running job, if any.
func (js *jobs) cancel(lane string) {
	js.mu.Lock()
	defer js.mu.Unlock()
	if ls := js.lanes[lane]; ls != nil && ls.cancel != nil {
		ls.cancel()
		ls.gen++
	}
}

// drain runs the UI functions queued so far (see newQueuedJobs) without
// waiting for running jobs, and says how many it ran.
func (js *jobs) drain() int {
	js.mu.Lock()
	fs := js.queued
	js.queued = nil
	js.mu.Unlock()
	for _, f := range fs {
		f()
	}
	return len(fs)
}

// wait runs the queued UI functions (see newQueuedJobs) until no job is
// running and none is queued, including the jobs those functions start.
// With post = fyne.Do it only waits for the jobs to end.
func (js *jobs) wait() {
	for {
		// A job queues its last UI function before it stops running, so
		// reading running before the queue sees every function of a
		// finished job.
		idle := js.running.Load() == 0
		if js.drain() == 0 {
			if idle {
				return
			}
			time.Sleep(time.Millisecond)
		}
	}
}

// close cancels every job.
func (js *jobs) close() { js.stop() }

// progressThrottle turns a job's progress calls into at most a few UI
// updates a second.
type progressThrottle struct {
	mu   sync.Mutex
	last time.Time
}

func (p *progressThrottle) due(done, total int) bool {
	p.mu.Lock()
	defer p.mu.Unlock()
	now := time.Now()
	if done < total && now.Sub(p.last) < 100*time.Millisecond {
		return false
	}
	p.last = now
	return true
}
