package horizonjob

import (
	"bytes"
	"context"
	"encoding/binary"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"quadtrace/compute"
	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
	"quadtrace/segy"
	"quadtrace/segy/segytest"
)

// script returns the path of a reference script in testdata/horizon.
func script(name string) string { return filepath.Join("..", "..", "testdata", "horizon", name) }

// writeVolume writes traces in the volume format of testdata/horizon's
// scripts: int32 ntr, int32 ns, float64 dt_ms, float64 t0_ms, samples.
func writeVolume(t *testing.T, path string, traces [][]float32, dtMS float64) {
	t.Helper()
	var buf bytes.Buffer
	binary.Write(&buf, binary.LittleEndian, [2]int32{int32(len(traces)), int32(len(traces[0]))})
	binary.Write(&buf, binary.LittleEndian, [2]float64{dtMS, 0})
	for _, tr := range traces {
		binary.Write(&buf, binary.LittleEndian, tr)
	}
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

func runPython(t *testing.T, py string, args ...string) {
	t.Helper()
	if out, err := exec.Command(py, args...).CombinedOutput(); err != nil {
		t.Fatalf("%s %s: %v\n%s", py, strings.Join(args, " "), err, out)
	}
}

// noisySegy writes the demo survey (40 x 50 traces, 600 ms, its noise
// raised to 50 % of the signal RMS) to a SEG-Y file with segyio and opens
// it; it returns the survey too.
func noisySegy(t *testing.T, py, dir string) (*synth.Survey, *segy.File) {
	t.Helper()
	cfg := synth.DefaultConfig()
	cfg.Inlines, cfg.Crosslines, cfg.Samples, cfg.Noise = 40, 50, 301, 0.5
	s, err := synth.Generate(context.Background(), cfg, nil)
	if err != nil {
		t.Fatal(err)
	}
	writeVolume(t, filepath.Join(dir, "vol"), s.Traces, s.IntervalMS())
	path := filepath.Join(dir, "noisy.sgy")
	runPython(t, py, script("segyio_volume.py"), "write", filepath.Join(dir, "vol"), "40", "50", "1000", "2000", path)
	f, err := segy.Open(path, segy.Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { f.Close() })
	return s, f
}

// On a noisy SEG-Y file written by segyio (Debian's python3-segyio), a
// horizon tracked from one seed on the seafloor's strong peak agrees on
// every tracked trace, within a tenth of a sample, with the peak that
// scipy.signal.find_peaks (python3-scipy) finds in segyio's reading of the
// file nearest the seafloor's true peak time, refined by the parabola
// through it and its neighbours (testdata/horizon/segyio_volume.py). The
// horizon covers at least 98 % of the grid, and its file records the CDP
// coordinates segyio wrote.
func TestTrackSegyioFileAgreesWithScipy(t *testing.T) {
	py := segytest.NeedPython(t, "segyio", "scipy.signal", "numpy")
	dir := t.TempDir()
	s, f := noisySegy(t, py, dir)
	src, err := NewFileSource(f)
	if err != nil {
		t.Fatal(err)
	}
	sf, _ := s.Surface(synth.SurfaceSeafloor)
	seed, err := Seed(src.Layout(), 1020, 2025, float64(sf.PeakMS[20*50+25]))
	if err != nil {
		t.Fatal(err)
	}
	opt := horizon.Options{Event: horizon.Peak, WindowMS: 4, MinCorrelation: 0.8, MaxPhaseJumpDeg: 40, MinEnvelope: 0.5}
	h, err := horizon.Track(context.Background(), src, []horizon.Seed{seed}, opt, nil)
	if err != nil {
		t.Fatal(err)
	}
	guide := make([]float64, len(h.State))
	for k := range guide {
		guide[k] = math.NaN()
		if h.State[k] != horizon.Empty {
			guide[k] = float64(sf.PeakMS[k])
		}
	}
	var gb bytes.Buffer
	binary.Write(&gb, binary.LittleEndian, guide)
	if err := os.WriteFile(filepath.Join(dir, "guide"), gb.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	runPython(t, py, script("segyio_volume.py"), "peaks", filepath.Join(dir, "noisy.sgy"), filepath.Join(dir, "guide"), filepath.Join(dir, "out"))
	raw, err := os.ReadFile(filepath.Join(dir, "out"))
	if err != nil {
		t.Fatal(err)
	}
	want := make([]float64, len(raw)/8)
	binary.Read(bytes.NewReader(raw), binary.LittleEndian, want)
	if len(want) != len(h.State) {
		t.Fatalf("scipy gave %d values for %d traces", len(want), len(h.State))
	}
	bad, worst := 0, 0.0
	for k, st := range h.State {
		if st == horizon.Empty {
			continue
		}
		d := math.Abs(h.TimeMS[k]-want[k]) / s.IntervalMS()
		if !(d <= 0.1) {
			if bad < 5 {
				t.Errorf("trace (%d, %d): tracked %.3f ms, scipy %.3f ms", k/50, k%50, h.TimeMS[k], want[k])
			}
			bad++
		}
		worst = math.Max(worst, d)
	}
	t.Logf("%d of %d traces tracked, %d disagree with scipy; largest difference %.4f samples", h.Picked(), len(h.State), bad, worst)
	if h.Picked() < len(h.State)*98/100 {
		t.Errorf("tracked %d of %d traces, want at least 98 %%", h.Picked(), len(h.State))
	}

	var buf bytes.Buffer
	if err := horizon.Write(&buf, h.Picks(src.Layout())); err != nil {
		t.Fatal(err)
	}
	picks, err := horizon.Read(&buf)
	if err != nil {
		t.Fatal(err)
	}
	for _, p := range picks[:10] {
		il, xl := p.Inline-1000, p.Crossline-2000
		if p.X != 512000+25*float64(xl) || p.Y != 6780000+25*float64(il) {
			t.Errorf("inline %d crossline %d at (%v, %v), segyio wrote (%d, %d)", p.Inline, p.Crossline, p.X, p.Y, 512000+25*xl, 6780000+25*il)
		}
	}
}

// MapAttribute, inline by inline from a file, gives the same map as
// horizon.Map over the whole attribute volume computed at once.
func TestMapAttributeMatchesWholeVolume(t *testing.T) {
	py := segytest.NeedPython(t, "segyio", "numpy")
	dir := t.TempDir()
	s, f := noisySegy(t, py, dir)
	src, err := NewFileSource(f)
	if err != nil {
		t.Fatal(err)
	}
	sf, _ := s.Surface(synth.SurfaceSeafloor)
	h, err := horizon.Track(context.Background(), src, []horizon.Seed{{Inline: 3, Crossline: 4, TimeMS: float64(sf.PeakMS[3*50+4])}}, horizon.Options{Event: horizon.Peak, WindowMS: 4}, nil)
	if err != nil {
		t.Fatal(err)
	}
	a, _ := compute.Lookup("envelope")
	p, _ := a.Resolve(nil)
	spec := horizon.MapSpec{Stat: horizon.RMS, FromMS: -8, ToMS: 12}
	got, err := MapAttribute(context.Background(), src, h, a, p, spec, nil)
	if err != nil {
		t.Fatal(err)
	}
	env, err := a.Compute(context.Background(), compute.Section{Traces: s.Traces, DT: s.IntervalMS() / 1000}, p, nil)
	if err != nil {
		t.Fatal(err)
	}
	whole, _ := horizon.NewTraces(env.Traces, 40, 50, env.DT, 0)
	want, err := horizon.Map(context.Background(), whole, h, spec, nil)
	if err != nil {
		t.Fatal(err)
	}
	for k := range want.Values {
		w, g := float64(want.Values[k]), float64(got.Values[k])
		if math.IsNaN(w) != math.IsNaN(g) || math.Abs(w-g) > 1e-6*math.Max(1, math.Abs(w)) {
			t.Fatalf("trace %d: %v, whole volume %v", k, g, w)
		}
	}
	if _, err := MapAttribute(context.Background(), src, horizon.New(2, 2), a, p, spec, nil); err == nil {
		t.Error("a horizon of another grid was accepted")
	}
	if _, err := Seed(src.Layout(), 999, 2000, 10); err == nil || !strings.Contains(err.Error(), "not on the survey's grid (inlines 1000 to 1039, crosslines 2000 to 2049)") {
		t.Errorf("seed off the grid: %v", err)
	}
}

// Maps of an attribute along a tracked horizon agree with numpy (Debian's
// python3-numpy, testdata/horizon/map_stats.py) computed on the attribute
// volume written as SEG-Y and read back with segyio (python3-segyio):
// every statistic over a window, to float32 precision.
func TestMapAgreesWithNumpyOnSegyioVolume(t *testing.T) {
	py := segytest.NeedPython(t, "segyio", "numpy")
	dir := t.TempDir()
	s, f := noisySegy(t, py, dir)
	src, err := NewFileSource(f)
	if err != nil {
		t.Fatal(err)
	}
	sf, _ := s.Surface(synth.SurfaceSeafloor)
	h, err := horizon.Track(context.Background(), src, []horizon.Seed{{Inline: 3, Crossline: 4, TimeMS: float64(sf.PeakMS[3*50+4])}}, horizon.Options{Event: horizon.Peak, WindowMS: 4}, nil)
	if err != nil {
		t.Fatal(err)
	}
	a, _ := compute.Lookup("envelope")
	p, _ := a.Resolve(nil)
	env, err := a.Compute(context.Background(), compute.Section{Traces: s.Traces, DT: s.IntervalMS() / 1000}, p, nil)
	if err != nil {
		t.Fatal(err)
	}
	writeVolume(t, filepath.Join(dir, "env"), env.Traces, s.IntervalMS())
	envSgy := filepath.Join(dir, "env.sgy")
	runPython(t, py, script("segyio_volume.py"), "write", filepath.Join(dir, "env"), "40", "50", "1000", "2000", envSgy)
	var tb bytes.Buffer
	binary.Write(&tb, binary.LittleEndian, h.TimeMS)
	os.WriteFile(filepath.Join(dir, "top"), tb.Bytes(), 0o644)
	stats := []horizon.Stat{horizon.Mean, horizon.MeanAbs, horizon.RMS, horizon.MaxAbs, horizon.MinAbs}
	args := []string{script("map_stats.py"), envSgy, filepath.Join(dir, "top"), "-", filepath.Join(dir, "out"), "value", "0", "0"}
	for _, st := range stats {
		args = append(args, st.String(), "-9.3", "13.1")
	}
	runPython(t, py, args...)
	raw, _ := os.ReadFile(filepath.Join(dir, "out"))
	want := make([]float64, len(raw)/8)
	binary.Read(bytes.NewReader(raw), binary.LittleEndian, want)
	n := len(h.State)
	if len(want) != n*(1+len(stats)) {
		t.Fatalf("numpy gave %d values, want %d", len(want), n*(1+len(stats)))
	}
	for i, spec := range append([]horizon.MapSpec{{Stat: horizon.Value}}, func() []horizon.MapSpec {
		var out []horizon.MapSpec
		for _, st := range stats {
			out = append(out, horizon.MapSpec{Stat: st, FromMS: -9.3, ToMS: 13.1})
		}
		return out
	}()...) {
		m, err := MapAttribute(context.Background(), src, h, a, p, spec, nil)
		if err != nil {
			t.Fatal(err)
		}
		values := 0
		for k, g := range m.Values {
			w := want[i*n+k]
			if math.IsNaN(w) != math.IsNaN(float64(g)) || math.Abs(float64(g)-w) > 1e-5*math.Max(1e-3, math.Abs(w)) {
				t.Fatalf("%v: trace %d: %v, numpy on segyio's reading %v", spec.Stat, k, g, w)
			}
			if !math.IsNaN(w) {
				values++
			}
		}
		if values < n*9/10 {
			t.Errorf("%v: only %d values", spec.Stat, values)
		}
	}
}

// FileSource.Live (the survey outline of map figures) says which grid
// positions have a trace: on a SEG-Y file of inlines 1-4 by crosslines
// 10-15 without the four traces of inlines 3-4 and crosslines 14-15
// (written by segytest's builder to the SEG-Y rev 1 layout), exactly those
// four read as missing, and read as NaN traces; positions off the grid are
// not live.
func TestFileSourceLive(t *testing.T) {
	var traces []segytest.Trace
	for _, tr := range segytest.Grid3D(segytest.Seq(1, 4, 1), segytest.Seq(10, 15, 1), 8) {
		if !(tr.Inline >= 3 && tr.Crossline >= 14) {
			traces = append(traces, tr)
		}
	}
	file := segytest.Base3D()
	file.Traces = traces
	path := filepath.Join(t.TempDir(), "holes.sgy")
	if err := os.WriteFile(path, file.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	f, err := segy.Open(path, segy.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	src, err := NewFileSource(f)
	if err != nil {
		t.Fatal(err)
	}
	g := src.Grid()
	if g.Inlines != 4 || g.Crosslines != 6 {
		t.Fatalf("grid %d x %d, want 4 x 6", g.Inlines, g.Crosslines)
	}
	for il := range 4 {
		for xl := range 6 {
			want := !(il >= 2 && xl >= 4)
			if got := src.Live(il, xl); got != want {
				t.Errorf("Live(%d, %d) = %v, want %v", il, xl, got, want)
			}
			tr, err := src.Trace(il, xl, nil)
			if err != nil {
				t.Fatal(err)
			}
			if math.IsNaN(float64(tr[0])) == want {
				t.Errorf("trace (%d, %d) starts %v, live %v", il, xl, tr[0], want)
			}
		}
	}
	for _, p := range [][2]int{{-1, 0}, {0, -1}, {4, 0}, {0, 6}} {
		if src.Live(p[0], p[1]) {
			t.Errorf("Live(%d, %d) off the grid is true", p[0], p[1])
		}
	}
}
