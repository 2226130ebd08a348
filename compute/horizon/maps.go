package horizon

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"sync"
	"sync/atomic"
)

// Stat is what a map shows on each trace.
type Stat int

// Map statistics.
const (
	// Value is the attribute on the horizon, interpolated linearly
	// between the two samples around the horizon's time (for a cyclic
	// attribute such as phase the interpolation across the wrap is
	// meaningless: use a window statistic or the nearest sample).
	Value Stat = iota + 1
	// Mean is the mean over the window.
	Mean
	// MeanAbs is the mean of the absolute value over the window.
	MeanAbs
	// RMS is the root mean square over the window.
	RMS
	// MaxAbs is the largest absolute value in the window.
	MaxAbs
	// MinAbs is the smallest absolute value in the window.
	MinAbs
)

// Stats lists the accepted statistic names, in Stat order.
func Stats() []string { return []string{"value", "mean", "mean-abs", "rms", "max-abs", "min-abs"} }

// String returns the statistic's name as ParseStat accepts it.
func (s Stat) String() string {
	if s >= Value && s <= MinAbs {
		return Stats()[s-1]
	}
	return fmt.Sprintf("stat(%d)", int(s))
}

// ParseStat returns the statistic named s (see Stats).
func ParseStat(s string) (Stat, error) {
	for k, name := range Stats() {
		if s == name {
			return Stat(k + 1), nil
		}
	}
	return 0, fmt.Errorf("statistic %q: want one of %v", s, Stats())
}

// MapSpec says what to map along a horizon.
type MapSpec struct {
	Stat Stat
	// FromMS and ToMS bound the window of a statistic: from the horizon's
	// time plus FromMS to its time plus ToMS (negative is above, shallower),
	// or, when Base is set, from the horizon's time plus FromMS to Base's
	// time plus ToMS. A sample is in the window when its time is, ends
	// included. Ignored for Value.
	FromMS, ToMS float64
	// Base, when not nil, is the lower horizon of a window between two
	// horizons, on the same grid. Traces where either horizon is empty
	// are empty on the map.
	Base *Horizon
}

// Validate reports what in the spec Map cannot use: no statistic, a
// window that is not a pair of finite numbers, or (without Base) one that
// ends before it starts.
func (spec MapSpec) Validate() error {
	if spec.Stat < Value || spec.Stat > MinAbs {
		return fmt.Errorf("map: no statistic chosen (want one of %v)", Stats())
	}
	if spec.Stat != Value {
		if math.IsNaN(spec.FromMS) || math.IsNaN(spec.ToMS) || math.IsInf(spec.FromMS, 0) || math.IsInf(spec.ToMS, 0) {
			return fmt.Errorf("map: window %v to %v ms is not a pair of finite numbers", spec.FromMS, spec.ToMS)
		}
		if spec.Base == nil && spec.ToMS < spec.FromMS {
			return fmt.Errorf("map: window %g to %g ms ends before it starts", spec.FromMS, spec.ToMS)
		}
	}
	return nil
}

// AttributeMap is a map on a grid, inline-major like Horizon: Values[il*
// Crosslines+xl], NaN where there is no value (no pick, the window off the
// trace or holding only gaps).
type AttributeMap struct {
	Inlines, Crosslines int
	Values              []float32
}

// Map computes the map spec asks for along horizon top from the traces of
// src (usually an attribute volume) on runtime.GOMAXPROCS(0) workers.
// Gap samples (NaN) are left out of every statistic. progress (may be nil)
// is called with inlines done; cancelling ctx stops the run with
// ctx.Err().
func Map(ctx context.Context, src Source, top *Horizon, spec MapSpec, progress func(done, total int)) (*AttributeMap, error) {
	g := src.Grid()
	if err := g.validate(); err != nil {
		return nil, fmt.Errorf("map: %w", err)
	}
	if top == nil || top.Inlines != g.Inlines || top.Crosslines != g.Crosslines {
		return nil, fmt.Errorf("map: the horizon's grid does not match the survey's %d x %d traces", g.Inlines, g.Crosslines)
	}
	if spec.Base != nil && (spec.Base.Inlines != g.Inlines || spec.Base.Crosslines != g.Crosslines) {
		return nil, fmt.Errorf("map: the base horizon's grid does not match the survey's %d x %d traces", g.Inlines, g.Crosslines)
	}
	if err := spec.Validate(); err != nil {
		return nil, err
	}
	out := &AttributeMap{Inlines: g.Inlines, Crosslines: g.Crosslines, Values: make([]float32, g.Inlines*g.Crosslines)}
	var next, done atomic.Int64
	var wg sync.WaitGroup
	var mu sync.Mutex
	var firstErr error
	fail := func(err error) {
		mu.Lock()
		if firstErr == nil {
			firstErr = err
		}
		mu.Unlock()
	}
	for range min(runtime.GOMAXPROCS(0), g.Inlines) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			buf := make([]float32, g.Samples)
			for {
				if err := ctx.Err(); err != nil {
					fail(err)
					return
				}
				il := int(next.Add(1) - 1)
				if il >= g.Inlines {
					return
				}
				for xl := range g.Crosslines {
					k := il*g.Crosslines + xl
					v, err := mapTrace(src, g, top, spec, il, xl, buf)
					if err != nil {
						fail(fmt.Errorf("map: %w", err))
						return
					}
					out.Values[k] = float32(v)
				}
				if progress != nil {
					mu.Lock()
					progress(int(done.Add(1)), g.Inlines)
					mu.Unlock()
				}
			}
		}()
	}
	wg.Wait()
	if firstErr != nil {
		return nil, firstErr
	}
	return out, nil
}

// mapTrace returns the map's value at one trace.
func mapTrace(src Source, g Grid, top *Horizon, spec MapSpec, il, xl int, buf []float32) (float64, error) {
	w, ok := mapWindow(g, top, spec, il*g.Crosslines+xl)
	if !ok {
		return math.NaN(), nil
	}
	a, err := src.Trace(il, xl, buf)
	if err != nil {
		return 0, err
	}
	if w.value {
		return w.interpolate(a[int(math.Floor(w.x)):]), nil
	}
	return windowStat(a[w.lo:w.hi+1], spec.Stat), nil
}

// traceWindow is what a map reads on one trace: for Value the fractional
// sample x of the horizon, otherwise the samples lo to hi (ends included).
type traceWindow struct {
	value  bool
	x      float64
	lo, hi int
	last   bool // Value: floor(x) is the trace's last sample
}

// mapWindow returns the samples the map reads on trace k, and false when
// the map is NaN there (no pick, the horizon or the window off the trace).
// Window samples are those j with start <= time(j) <= end, clamped in
// floating point before conversion so that windows far off the trace stay
// empty.
func mapWindow(g Grid, top *Horizon, spec MapSpec, k int) (traceWindow, bool) {
	t0 := top.TimeMS[k]
	if top.State[k] == Empty || math.IsNaN(t0) {
		return traceWindow{}, false
	}
	if spec.Stat == Value {
		x := g.sampleAt(t0)
		if !(x >= 0 && x <= float64(g.Samples-1)) {
			return traceWindow{}, false
		}
		return traceWindow{value: true, x: x, last: int(math.Floor(x)) == g.Samples-1}, true
	}
	start, end := t0+spec.FromMS, t0+spec.ToMS
	if spec.Base != nil {
		if spec.Base.State[k] == Empty || math.IsNaN(spec.Base.TimeMS[k]) {
			return traceWindow{}, false
		}
		end = spec.Base.TimeMS[k] + spec.ToMS
	}
	n := float64(g.Samples)
	lo := int(math.Max(0, math.Min(n, math.Ceil(g.sampleAt(start)-1e-9))))
	hi := int(math.Max(-1, math.Min(n-1, math.Floor(g.sampleAt(end)+1e-9))))
	if lo > hi {
		return traceWindow{}, false
	}
	return traceWindow{lo: lo, hi: hi}, true
}

// interpolate returns Value's linear interpolation at w.x from a, which
// starts at sample floor(w.x).
func (w traceWindow) interpolate(a []float32) float64 {
	if w.last {
		return float64(a[0])
	}
	f := w.x - math.Floor(w.x)
	return (1-f)*float64(a[0]) + f*float64(a[1])
}

// windowStat returns statistic s (not Value) of the samples in w, gaps
// left out; NaN when w holds none.
func windowStat(w []float32, s Stat) float64 {
	n := 0
	var sum, sumSq float64
	mx, mn := math.Inf(-1), math.Inf(1)
	for _, v := range w {
		x := float64(v)
		if math.IsNaN(x) || math.IsInf(x, 0) {
			continue
		}
		n++
		switch s {
		case Mean:
			sum += x
		case MeanAbs:
			sum += math.Abs(x)
		case RMS:
			sumSq += x * x
		case MaxAbs:
			mx = math.Max(mx, math.Abs(x))
		case MinAbs:
			mn = math.Min(mn, math.Abs(x))
		}
	}
	if n == 0 {
		return math.NaN()
	}
	switch s {
	case Mean, MeanAbs:
		return sum / float64(n)
	case RMS:
		return math.Sqrt(sumSq / float64(n))
	case MaxAbs:
		return mx
	}
	return mn
}
