package horizon

import (
	"fmt"
	"math"
)

// State says how a trace of a horizon was picked.
type State uint8

// Trace states.
const (
	// Empty: no pick (not reached, or a constraint failed).
	Empty State = iota
	// Tracked: picked by the tracker from a neighbour.
	Tracked
	// Seeded: picked at a seed point.
	Seeded
)

// String returns "empty", "tracked" or "seeded".
func (s State) String() string {
	switch s {
	case Empty:
		return "empty"
	case Tracked:
		return "tracked"
	case Seeded:
		return "seeded"
	}
	return fmt.Sprintf("state(%d)", uint8(s))
}

// Horizon is a surface picked on a grid of traces, inline-major: index
// il*Crosslines+xl holds the trace at grid index (il, xl).
type Horizon struct {
	Inlines, Crosslines int
	// TimeMS is the picked two-way time in milliseconds, NaN where the
	// trace is Empty.
	TimeMS []float64
	// Quality is the waveform correlation coefficient (-1..1) between the
	// trace and the neighbour it was tracked from over the correlation
	// window; 1 at seeds, NaN where Empty.
	Quality []float32
	// State says, per trace, whether it is empty, tracked or seeded.
	State []State
}

// New returns an empty horizon on a grid of the given size.
func New(inlines, crosslines int) *Horizon {
	n := inlines * crosslines
	h := &Horizon{
		Inlines: inlines, Crosslines: crosslines,
		TimeMS: make([]float64, n), Quality: make([]float32, n), State: make([]State, n),
	}
	nan := math.NaN()
	for k := range h.TimeMS {
		h.TimeMS[k] = nan
		h.Quality[k] = float32(nan)
	}
	return h
}

// At returns the time (ms) and state of the trace at grid index (il, xl);
// NaN and Empty outside the grid.
func (h *Horizon) At(il, xl int) (float64, State) {
	if il < 0 || il >= h.Inlines || xl < 0 || xl >= h.Crosslines {
		return math.NaN(), Empty
	}
	k := il*h.Crosslines + xl
	return h.TimeMS[k], h.State[k]
}

// Picked returns the number of traces that hold a pick (tracked or seeded).
func (h *Horizon) Picked() int {
	n := 0
	for _, s := range h.State {
		if s != Empty {
			n++
		}
	}
	return n
}

// set records a pick.
func (h *Horizon) set(k int, ms float64, q float32, s State) {
	h.TimeMS[k], h.Quality[k], h.State[k] = ms, q, s
}
