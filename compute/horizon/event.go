package horizon

import (
	"fmt"
	"math"
)

// Event is the phase of the wavelet a horizon follows.
type Event int

// Events.
const (
	// Peak: a local maximum of positive amplitude.
	Peak Event = iota + 1
	// Trough: a local minimum of negative amplitude.
	Trough
	// ZeroRising: a zero crossing from negative to positive amplitude.
	ZeroRising
	// ZeroFalling: a zero crossing from positive to negative amplitude.
	ZeroFalling
)

// Events lists the accepted event names, for usage messages.
func Events() []string { return []string{"peak", "trough", "zero-rising", "zero-falling"} }

// String returns the event's name as ParseEvent accepts it.
func (e Event) String() string {
	if e >= Peak && e <= ZeroFalling {
		return Events()[e-1]
	}
	return fmt.Sprintf("event(%d)", int(e))
}

// ParseEvent returns the event named s ("peak", "trough", "zero-rising",
// "zero-falling").
func ParseEvent(s string) (Event, error) {
	for k, name := range Events() {
		if s == name {
			return Event(k + 1), nil
		}
	}
	return 0, fmt.Errorf("event %q: want peak, trough, zero-rising or zero-falling", s)
}

// valid reports whether e is one of the four events.
func (e Event) valid() bool { return e >= Peak && e <= ZeroFalling }

// Locate appends to dst the positions, in fractional samples, of every
// event of kind e on trace a whose position lies in [from, to], and
// returns the extended slice.
//
// A peak is a sample greater than the one before it, not less than the
// one after it, and positive; its position is the vertex of the parabola
// through it and its two neighbours,
//
//	i + (a[i-1] - a[i+1]) / (2 (a[i-1] - 2 a[i] + a[i+1])),
//
// the usual three-point parabolic interpolation of a sampled maximum
// (common practice; e.g. Press et al., Numerical Recipes, section 10.2,
// and scipy's peak refinement by quadratic fit). A trough is a peak of -a.
// A zero crossing lies between samples i and i+1 whose signs differ in
// the event's sense (a[i] <= 0 < a[i+1] rising, a[i] >= 0 > a[i+1]
// falling); its position is the zero of the straight line through them,
// i + a[i] / (a[i] - a[i+1]). Gap samples (NaN) never form an event.
func (e Event) Locate(a []float32, from, to float64, dst []float64) []float64 {
	if !(from <= to) {
		return dst
	}
	lo := max(0, int(math.Floor(from))-1)
	hi := min(len(a)-1, int(math.Ceil(to))+1)
	switch e {
	case Peak, Trough:
		s := float32(1)
		if e == Trough {
			s = -1
		}
		for i := max(lo, 1); i <= hi && i < len(a)-1; i++ {
			p, c, n := s*a[i-1], s*a[i], s*a[i+1]
			if !(c > p && c >= n && c > 0) {
				continue
			}
			den := float64(p) - 2*float64(c) + float64(n)
			x := float64(i)
			if den < 0 {
				x += 0.5 * (float64(p) - float64(n)) / den
			}
			if x >= from && x <= to {
				dst = append(dst, x)
			}
		}
	case ZeroRising, ZeroFalling:
		s := float32(1)
		if e == ZeroFalling {
			s = -1
		}
		for i := lo; i < hi && i+1 < len(a); i++ {
			c, n := s*a[i], s*a[i+1]
			if !(c <= 0 && n > 0) {
				continue
			}
			x := float64(i) + float64(c)/(float64(c)-float64(n))
			if x >= from && x <= to {
				dst = append(dst, x)
			}
		}
	}
	return dst
}
