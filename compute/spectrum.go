package compute

import (
	"math"
	"math/cmplx"
)

// Spectrum is a one-sided amplitude spectrum.
type Spectrum struct {
	Freqs, Amps []float64 // frequency in Hz of each bin, and its amplitude
	PeakHz      float64   // frequency of the largest amplitude
	CentroidHz  float64   // amplitude-weighted mean frequency, Σ f A / Σ A
}

// TraceSpectrum returns the amplitude spectrum of a trace sampled at dt
// seconds. The trace (gaps as zeros, no taper) is transformed at its own
// length n, so bin k is at k/(n dt) Hz. Amplitudes are
// scaled so a sinusoid of amplitude A filling the trace reads about A at
// its frequency: 2|X_k|/n, and |X_k|/n at 0 Hz and Nyquist. It returns the
// zero Spectrum for an empty trace or a sampling interval that is not a
// positive number.
func TraceSpectrum(trace []float32, dt float64) Spectrum {
	if len(trace) == 0 || !(dt > 0) || math.IsInf(dt, 0) {
		return Spectrum{}
	}
	var s spectrumWork
	s.setup(len(trace), dt, 0)
	s.add(trace)
	return s.result(1)
}

// SectionSpectrum returns the amplitude spectrum of the time window t0..t1
// (seconds, inclusive, clipped to the section) averaged over the section's
// traces. The window is tapered by a Tukey window (cosine ramps over 10% of
// its length at each end) so its cut edges do not leak, and amplitudes are
// scaled as in TraceSpectrum with the taper's sum in place of n. It
// returns the zero Spectrum when the window holds no sample.
func SectionSpectrum(sec Section, t0, t1 float64) Spectrum {
	if sec.validate() != nil || len(sec.Traces) == 0 || math.IsNaN(t0) || math.IsNaN(t1) {
		return Spectrum{}
	}
	n := sec.Samples()
	i0 := max(0, int(math.Ceil((t0-sec.T0)/sec.DT-1e-9)))
	i1 := min(n-1, int(math.Floor((t1-sec.T0)/sec.DT+1e-9)))
	if i1 < i0 {
		return Spectrum{}
	}
	var s spectrumWork
	s.setup(i1-i0+1, sec.DT, 0.1)
	for _, tr := range sec.Traces {
		s.add(tr[i0 : i1+1])
	}
	return s.result(len(sec.Traces))
}

// spectrumWork accumulates amplitude spectra of equal-length pieces.
// Each piece is transformed at its own length (no padding) with a
// realPlan.
type spectrumWork struct {
	n, m int // piece length and transform length (equal)
	dt   float64
	plan *realPlan
	rw   *realWork
	seq  []float64
	spec []complex128
	w    []float64 // taper weights, length n
	wsum float64
	sum  []float64 // summed amplitudes per bin
}

func (s *spectrumWork) setup(n int, dt, tukey float64) {
	s.n, s.m, s.dt = n, n, dt
	s.plan = newRealPlan(n)
	s.rw = s.plan.newWork()
	s.seq = make([]float64, n)
	s.spec = make([]complex128, n/2+1)
	s.w = make([]float64, n)
	s.sum = make([]float64, len(s.spec))
	L := int(math.Round(tukey * float64(n)))
	for j := range s.w {
		s.w[j] = 1
		if d := min(j, n-1-j); d < L {
			v := math.Sin(math.Pi * (float64(d) + 0.5) / float64(2*L))
			s.w[j] = v * v
		}
		s.wsum += s.w[j]
	}
}

func (s *spectrumWork) add(tr []float32) {
	for j, v := range tr {
		s.seq[j] = 0
		if !isGap(v) {
			s.seq[j] = float64(v) * s.w[j]
		}
	}
	s.plan.forward(s.spec, s.seq, s.rw)
	for k, c := range s.spec {
		s.sum[k] += cmplx.Abs(c)
	}
}

func (s *spectrumWork) result(count int) Spectrum {
	sp := Spectrum{Freqs: make([]float64, len(s.sum)), Amps: make([]float64, len(s.sum))}
	df := 1 / (float64(s.m) * s.dt)
	var num, den float64
	peak := 0
	for k, v := range s.sum {
		scale := 2 / s.wsum
		if k == 0 || (s.m%2 == 0 && k == len(s.sum)-1) {
			scale = 1 / s.wsum
		}
		a := v * scale / float64(count)
		f := df * float64(k)
		sp.Freqs[k], sp.Amps[k] = f, a
		if a > sp.Amps[peak] {
			peak = k
		}
		num += f * a
		den += a
	}
	sp.PeakHz = sp.Freqs[peak]
	sp.CentroidHz = ratio(num, den)
	return sp
}
