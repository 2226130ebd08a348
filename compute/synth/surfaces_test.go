package synth

import (
	"context"
	"math"
	"testing"

	"quadtrace/compute"
	"quadtrace/compute/horizon"
)

// surfaceHorizon returns a modelled surface's true times as a horizon.
func surfaceHorizon(s *Survey, f Surface) *horizon.Horizon {
	h := horizon.New(s.Config.Inlines, s.Config.Crosslines)
	for k, v := range f.TimesMS {
		if !math.IsNaN(float64(v)) {
			h.TimeMS[k], h.State[k] = float64(v), horizon.Tracked
		}
	}
	return h
}

// envelopeMap maps the survey's envelope (compute's registry attribute)
// along h over the window from..to ms relative to it.
func envelopeMap(t *testing.T, s *Survey, h *horizon.Horizon, stat horizon.Stat, from, to float64) []float32 {
	t.Helper()
	a, err := compute.Lookup("envelope")
	if err != nil {
		t.Fatal(err)
	}
	p, err := a.Resolve(nil)
	if err != nil {
		t.Fatal(err)
	}
	env, err := a.Compute(context.Background(), compute.Section{Traces: s.Traces, DT: s.IntervalMS() / 1000}, p, nil)
	if err != nil {
		t.Fatal(err)
	}
	src, err := horizon.NewTraces(env.Traces, s.Config.Inlines, s.Config.Crosslines, env.DT, 0)
	if err != nil {
		t.Fatal(err)
	}
	m, err := horizon.Map(context.Background(), src, h, horizon.MapSpec{Stat: stat, FromMS: from, ToMS: to}, nil)
	if err != nil {
		t.Fatal(err)
	}
	return m.Values
}

// mean returns the mean of v over the traces where keep is true.
func mean(v []float32, keep func(il, xl int) bool, nx int) (float64, int) {
	sum, n := 0.0, 0
	for k, x := range v {
		if keep(k/nx, k%nx) && !math.IsNaN(float64(x)) {
			sum += float64(x)
			n++
		}
	}
	return sum / float64(n), n
}

// Every kept surface has a name, times on every trace where it exists,
// and its peak time close to its interface time: the constant-Q phase
// dispersion (Kjartansson 1979) speeds the frequencies above the 40 Hz
// reference a little, so a shallow peak may come up to half a ms early,
// and delays the lower ones, more the deeper (a few ms over the record,
// more below the gas). The zero-phase source wavelet has no delay.
func TestSurfacesKeepTrueTimes(t *testing.T) {
	s := defaultQuiet(t)
	if len(s.Surfaces) < 30 {
		t.Fatalf("%d surfaces, want the model's main interfaces", len(s.Surfaces))
	}
	names := map[string]bool{}
	for _, f := range s.Surfaces {
		if f.Name == "" || names[f.Name] || len(f.TimesMS) != len(s.Traces) || len(f.PeakMS) != len(s.Traces) {
			t.Fatalf("surface %q: duplicate or wrong length", f.Name)
		}
		names[f.Name] = true
		n := 0
		for k, v := range f.TimesMS {
			p := f.PeakMS[k]
			if math.IsNaN(float64(v)) != math.IsNaN(float64(p)) {
				t.Fatalf("%s: trace %d: time %v but peak %v", f.Name, k, v, p)
			}
			if math.IsNaN(float64(v)) {
				continue
			}
			n++
			if d := p - v; d < -0.5 || d > 12 {
				t.Fatalf("%s: trace %d: peak %.2f ms %.2f ms after the interface at %.2f ms", f.Name, k, p, d, v)
			}
		}
		if n == 0 {
			t.Errorf("%s: on no trace", f.Name)
		}
	}
	for _, name := range []string{SurfaceSeafloor, SurfaceChannel, SurfaceWedgeTop, SurfaceWedgeBase, SurfaceReservoirTop} {
		if _, ok := s.Surface(name); !ok {
			t.Errorf("no surface %q", name)
		}
	}
	if d := newWaveletBank(s.IntervalMS(), 20).peakDelaysMS()[0]; math.Abs(d) > 1e-3 {
		t.Errorf("the unattenuated Ricker's peak is %.4f ms off its centre", d)
	}
	// The seafloor's kept time is the interface the model placed.
	m := newModel(s.Config)
	f, _ := s.Surface(SurfaceSeafloor)
	refl, _ := m.trace(10, 20, nil, newWaveletBank(s.IntervalMS(), 200))
	if got := float64(f.TimesMS[10*s.Config.Crosslines+20]); math.Abs(got-refl[0].tMS) > 1e-3 {
		t.Errorf("seafloor at (10, 20): kept %.4f ms, model %.4f ms", got, refl[0].tMS)
	}
}

// The channel shows on a map along the surface it is cut from: the mean
// envelope over the 20 ms below that surface is at least twice as high
// over the channel's axis (within half its half-width) as over the muddy
// interval well away from it (more than three half-widths), on the same
// inlines. And the gas sand shows on a map along the reservoir top: the
// envelope on the horizon over the gas is at least three times that over
// the brine sand around it (reflection coefficients -0.30 and -0.06 in
// the model).
func TestChannelAndGasShowOnHorizonMaps(t *testing.T) {
	s := defaultQuiet(t)
	m := newModel(s.Config)
	nx := s.Config.Crosslines
	u := func(xl int) float64 { return float64(xl) / float64(nx-1) }
	v := func(il int) float64 { return float64(il) / float64(s.Config.Inlines-1) }

	ch, _ := s.Surface(SurfaceChannel)
	cmap := envelopeMap(t, s, surfaceHorizon(s, ch), horizon.MeanAbs, 0, 20)
	in, nIn := mean(cmap, func(il, xl int) bool { return m.channelDistance(u(xl), v(il)) < channelHW/2 }, nx)
	out, nOut := mean(cmap, func(il, xl int) bool { return m.channelDistance(u(xl), v(il)) > 3*channelHW }, nx)
	t.Logf("channel: mean envelope %.4f over %d traces on the axis, %.4f over %d away from it", in, nIn, out, nOut)
	if nIn < 100 || !(in > 2*out) {
		t.Errorf("channel: envelope %.4f on the axis, %.4f away (want at least twice)", in, out)
	}

	res, _ := s.Surface(SurfaceReservoirTop)
	gmap := envelopeMap(t, s, surfaceHorizon(s, res), horizon.Value, 0, 0)
	bank := newWaveletBank(s.IntervalMS(), m.recordMS)
	isGas := make([]bool, len(s.Traces))
	var refl []reflector
	for k := range isGas {
		var info traceInfo
		refl, info = m.trace(k/nx, k%nx, refl, bank)
		isGas[k] = info.present&hasGas != 0
	}
	in, nIn = mean(gmap, func(il, xl int) bool { return isGas[il*nx+xl] && dome(u(xl), v(il)) > 0.8 }, nx)
	out, nOut = mean(gmap, func(il, xl int) bool { return !isGas[il*nx+xl] && dome(u(xl), v(il)) < 0.2 }, nx)
	t.Logf("gas: envelope on the reservoir top %.4f over %d gas traces, %.4f over %d brine traces", in, nIn, out, nOut)
	if nIn < 50 || !(in > 3*out) {
		t.Errorf("gas: envelope %.4f over the gas, %.4f over brine sand (want at least three times)", in, out)
	}
}
