package compute

import (
	"fmt"
	"math"
)

// End-treatment modes for the analytic trace (the `pad` parameter).
const (
	// PadNone transforms the trace at its own length: the result is the
	// plain discrete analytic signal of Marple (1999), "Computing the
	// discrete-time analytic signal via FFT", IEEE Transactions on Signal
	// Processing 47(9), 2600-2603, the same as scipy.signal.hilbert(x).
	// Its ends wrap round onto each other and lengths with large prime
	// factors transform slowly.
	PadNone = "none"
	// PadFast appends zeros up to the next power of two m (the fastest FFT
	// lengths in gonum); the result equals Marple's analytic signal of the
	// zero-padded trace, cut back to the trace length, i.e.
	// scipy.signal.hilbert(x, N=m)[:n]. This is the default.
	PadFast = "fast"
	// PadDouble appends zeros up to the next power of two of at least twice
	// the trace length, so the circular wrap-around of the transform falls
	// on the padding rather than on the other end of the trace.
	PadDouble = "double"
)

// PadModes lists the accepted values of the `pad` parameter.
func PadModes() []string { return []string{PadNone, PadFast, PadDouble} }

// EndTreatment says how a trace's ends are handled before its FFT.
//
// Zero padding (PadFast, PadDouble) keeps the far end of the trace from
// wrapping onto the near one, but a trace that is still strong at its ends
// then steps to zero there, and that step rings into the quadrature: about
// 3% in instantaneous frequency 0.2 s into a chirp at 26 Hz (see
// TestChirpInstantaneousFrequency). A taper of a wavelength or so
// (TaperMS ~ 100) removes it at the cost of the tapered samples' amplitude.
// Traces with quiet ends (mutes, decayed energy) need no taper.
type EndTreatment struct {
	// Pad is PadNone, PadFast or PadDouble ("" means PadFast).
	Pad string
	// TaperMS, when positive, multiplies the first and last TaperMS
	// milliseconds of the trace by a half Hann (cosine-squared) ramp,
	// w_j = sin²(π(j+½)/(2L)) for j = 0..L-1 (mirrored at the end), before
	// the transform. The analytic trace is then that of the tapered trace.
	// The ramp is cut to half the trace when the trace is shorter.
	TaperMS float64
}

// transformLength returns the FFT length used for traces of n samples.
func (e EndTreatment) transformLength(n int) (int, error) {
	switch e.Pad {
	case PadNone:
		return n, nil
	case PadFast, "":
		return NextPow2(n), nil
	case PadDouble:
		return NextPow2(2 * n), nil
	}
	return 0, fmt.Errorf("end treatment: unknown pad mode %q (want none, fast or double)", e.Pad)
}

// analytic holds one worker's FFT plan and work buffers for the analytic
// trace z = x + i h of traces of one length, and the time derivatives
// computed in the frequency domain. Build it with setup, then per trace call
// load and the transforms needed.
type analytic struct {
	n, m int
	dt   float64
	end  EndTreatment

	taper []float64
	fft   realFFT
	seq   []float64    // m
	spec  []complex128 // m/2+1: spectrum of the loaded trace
	work  []complex128 // m/2+1: filtered spectrum

	x, h   []float64 // trace (gaps zeroed, tapered) and its Hilbert transform
	dx, dh []float64 // first time derivatives of x and h (per second)

	// hb, dxb, dhb are the m-long transform outputs that h, dx and dh are
	// the first n samples of, so the inverse FFTs write them in place.
	hb, dxb, dhb []float64
	gap          []bool // gap[j]: sample j was NaN or Inf
	gaps         int    // number of gap samples in the loaded trace
}

// setup readies p for traces of n samples at interval dt. It keeps the plan
// when nothing changed.
func (p *analytic) setup(n int, dt float64, end EndTreatment) error {
	if p.fft != nil && p.n == n && p.dt == dt && p.end == end {
		return nil
	}
	m, err := end.transformLength(n)
	if err != nil {
		return err
	}
	if end.TaperMS < 0 || math.IsNaN(end.TaperMS) {
		return fmt.Errorf("end treatment: taper %v ms is negative", end.TaperMS)
	}
	p.n, p.m, p.dt, p.end = n, m, dt, end
	if p.fft == nil || p.fft.Len() != m {
		p.fft = newRealFFT(m)
	}
	p.seq = make([]float64, m)
	p.spec = make([]complex128, m/2+1)
	p.work = make([]complex128, m/2+1)
	p.x = make([]float64, n)
	p.hb, p.dxb, p.dhb = make([]float64, m), make([]float64, m), make([]float64, m)
	p.h, p.dx, p.dh = p.hb[:n], p.dxb[:n], p.dhb[:n]
	p.gap = make([]bool, n)
	L := int(math.Round(end.TaperMS / 1000 / dt))
	if L > n/2 {
		L = n / 2
	}
	p.taper = make([]float64, L)
	for j := range p.taper {
		s := math.Sin(math.Pi * (float64(j) + 0.5) / float64(2*L))
		p.taper[j] = s * s
	}
	return nil
}

// load copies a trace into p.x (gaps set to zero and flagged, taper
// applied) and computes its spectrum, divided by m so that inverse
// transforms come out normalised.
func (p *analytic) load(tr []float32) {
	p.gaps = 0
	for j, v := range tr {
		f := float64(v)
		// NaN fails every comparison; ±Inf exceeds the largest float32.
		if !(f >= -math.MaxFloat32 && f <= math.MaxFloat32) {
			p.gap[j] = true
			p.gaps++
			f = 0
		} else {
			p.gap[j] = false
		}
		p.x[j] = f
	}
	for j, w := range p.taper {
		p.x[j] *= w
		p.x[p.n-1-j] *= w
	}
	copy(p.seq, p.x)
	clear(p.seq[p.n:])
	p.fft.Coefficients(p.spec, p.seq)
	s := complex(1/float64(p.m), 0)
	for k := range p.spec {
		p.spec[k] *= s
	}
}

// inverse transforms p.work back to the time domain and stores the first n
// samples in dst.
func (p *analytic) inverse(dst []float64) {
	p.fft.Sequence(p.seq, p.work)
	copy(dst, p.seq[:len(dst)])
}

// nyquist reports whether the last spectrum bin is the Nyquist bin (m even).
func (p *analytic) nyquist() bool { return p.m%2 == 0 }

// quadrature computes p.h, the imaginary part of Marple's discrete analytic
// signal of the (padded) trace: spectrum multiplied by -i for positive
// frequencies, zero at DC and Nyquist.
func (p *analytic) quadrature() {
	w := p.work
	w[0] = 0
	for k := 1; k < len(w); k++ {
		c := p.spec[k]
		w[k] = complex(imag(c), -real(c))
	}
	if p.nyquist() {
		w[len(w)-1] = 0
	}
	p.fft.Sequence(p.hb, w)
}

// derivatives computes p.dx and p.dh, the time derivatives of x and h,
// by multiplying the spectrum by iω (x) and |ω| (h); the Nyquist bin of an
// even length has no defined derivative and is dropped. Together they are
// the derivative of the analytic signal, z' = ifft(iω Z).
func (p *analytic) derivatives() {
	w, dw, last := p.derivativeBins()
	for k := 1; k < last; k++ {
		c := p.spec[k]
		om := dw * float64(k)
		w[k] = complex(-om*imag(c), om*real(c))
	}
	p.fft.Sequence(p.dxb, w)
	for k := 1; k < last; k++ {
		w[k] = p.spec[k] * complex(dw*float64(k), 0)
	}
	p.fft.Sequence(p.dhb, w)
}

// derivativeBins prepares the work spectrum for a time derivative: the
// zero-frequency bin and, for an even length, the Nyquist bin (which has no
// defined derivative) are zeroed. It returns the work spectrum, the angular
// frequency step and the end of the bins left to fill (1 to last-1).
func (p *analytic) derivativeBins() (w []complex128, dw float64, last int) {
	w = p.work
	dw = 2 * math.Pi / (float64(p.m) * p.dt)
	last = len(w)
	if p.nyquist() {
		last--
		w[last] = 0
	}
	w[0] = 0
	return w, dw, last
}

// secondDerivatives stores x” and h” (spectrum times -ω² and iω²) in
// ddx and ddh.
func (p *analytic) secondDerivatives(ddx, ddh []float64) {
	w, dw, last := p.derivativeBins()
	for k := 1; k < last; k++ {
		om := dw * float64(k)
		w[k] = p.spec[k] * complex(-om*om, 0)
	}
	p.inverse(ddx)
	for k := 1; k < last; k++ {
		om := dw * float64(k)
		c := p.spec[k]
		w[k] = complex(-om*om*imag(c), om*om*real(c))
	}
	p.inverse(ddh)
}

// AnalyticTrace returns the analytic trace x + i h of one trace sampled at
// dt seconds with the given end treatment. Gap samples (NaN, Inf) are
// treated as zero in the transform and are NaN in the result.
func AnalyticTrace(trace []float32, dt float64, end EndTreatment) ([]complex128, error) {
	if !(dt > 0) || math.IsInf(dt, 0) {
		return nil, fmt.Errorf("analytic trace: sample interval %v s is not a positive number", dt)
	}
	out := make([]complex128, len(trace))
	if len(trace) == 0 {
		return out, nil
	}
	var p analytic
	if err := p.setup(len(trace), dt, end); err != nil {
		return nil, fmt.Errorf("analytic trace: %w", err)
	}
	p.load(trace)
	p.quadrature()
	for j := range out {
		if p.gap[j] {
			out[j] = complex(math.NaN(), math.NaN())
			continue
		}
		out[j] = complex(p.x[j], p.h[j])
	}
	return out, nil
}
