package horizon

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"runtime"
	"strconv"
	"sync"
	"sync/atomic"

	"quadtrace/compute"
)

// Seed is a starting point of a horizon: a grid index and a time near the
// event to follow.
type Seed struct {
	Inline, Crossline int     // grid indices from 0
	TimeMS            float64 // two-way time, ms
}

// Options set the event, the search and the constraints of Track.
type Options struct {
	// Event is the wavelet phase to follow.
	Event Event
	// WindowMS is the search half-window: on each new trace the event is
	// looked for within ±WindowMS of the time predicted from the neighbour
	// it grows from (and of the seed time at seeds). The prediction is the
	// neighbour's time plus the local dip: the step in time from the trace
	// behind the neighbour (in line with the new trace) to the neighbour,
	// when that trace is picked. Must be positive.
	WindowMS float64
	// MaxPhaseJumpDeg, when positive, is the largest difference (degrees,
	// wrapped to -180..180) allowed between the instantaneous phase at the
	// pick and at the neighbour's pick.
	MaxPhaseJumpDeg float64
	// MinEnvelope, when positive, is the smallest envelope allowed at the
	// pick as a fraction of the local level: the mean envelope at the picks
	// of the traces already tracked within LevelRadius traces (inline and
	// crossline) of the new one.
	MinEnvelope float64
	// LevelRadius is the half-size in traces of the square over which the
	// local envelope level is taken; 0 means 2.
	LevelRadius int
	// MinCorrelation is the smallest correlation coefficient (-1..1)
	// allowed between the trace's waveform around the pick and the
	// neighbour's around its pick, over CorrelationMS. -1 accepts every
	// pick.
	MinCorrelation float64
	// CorrelationMS is the length of the correlation window centred on
	// the picks; 0 means 24 ms.
	CorrelationMS float64
	// MinSeparationMS, when positive, is the interference rule: a trace is
	// left empty where an event of the opposite polarity (a trough beside
	// a peak, a peak beside a trough) lies closer than MinSeparationMS to
	// the pick and is stronger, relative to the pick, than halfway between
	// the wavelet's own side lobe on that side and an equal reflection:
	// (r + 1) / 2 of the pick, where r is the strongest such event's
	// ratio on that side at the seeds (mean over the seeds, which are to
	// lie where the event is resolved). Set to the tuning thickness of the
	// wavelet, it stops the top or base of a thinning bed where the two
	// reflections interfere (Widess 1973; Kallweit and Wood 1982, "The
	// limits of resolution of zero-phase wavelets", Geophysics 47: below
	// tuning the picked times no longer follow the interfaces; Widess:
	// below it the composite tends to the wavelet's derivative, whose
	// trough and peak are equal). For a zero-phase Ricker of peak
	// frequency f the tuning thickness is its peak-to-side-lobe time,
	// sqrt(3/2)/(pi f) = 1/(2.565 f) (TuningThicknessMS). Peak and trough
	// events only.
	//
	// Off by default: it stops a horizon wherever another reflection
	// interferes, not only at a bed's pinch-out. Measured on the demo
	// survey with the tuning thickness at each surface's depth: the
	// isolated surfaces keep 99.6 to 100 % of their recovery, but the
	// reservoir's base (a bed with its top) keeps 96.7 % and the weak
	// deep-5 (R 0.045, beside stronger reflections) 90.8 %.
	MinSeparationMS float64
}

// TuningThicknessMS returns the tuning thickness (two-way ms) of a bed
// with equal and opposite reflections at top and base for a zero-phase
// Ricker wavelet of peak frequency peakHz: the time from the wavelet's
// peak to its side-lobe minima, sqrt(3/2)/(pi f) (side lobes: SEG Wiki,
// "Ricker wavelet"; that tuning falls at the wavelet's peak-to-trough time
// is recalled from memory of Kallweit and Wood 1982), where the composite
// amplitude is largest (Widess 1973's tuning).
// TestTuningThicknessClosedForm checks it against a brute-force search
// for that maximum, which is what this value rests on. (1/(2.31 f), a
// figure sometimes quoted, gives 11 % more with f the peak frequency: it
// may take f in another sense; unverified.)
func TuningThicknessMS(peakHz float64) float64 {
	return 1000 * math.Sqrt(1.5) / (math.Pi * peakHz)
}

// Defaults used when the Options fields are zero.
const (
	DefaultLevelRadius   = 2
	DefaultCorrelationMS = 24.0
	// analyticSpanMS and analyticMinSpan set the length of the stretch of
	// trace, centred on a pick, whose analytic trace gives the envelope and
	// phase there (see Track): at least this many ms and samples, rounded
	// up to a power of two samples; its ends are tapered over an eighth of
	// its length.
	analyticSpanMS  = 128.0
	analyticMinSpan = 16
	// batch is how many candidates are accepted from the queue before
	// their neighbours are evaluated (in parallel).
	batch = 64
)

// Check reports the first option that no grid can use (Track checks the
// search window against the sample interval besides).
func (o Options) Check() error {
	if !o.Event.valid() {
		return fmt.Errorf("tracking: no event chosen (want %v)", Events())
	}
	if !(o.WindowMS > 0) || math.IsInf(o.WindowMS, 0) {
		return fmt.Errorf("tracking: search window %v ms: want a positive number of ms", o.WindowMS)
	}
	if math.IsNaN(o.MaxPhaseJumpDeg) || o.MaxPhaseJumpDeg < 0 {
		return fmt.Errorf("tracking: maximum phase jump %v degrees: want 0 (off) or more", o.MaxPhaseJumpDeg)
	}
	if math.IsNaN(o.MinEnvelope) || o.MinEnvelope < 0 || math.IsInf(o.MinEnvelope, 0) {
		return fmt.Errorf("tracking: minimum envelope fraction %v: want 0 (off) or more", o.MinEnvelope)
	}
	if !(o.MinCorrelation >= -1 && o.MinCorrelation <= 1) {
		return fmt.Errorf("tracking: minimum correlation %v: want -1 to 1", o.MinCorrelation)
	}
	if o.LevelRadius < 0 {
		return fmt.Errorf("tracking: level radius %d traces is negative", o.LevelRadius)
	}
	if math.IsNaN(o.CorrelationMS) || o.CorrelationMS < 0 || math.IsInf(o.CorrelationMS, 0) {
		return fmt.Errorf("tracking: correlation window %v ms: want a positive length", o.CorrelationMS)
	}
	if math.IsNaN(o.MinSeparationMS) || o.MinSeparationMS < 0 || math.IsInf(o.MinSeparationMS, 0) {
		return fmt.Errorf("tracking: minimum separation %v ms: want 0 (off) or more", o.MinSeparationMS)
	}
	if o.MinSeparationMS > 0 && o.Event != Peak && o.Event != Trough {
		return fmt.Errorf("tracking: a minimum separation applies to peak and trough events, not %v", o.Event)
	}
	return nil
}

// resolved checks the options for grid g and fills in the defaults.
func (o Options) resolved(g Grid) (Options, error) {
	if err := o.Check(); err != nil {
		return o, err
	}
	if o.WindowMS < g.dtMS()/2 {
		return o, fmt.Errorf("tracking: search window %v ms is less than half the %v ms sample interval", o.WindowMS, g.dtMS())
	}
	if o.LevelRadius == 0 {
		o.LevelRadius = DefaultLevelRadius
	}
	if o.CorrelationMS == 0 {
		o.CorrelationMS = DefaultCorrelationMS
	}
	return o, nil
}

// pick is what the tracker keeps of a tracked trace beyond its time.
type pick struct {
	sample float64 // fractional sample of the pick
	env    float32 // envelope at the pick (when the constraints need it)
	phase  float32 // instantaneous phase at the pick, radians
}

// candidate is a pick proposed for trace k from its tracked neighbour from.
type candidate struct {
	k, from int32
	pick
	corr  float32
	start int32 // first sample of the analytic stretch
}

// queue is a max-queue of candidates on correlation holding at most one
// candidate per trace (the best one offered); ties go to the lower trace
// index, then the lower neighbour index, so the order never depends on
// timing.
type queue struct {
	items []candidate
	pos   []int32 // pos[k]: index of trace k's candidate in items, -1 when none
}

func newQueue(traces int) *queue {
	q := &queue{pos: make([]int32, traces)}
	for k := range q.pos {
		q.pos[k] = -1
	}
	return q
}

func (q *queue) Len() int { return len(q.items) }

// swap exchanges items i and j and updates their positions.
func (q *queue) swap(i, j int) {
	q.items[i], q.items[j] = q.items[j], q.items[i]
	q.pos[q.items[i].k], q.pos[q.items[j].k] = int32(i), int32(j)
}

// up moves item i towards the root while it is better than its parent
// (a binary heap, as in container/heap, without boxing the items).
func (q *queue) up(i int) {
	for i > 0 {
		p := (i - 1) / 2
		if !better(&q.items[i], &q.items[p]) {
			return
		}
		q.swap(i, p)
		i = p
	}
}

// down moves item i towards the leaves while a child is better.
func (q *queue) down(i int) {
	n := len(q.items)
	for {
		c := 2*i + 1
		if c >= n {
			return
		}
		if r := c + 1; r < n && better(&q.items[r], &q.items[c]) {
			c = r
		}
		if !better(&q.items[c], &q.items[i]) {
			return
		}
		q.swap(i, c)
		i = c
	}
}

// pop removes and returns the best candidate.
func (q *queue) pop() candidate {
	last := len(q.items) - 1
	q.swap(0, last)
	c := q.items[last]
	q.items = q.items[:last]
	q.pos[c.k] = -1
	q.down(0)
	return c
}

// better reports whether candidate a goes before b.
func better(a, b *candidate) bool {
	if a.corr != b.corr {
		return a.corr > b.corr
	}
	if a.k != b.k {
		return a.k < b.k
	}
	return a.from < b.from
}

// offer queues c unless its trace has a better candidate queued already.
func (q *queue) offer(c candidate) {
	i := q.pos[c.k]
	switch {
	case i < 0:
		q.pos[c.k] = int32(len(q.items))
		q.items = append(q.items, c)
		q.up(len(q.items) - 1)
	case better(&c, &q.items[i]):
		// A better candidate for the same trace only moves up.
		q.items[i] = c
		q.up(int(i))
	}
}

// tracker holds one Track run's state.
type tracker struct {
	src   Source
	g     Grid
	opt   Options
	h     *Horizon
	picks []pick
	// needAnalytic: a constraint uses envelope or phase.
	needAnalytic bool
	halfWin      float64 // search half-window, samples
	halfCorr     int     // correlation half-window, samples
	span         int     // analytic stretch length, samples
	taper        int     // samples tapered at each end of a stretch
	quad         *compute.Attribute
	quadParams   compute.Params
	stretches    []float32 // copies of the stretches for the analytic trace
	// memo holds, per trace, the last pick whose envelope and phase were
	// computed (sample NaN when none).
	memo []pick

	// The interference rule (Options.MinSeparationMS): the separation in
	// samples (0: off), the event of the opposite polarity, and the
	// strength, relative to the pick, from which such an event above or
	// below the pick interferes ((r + 1) / 2, r the seeds' mean side lobe
	// there).
	minSep                         float64
	opposite                       Event
	interfereAbove, interfereBelow float64
}

// worker holds one goroutine's buffers.
type worker struct {
	a, b     []float32
	events   []float64
	opposite []float64 // events of the opposite polarity (interferes)
}

// Track grows a horizon on src from the seeds and returns it.
//
// Each seed is snapped to the event nearest its time within ±WindowMS;
// a seed with no such event is an error. From every picked trace the
// tracker proposes picks on its four grid neighbours: among the events
// within ±WindowMS of the predicted time (see Options.WindowMS) it takes the one whose waveform
// correlates best with the picked trace's (Pearson's correlation over
// CorrelationMS, windows centred on the nearest samples to the picks),
// and keeps it when the correlation, phase and envelope constraints hold.
// The proposals wait in a priority queue ordered by that correlation (the
// best proposal per trace), so the horizon spreads through the most
// coherent parts first and reaches doubtful traces last, from whichever
// side fits best; the phase and envelope constraints are checked when a
// proposal leaves the queue, and a trace that fails them may still be
// picked later from another neighbour. It takes
// proposals in batches of 64 and evaluates the neighbours of a batch on
// runtime.GOMAXPROCS(0) workers; the result does not depend on the number
// of workers.
//
// Envelope and phase come from compute's analytic trace (Marple's discrete
// analytic signal: the "quadrature" attribute of compute's registry) of a
// stretch of the trace centred on the pick, 128 ms long (at least 16
// samples; a power of two), with half-Hann tapers over an eighth of it at
// its ends:
// the Hilbert transform's kernel falls off as 1/t, so a stretch several
// wavelets long gives the phase at its centre to within a few degrees of
// the whole trace's (TestAnalyticStretchMatchesWholeTrace) at a small
// fraction of the cost. They are computed only when a constraint uses
// them.
//
// progress (may be nil) is called from the calling goroutine with the
// number of traces picked so far and the number in the grid, and once at
// the end with both equal. Cancelling ctx stops the run with ctx.Err().
func Track(ctx context.Context, src Source, seeds []Seed, opt Options, progress func(done, total int)) (*Horizon, error) {
	g := src.Grid()
	if err := g.validate(); err != nil {
		return nil, fmt.Errorf("tracking: %w", err)
	}
	opt, err := opt.resolved(g)
	if err != nil {
		return nil, err
	}
	if len(seeds) == 0 {
		return nil, fmt.Errorf("tracking: no seed points")
	}
	t := &tracker{
		src: src, g: g, opt: opt, h: New(g.Inlines, g.Crosslines),
		picks:        make([]pick, g.Inlines*g.Crosslines),
		needAnalytic: opt.MaxPhaseJumpDeg > 0 || opt.MinEnvelope > 0,
		halfWin:      opt.WindowMS / g.dtMS(),
		halfCorr:     max(1, int(math.Round(opt.CorrelationMS/g.dtMS()/2))),
		minSep:       opt.MinSeparationMS / g.dtMS(),
		opposite:     Trough,
	}
	if opt.Event == Trough {
		t.opposite = Peak
	}
	if err := t.setSpan(); err != nil {
		return nil, fmt.Errorf("tracking: %w", err)
	}
	if t.needAnalytic {
		t.memo = make([]pick, len(t.picks))
		for k := range t.memo {
			t.memo[k].sample = math.NaN()
		}
	}
	if err := t.seed(seeds); err != nil {
		return nil, err
	}
	if err := t.grow(ctx, progress); err != nil {
		return nil, err
	}
	return t.h, nil
}

// setSpan sets the length and end taper of the analytic stretches and
// readies compute's quadrature attribute for them.
func (t *tracker) setSpan() error {
	t.span = min(t.g.Samples, compute.NextPow2(max(analyticMinSpan, int(math.Ceil(analyticSpanMS/t.g.dtMS())))))
	t.taper = t.span / 8
	q, err := compute.Lookup("quadrature")
	if err != nil {
		return err
	}
	p, err := q.Resolve(map[string]string{"pad": compute.PadFast, "taper": strconv.FormatFloat(float64(t.taper)*t.g.dtMS(), 'g', -1, 64)})
	if err != nil {
		return err
	}
	t.quad, t.quadParams = q, p
	return nil
}

// quadrature returns the quadrature traces (Hilbert transforms) of the
// stretches in sec, computed by compute's "quadrature" attribute (the
// imaginary part of Marple's discrete analytic signal) on all cores.
func (t *tracker) quadrature(ctx context.Context, sec compute.Section) (compute.Section, error) {
	return t.quad.Compute(ctx, sec, t.quadParams, nil)
}

// analyticAt returns the envelope and the instantaneous phase (radians)
// at fractional sample x of a stretch whose quadrature trace is h: the
// analytic value z = x + i h (x tapered as compute tapers it before the
// transform, which changes nothing away from the stretch's ends) is
// interpolated linearly between the samples either side (Taner, Koehler
// and Sheriff 1979: envelope |z|, phase arg z).
func (t *tracker) analyticAt(stretch, h []float32, x float64) (env, phase float32) {
	i0 := int(math.Floor(x))
	z := func(j int) complex128 {
		return complex(float64(stretch[j])*t.taperWeight(j), float64(h[j]))
	}
	v := z(i0)
	if f := x - float64(i0); f > 0 && i0+1 < len(h) {
		v = complex(1-f, 0)*v + complex(f, 0)*z(i0+1)
	}
	return float32(cmplx.Abs(v)), float32(cmplx.Phase(v))
}

// taperWeight returns the weight compute.EndTreatment's half-Hann taper
// of t.taper samples gives sample j of a stretch: sin^2(pi (j+1/2) / (2L))
// over the first and last L samples, 1 between.
func (t *tracker) taperWeight(j int) float64 {
	L := t.taper
	if k := t.span - 1 - j; k < j {
		j = k
	}
	if j >= L {
		return 1
	}
	s := math.Sin(math.Pi * (float64(j) + 0.5) / float64(2*L))
	return s * s
}

// seed picks the seed traces.
func (t *tracker) seed(seeds []Seed) error {
	w := t.newWorker()
	var sumAbove, sumBelow float64 // side lobes at the seeds (interference rule)
	for i, s := range seeds {
		if s.Inline < 0 || s.Inline >= t.g.Inlines || s.Crossline < 0 || s.Crossline >= t.g.Crosslines {
			return fmt.Errorf("tracking: seed %d at grid index (%d, %d): outside the %d x %d grid", i+1, s.Inline, s.Crossline, t.g.Inlines, t.g.Crosslines)
		}
		k := s.Inline*t.g.Crosslines + s.Crossline
		if t.h.State[k] != Empty {
			return fmt.Errorf("tracking: seed %d at grid index (%d, %d): a seed on that trace already", i+1, s.Inline, s.Crossline)
		}
		a, err := t.src.Trace(s.Inline, s.Crossline, w.a)
		if err != nil {
			return fmt.Errorf("tracking: seed %d: %w", i+1, err)
		}
		at := t.g.sampleAt(s.TimeMS)
		w.events = t.opt.Event.Locate(a, at-t.halfWin, at+t.halfWin, w.events[:0])
		best := math.NaN()
		for _, x := range w.events {
			if !(math.Abs(x-at) >= math.Abs(best-at)) {
				best = x
			}
		}
		if math.IsNaN(best) {
			return fmt.Errorf("tracking: seed %d at grid index (%d, %d): no %v within %g ms of %g ms", i+1, s.Inline, s.Crossline, t.opt.Event, t.opt.WindowMS, s.TimeMS)
		}
		if t.minSep > 0 {
			above, below := t.sideLobes(a, best)
			sumAbove += above
			sumBelow += below
		}
		p := pick{sample: best}
		if t.needAnalytic {
			start := t.stretchStart(best)
			stretch := a[start : start+t.span]
			q, err := t.quadrature(context.Background(), compute.Section{Traces: [][]float32{stretch}, DT: t.g.DT})
			if err != nil {
				return fmt.Errorf("tracking: seed %d: %w", i+1, err)
			}
			p.env, p.phase = t.analyticAt(stretch, q.Traces[0], best-float64(start))
		}
		t.picks[k] = p
		t.h.set(k, t.g.msAt(best), 1, Seeded)
	}
	if t.minSep > 0 {
		n := float64(len(seeds))
		t.interfereAbove = (sumAbove/n + 1) / 2
		t.interfereBelow = (sumBelow/n + 1) / 2
	}
	return nil
}

func (t *tracker) newWorker() *worker {
	return &worker{a: make([]float32, t.g.Samples), b: make([]float32, t.g.Samples)}
}

// pair is a trace to evaluate and the picked neighbour it grows from.
type pair struct{ k, from int32 }

// grow runs the best-first flood from the picked traces.
func (t *tracker) grow(ctx context.Context, progress func(done, total int)) error {
	total := len(t.picks)
	var pending []pair
	picked := 0
	for k, s := range t.h.State {
		if s != Empty {
			picked++
			pending = t.neighbours(pending, k)
		}
	}
	workers := runtime.GOMAXPROCS(0)
	ws := make([]*worker, workers)
	for i := range ws {
		ws[i] = t.newWorker()
	}
	queue := newQueue(total)
	results := make([]candidate, 0, 4*batch)
	ok := make([]bool, 0, 4*batch)
	accepted := make([]int32, 0, batch)
	var taken []candidate
	step := max(1, total/200)
	reported := 0
	for len(pending) > 0 || queue.Len() > 0 {
		if err := ctx.Err(); err != nil {
			return err
		}
		results, ok = results[:len(pending)], ok[:len(pending)]
		if err := t.evaluate(ws, pending, results, ok); err != nil {
			return fmt.Errorf("tracking: %w", err)
		}
		for i, c := range results {
			if ok[i] {
				queue.offer(c)
			}
		}
		// Take the best candidates (one per trace, and only of empty
		// traces: a picked trace is never offered).
		taken = taken[:0]
		for len(taken) < batch && queue.Len() > 0 {
			taken = append(taken, queue.pop())
		}
		if t.needAnalytic {
			if err := t.analytic(ctx, ws[0], taken); err != nil {
				return fmt.Errorf("tracking: %w", err)
			}
		}
		accepted = accepted[:0]
		for i := range taken {
			c := &taken[i]
			if t.needAnalytic && !t.constraints(c) {
				continue
			}
			t.picks[c.k] = c.pick
			t.h.set(int(c.k), t.g.msAt(c.sample), c.corr, Tracked)
			accepted = append(accepted, c.k)
		}
		picked += len(accepted)
		// Neighbours are listed after the whole batch is in, so a trace
		// picked in this batch is not proposed again.
		pending = pending[:0]
		for _, k := range accepted {
			pending = t.neighbours(pending, int(k))
		}
		if progress != nil && picked-reported >= step {
			reported = picked
			progress(picked, total)
		}
	}
	if progress != nil {
		progress(total, total)
	}
	return nil
}

// neighbours appends the empty grid neighbours of trace k, paired with k.
func (t *tracker) neighbours(dst []pair, k int) []pair {
	nx := t.g.Crosslines
	il, xl := k/nx, k%nx
	add := func(n int) {
		if t.h.State[n] == Empty {
			dst = append(dst, pair{int32(n), int32(k)})
		}
	}
	if il > 0 {
		add(k - nx)
	}
	if il < t.g.Inlines-1 {
		add(k + nx)
	}
	if xl > 0 {
		add(k - 1)
	}
	if xl < nx-1 {
		add(k + 1)
	}
	return dst
}

// evaluate proposes a pick for every pair (the event and its correlation
// with the neighbour), on the workers when there are enough pairs to
// share. ok[i] says whether pairs[i] passed the correlation constraint.
func (t *tracker) evaluate(ws []*worker, pairs []pair, out []candidate, ok []bool) error {
	propose := func(w *worker, i int) error {
		var err error
		out[i], ok[i], err = t.propose(w, pairs[i])
		return err
	}
	if len(ws) == 1 || len(pairs) < 8 {
		for i := range pairs {
			if err := propose(ws[0], i); err != nil {
				return err
			}
		}
		return nil
	}
	var next atomic.Int64
	var wg sync.WaitGroup
	var mu sync.Mutex
	var firstErr error
	for _, w := range ws {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for {
				i := int(next.Add(1) - 1)
				if i >= len(pairs) {
					return
				}
				if err := propose(w, i); err != nil {
					mu.Lock()
					if firstErr == nil {
						firstErr = err
					}
					mu.Unlock()
					return
				}
			}
		}()
	}
	wg.Wait()
	return firstErr
}

// analytic fills in the envelope and phase of the candidates, from the
// analytic trace of a stretch of each trace around its pick, computed for
// all of them as one section through compute's quadrature attribute (which
// shares its FFT plans across the stretches and runs on all cores). A trace whose
// envelope and phase were computed before at the same pick reuses them.
func (t *tracker) analytic(ctx context.Context, w *worker, cs []candidate) error {
	sec := compute.Section{DT: t.g.DT}
	if cap(t.stretches) < len(cs)*t.span {
		t.stretches = make([]float32, len(cs)*t.span)
	}
	var idx []int
	nx := t.g.Crosslines
	for i := range cs {
		c := &cs[i]
		if m := t.memo[c.k]; m.sample == c.sample {
			c.env, c.phase = m.env, m.phase
			continue
		}
		a, err := t.src.Trace(int(c.k)/nx, int(c.k)%nx, w.a)
		if err != nil {
			return err
		}
		n := len(idx)
		stretch := t.stretches[n*t.span : (n+1)*t.span : (n+1)*t.span]
		c.start = int32(t.stretchStart(c.sample))
		copy(stretch, a[c.start:])
		sec.Traces = append(sec.Traces, stretch)
		idx = append(idx, i)
	}
	if len(idx) == 0 {
		return nil
	}
	q, err := t.quadrature(ctx, sec)
	if err != nil {
		return err
	}
	for n, i := range idx {
		c := &cs[i]
		c.env, c.phase = t.analyticAt(sec.Traces[n], q.Traces[n], c.sample-float64(c.start))
		t.memo[c.k] = c.pick
	}
	return nil
}

// propose evaluates trace p.k from its picked neighbour p.from: the event
// within the search window that correlates best with the neighbour, and
// whether it passes the correlation constraint.
func (t *tracker) propose(w *worker, p pair) (candidate, bool, error) {
	nx := t.g.Crosslines
	k, from := int(p.k), int(p.from)
	a, err := t.src.Trace(k/nx, k%nx, w.a)
	if err != nil {
		return candidate{}, false, err
	}
	ref, err := t.src.Trace(from/nx, from%nx, w.b)
	if err != nil {
		return candidate{}, false, err
	}
	fp := t.picks[from]
	pred := fp.sample
	if b := t.behind(k, from); b >= 0 && t.h.State[b] != Empty {
		pred += fp.sample - t.picks[b].sample
	}
	w.events = t.opt.Event.Locate(a, pred-t.halfWin, pred+t.halfWin, w.events[:0])
	if len(w.events) == 0 {
		return candidate{}, false, nil
	}
	rc := int(math.Round(fp.sample))
	best, bestCorr := math.NaN(), math.Inf(-1)
	for _, x := range w.events {
		c := correlation(ref, rc, a, x+float64(rc)-fp.sample, t.halfCorr)
		if c > bestCorr || (c == bestCorr && math.Abs(x-pred) < math.Abs(best-pred)) {
			best, bestCorr = x, c
		}
	}
	if !(bestCorr >= t.opt.MinCorrelation) {
		return candidate{}, false, nil
	}
	if !t.fitsNeighbours(k, best) {
		return candidate{}, false, nil
	}
	if t.minSep > 0 && t.interferes(a, best, w) {
		return candidate{}, false, nil
	}
	return candidate{k: p.k, from: p.from, pick: pick{sample: best}, corr: float32(bestCorr)}, true, nil
}

// fitsNeighbours reports whether a pick at fractional sample x on trace k
// lies within twice the search window of the picks on all its picked grid
// neighbours. A trace between two blocks of a fault (or between two
// reflectors the horizon has reached from either side) fits only one of
// them and is left empty.
func (t *tracker) fitsNeighbours(k int, x float64) bool {
	nx := t.g.Crosslines
	il, xl := k/nx, k%nx
	ok := func(n int) bool {
		return t.h.State[n] == Empty || math.Abs(t.picks[n].sample-x) <= 2*t.halfWin
	}
	return (il == 0 || ok(k-nx)) && (il == t.g.Inlines-1 || ok(k+nx)) &&
		(xl == 0 || ok(k-1)) && (xl == nx-1 || ok(k+1))
}

// interferes reports whether an event of the opposite polarity lies
// closer than the minimum separation to the event at fractional sample x
// of trace a and is stronger, relative to it, than the threshold of its
// side (Options.MinSeparationMS, sideLobes). Strengths are the extremes
// of the parabolas Locate fits.
func (t *tracker) interferes(a []float32, x float64, w *worker) bool {
	pick := math.Abs(extremum(a, x))
	w.opposite = t.opposite.Locate(a, x-t.minSep, x+t.minSep, w.opposite[:0])
	for _, y := range w.opposite {
		if !(math.Abs(y-x) < t.minSep) {
			continue
		}
		limit := t.interfereAbove
		if y > x {
			limit = t.interfereBelow
		}
		if math.Abs(extremum(a, y)) >= limit*pick {
			return true
		}
	}
	return false
}

// sideLobes returns the largest strength, relative to the event at x, of
// the events of the opposite polarity closer than the minimum separation
// above and below it on trace a (0 where there is none).
func (t *tracker) sideLobes(a []float32, x float64) (above, below float64) {
	pick := math.Abs(extremum(a, x))
	for _, y := range t.opposite.Locate(a, x-t.minSep, x+t.minSep, nil) {
		if !(math.Abs(y-x) < t.minSep) || !(pick > 0) {
			continue
		}
		r := math.Abs(extremum(a, y)) / pick
		if y < x {
			above = max(above, r)
		} else {
			below = max(below, r)
		}
	}
	return above, below
}

// extremum returns the value at fractional sample x of the parabola
// through the sample nearest x and its two neighbours (the height of the
// vertex Locate found there); at a trace's ends, the sample itself.
func extremum(a []float32, x float64) float64 {
	i := min(max(0, int(math.Round(x))), len(a)-1)
	if i == 0 || i == len(a)-1 {
		return float64(a[i])
	}
	p, c, n := float64(a[i-1]), float64(a[i]), float64(a[i+1])
	d := x - float64(i)
	return c + 0.5*(n-p)*d + 0.5*(p-2*c+n)*d*d
}

// behind returns the trace on the far side of from as seen from k (the
// next one in line), or -1 when that is outside the grid.
func (t *tracker) behind(k, from int) int {
	nx := t.g.Crosslines
	b := 2*from - k
	if b < 0 || b >= len(t.picks) || (k-from == 1 || k-from == -1) && b/nx != from/nx {
		return -1
	}
	return b
}

// stretchStart returns the first sample of the analytic stretch around
// fractional sample x.
func (t *tracker) stretchStart(x float64) int {
	return min(max(0, int(math.Floor(x))-t.span/2), t.g.Samples-t.span)
}

// constraints reports whether a candidate with its envelope and phase set
// passes the phase and envelope constraints.
func (t *tracker) constraints(c *candidate) bool {
	if t.opt.MaxPhaseJumpDeg > 0 {
		fp := t.picks[c.from]
		d := math.Remainder(float64(c.phase)-float64(fp.phase), 2*math.Pi) * 180 / math.Pi
		if !(math.Abs(d) <= t.opt.MaxPhaseJumpDeg) {
			return false
		}
	}
	return !(t.opt.MinEnvelope > 0) || float64(c.env) >= t.opt.MinEnvelope*t.level(int(c.k))
}

// level returns the mean envelope at the picks of the picked traces within
// LevelRadius of trace k (at least the neighbour it grows from is picked).
func (t *tracker) level(k int) float64 {
	nx, r := t.g.Crosslines, t.opt.LevelRadius
	il, xl := k/nx, k%nx
	sum, n := 0.0, 0
	for i := max(0, il-r); i <= min(t.g.Inlines-1, il+r); i++ {
		for j := max(0, xl-r); j <= min(nx-1, xl+r); j++ {
			q := i*nx + j
			if t.h.State[q] != Empty {
				sum += float64(t.picks[q].env)
				n++
			}
		}
	}
	if n == 0 {
		return 0
	}
	return sum / float64(n)
}

// correlation returns Pearson's correlation coefficient between ref's
// samples rc-half..rc+half and trace a at the same offsets from position
// x (fractional samples, linearly interpolated), so that the two windows
// line up on the picks to a fraction of a sample. The windows are cut
// short equally where a trace ends. It returns -1 when either window is
// flat or holds a gap.
func correlation(ref []float32, rc int, a []float32, x float64, half int) float64 {
	// First and last offsets with both samples inside their traces.
	lo := max(-half, -rc, int(math.Ceil(-x)))
	hi := min(half, len(ref)-1-rc, int(math.Floor(float64(len(a)-1)-x)))
	if hi-lo < 2 {
		return -1
	}
	i0 := int(math.Floor(x))
	f := float32(x - float64(i0))
	var sa, sb, sab, saa, sbb float64
	for j := lo; j <= hi; j++ {
		ra := float64(ref[rc+j])
		k := i0 + j
		v := a[k]
		if f > 0 {
			v += f * (a[k+1] - v)
		}
		rb := float64(v)
		sa += ra
		sb += rb
		sab += ra * rb
		saa += ra * ra
		sbb += rb * rb
	}
	n := float64(hi - lo + 1)
	cov := sab - sa*sb/n
	va, vb := saa-sa*sa/n, sbb-sb*sb/n
	r := cov / math.Sqrt(va*vb)
	if math.IsNaN(r) || math.IsInf(r, 0) {
		return -1
	}
	return max(-1, min(1, r))
}
