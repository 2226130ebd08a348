package segytest

import "slices"

// Grid is a regular inline-sorted 3D file of inlines x crosslines traces
// (inline numbers from 100 by 1, crosslines from 20 by 2) of samples IEEE
// floats at 4 ms, with CDP coordinates on a 25 m x 12.5 m grid (scalar -100:
// centimetres stored, SEG-Y rev 1 table 3) and sample values that encode
// the trace's position (inline*1000 + crossline at every sample), so a
// reader that mixes traces up is caught.
func Grid(inlines, crosslines, samples int) File {
	f := File{Format: 5, Samples: samples, Interval: 4000, TraceSamples: SameAsBinary, TraceInterval: SameAsBinary, Revision: [2]byte{1, 0}}
	for i := 0; i < inlines; i++ {
		for j := 0; j < crosslines; j++ {
			il, xl := 100+i, 20+2*j
			v := make([]float64, samples)
			for k := range v {
				v[k] = float64(il*1000 + xl)
			}
			f.Traces = append(f.Traces, Trace{Inline: il, Crossline: xl, CoordScalar: -100,
				X: 50000000 + 1250*j, Y: 600000000 + 2500*i, Values: v})
		}
	}
	return f
}

// Irregular is a named change that turns a regular Grid into one a sampled
// open can mistake for regular: each leaves most traces where a regular
// grid puts them.
type Irregular struct {
	Name   string
	Change func(tr []Trace, crosslines int) []Trace
}

// Irregulars lists the irregular layouts the sampled-open tests use:
// gaps, duplicates, a swapped pair of lines (whole inlines stored in the
// other's place), a partial last inline, a trace out of order.
func Irregulars() []Irregular {
	return []Irregular{
		{"gap", func(tr []Trace, nx int) []Trace {
			k := len(tr) / 3
			return slices.Delete(slices.Clone(tr), k, k+1) // one trace missing mid-file
		}},
		{"gaps-spread", func(tr []Trace, nx int) []Trace {
			var out []Trace
			for i, t := range tr {
				if i%97 != 50 {
					out = append(out, t)
				}
			}
			return out
		}},
		{"duplicate", func(tr []Trace, nx int) []Trace {
			k := len(tr) / 2
			out := slices.Clone(tr)
			out[k+1] = out[k] // trace k's position twice; k+1's missing
			return out
		}},
		{"swapped-lines", func(tr []Trace, nx int) []Trace {
			out := slices.Clone(tr)
			a := (len(tr)/nx/2 - 1) * nx // the inlines before the middle one
			for j := 0; j < nx; j++ {
				out[a+j], out[a+nx+j] = out[a+nx+j], out[a+j]
			}
			return out
		}},
		{"partial-last-inline", func(tr []Trace, nx int) []Trace {
			return slices.Clone(tr[:len(tr)-nx/3])
		}},
		{"out-of-order-trace", func(tr []Trace, nx int) []Trace {
			out := slices.Clone(tr)
			k := len(tr)/2 + 3
			out[k], out[k+nx] = out[k+nx], out[k]
			return out
		}},
	}
}

// SampledByFastOpen reports whether trace i is among the 4000 trace
// headers spread evenly through n traces that segy.OpenFast samples by
// default (trace j*n/4000 for j = 0..3999), so a test can put an
// irregularity where the sample does not see it.
func SampledByFastOpen(i, n int) bool {
	for j := 0; j < 4000; j++ {
		if int(int64(j)*int64(n)/4000) == i {
			return true
		}
	}
	return false
}
