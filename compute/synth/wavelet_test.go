package synth

import (
	"math"
	"math/cmplx"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/stat"
)

// ricker is the Ricker wavelet in time with peak frequency fp (Hz) at t
// seconds: (1 - 2 pi^2 fp^2 t^2) exp(-pi^2 fp^2 t^2) (Ricker 1953,
// Geophysics 18; the usual textbook form).
func ricker(t, fp float64) float64 {
	a := math.Pi * math.Pi * fp * fp * t * t
	return (1 - 2*a) * math.Exp(-a)
}

// At zero attenuation the bank holds the Ricker wavelet itself, shifted
// by the sub-sample phase.
func TestBankSourceIsRicker(t *testing.T) {
	for _, dtMS := range []float64{2, 4} {
		b := newWaveletBank(dtMS, 100)
		if g := b.gain[0]; g != 1 {
			t.Errorf("dt %g: gain[0] = %v, want 1", dtMS, g)
		}
		for _, ph := range []int{0, 5, bankPhases / 2, bankPhases - 1} {
			taps := b.taps[ph]
			worst := 0.0
			for k, w := range taps {
				tS := (float64(k-b.half) - float64(ph)/bankPhases) * dtMS / 1000
				worst = math.Max(worst, math.Abs(float64(w)-ricker(tS, SourcePeakHz)))
			}
			if worst > 2e-3 {
				t.Errorf("dt %g ms, phase %d/%d: largest difference from the Ricker formula %.2g", dtMS, ph, bankPhases, worst)
			}
		}
	}
}

// amplitudeSpectrum returns |W(f)| of taps zero-padded to n samples, and
// the frequency step.
func amplitudeSpectrum(taps []float32, n int, dtMS float64) ([]float64, float64) {
	x := make([]float64, n)
	for k, v := range taps {
		x[k] = float64(v)
	}
	c := fourier.NewFFT(n).Coefficients(nil, x)
	a := make([]float64, len(c))
	for k, v := range c {
		a[k] = cmplx.Abs(v)
	}
	return a, 1000 / (float64(n) * dtMS)
}

// Constant-Q attenuation multiplies the spectrum by exp(-pi f t / Q)
// (Kjartansson 1979, JGR 84; Aki and Richards, Quantitative Seismology,
// ch. 5), so the log spectral ratio of a wavelet at time t to the source is
// a line in f of slope -pi t / Q: the spectral-ratio method (common
// practice for measuring Q).
func TestBankConstantQSpectralRatio(t *testing.T) {
	const dtMS = 2
	b := newWaveletBank(dtMS, 1600)
	src, df := amplitudeSpectrum(b.taps[0], 4096, dtMS)
	for _, tMS := range []float64{300, 800, 1500} {
		j := b.entry(tMS)
		w, _ := amplitudeSpectrum(b.taps[j*bankPhases], 4096, dtMS)
		var fs, lr []float64
		for k := range w {
			f := float64(k) * df
			if f < 8 || f > 70 {
				continue
			}
			fs = append(fs, f)
			lr = append(lr, math.Log(w[k]/src[k]))
		}
		_, slope := stat.LinearRegression(fs, lr, nil, false)
		want := -math.Pi * tMS / 1000 / QualityFactor
		if math.Abs(slope/want-1) > 0.01 {
			t.Errorf("t = %g ms: log spectral ratio slope %.5f /Hz, want %.5f (pi t/Q, Q = %g)", tMS, slope, want, QualityFactor)
		}
	}
}

// attenuatedPeakHz is the peak frequency of a Ricker spectrum
// f^2 exp(-f^2/fp^2) times exp(-pi f t / Q): the positive root of
// d/df ln(...) = 2/f - 2f/fp^2 - pi t/Q = 0.
func attenuatedPeakHz(tS float64) float64 {
	a := math.Pi * tS / QualityFactor
	fp := SourcePeakHz
	// 2 f^2 / fp^2 + a f - 2 = 0
	qa, qb, qc := 2/(fp*fp), a, -2.0
	return (-qb + math.Sqrt(qb*qb-4*qa*qc)) / (2 * qa)
}

// The bank's wavelets peak where the Ricker spectrum times the constant-Q
// decay peaks, and the peak falls with time.
func TestBankPeakFrequency(t *testing.T) {
	const dtMS = 2
	b := newWaveletBank(dtMS, 1600)
	prev := math.Inf(1)
	for _, tMS := range []float64{0, 400, 900, 1500} {
		w, df := amplitudeSpectrum(b.taps[b.entry(tMS)*bankPhases], 8192, dtMS)
		k := 0
		for i := range w {
			if w[i] > w[k] {
				k = i
			}
		}
		got, want := float64(k)*df, attenuatedPeakHz(tMS/1000)
		if math.Abs(got-want) > df {
			t.Errorf("t = %g ms: peak %.2f Hz, want %.2f", tMS, got, want)
		}
		if got >= prev {
			t.Errorf("t = %g ms: peak %.2f Hz does not fall below %.2f", tMS, got, prev)
		}
		prev = got
	}
}
