package synth

import "math"

// peakDelaysMS returns, for each entry of the bank, the time in ms by
// which the largest lobe of its wavelet lags the wavelet's centre. The
// bank holds each wavelet at bankPhases sub-sample shifts, which together
// sample it every 1/bankPhases of a sample; the largest of those samples,
// refined by the parabola through it and its two neighbours, gives the
// peak to about a thousandth of a sample. The constant-Q phase dispersion
// (Kjartansson 1979) delays the frequencies below the reference one, so a
// reflection's peak comes later than its interface time the deeper it
// lies; entry 0 (no attenuation) is the zero-phase Ricker with no delay.
func (b *waveletBank) peakDelaysMS() []float64 {
	out := make([]float64, len(b.lo))
	taps := 2*b.half + 1
	// fine(i) is the wavelet at i/bankPhases samples from the start of
	// the taps: shift ph holds w(k - half - ph/bankPhases) at tap k.
	for j := range out {
		fine := func(i int) float64 {
			k, ph := (i+bankPhases-1)/bankPhases, (bankPhases-i%bankPhases)%bankPhases
			if k < 0 || k >= taps {
				return 0
			}
			return float64(b.taps[j*bankPhases+ph][k])
		}
		n := taps * bankPhases
		best := 0
		for i := range n {
			if math.Abs(fine(i)) > math.Abs(fine(best)) {
				best = i
			}
		}
		x := float64(best)
		p, c, nx := fine(best-1), fine(best), fine(best+1)
		if den := p - 2*c + nx; den != 0 {
			x += 0.5 * (p - nx) / den
		}
		out[j] = (x/bankPhases - float64(b.half)) * b.dtMS
	}
	return out
}
