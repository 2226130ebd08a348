package horizon_test

import (
	"context"
	"math"
	"testing"

	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
)

// tuningThicknessMS returns the two-way thickness at which a bed with equal
// and opposite reflections at top and base gives its largest composite
// amplitude, for a Ricker wavelet of peak frequency f (Hz): Widess's tuning
// thickness (Widess 1973, "How thin is a thin bed?", Geophysics 38(6),
// 1176-1180: a quarter wavelength in depth, about half the dominant period
// in two-way time). Computed by brute force on the closed-form wavelet
// (see ricker), to 0.05 ms.
func tuningThicknessMS(f float64) float64 {
	best, bestAmp := 0.0, 0.0
	for b := 0.05; b < 60; b += 0.05 {
		amp := 0.0
		for tm := -60.0; tm < 120; tm += 0.05 {
			t := tm / 1000
			amp = math.Max(amp, math.Abs(ricker(t, 0, f)-ricker(t, b/1000, f)))
		}
		if amp > bestAmp {
			best, bestAmp = b, amp
		}
	}
	return best
}

// attenuatedPeakHz returns the peak frequency of a Ricker spectrum of peak
// fp after constant-Q attenuation exp(-pi f t / Q) over two-way time t (s):
// the positive root of f^2 + (pi t fp^2 / (2 Q)) f - fp^2 = 0, where the
// derivative of ln(f^2 exp(-f^2/fp^2) exp(-pi f t/Q)) vanishes (Ricker
// 1953 for the spectrum; the attenuation term as in Aki and Richards,
// Quantitative Seismology, ch. 5).
func attenuatedPeakHz(fp, t, q float64) float64 {
	b := math.Pi * t * fp * fp / (2 * q)
	return (-b + math.Sqrt(b*b+4*fp*fp)) / 2
}

// Tracking the base of the demo's sand wedge (a peak: the sand's base
// reflection is positive) from one seed at its thick end follows it to
// the pinch-out and stops where the wedge has become thinner than tuning
// (Widess 1973): every trace where the wedge is thicker than the tuning
// thickness (for a Ricker at the peak frequency the model's constant Q
// leaves at the wedge's depth) is picked within one sample of the base's
// reflection, the horizon reaches into the sub-tuning zone, and it never
// goes past the pinch-out: no trace without the wedge is picked.
func TestWedgePinchOutStopsBelowTuning(t *testing.T) {
	s := demo(t, synth.DefaultConfig())
	top := surface(t, s, synth.SurfaceWedgeTop)
	base := surface(t, s, synth.SurfaceWedgeBase)
	k0 := 145*s.Config.Crosslines + 50
	f := attenuatedPeakHz(synth.SourcePeakHz, float64(top.TimesMS[k0])/1000, synth.QualityFactor)
	tuning := tuningThicknessMS(f)
	t.Logf("peak frequency at the wedge %.1f Hz, tuning thickness %.2f ms", f, tuning)

	// The search window has to take the steepest step of the base from
	// trace to trace: about 5.6 ms where the wedge's thickness tapers off
	// at its crossline edges (45 ms over 8 traces).
	opt := horizon.Options{Event: horizon.Peak, WindowMS: 7, MinCorrelation: 0.9, CorrelationMS: 48, MaxPhaseJumpDeg: 30, MinEnvelope: 0.8}
	h, err := horizon.Track(context.Background(), source(t, s), seedsFor(s, base, [2]int{145, 50}), opt, nil)
	if err != nil {
		t.Fatal(err)
	}
	thick, thickWithin, strayed := 0, 0, 0
	minTracked := math.Inf(1)
	for k, st := range h.State {
		b := float64(base.TimesMS[k] - top.TimesMS[k])
		if math.IsNaN(b) {
			if st != horizon.Empty {
				strayed++
			}
			continue
		}
		if st != horizon.Empty {
			minTracked = math.Min(minTracked, b)
		}
		if b >= tuning {
			thick++
			if st != horizon.Empty && math.Abs(h.TimeMS[k]-float64(base.PeakMS[k])) <= s.IntervalMS() {
				thickWithin++
			}
		}
	}
	share := float64(thickWithin) / float64(thick)
	t.Logf("%.1f %% of %d traces thicker than tuning picked within one sample; thinnest wedge picked %.2f ms; %d picks where there is no wedge",
		100*share, thick, minTracked, strayed)
	if share < 0.98 {
		t.Errorf("%.1f %% of the traces thicker than tuning picked within one sample, want >= 98 %%", 100*share)
	}
	if !(minTracked < tuning) {
		t.Errorf("the horizon stopped where the wedge is still %.2f ms thick, at or above tuning (%.2f ms)", minTracked, tuning)
	}
	if strayed > 0 {
		t.Errorf("%d traces picked past the pinch-out, where there is no wedge", strayed)
	}
}
