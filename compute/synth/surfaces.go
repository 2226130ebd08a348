package synth

import "math"

// peakDelaysMS returns, for each entry of the bank, the time in ms by
// which the largest lobe of its (unshifted) wavelet lags the wavelet's
// centre, located to a fraction of a sample by the parabola through the
// largest sample and its neighbours. The constant-Q phase dispersion
// (Kjartansson 1979) delays the frequencies below the reference one, so
// a reflection's peak comes later than its interface time the deeper it
// lies; entry 0 (no attenuation) is the zero-phase Ricker with no delay.
func (b *waveletBank) peakDelaysMS() []float64 {
	out := make([]float64, len(b.lo))
	for j := range out {
		w := b.taps[j*bankPhases]
		k := 0
		for i, v := range w {
			if math.Abs(float64(v)) > math.Abs(float64(w[k])) {
				k = i
			}
		}
		x := float64(k)
		if k > 0 && k < len(w)-1 {
			p, c, n := float64(w[k-1]), float64(w[k]), float64(w[k+1])
			if den := p - 2*c + n; den != 0 {
				x += 0.5 * (p - n) / den
			}
		}
		out[j] = (x - float64(b.half)) * b.dtMS
	}
	return out
}
