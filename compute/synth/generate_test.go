package synth

import (
	"context"
	"errors"
	"math"
	"runtime"
	"sync"
	"testing"
)

// smallConfig is a survey small enough to generate many times in a test.
func smallConfig() Config {
	return Config{Inlines: 24, Crosslines: 32, Samples: 401, IntervalUS: 4000, Noise: 0.2, Seed: 7}
}

func mustGenerate(t testing.TB, cfg Config) *Survey {
	t.Helper()
	s, err := Generate(context.Background(), cfg, nil)
	if err != nil {
		t.Fatalf("Generate(%+v): %v", cfg, err)
	}
	return s
}

// Shared default-size surveys, generated once per test binary.
var (
	quietOnce, noisyOnce sync.Once
	quietSurvey          *Survey // default size, no noise
	noisySurvey          *Survey // the default config itself
)

func defaultQuiet(t testing.TB) *Survey {
	quietOnce.Do(func() {
		cfg := DefaultConfig()
		cfg.Noise = 0
		quietSurvey = mustGenerate(t, cfg)
	})
	return quietSurvey
}

func defaultNoisy(t testing.TB) *Survey {
	noisyOnce.Do(func() { noisySurvey = mustGenerate(t, DefaultConfig()) })
	return noisySurvey
}

func equalTraces(a, b [][]float32) bool {
	if len(a) != len(b) {
		return false
	}
	for k := range a {
		if len(a[k]) != len(b[k]) {
			return false
		}
		for i := range a[k] {
			if math.Float32bits(a[k][i]) != math.Float32bits(b[k][i]) {
				return false
			}
		}
	}
	return true
}

// The survey is a function of the config alone: same seed, same bits,
// whatever the number of workers; another seed, another survey.
func TestGenerateDeterministic(t *testing.T) {
	cfg := smallConfig()
	a := mustGenerate(t, cfg)
	prev := runtime.GOMAXPROCS(1)
	b := mustGenerate(t, cfg)
	runtime.GOMAXPROCS(prev)
	if !equalTraces(a.Traces, b.Traces) {
		t.Fatal("same config, one and several workers: traces differ")
	}
	if len(a.Features) != len(b.Features) {
		t.Fatalf("features differ: %v vs %v", a.Features, b.Features)
	}
	for i := range a.Features {
		if a.Features[i] != b.Features[i] {
			t.Errorf("feature %d: %+v vs %+v", i, a.Features[i], b.Features[i])
		}
	}
	cfg.Seed++
	if c := mustGenerate(t, cfg); equalTraces(a.Traces, c.Traces) {
		t.Error("seeds 7 and 8 gave identical traces")
	}
}

func TestGenerateShapeAndProgress(t *testing.T) {
	cfg := smallConfig()
	var calls, last, total int
	s, err := Generate(context.Background(), cfg, func(done, tot int) {
		calls++
		if done != last+1 {
			t.Errorf("progress went from %d to %d", last, done)
		}
		last, total = done, tot
	})
	if err != nil {
		t.Fatal(err)
	}
	if len(s.Traces) != cfg.Inlines*cfg.Crosslines {
		t.Fatalf("%d traces, want %d", len(s.Traces), cfg.Inlines*cfg.Crosslines)
	}
	for k, tr := range s.Traces {
		if len(tr) != cfg.Samples {
			t.Fatalf("trace %d: %d samples, want %d", k, len(tr), cfg.Samples)
		}
		for i, v := range tr {
			if math.IsNaN(float64(v)) || math.IsInf(float64(v), 0) {
				t.Fatalf("trace %d sample %d: %v", k, i, v)
			}
		}
	}
	if last != total || total == 0 || calls != total {
		t.Errorf("progress ended at %d of %d after %d calls", last, total, calls)
	}
	if s.Basin == "" || s.Name == "" || len(s.Wells) < 2 {
		t.Errorf("names %q %q, wells %v", s.Basin, s.Name, s.Wells)
	}
	if s.Trace(s.FirstInline+3, s.FirstCrossline+5)[100] != s.Traces[3*cfg.Crosslines+5][100] {
		t.Error("Trace does not index inline-major")
	}
	if s.Trace(s.FirstInline-1, s.FirstCrossline) != nil || s.Trace(s.FirstInline, s.FirstCrossline+cfg.Crosslines) != nil {
		t.Error("Trace outside the survey is not nil")
	}
}

func TestGenerateCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	s, err := Generate(ctx, smallConfig(), nil)
	if s != nil || !errors.Is(err, context.Canceled) {
		t.Fatalf("Generate on a cancelled context = %v, %v", s, err)
	}
	// Cancelled part way through: stops, returns no survey.
	ctx, cancel = context.WithCancel(context.Background())
	defer cancel()
	calls := 0
	s, err = Generate(ctx, smallConfig(), func(done, total int) {
		calls++
		if done == 3 {
			cancel()
		}
	})
	if s != nil || !errors.Is(err, context.Canceled) {
		t.Fatalf("Generate cancelled from progress = %v, %v", s, err)
	}
	if calls >= 2*smallConfig().Inlines {
		t.Errorf("progress called %d times after cancelling at 3", calls)
	}
}

// The noise level is the RMS of the added noise relative to the RMS of the
// noise-free survey, as Config.Noise documents.
func TestNoiseLevel(t *testing.T) {
	cfg := smallConfig()
	noisy := mustGenerate(t, cfg)
	cfg.Noise = 0
	quiet := mustGenerate(t, cfg)
	var sig, noise float64
	for k := range quiet.Traces {
		for i, q := range quiet.Traces[k] {
			d := float64(noisy.Traces[k][i] - q)
			sig += float64(q) * float64(q)
			noise += d * d
		}
	}
	if got := math.Sqrt(noise / sig); math.Abs(got-0.2) > 1e-3 {
		t.Errorf("noise RMS / signal RMS = %.4f, want 0.2", got)
	}
}

// CDP coordinates: square 25 m bins on an orthogonal grid whose crossline
// axis points along AzimuthDeg (bearings clockwise from north, common
// practice in survey geometry).
func TestCDPGrid(t *testing.T) {
	s := &Survey{FirstInline: FirstInline, FirstCrossline: FirstCrossline}
	x0, y0 := s.CDP(FirstInline, FirstCrossline)
	if x0 != OriginEasting || y0 != OriginNorthing {
		t.Errorf("origin (%v, %v), want (%v, %v)", x0, y0, OriginEasting, OriginNorthing)
	}
	tests := []struct {
		name       string
		dil, dxl   int
		wantLen    float64
		wantBearDg float64
	}{
		{"along an inline", 0, 1, BinSizeM, AzimuthDeg},
		{"along a crossline", 1, 0, BinSizeM, AzimuthDeg + 90},
		{"ten crosslines", 0, 10, 10 * BinSizeM, AzimuthDeg},
		{"diagonal", 3, 4, 5 * BinSizeM, AzimuthDeg + math.Atan2(3, 4)*180/math.Pi},
	}
	for _, tc := range tests {
		x, y := s.CDP(FirstInline+100+tc.dil, FirstCrossline+50+tc.dxl)
		xa, ya := s.CDP(FirstInline+100, FirstCrossline+50)
		dx, dy := x-xa, y-ya
		if got := math.Hypot(dx, dy); math.Abs(got-tc.wantLen) > 1e-6 {
			t.Errorf("%s: step %.6f m, want %.6f", tc.name, got, tc.wantLen)
		}
		bearing := math.Atan2(dx, dy) * 180 / math.Pi
		if math.Abs(bearing-tc.wantBearDg) > 1e-9 {
			t.Errorf("%s: bearing %.6f deg, want %.6f", tc.name, bearing, tc.wantBearDg)
		}
	}
}

// The smallest accepted grid and a record shorter than the model's deeper
// features still generate; features below the record are left out.
func TestGenerateSmallAndShort(t *testing.T) {
	for _, cfg := range []Config{
		{Inlines: minLateral, Crosslines: minLateral, Samples: minSamples, IntervalUS: 4000, Noise: 1, Seed: -3},
		{Inlines: 10, Crosslines: 12, Samples: 301, IntervalUS: 2000, Seed: 2}, // 600 ms
	} {
		s := mustGenerate(t, cfg)
		record := float64(cfg.Samples-1) * s.IntervalMS()
		for _, f := range s.Features {
			if f.TimeMinMS > record || f.TimeMaxMS > record {
				t.Errorf("%+v: feature %+v below the %g ms record", cfg, f, record)
			}
		}
		if cfg.Samples == 301 {
			if _, ok := s.Feature(FeatureBrightSpot); ok {
				t.Errorf("%+v: bright spot listed, but the reservoir lies below the record", cfg)
			}
			if _, ok := s.Feature(FeatureChannel); !ok {
				t.Errorf("%+v: channel missing from a 600 ms record", cfg)
			}
		}
	}
}
