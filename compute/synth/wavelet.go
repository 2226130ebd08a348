package synth

import (
	"math"
	"math/cmplx"
	"runtime"
	"sync"
	"sync/atomic"

	"quadtrace/compute"
)

// Parameters of the wavelet model.
const (
	// SourcePeakHz is the peak frequency of the Ricker source wavelet at
	// time zero.
	SourcePeakHz = 40.0
	// QualityFactor is the constant Q of the background sediments. Values
	// of 50 to 150 are usual for clastic basins (from memory).
	QualityFactor = 80.0
	// GasQualityFactor is the Q inside the gas-charged sand, which makes the
	// low-frequency shadow below it. Very low Q in gas sands, below ten, is
	// reported in the literature (from memory).
	GasQualityFactor = 3.0
)

// rickerSpectrum returns the amplitude spectrum of the zero-phase Ricker
// wavelet with peak frequency fp at frequency f, scaled so that the
// wavelet's peak amplitude in time is one:
//
//	R(f) = (2/sqrt(pi)) f^2/fp^3 exp(-f^2/fp^2)
//
// Ricker (1953), "The form and laws of propagation of seismic wavelets",
// Geophysics 18; the spectrum in this form is the usual textbook one
// (e.g. Yilmaz, Seismic Data Analysis, 2001).
func rickerSpectrum(f, fp float64) float64 {
	return 2 / math.SqrtPi * f * f / (fp * fp * fp) * math.Exp(-f*f/(fp*fp))
}

// constantQ returns the constant-Q response of a path of two-way travel
// time tS seconds at frequency f, relative to a reference frequency fRef
// at which the travel time is tS (Kjartansson 1979, "Constant Q-wave
// propagation and attenuation", JGR 84(B9), eqs. for the power-law
// phase velocity c(f) = c_ref (f/fRef)^gamma with gamma = arctan(1/Q)/pi):
//
//	amplitude exp(-pi f tS / Q), delay tS ((f/fRef)^(-gamma) - 1)
//
// The amplitude term is the standard one (Aki and Richards, Quantitative
// Seismology, ch. 5); low frequencies travel slower and arrive later.
func constantQ(f, tS, q, fRef float64) complex128 {
	if f == 0 {
		return 1
	}
	gamma := math.Atan(1/q) / math.Pi
	amp := math.Exp(-math.Pi * f * tS / q)
	delay := tS * (math.Pow(f/fRef, -gamma) - 1)
	return cmplx.Rect(amp, -2*math.Pi*f*delay)
}

// waveletBank holds the wavelet seen by a reflector at a set of
// attenuation times (two-way time through Q = QualityFactor), each
// sampled at bankPhases sub-sample shifts, so that a reflector at any
// time is added to a trace by a table look-up and a multiply-add.
type waveletBank struct {
	dtMS   float64 // sample interval
	stepMS float64 // attenuation-time spacing of the entries
	half   int     // taps on each side of the centre tap
	// taps[j*bankPhases+ph][k] is entry j's wavelet, shifted later by
	// ph/bankPhases of a sample, at sample k-half, with unit peak.
	taps [][]float32
	// lo[j], hi[j] bound the taps of entry j above 1e-3 of its peak.
	lo, hi []int
	// gain[j] is entry j's peak amplitude before normalisation relative to
	// entry 0: the amplitude loss a processing gain would have removed.
	gain []float64
}

const (
	bankPhases = 16    // sub-sample shifts per sample
	bankStepMS = 10.0  // attenuation-time spacing of the entries
	bankHalfMS = 160.0 // wavelet half-length
	bankFloor  = 1e-3  // tap magnitude below which the wavelet is trimmed
)

// newWaveletBank builds the wavelets for attenuation times 0 to maxMS at
// sample interval dtMS: the Ricker source (SourcePeakHz) times the
// constant-Q response (QualityFactor, reference frequency SourcePeakHz),
// each normalised to unit peak amplitude. Entries are built in parallel
// on runtime.GOMAXPROCS(0) workers.
func newWaveletBank(dtMS, maxMS float64) *waveletBank {
	b := &waveletBank{dtMS: dtMS, stepMS: bankStepMS, half: int(math.Ceil(bankHalfMS / dtMS))}
	n := 1
	for n < 2*(2*b.half+1) {
		n *= 2
	}
	dtS := dtMS / 1000
	entries := int(math.Ceil(maxMS/b.stepMS)) + 1
	b.taps = make([][]float32, entries*bankPhases)
	b.lo, b.hi, b.gain = make([]int, entries), make([]int, entries), make([]float64, entries)

	// Source spectrum and sub-sample shift factors, shared by all entries.
	nf := n/2 + 1
	source := make([]complex128, nf)
	shift := make([]complex128, bankPhases*nf)
	for k := range source {
		f := float64(k) / (float64(n) * dtS)
		source[k] = complex(rickerSpectrum(f, SourcePeakHz), 0)
		for ph := 0; ph < bankPhases; ph++ {
			shift[ph*nf+k] = cmplx.Rect(1, -2*math.Pi*f*float64(ph)/bankPhases*dtS)
		}
	}

	var next atomic.Int64
	var wg sync.WaitGroup
	fft := compute.NewRealFFT(n) // one plan, shared by the workers
	for range min(runtime.GOMAXPROCS(0), entries) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			att, coeff := make([]complex128, nf), make([]complex128, nf)
			seq := make([]float64, n)
			raw := make([]float64, bankPhases*(2*b.half+1))
			for {
				j := int(next.Add(1) - 1)
				if j >= entries {
					return
				}
				b.buildEntry(j, n, dtS, source, shift, fft, att, coeff, seq, raw)
			}
		}()
	}
	wg.Wait()
	g0 := b.gain[0]
	for j := range b.gain {
		b.gain[j] /= g0
	}
	return b
}

// buildEntry fills entry j of the bank; fft, att, coeff, seq and raw are
// the caller's work buffers.
func (b *waveletBank) buildEntry(j, n int, dtS float64, source, shift []complex128,
	fft *compute.RealFFT, att, coeff []complex128, seq, raw []float64) {
	nf := len(source)
	taps := 2*b.half + 1
	tS := float64(j) * b.stepMS / 1000
	peak := 0.0
	for k := range att {
		f := float64(k) / (float64(n) * dtS)
		att[k] = source[k] * constantQ(f, tS, QualityFactor, SourcePeakHz)
	}
	for ph := 0; ph < bankPhases; ph++ {
		for k := range coeff {
			coeff[k] = att[k] * shift[ph*nf+k]
		}
		fft.Sequence(seq, coeff)
		w := raw[ph*taps : (ph+1)*taps]
		for k := range w {
			// Sequence is unnormalised and the spectrum that of a
			// continuous-time wavelet: scale by 1/(n dt).
			w[k] = seq[(k-b.half+n)%n] / (float64(n) * dtS)
			peak = math.Max(peak, math.Abs(w[k]))
		}
	}
	b.gain[j] = peak
	lo, hi := taps, -1
	for ph := 0; ph < bankPhases; ph++ {
		w := raw[ph*taps : (ph+1)*taps]
		t := make([]float32, taps)
		for k, v := range w {
			t[k] = float32(v / peak)
			if math.Abs(v) > bankFloor*peak {
				lo, hi = min(lo, k), max(hi, k)
			}
		}
		b.taps[j*bankPhases+ph] = t
	}
	b.lo[j], b.hi[j] = lo, hi
}

// entry returns the bank index for attenuation time tqMS.
func (b *waveletBank) entry(tqMS float64) int {
	j := int(tqMS/b.stepMS + 0.5)
	return max(0, min(j, len(b.lo)-1))
}

// add adds r times the wavelet of attenuation time tqMS, centred at time
// tMS, to trace (sample 0 at time 0).
func (b *waveletBank) add(trace []float32, tMS, r, tqMS float64) {
	p := tMS / b.dtMS
	i0 := math.Floor(p)
	ph := int((p-i0)*bankPhases + 0.5)
	start := int(i0) - b.half
	if ph == bankPhases {
		ph = 0
		start++
	}
	j := b.entry(tqMS)
	taps := b.taps[j*bankPhases+ph]
	lo, hi := b.lo[j], b.hi[j]
	lo = max(lo, -start)
	hi = min(hi, len(trace)-1-start)
	if lo > hi {
		return
	}
	w := taps[lo : hi+1]
	out := trace[start+lo : start+hi+1]
	out = out[:len(w)] // same length; lets the compiler drop bounds checks
	rf := float32(r)
	for k, x := range w {
		out[k] += rf * x
	}
}
