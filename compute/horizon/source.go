package horizon

import (
	"fmt"
	"math"
)

// Grid is the shape and sampling of a trace source.
type Grid struct {
	Inlines, Crosslines int     // grid size in traces
	Samples             int     // samples per trace
	DT                  float64 // sample interval, seconds
	T0                  float64 // time of the first sample, seconds
}

// validate checks that the grid can be tracked or mapped on.
func (g Grid) validate() error {
	switch {
	case g.Inlines < 1 || g.Crosslines < 1:
		return fmt.Errorf("grid of %d x %d traces: need at least one trace", g.Inlines, g.Crosslines)
	case g.Samples < 3:
		return fmt.Errorf("grid with %d samples per trace: need at least 3", g.Samples)
	case !(g.DT > 0) || math.IsInf(g.DT, 0):
		return fmt.Errorf("grid: sample interval %v s is not a positive number", g.DT)
	case math.IsNaN(g.T0) || math.IsInf(g.T0, 0):
		return fmt.Errorf("grid: start time %v s is not a finite number", g.T0)
	}
	return nil
}

// dtMS returns the sample interval in milliseconds.
func (g Grid) dtMS() float64 { return g.DT * 1000 }

// sampleAt converts a time in ms to a fractional sample index.
func (g Grid) sampleAt(ms float64) float64 { return (ms/1000 - g.T0) / g.DT }

// msAt converts a fractional sample index to a time in ms.
func (g Grid) msAt(sample float64) float64 { return (g.T0 + sample*g.DT) * 1000 }

// Source gives the traces of a regular 3D grid. Implementations must be
// safe for concurrent use: Track and Map read from several goroutines.
type Source interface {
	// Grid returns the grid's shape and sampling; it never changes.
	Grid() Grid
	// Trace returns the trace at grid index (il, xl), Grid().Samples
	// samples long. It may fill and return buf (when it is long enough) or
	// return a slice of its own; callers do not modify the result and do
	// not keep it beyond their next call with the same buf. NaN samples
	// are gaps.
	Trace(il, xl int, buf []float32) ([]float32, error)
}

// Traces is a Source over equal-length traces held in memory.
type Traces struct {
	grid Grid
	data [][]float32
}

// NewTraces returns a Source over data, inline-major: data[il*crosslines+xl]
// is the trace at grid index (il, xl). The traces are used, not copied.
// It fails when the count or a trace's length does not fit the grid.
func NewTraces(data [][]float32, inlines, crosslines int, dt, t0 float64) (*Traces, error) {
	if inlines < 1 || crosslines < 1 || len(data) != inlines*crosslines {
		return nil, fmt.Errorf("traces: %d traces for a %d x %d grid", len(data), inlines, crosslines)
	}
	g := Grid{Inlines: inlines, Crosslines: crosslines, Samples: len(data[0]), DT: dt, T0: t0}
	if err := g.validate(); err != nil {
		return nil, fmt.Errorf("traces: %w", err)
	}
	for k, tr := range data {
		if len(tr) != g.Samples {
			return nil, fmt.Errorf("traces: trace %d: %d samples, want %d like trace 0", k, len(tr), g.Samples)
		}
	}
	return &Traces{grid: g, data: data}, nil
}

// Grid implements Source.
func (t *Traces) Grid() Grid { return t.grid }

// Trace implements Source: it returns the stored slice itself.
func (t *Traces) Trace(il, xl int, _ []float32) ([]float32, error) {
	if il < 0 || il >= t.grid.Inlines || xl < 0 || xl >= t.grid.Crosslines {
		return nil, fmt.Errorf("trace at grid index (%d, %d): outside the %d x %d grid", il, xl, t.grid.Inlines, t.grid.Crosslines)
	}
	return t.data[il*t.grid.Crosslines+xl], nil
}
