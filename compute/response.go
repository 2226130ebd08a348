package compute

import (
	"context"
	"math"
)

// lobeValue picks what a response attribute reports for one envelope lobe,
// from the envelope ap, phase phi (radians) and instantaneous frequency fq
// at the (interpolated) envelope peak.
type lobeValue func(ap, phi, fq float64) float64

// Response attributes after Bodine (1984): each sample between two
// envelope minima takes the value at the envelope maximum between them.
func lobeAmplitude(ap, _, _ float64) float64 { return ap }
func lobePhase(_, phi, _ float64) float64    { return phi * (180 / math.Pi) }
func lobeFrequency(_, _, fq float64) float64 {
	return fq
}

// lobePolarity is apparent polarity after Taner, Koehler and Sheriff
// (1979): the envelope peak value, signed by the trace at the peak.
func lobePolarity(ap, phi, _ float64) float64 {
	if math.Cos(phi) < 0 {
		return -ap
	}
	return ap
}

// lobeAttribute makes a computeFunc for a response-type attribute.
//
// Lobes: a sample j is a lobe boundary (an envelope minimum) when
// a[j-1] > a[j] <= a[j+1]; a lobe runs from one boundary (included) to the
// next (excluded), the first from sample 0 and the last to the trace end.
// Gap samples have zero envelope here, so they bound lobes too. The peak
// is the lobe's largest sample refined by a parabola through it and its
// neighbours (offset δ in -½..½ samples); the values at the peak are the
// parabola's top for the envelope, φ + 2π f δ dt for the phase (the phase
// moves at the instantaneous frequency) and the linear interpolation of
// the instantaneous frequency. Without the refinement a peak half a sample
// off the grid would shift the response phase of a 30 Hz wavelet sampled at
// 2 ms by 11 degrees.
func lobeAttribute(value lobeValue) computeFunc {
	return func(ctx context.Context, in, out Section, p Params, progress func(done, total int)) error {
		return analyticRun(ctx, in, out, p, progress, analyticNeeds{derivatives: true}, func(w *traceWork, out []float32) {
			n := w.n
			a, f := w.a, w.f
			for j := range n {
				if w.gap[j] {
					a[j], f[j] = 0, 0
					continue
				}
				a[j] = math.Hypot(w.x[j], w.h[j])
				f[j] = frequencyAt(w, j)
			}
			start := 0
			for j := 1; j <= n; j++ {
				if j < n && !(j+1 < n && a[j-1] > a[j] && a[j] <= a[j+1]) {
					continue
				}
				v := w.lobe(start, j, value)
				for k := start; k < j; k++ {
					out[k] = float32(v)
				}
				start = j
			}
		})
	}
}

// lobe returns value() at the refined envelope peak of samples [lo, hi).
func (w *traceWork) lobe(lo, hi int, value lobeValue) float64 {
	a, f := w.a, w.f
	p := lo
	for k := lo + 1; k < hi; k++ {
		if a[k] > a[p] {
			p = k
		}
	}
	ap := a[p]
	phi := math.Atan2(w.h[p], w.x[p])
	fq := f[p]
	if p > 0 && p < w.n-1 {
		l, r := a[p-1], a[p+1]
		if d := l - 2*ap + r; d < 0 {
			delta := min(0.5, max(-0.5, 0.5*(l-r)/d))
			ap -= 0.25 * (l - r) * delta
			phi = math.Remainder(phi+twoPi*fq*delta*w.dt, twoPi)
			if delta >= 0 {
				fq += delta * (f[p+1] - fq)
			} else {
				fq -= delta * (f[p-1] - fq)
			}
		}
	}
	return value(ap, phi, fq)
}
