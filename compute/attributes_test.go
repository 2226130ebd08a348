package compute

import (
	"math"
	"testing"
)

// interior returns the samples of the middle half of a trace.
func interior(n int) (int, int) { return n / 4, 3 * n / 4 }

// Source: calculus on the analytic trace of an AM carrier (Bracewell, as in
// TestEnvelopeOfModulatedCarrier): a = 1 + d cos(ωm t), so
// a' = -d ωm sin(ωm t) and a” = -d ωm² cos(ωm t); the instantaneous
// frequency is the carrier's, the instantaneous bandwidth |a'/a|/2π
// (Barnes 1992) and the dominant frequency sqrt(f² + b²) (Barnes 1993).
func TestEnvelopeDerivativesBandwidthDominantOnAM(t *testing.T) {
	const n, dt = 1000, 0.002
	const fc, fm, d = 50.0, 4.0, 0.6
	wm := 2 * math.Pi * fm
	x := sampled(n, dt, func(t float64) float64 { return (1 + d*math.Cos(wm*t)) * math.Cos(2*math.Pi*fc*t) })
	raw := map[string]string{"pad": "none"}
	sec := section1(x, dt)
	d1 := compute(t, "envelope-derivative", raw, sec).Traces[0]
	d2 := compute(t, "envelope-second-derivative", raw, sec).Traces[0]
	f := compute(t, "instantaneous-frequency", raw, sec).Traces[0]
	b := compute(t, "instantaneous-bandwidth", raw, sec).Traces[0]
	dom := compute(t, "dominant-frequency", raw, sec).Traces[0]
	for j := range x {
		tt := float64(j) * dt
		a := 1 + d*math.Cos(wm*tt)
		da := -d * wm * math.Sin(wm*tt)
		dda := -d * wm * wm * math.Cos(wm*tt)
		bw := math.Abs(da/a) / (2 * math.Pi)
		checks := []struct {
			name      string
			got, want float64
			tol       float64
		}{
			{"a'", float64(d1[j]), da, 1e-4 * d * wm},
			{"a''", float64(d2[j]), dda, 1e-4 * d * wm * wm},
			{"frequency", float64(f[j]), fc, 1e-4 * fc},
			{"bandwidth", float64(b[j]), bw, 1e-4 * fc},
			{"dominant", float64(dom[j]), math.Hypot(fc, bw), 1e-4 * fc},
		}
		for _, c := range checks {
			if math.Abs(c.got-c.want) > c.tol {
				t.Fatalf("sample %d: %s = %v, want %v", j, c.name, c.got, c.want)
			}
		}
	}
}

// Source: for a zero-phase wavelet the analytic trace at the peak is
// z(0) = 2∫A df and z'(0) = i2π·2∫f A df, so the instantaneous frequency at
// the envelope peak is the centroid of the amplitude spectrum; for a Ricker
// wavelet (A ∝ f² exp(-f²/fp²)) that is 2 fp/sqrt(π) = 1.1284 fp, and the
// envelope peak equals the wavelet's peak value. Response frequency and
// amplitude (Bodine 1984) report those values over the whole lobe;
// apparent polarity (Taner et al. 1979) carries the sign of the trace at
// the peak.
func TestResponseAttributesOfRicker(t *testing.T) {
	const n, dt, fp = 501, 0.001, 30.0
	for _, sign := range []float64{1, -1} {
		x := sampled(n, dt, func(t float64) float64 { return sign * 2 * ricker(t-0.25, fp) })
		sec := section1(x, dt)
		rf := compute(t, "response-frequency", nil, sec).Traces[0]
		ra := compute(t, "response-amplitude", nil, sec).Traces[0]
		pol := compute(t, "apparent-polarity", nil, sec).Traces[0]
		for _, j := range []int{245, 250, 256} {
			if want := 2 * fp / math.Sqrt(math.Pi); math.Abs(float64(rf[j])-want) > 0.003*want {
				t.Errorf("sign %v: response frequency at %d: %v Hz, want %v Hz", sign, j, rf[j], want)
			}
			if math.Abs(float64(ra[j])-2) > 1e-3 {
				t.Errorf("sign %v: response amplitude at %d: %v, want 2", sign, j, ra[j])
			}
			if math.Abs(float64(pol[j])-2*sign) > 1e-3 {
				t.Errorf("sign %v: apparent polarity at %d: %v, want %v", sign, j, pol[j], 2*sign)
			}
		}
	}
}

// Source: for a sinusoid of amplitude A and frequency f every weighted
// average of the instantaneous frequency is f, the amplitude-weighted
// cosine of phase over whole cycles averages cos to 0, the weighted
// bandwidth is 0, the thin-bed indicator (frequency minus its average) is
// 0, sweetness is A/sqrt(f) (Radovich and Oliveros 1998) and the RMS is
// A/sqrt(2) (common practice).
func TestWindowedAttributesOnSinusoid(t *testing.T) {
	const n, dt, A, f = 1000, 0.002, 3.0, 25.0
	x := sampled(n, dt, func(t float64) float64 { return A * math.Cos(2*math.Pi*f*t+0.3) })
	sec := section1(x, dt)
	win := map[string]string{"window": "80", "pad": "none"} // two whole cycles
	lo, hi := interior(n)
	for _, c := range []struct {
		id   string
		raw  map[string]string
		want float64
		tol  float64
	}{
		{"weighted-frequency", win, f, 1e-4 * f},
		{"amplitude-weighted-frequency", win, f, 1e-4 * f},
		{"weighted-bandwidth", win, 0, 0.01},
		{"thin-bed", win, 0, 1e-3},
		{"amplitude-weighted-cosine-phase", win, 0, 0.05},
		{"sweetness", win, A / math.Sqrt(f), 1e-4},
		{"rms-amplitude", map[string]string{"window": "80"}, A / math.Sqrt2, 0.03 * A},
	} {
		out := compute(t, c.id, c.raw, sec).Traces[0]
		for j := lo; j < hi; j++ {
			if math.Abs(float64(out[j])-c.want) > c.tol {
				t.Fatalf("%s: sample %d: %v, want %v", c.id, j, out[j], c.want)
			}
		}
	}
	// Sweetness guards its division: a dead trace gives 0, not Inf or NaN.
	dead := compute(t, "sweetness", nil, section1(make([]float32, 200), dt)).Traces[0]
	for j, v := range dead {
		if v != 0 {
			t.Fatalf("sweetness of a dead trace: sample %d is %v", j, v)
		}
	}
}

// Source: calculus: the running integral of cos(2πft) is sin(2πft)/(2πf);
// above the low-cut the relative impedance (Taner 2001) is that integral,
// and the low-cut removes a DC offset instead of integrating it into drift.
func TestRelativeImpedanceIsIntegral(t *testing.T) {
	const n, dt, f = 1000, 0.002, 20.0
	x := sampled(n, dt, func(t float64) float64 { return math.Cos(2*math.Pi*f*t) + 0.5 })
	out := compute(t, "relative-impedance", map[string]string{"pad": "none", "low-cut": "5"}, section1(x, dt)).Traces[0]
	for j := range out {
		want := math.Sin(2*math.Pi*f*float64(j)*dt) / (2 * math.Pi * f)
		if math.Abs(float64(out[j])-want) > 1e-3/(2*math.Pi*f) {
			t.Fatalf("sample %d: %v, want %v", j, out[j], want)
		}
	}
}

// Issue 13: the running integral of relative impedance wraps the trace's
// end round onto its start when the padding leaves too little room (pad=
// fast: a trace of 1024 samples gets none). A spike in the last samples of the trace
// then shows at t = 0 as a large fraction of its own peak; with pad=double,
// the default, the wrap falls on the padding. The threshold 1% is ours.
func TestRelativeImpedanceDefaultPadDoesNotWrap(t *testing.T) {
	const n, dt = 1024, 0.002
	x := make([]float32, n)
	x[n-3] = 1
	a, err := Lookup("relative-impedance")
	if err != nil {
		t.Fatal(err)
	}
	p, err := a.Resolve(nil)
	if err != nil {
		t.Fatal(err)
	}
	if got := p.String("pad"); got != PadDouble {
		t.Fatalf("default pad %q, want %q", got, PadDouble)
	}
	leak := func(raw map[string]string) float64 {
		out := compute(t, "relative-impedance", raw, section1(x, dt)).Traces[0]
		peak := 0.0
		for _, v := range out {
			peak = max(peak, math.Abs(float64(v)))
		}
		return math.Abs(float64(out[0])) / peak
	}
	if l := leak(nil); l > 0.01 {
		t.Errorf("default pad: value at t=0 is %.3g of the peak, want below 0.01", l)
	}
	if l := leak(map[string]string{"pad": "fast"}); l < 0.05 {
		t.Errorf("pad=fast: value at t=0 is only %.3g of the peak; the wrap this test guards against is not shown", l)
	} else {
		t.Logf("pad=fast: value at t=0 is %.3g of the peak (the wrap pad=double avoids)", l)
	}
}
