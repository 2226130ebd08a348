package horizon_test

import (
	"bytes"
	"context"
	"encoding/binary"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
)

// demos caches generated demo surveys by configuration for the tests of
// this package (generation takes a few seconds).
var demos sync.Map // synth.Config -> func() (*synth.Survey, error)

// demo returns the demo survey for cfg, generated once per test binary.
func demo(t testing.TB, cfg synth.Config) *synth.Survey {
	t.Helper()
	f, _ := demos.LoadOrStore(cfg, sync.OnceValues(func() (*synth.Survey, error) {
		return synth.Generate(context.Background(), cfg, nil)
	}))
	s, err := f.(func() (*synth.Survey, error))()
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// source returns the survey's traces as a horizon.Source.
func source(t testing.TB, s *synth.Survey) *horizon.Traces {
	t.Helper()
	src, err := horizon.NewTraces(s.Traces, s.Config.Inlines, s.Config.Crosslines, s.IntervalMS()/1000, 0)
	if err != nil {
		t.Fatal(err)
	}
	return src
}

// surface returns the named modelled surface of s.
func surface(t testing.TB, s *synth.Survey, name string) synth.Surface {
	t.Helper()
	f, ok := s.Surface(name)
	if !ok {
		t.Fatalf("the demo survey has no surface %q", name)
	}
	return f
}

// eventOf returns the event a surface's reflection shows as: a peak for a
// positive reflection coefficient (zero-phase wavelet, SEG normal
// polarity: common practice), a trough for a negative one.
func eventOf(f synth.Surface) horizon.Event {
	if f.R > 0 {
		return horizon.Peak
	}
	return horizon.Trough
}

// comparison counts how a horizon matches a modelled surface.
type comparison struct {
	exists  int     // traces counted (where the surface exists, and in the mask)
	within  int     // of those, picked within tol of the true time
	off     int     // picked, more than tol off
	jumped  int     // picked more than jump off
	strayed int     // picked where the surface does not exist
	worst   float64 // largest |pick - true| on counted traces, ms
	worstIL int
	worstXL int
}

// compare compares a horizon with the peak times of a modelled surface on
// the traces where mask is true (all when mask is nil); picks where the
// surface does not exist count as strayed wherever they are.
func compare(h *horizon.Horizon, f synth.Surface, mask []bool, tol, jump float64) comparison {
	var c comparison
	for k, st := range h.State {
		want := float64(f.PeakMS[k])
		if math.IsNaN(want) {
			if st != horizon.Empty {
				c.strayed++
			}
			continue
		}
		if mask != nil && !mask[k] {
			continue
		}
		c.exists++
		if st == horizon.Empty {
			continue
		}
		d := math.Abs(h.TimeMS[k] - want)
		if d > c.worst {
			c.worst, c.worstIL, c.worstXL = d, k/h.Crosslines, k%h.Crosslines
		}
		switch {
		case d <= tol:
			c.within++
		case d > jump:
			c.jumped++
			c.off++
		default:
			c.off++
		}
	}
	return c
}

// python is the reference interpreter: Debian's, with its numpy and scipy
// (python3-numpy, python3-scipy), always called by its full path.
const python = "/usr/bin/python3"

// needPython fails the test when python cannot import the modules.
func needPython(t testing.TB, modules ...string) {
	t.Helper()
	code := "import " + strings.Join(modules, ", ")
	if out, err := exec.Command(python, "-c", code).CombinedOutput(); err != nil {
		t.Fatalf("%s cannot %q (install Debian's python3-numpy python3-scipy, e.g. with bash .ci/deps): %v: %s", python, code, err, strings.TrimSpace(string(out)))
	}
}

// script returns the path of a reference script in testdata/horizon.
func script(name string) string { return filepath.Join("..", "..", "testdata", "horizon", name) }

// writeVolume writes traces in map_stats.py's volume format.
func writeVolume(t testing.TB, path string, traces [][]float32, dtMS, t0MS float64) {
	t.Helper()
	var buf bytes.Buffer
	binary.Write(&buf, binary.LittleEndian, [2]int32{int32(len(traces)), int32(len(traces[0]))})
	binary.Write(&buf, binary.LittleEndian, [2]float64{dtMS, t0MS})
	for _, tr := range traces {
		binary.Write(&buf, binary.LittleEndian, tr)
	}
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

// writeFloat64s writes values as little-endian float64.
func writeFloat64s(t testing.TB, path string, v []float64) {
	t.Helper()
	var buf bytes.Buffer
	binary.Write(&buf, binary.LittleEndian, v)
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

// readFloat64s reads a file of little-endian float64.
func readFloat64s(t testing.TB, path string) []float64 {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	v := make([]float64, len(b)/8)
	if err := binary.Read(bytes.NewReader(b), binary.LittleEndian, v); err != nil {
		t.Fatal(err)
	}
	return v
}

// run runs a reference script and fails the test with its output when it
// fails.
func run(t testing.TB, args ...string) {
	t.Helper()
	if out, err := exec.Command(python, args...).CombinedOutput(); err != nil {
		t.Fatalf("%s %s: %v\n%s", python, strings.Join(args, " "), err, out)
	}
}
