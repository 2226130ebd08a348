package compute

import (
	"context"
	"math"
)

// windowedAttribute makes a computeFunc for attributes built from sums over
// a centred sliding window of 2*half+1 samples (the `window` parameter in
// ms, truncated at the trace ends). Gap samples carry zero weight.
func windowedAttribute(fill func(w *traceWork, half int, out []float32)) computeFunc {
	return func(ctx context.Context, in, out Section, p Params, progress func(done, total int)) error {
		half := windowHalf(p.Float("window"), in.DT)
		return analyticRun(ctx, in, out, p, progress, analyticNeeds{derivatives: true}, func(w *traceWork, out []float32) {
			fill(w, half, out)
		})
	}
}

// prefix stores the running sums of v in s (len(v)+1 long, s[0] = 0).
func prefix(s, v []float64) {
	s[0] = 0
	acc := 0.0
	for j, x := range v {
		acc += x
		s[j+1] = acc
	}
}

// windowSum returns the sum over samples j-half..j+half (clipped) from
// prefix sums s.
func windowSum(s []float64, j, half int) float64 {
	lo, hi := j-half, j+half+1
	if lo < 0 {
		lo = 0
	}
	if hi > len(s)-1 {
		hi = len(s) - 1
	}
	return s[hi] - s[lo]
}

// ratio returns num/den, or 0 when den is not positive (a dead window).
func ratio(num, den float64) float64 {
	if den > 0 {
		return num / den
	}
	return 0
}

// powerWeights fills w.num with a² f = (x h' - h x')/2π, w.den with a² and
// w.mom with a²(f² + b²) = (x'² + h'²)/4π² as prefix sums, gaps at zero
// weight. Barnes (1993), Geophysics 58, eqs. for the weighted moments.
func (w *traceWork) powerWeights() {
	for j := range w.n {
		if w.gap[j] {
			w.v[j], w.a[j], w.f[j] = 0, 0, 0
			continue
		}
		x, h, dx, dh := w.x[j], w.h[j], w.dx[j], w.dh[j]
		w.v[j] = (x*dh - h*dx) / twoPi
		w.a[j] = x*x + h*h
		w.f[j] = (dx*dx + dh*dh) / (twoPi * twoPi)
	}
	prefix(w.num, w.v)
	prefix(w.den, w.a)
	prefix(w.mom, w.f)
}

// weightedFrequencyAt is Barnes' (1993) weighted average frequency: the
// envelope-squared-weighted mean of instantaneous frequency over the
// window, Σ a² f / Σ a². Over a whole wavelet it equals the centroid of the
// wavelet's power spectrum.
func weightedFrequencyAt(w *traceWork, half int, out []float32) {
	w.powerWeights()
	for j := range out {
		out[j] = float32(ratio(windowSum(w.num, j, half), windowSum(w.den, j, half)))
	}
}

// weightedBandwidthAt is Barnes' (1993) weighted bandwidth:
// σ² = Σ a² [(f - f̄)² + b²] / Σ a², with b = a'/(2π a) the instantaneous
// bandwidth, computed as Σ a²(f² + b²)/Σ a² - f̄². Over a whole wavelet it
// equals the standard deviation of the wavelet's power spectrum.
func weightedBandwidthAt(w *traceWork, half int, out []float32) {
	w.powerWeights()
	for j := range out {
		den := windowSum(w.den, j, half)
		fm := ratio(windowSum(w.num, j, half), den)
		out[j] = float32(math.Sqrt(max(0, ratio(windowSum(w.mom, j, half), den)-fm*fm)))
	}
}

// thinBedAt is the thin-bed indicator after Taner (2001): instantaneous
// frequency minus the weighted average frequency over the window, whose
// weights are the envelope squared, a² (Barnes 1993, as
// weightedFrequencyAt), not the envelope (from
// memory: Taner takes the difference of the two; we keep its sign, so
// interference spikes show up and down).
func thinBedAt(w *traceWork, half int, out []float32) {
	w.powerWeights()
	for j := range out {
		fw := ratio(windowSum(w.num, j, half), windowSum(w.den, j, half))
		out[j] = float32(w.v[j]/(w.a[j]+w.eps) - fw)
	}
}

// sweetnessAt is sweetness after Radovich and Oliveros (1998): envelope
// over the square root of frequency. The frequency used is the weighted
// average frequency (Barnes 1993) over the window rather than the
// instantaneous frequency: it is positive, smooth and does not spike or go
// negative where wavelets interfere, so sweetness keeps the envelope's
// shape. It is floored at the min-frequency parameter before the square
// root, so dead or very low-frequency stretches cannot divide by near zero.
func sweetnessAt(w *traceWork, half int, out []float32) {
	w.powerWeights()
	floor := w.p.Float("min-frequency")
	for j := range out {
		fw := ratio(windowSum(w.num, j, half), windowSum(w.den, j, half))
		out[j] = float32(math.Sqrt(w.a[j]) / math.Sqrt(max(fw, floor)))
	}
}

// amplitudeWeightedFrequencyAt is Taner's (2001) amplitude-weighted
// frequency: Σ a f / Σ a over the window (envelope weights, where Barnes'
// weighted frequency uses envelope squared).
func amplitudeWeightedFrequencyAt(w *traceWork, half int, out []float32) {
	for j := range w.n {
		if w.gap[j] {
			w.v[j], w.a[j] = 0, 0
			continue
		}
		x, h := w.x[j], w.h[j]
		a2 := x*x + h*h
		w.a[j] = math.Sqrt(a2)
		w.v[j] = (x*w.dh[j] - h*w.dx[j]) / (twoPi * math.Sqrt(a2+w.eps)) // a f
	}
	prefix(w.num, w.v)
	prefix(w.den, w.a)
	for j := range out {
		out[j] = float32(ratio(windowSum(w.num, j, half), windowSum(w.den, j, half)))
	}
}

// amplitudeWeightedCosPhaseAt is Taner's (2001) amplitude-weighted cosine
// of phase: Σ a cos φ / Σ a = Σ x / Σ a over the window, in -1..1.
func amplitudeWeightedCosPhaseAt(w *traceWork, half int, out []float32) {
	for j := range w.n {
		w.v[j] = w.x[j] // zero at gaps already
		w.a[j] = 0
		if !w.gap[j] {
			w.a[j] = math.Hypot(w.x[j], w.h[j])
		}
	}
	prefix(w.num, w.v)
	prefix(w.den, w.a)
	for j := range out {
		out[j] = float32(min(1, max(-1, ratio(windowSum(w.num, j, half), windowSum(w.den, j, half)))))
	}
}

// rmsAmplitude is the root mean square of the trace over a centred window
// of the `window` parameter (common practice), gaps left out of the mean.
func rmsAmplitude(ctx context.Context, in, out Section, p Params, progress func(done, total int)) error {
	n := in.Samples()
	half := windowHalf(p.Float("window"), in.DT)
	type buf struct{ sq, cnt, v, c []float64 }
	return forEachTrace(ctx, len(in.Traces), func() *buf {
		return &buf{make([]float64, n+1), make([]float64, n+1), make([]float64, n), make([]float64, n)}
	}, func(b *buf, i int) error {
		tr := in.Traces[i]
		for j, s := range tr {
			if isGap(s) {
				b.v[j], b.c[j] = 0, 0
				continue
			}
			b.v[j], b.c[j] = float64(s)*float64(s), 1
		}
		prefix(b.sq, b.v)
		prefix(b.cnt, b.c)
		o := out.Traces[i]
		for j := range o {
			if isGap(tr[j]) {
				o[j] = float32(math.NaN())
				continue
			}
			o[j] = float32(math.Sqrt(ratio(windowSum(b.sq, j, half), windowSum(b.cnt, j, half))))
		}
		return nil
	}, progress)
}

// relativeImpedance is the running integral of the trace with a low-cut,
// after Taner (2001): since ln Z is about twice the running sum of the
// reflection coefficients, the integrated trace follows relative
// impedance; the low-cut removes the drift integration builds up. It is
// done in the frequency domain as one zero-phase filter, X(f)·L(f)/(i2πf),
// with L the one-octave cosine-squared low-cut ramp of the band-pass
// (half amplitude at `low-cut`) and the DC and Nyquist terms set to zero.
// Units are amplitude·s.
func relativeImpedance(ctx context.Context, in, out Section, p Params, progress func(done, total int)) error {
	fc := p.Float("low-cut")
	op := func(p *analyticPair) spectralOp {
		return p.makeOp(true, func(om float64) float64 {
			return -lowCutGain(om/twoPi, fc) / om // L(f)/(i2πf)
		})
	}
	return analyticRun(ctx, in, out, p, progress, analyticNeeds{op: op}, func(w *traceWork, out []float32) {
		for j := range out {
			out[j] = float32(w.v[j])
		}
	})
}
