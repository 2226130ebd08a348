package synth

import (
	"math"
	"slices"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

// sampleAt returns the sample index nearest time tMS.
func sampleAt(s *Survey, tMS float64) int {
	return int(math.Round(tMS / s.IntervalMS()))
}

// window returns samples from time t0 to t1 (ms) of the trace at grid
// index (il, xl).
func window(s *Survey, il, xl int, t0, t1 float64) []float32 {
	tr := s.Traces[il*s.Config.Crosslines+xl]
	return tr[max(0, sampleAt(s, t0)):min(len(tr), sampleAt(s, t1)+1)]
}

func maxAbs(x []float32) float64 {
	m := 0.0
	for _, v := range x {
		m = math.Max(m, math.Abs(float64(v)))
	}
	return m
}

// bestLag returns the lag in samples, within +-maxLag, at which b best
// matches a (b[i+lag] ~ a[i]) by normalised cross-correlation, over
// a's samples i0..i1 of trace a.
func bestLag(a, b []float32, i0, i1, maxLag int) int {
	best, bestC := 0, math.Inf(-1)
	for lag := -maxLag; lag <= maxLag; lag++ {
		var ab, aa, bb float64
		for i := i0; i <= i1; i++ {
			if i+lag < 0 || i+lag >= len(b) {
				continue
			}
			x, y := float64(a[i]), float64(b[i+lag])
			ab += x * y
			aa += x * x
			bb += y * y
		}
		if c := ab / math.Sqrt(aa*bb+1e-30); c > bestC {
			best, bestC = lag, c
		}
	}
	return best
}

func gridU(s *Survey, xl int) float64 { return float64(xl) / float64(s.Config.Crosslines-1) }
func gridV(s *Survey, il int) float64 { return float64(il) / float64(s.Config.Inlines-1) }

// Every feature the issue asks for is placed inside the survey.
func TestFeaturesPlaced(t *testing.T) {
	s := defaultQuiet(t)
	c := s.Config
	record := float64(c.Samples-1) * s.IntervalMS()
	var names []string
	for _, f := range s.Features {
		names = append(names, f.Name)
		if f.InlineMin < s.FirstInline || f.InlineMax >= s.FirstInline+c.Inlines || f.InlineMin > f.InlineMax ||
			f.CrosslineMin < s.FirstCrossline || f.CrosslineMax >= s.FirstCrossline+c.Crosslines || f.CrosslineMin > f.CrosslineMax ||
			f.TimeMinMS < 0 || f.TimeMaxMS > record || f.TimeMinMS > f.TimeMaxMS || f.Description == "" {
			t.Errorf("feature box outside the survey or empty: %+v", f)
		}
	}
	for _, want := range []string{FeatureThinBeds, FeatureChannel, FeatureClinoforms, FeatureFault,
		FeatureWedge, FeatureBrightSpot, FeatureFlatSpot, FeatureShadow} {
		if !slices.Contains(names, want) {
			t.Errorf("feature %q missing; have %v", want, names)
		}
	}
	// The wedge pinches out at inline fraction wedgeV0 and the bright spot
	// sits on the dome crest, as documented in the model.
	if w, _ := s.Feature(FeatureWedge); w.InlineMin != s.FirstInline+int(math.Ceil(wedgeV0*float64(c.Inlines-1))) {
		t.Errorf("wedge starts at inline %d, want the pinch-out line at %d", w.InlineMin, s.FirstInline+int(math.Ceil(wedgeV0*float64(c.Inlines-1))))
	}
	b, _ := s.Feature(FeatureBrightSpot)
	crestIL := s.FirstInline + int(math.Round(domeV*float64(c.Inlines-1)))
	crestXL := s.FirstCrossline + int(math.Round(domeU*float64(c.Crosslines-1)))
	if crestIL < b.InlineMin || crestIL > b.InlineMax || crestXL < b.CrosslineMin || crestXL > b.CrosslineMax {
		t.Errorf("bright spot %+v does not cover the dome crest (%d, %d)", b, crestIL, crestXL)
	}
	for _, w := range s.Wells {
		if s.Trace(w.Inline, w.Crossline) == nil || w.Name == "" {
			t.Errorf("well %+v is not on the survey", w)
		}
	}
}

// The seafloor, a single positive reflection under quiet water, peaks at
// the model's seafloor time with positive polarity: zero-phase wavelet
// and an impedance increase shown as a positive number (the SEG normal
// polarity convention, common practice).
func TestSeafloorPlacementAndPolarity(t *testing.T) {
	s := defaultQuiet(t)
	m := newModel(s.Config)
	bank := newWaveletBank(s.IntervalMS(), 200)
	for _, g := range [][2]int{{0, 0}, {75, 100}, {149, 199}, {30, 170}} {
		refl, _ := m.trace(g[0], g[1], nil, bank)
		sf := refl[0] // the first interface the model lays down
		w := window(s, g[0], g[1], 0, sf.tMS+8)
		k := 0
		for i := range w {
			if math.Abs(float64(w[i])) > math.Abs(float64(w[k])) {
				k = i
			}
		}
		if got := float64(k) * s.IntervalMS(); math.Abs(got-sf.tMS) > s.IntervalMS()/2 || w[k] <= 0 {
			t.Errorf("trace (%d, %d): largest shallow sample %.3f at %.1f ms, want a positive peak at the seafloor, %.2f ms", g[0], g[1], w[k], got, sf.tMS)
		}
	}
}

// The bright spot holds the survey's largest absolute amplitude (the
// default survey, with its noise).
func TestBrightSpotHoldsLargestAmplitude(t *testing.T) {
	s := defaultNoisy(t)
	b, _ := s.Feature(FeatureBrightSpot)
	best, bestK, bestI := 0.0, 0, 0
	for k, tr := range s.Traces {
		for i, v := range tr {
			if a := math.Abs(float64(v)); a > best {
				best, bestK, bestI = a, k, i
			}
		}
	}
	il, xl := s.FirstInline+bestK/s.Config.Crosslines, s.FirstCrossline+bestK%s.Config.Crosslines
	tMS := float64(bestI) * s.IntervalMS()
	// The box holds the interfaces; half a wavelet (20 ms) of slack in time.
	if il < b.InlineMin || il > b.InlineMax || xl < b.CrosslineMin || xl > b.CrosslineMax ||
		tMS < b.TimeMinMS-20 || tMS > b.TimeMaxMS+20 {
		t.Errorf("largest amplitude %.3f at inline %d crossline %d %.0f ms, outside the bright spot %+v", best, il, xl, tMS, b)
	}
}

// On every inline the channel sand's reflections are strongest inside
// the channel: within its half-width of the axis, measured across the
// channel (the edges, thinner, may tune brighter than the axis).
func TestChannelFollowsItsAxis(t *testing.T) {
	s := defaultQuiet(t)
	c := s.Config
	m := newModel(c)
	for il := 0; il < c.Inlines; il += 7 {
		best, bestXL := 0.0, -1
		for xl := 0; xl < c.Crosslines; xl++ {
			top := channelMS + 18*gridU(s, xl)
			if a := maxAbs(window(s, il, xl, top-2, top+channelDep+4)); a > best {
				best, bestXL = a, xl
			}
		}
		if d := m.channelDistance(gridU(s, bestXL), gridV(s, il)); d >= channelHW {
			uc, _ := channelCentre(gridV(s, il))
			t.Errorf("inline index %d: channel reflections strongest at crossline index %d, %.1f bins from the axis at %.1f", il, bestXL, d, uc*float64(c.Crosslines-1))
		}
	}
}

// Across the normal fault the deep layers are offset by the model's throw;
// above the fault's tip they are not.
func TestFaultOffsetsLayers(t *testing.T) {
	s := defaultQuiet(t)
	c := s.Config
	dt := s.IntervalMS()
	for _, il := range []int{15, 134} { // away from the dome
		v := gridV(s, il)
		const tDeep = 1300.0
		uFault := faultU + 0.03*math.Sin(math.Pi*v) + faultSlope*(tDeep-faultTipMS)/faultSpanMS
		xlF := int(math.Round(uFault * float64(c.Crosslines-1)))
		foot, hang := s.Traces[il*c.Crosslines+xlF-6], s.Traces[il*c.Crosslines+xlF+6]
		throw := faultThrow(tDeep, v)
		lag := float64(bestLag(foot, hang, sampleAt(s, 1180), sampleAt(s, 1450), 30)) * dt
		// Slack: the layers' own dip over 12 bins (about 2 ms) plus a sample.
		if math.Abs(lag-throw) > 2+dt {
			t.Errorf("inline index %d: deep layers offset %.0f ms across the fault, want the throw %.1f ms", il, lag, throw)
		}
		lag = float64(bestLag(foot, hang, sampleAt(s, 280), sampleAt(s, 400), 30)) * dt
		if math.Abs(lag) > 2+dt {
			t.Errorf("inline index %d: shallow layers above the fault tip offset %.0f ms", il, lag)
		}
	}
}

// In the clinoform unit reflections dip basinward (towards higher
// crosslines); the topsets above are near flat.
func TestClinoformsDipBasinward(t *testing.T) {
	s := defaultQuiet(t)
	c := s.Config
	dt := s.IntervalMS()
	il := c.Inlines / 2
	var foreset, topset []float64
	for xl := 20; xl < 110; xl += 10 {
		a, b := s.Traces[il*c.Crosslines+xl], s.Traces[il*c.Crosslines+xl+3]
		top := clinoTopMS + 15*gridU(s, xl)
		foreset = append(foreset, float64(bestLag(a, b, sampleAt(s, top+70), sampleAt(s, top+190), 20))*dt)
		topset = append(topset, float64(bestLag(a, b, sampleAt(s, top-60), sampleAt(s, top-8), 20))*dt)
	}
	for i := range foreset {
		if foreset[i] < 5 {
			t.Errorf("foreset dip over 3 bins at %d: %.0f ms, want basinward (> 5 ms)", 20+10*i, foreset[i])
		}
		if math.Abs(topset[i]) > dt {
			t.Errorf("topset dip over 3 bins at %d: %.0f ms, want flat", 20+10*i, topset[i])
		}
	}
}

// wedgeAmplitudes returns, for every inline along the wedge's central
// crossline, the wedge's two-way thickness and its composite amplitude
// measured by amp over a window from 30 ms above the top to 30 ms below
// the base.
func wedgeAmplitudes(s *Survey, amp func(il, xl int, t0, t1 float64) float64) (xl int, thick, a []float64) {
	c := s.Config
	xl = int(math.Round((wedgeU0 + wedgeU1) / 2 * float64(c.Crosslines-1)))
	u := gridU(s, xl)
	for il := 0; il < c.Inlines; il++ {
		th := wedgeThickness(u, gridV(s, il))
		top := wedgeTopMS + 5*u
		thick = append(thick, th)
		a = append(a, amp(il, xl, top-30, top+th+30))
	}
	return xl, thick, a
}

// bankWavelet returns the bank's wavelet for attenuation time tqMS at
// time tMS from its centre, read through the sub-sample phases (to
// 1/bankPhases of a sample).
func bankWavelet(b *waveletBank, tqMS, tMS float64) float64 {
	// taps[j*P+ph][k] holds w((k-half)dt - ph dt/P).
	p := tMS / b.dtMS
	k := int(math.Ceil(p))
	ph := int(math.Round((float64(k) - p) * bankPhases))
	if ph == bankPhases {
		ph, k = 0, k-1
	}
	k += b.half
	taps := b.taps[b.entry(tqMS)*bankPhases+ph]
	if k < 0 || k >= len(taps) {
		return 0
	}
	return float64(taps[k])
}

// dominantPeriodMS returns the dominant period of the wavelet the model
// uses at time tMS, measured on the wavelet in time as the interval
// between the two troughs flanking its main peak (reading the dominant
// period off the wavelet between like phases is common practice; the
// dominant frequency is its reciprocal).
func dominantPeriodMS(s *Survey, tMS float64) float64 {
	b := newWaveletBank(s.IntervalMS(), tMS+bankStepMS)
	step := s.IntervalMS() / bankPhases // one sub-sample phase
	w := func(x float64) float64 { return bankWavelet(b, tMS, x) }
	peak := 0.0
	for x := -30.0; x <= 30; x += step {
		if math.Abs(w(x)) > math.Abs(w(peak)) {
			peak = x
		}
	}
	sign := math.Copysign(1, w(peak))
	// Walk out from the peak to the first opposite-sign extremum each side.
	trough := func(dir float64) float64 {
		x := peak
		for sign*w(x) > 0 || sign*w(x+dir*step) < sign*w(x) {
			x += dir * step
		}
		return x
	}
	return trough(1) - trough(-1)
}

// checkTuning checks a wedge's composite amplitude against thickness.
// Widess (1973, "How thin is a thin bed?", Geophysics 38) puts the largest
// composite amplitude of a bed with equal and opposite reflections at top
// and base at a thickness of a quarter of the dominant wavelength, which
// in two-way time is half the dominant period, 1/(2 fdom). For the
// symmetric Ricker wavelet that is exact with the trough-to-trough period
// (the composite peaks when one reflection's trough meets the other's
// peak, at the peak-to-trough time, half the trough-to-trough period).
// Our wavelet carries the constant-Q phase dispersion, so its two troughs
// are unequal; the tolerance, 15 %, allows for that and the wedge's
// thickness step, and no more. (Taking fdom as the amplitude spectrum's
// peak instead would not do: for a Ricker the composite peaks at 0.78 of
// 1/(2 fpeak).)
func checkTuning(t *testing.T, s *Survey, what string, thick, a []float64) {
	t.Helper()
	k := 0
	for i := range a {
		if a[i] > a[k] {
			k = i
		}
	}
	top := wedgeTopMS + 5*(wedgeU0+wedgeU1)/2
	period := dominantPeriodMS(s, top+thick[k]/2)
	want := period / 2
	t.Logf("%s: composite amplitude peaks at %.1f ms thickness; dominant period %.1f ms, half of it %.1f ms", what, thick[k], period, want)
	if math.Abs(thick[k]/want-1) > 0.15 {
		t.Errorf("%s: composite amplitude peaks at thickness %.1f ms, want near 1/(2 fdom) = %.1f ms", what, thick[k], want)
	}
	// Below tuning the composite amplitude falls towards zero with the
	// thickness (Widess 1973: proportional to thickness for a thin bed);
	// above it, it settles to the single reflection's amplitude, the
	// reflection coefficient times the unit-peak wavelet.
	for i := range a {
		if thick[i] > 0 && thick[i] < thick[k]/4 && a[i] > 0.6*a[k] {
			t.Errorf("%s: at thickness %.1f ms (below a quarter of tuning) amplitude %.3f, not below 0.6 x %.3f", what, thick[i], a[i], a[k])
		}
	}
	if last := a[len(a)-1]; math.Abs(last/wedgeR-1) > 0.15 {
		t.Errorf("%s: thick end (%.0f ms) amplitude %.3f, want about |r| = %.2f", what, thick[len(a)-1], last, wedgeR)
	}
}

func TestWedgeTuningPeakAmplitude(t *testing.T) {
	s := defaultQuiet(t)
	_, thick, a := wedgeAmplitudes(s, func(il, xl int, t0, t1 float64) float64 {
		return maxAbs(window(s, il, xl, t0, t1))
	})
	checkTuning(t, s, "peak amplitude", thick, a)
}

// powerCentroidHz returns the mean frequency of the power spectrum,
// summed over the given traces, of their samples from t0 to t1 under a
// Hann taper.
func powerCentroidHz(s *Survey, traces [][2]int, t0, t1 float64) float64 {
	i0, i1 := sampleAt(s, t0), sampleAt(s, t1)
	n := 1024
	fft := fourier.NewFFT(n)
	x := make([]float64, n)
	var coef []complex128
	power := make([]float64, n/2+1)
	for _, g := range traces {
		clear(x)
		tr := s.Traces[g[0]*s.Config.Crosslines+g[1]]
		for i := i0; i <= i1; i++ {
			h := 0.5 - 0.5*math.Cos(2*math.Pi*float64(i-i0)/float64(i1-i0))
			x[i-i0] = h * float64(tr[i])
		}
		coef = fft.Coefficients(coef, x)
		for k, c := range coef {
			power[k] += real(c)*real(c) + imag(c)*imag(c)
		}
	}
	var num, den float64
	for k, p := range power {
		num += fft.Freq(k) / (s.IntervalMS() / 1000) * p
		den += p
	}
	return num / den
}

// modelCentroidHz is the mean frequency of the power spectrum of the
// Ricker source (Ricker 1953) after constant-Q attenuation over tS
// seconds, exp(-pi f t/Q) (Kjartansson 1979), by numerical integration.
func modelCentroidHz(tS float64) float64 {
	var num, den float64
	for f := 0.05; f < 250; f += 0.05 {
		a := rickerSpectrum(f, SourcePeakHz) * math.Exp(-math.Pi*f*tS/QualityFactor)
		num += f * a * a
		den += a * a
	}
	return num / den
}

// Under the gas the extra attenuation lowers the frequency content: a
// low-frequency shadow, relative to the same window off the gas.
func TestLowFrequencyShadow(t *testing.T) {
	s := defaultQuiet(t)
	sh, _ := s.Feature(FeatureShadow)
	var under, beside [][2]int
	c := s.Config
	crestIL := int(math.Round(domeV * float64(c.Inlines-1)))
	crestXL := int(math.Round(domeU * float64(c.Crosslines-1)))
	for il := crestIL - 6; il <= crestIL+6; il += 2 {
		for xl := crestXL - 4; xl <= crestXL+4; xl += 2 {
			under = append(under, [2]int{il, xl})
		}
		for xl := c.Crosslines - 6; xl < c.Crosslines; xl++ {
			beside = append(beside, [2]int{il, xl})
		}
	}
	t0 := sh.TimeMinMS + 20
	fu, fb := powerCentroidHz(s, under, t0, t0+250), powerCentroidHz(s, beside, t0, t0+250)
	t.Logf("centroid %.0f-%.0f ms: %.1f Hz under the gas, %.1f Hz beside it", t0, t0+250, fu, fb)
	if fu > 0.9*fb {
		t.Errorf("centroid under the gas %.1f Hz, want at least 10 %% below %.1f Hz beside it", fu, fb)
	}
}
