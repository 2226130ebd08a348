package compute

import (
	"context"
	"math"
	"testing"
)

func TestParseConditioningRoundTrip(t *testing.T) {
	for _, tc := range []struct {
		spec string
		want Conditioning
		str  string
	}{
		{"", Conditioning{}, ""},
		{"none", Conditioning{}, ""},
		{"bandpass=8-60,agc=500", Conditioning{8, 60, 500}, "bandpass=8-60,agc=500"},
		{" agc = 250 , bandpass = 4.5-0 ", Conditioning{4.5, 0, 250}, "bandpass=4.5-0,agc=250"},
		{"bandpass=0-45", Conditioning{0, 45, 0}, "bandpass=0-45"},
		{"agc=300", Conditioning{AGCWindowMS: 300}, "agc=300"},
	} {
		c, err := ParseConditioning(tc.spec)
		if err != nil || c != tc.want || c.String() != tc.str {
			t.Errorf("%q: %+v %q %v", tc.spec, c, c.String(), err)
			continue
		}
		back, err := ParseConditioning(c.String())
		if err != nil || back != c {
			t.Errorf("%q does not round-trip: %+v %v", c.String(), back, err)
		}
	}
	for _, bad := range []string{"bandpass=60-8", "bandpass=8", "bandpass=a-60", "agc=-3", "agc", "gain=3", "agc=1,agc=2", "bandpass=8-8"} {
		if _, err := ParseConditioning(bad); err == nil {
			t.Errorf("%q accepted", bad)
		}
	}
}

// amplitudeAt measures the amplitude of a sinusoid of frequency f in a
// trace over samples lo..hi by least squares on cos and sin.
func amplitudeAt(tr []float32, dt, f float64, lo, hi int) float64 {
	var cc, ss, cs, xc, xs float64
	for j := lo; j < hi; j++ {
		c, s := math.Cos(2*math.Pi*f*float64(j)*dt), math.Sin(2*math.Pi*f*float64(j)*dt)
		x := float64(tr[j])
		cc, ss, cs, xc, xs = cc+c*c, ss+s*s, cs+c*s, xc+x*c, xs+x*s
	}
	det := cc*ss - cs*cs
	a := (xc*ss - xs*cs) / det
	b := (xs*cc - xc*cs) / det
	return math.Hypot(a, b)
}

// The band-pass passes the band, stops well outside it and is -6 dB (half
// amplitude) at its corners, as documented on Conditioning; being zero
// phase it leaves a symmetric wavelet symmetric about the same peak
// (common practice).
func TestBandpass(t *testing.T) {
	const n, dt = 2000, 0.002
	c := Conditioning{LowCutHz: 10, HighCutHz: 60}
	lo, hi := interior(n)
	for _, tc := range []struct{ f, gain, tol float64 }{
		{2, 0, 0.005}, {5, 0, 0.005}, {10, 0.5, 0.01}, {20, 1, 0.005}, {40, 1, 0.005}, {60, 0.5, 0.01}, {90, 0, 0.005}, {200, 0, 0.005},
	} {
		x := sampled(n, dt, func(t float64) float64 { return math.Cos(2 * math.Pi * tc.f * t) })
		out, err := c.Apply(context.Background(), section1(x, dt), nil)
		if err != nil {
			t.Fatal(err)
		}
		if g := amplitudeAt(out.Traces[0], dt, tc.f, lo, hi); math.Abs(g-tc.gain) > tc.tol {
			t.Errorf("%v Hz: gain %v, want %v", tc.f, g, tc.gain)
		}
	}
	x := sampled(n, dt, func(t float64) float64 { return ricker(t-2, 25) })
	out, err := c.Apply(context.Background(), section1(x, dt), nil)
	if err != nil {
		t.Fatal(err)
	}
	y := out.Traces[0]
	for k := 1; k < 200; k++ {
		if math.Abs(float64(y[1000+k]-y[1000-k])) > 1e-5 {
			t.Fatalf("filtered Ricker not symmetric about its peak: %v vs %v at ±%d", y[1000+k], y[1000-k], k)
		}
	}
	if _, err := (Conditioning{HighCutHz: 300}).Apply(context.Background(), section1(x, dt), nil); err == nil {
		t.Error("high corner above Nyquist accepted")
	}
}

// AGC (common practice): the output has unit RMS over the window whatever
// the input's level, and dead stretches stay zero.
func TestAGC(t *testing.T) {
	const n, dt = 2000, 0.002
	x := sampled(n, dt, func(t float64) float64 {
		if t > 3 {
			return 0
		}
		return 100 * math.Exp(-t) * math.Cos(2*math.Pi*30*t)
	})
	out, err := Conditioning{AGCWindowMS: 200}.Apply(context.Background(), section1(x, dt), nil)
	if err != nil {
		t.Fatal(err)
	}
	y := out.Traces[0]
	for _, center := range []int{300, 700, 1200} {
		var s float64
		for j := center - 50; j <= center+50; j++ {
			s += float64(y[j]) * float64(y[j])
		}
		if rms := math.Sqrt(s / 101); math.Abs(rms-1) > 0.05 {
			t.Errorf("RMS after AGC around sample %d: %v, want 1", center, rms)
		}
	}
	for j := 1700; j < n; j++ {
		if y[j] != 0 {
			t.Fatalf("dead stretch: sample %d is %v", j, y[j])
		}
	}
}

// Source: a sinusoid of amplitude A at f reads A at its peak bin; the
// Ricker amplitude spectrum f² exp(-f²/fp²) peaks at fp and has its
// centroid at 2 fp/sqrt(π).
func TestSpectra(t *testing.T) {
	const n, dt = 1000, 0.002
	x := sampled(n, dt, func(t float64) float64 { return 2 * math.Cos(2*math.Pi*25*t) })
	s := TraceSpectrum(x, dt)
	if s.PeakHz != 25 || math.Abs(s.Amps[50]-2) > 1e-3 || s.Freqs[len(s.Freqs)-1] != 250 {
		t.Errorf("sinusoid: peak %v Hz, amplitude %v, last bin %v Hz", s.PeakHz, s.Amps[50], s.Freqs[len(s.Freqs)-1])
	}
	const fp = 30.0
	r := sampled(n, dt, func(t float64) float64 { return ricker(t-1, fp) })
	s = TraceSpectrum(r, dt)
	if math.Abs(s.PeakHz-fp) > 0.5 {
		t.Errorf("Ricker: peak %v Hz, want %v", s.PeakHz, fp)
	}
	if want := 2 * fp / math.Sqrt(math.Pi); math.Abs(s.CentroidHz-want) > 0.005*want {
		t.Errorf("Ricker: centroid %v Hz, want %v", s.CentroidHz, want)
	}
	// A section window: two traces, the window holding one Ricker each.
	sec := Section{Traces: [][]float32{r, sampled(n, dt, func(t float64) float64 { return -3 * ricker(t-1.1, fp) })}, DT: dt, T0: 0}
	w := SectionSpectrum(sec, 0.7, 1.4)
	if math.Abs(w.PeakHz-fp) > 1 {
		t.Errorf("section window: peak %v Hz, want %v", w.PeakHz, fp)
	}
	if want := 2 * fp / math.Sqrt(math.Pi); math.Abs(w.CentroidHz-want) > 0.01*want {
		t.Errorf("section window: centroid %v Hz, want %v", w.CentroidHz, want)
	}
	if e := SectionSpectrum(sec, 5, 6); len(e.Amps) != 0 {
		t.Errorf("window outside the section: %d bins", len(e.Amps))
	}
	if e := TraceSpectrum(nil, dt); len(e.Amps) != 0 {
		t.Error("empty trace gave a spectrum")
	}
}
