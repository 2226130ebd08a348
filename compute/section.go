package compute

import (
	"fmt"
	"math"
)

// Section is a block of traces with common sampling. Every attribute maps a
// Section to a Section with the same shape, DT and T0.
//
// Samples that are NaN or ±Inf are gaps: the computations treat them as
// missing (zero inside transforms, left out of window sums) and the outputs
// hold NaN at the same samples, so a gap never spreads along a trace.
type Section struct {
	Traces [][]float32 // Traces[i] is one trace; all the same length
	DT     float64     // sample interval in seconds
	T0     float64     // time of the first sample in seconds
}

// Samples returns the number of samples per trace (0 for an empty section).
func (s Section) Samples() int {
	if len(s.Traces) == 0 {
		return 0
	}
	return len(s.Traces[0])
}

// validate checks that the section can be computed on: a positive, finite
// sample interval and traces of one length.
func (s Section) validate() error {
	if !(s.DT > 0) || math.IsInf(s.DT, 0) {
		return fmt.Errorf("section: sample interval %v s is not a positive number", s.DT)
	}
	if math.IsNaN(s.T0) || math.IsInf(s.T0, 0) {
		return fmt.Errorf("section: start time %v s is not a finite number", s.T0)
	}
	n := s.Samples()
	for i, tr := range s.Traces {
		if len(tr) != n {
			return fmt.Errorf("section: trace %d: %d samples, want %d like trace 0", i, len(tr), n)
		}
	}
	return nil
}

// newLike returns a section with the shape and sampling of s, its traces
// carved from one backing array.
func newLike(s Section) Section {
	n := s.Samples()
	back := make([]float32, n*len(s.Traces))
	out := Section{Traces: make([][]float32, len(s.Traces)), DT: s.DT, T0: s.T0}
	for i := range out.Traces {
		out.Traces[i] = back[i*n : (i+1)*n : (i+1)*n]
	}
	return out
}

// isGap reports whether a sample is a gap (NaN or ±Inf).
func isGap(v float32) bool {
	f := float64(v)
	return math.IsNaN(f) || math.IsInf(f, 0)
}

// windowHalf converts a window length in milliseconds to a half-width in
// samples for a centred window of 2*half+1 samples (at least one sample).
func windowHalf(windowMS, dt float64) int {
	half := int(math.Round(windowMS / 1000 / dt / 2))
	if half < 0 {
		half = 0
	}
	return half
}
