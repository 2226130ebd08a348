package synth

import (
	"context"
	"math"
	"strconv"
	"testing"

	"quadtrace/compute"
)

// attribute computes a quadtrace/compute attribute on the given traces of
// a survey.
func attribute(t *testing.T, s *Survey, id string, raw map[string]string, traces [][]float32) [][]float32 {
	t.Helper()
	a, err := compute.Lookup(id)
	if err != nil {
		t.Fatal(err)
	}
	p, err := a.Resolve(raw)
	if err != nil {
		t.Fatal(err)
	}
	out, err := a.Compute(context.Background(), compute.Section{Traces: traces, DT: s.IntervalMS() / 1000}, p, nil)
	if err != nil {
		t.Fatalf("%s: %v", id, err)
	}
	return out.Traces
}

// The bright spot carries the survey's largest envelope (reflection
// strength, Taner, Koehler and Sheriff 1979), in the default survey with
// its noise: the demo's strongest anomaly is the gas.
func TestBrightSpotHasLargestEnvelope(t *testing.T) {
	s := defaultNoisy(t)
	env := attribute(t, s, "envelope", nil, s.Traces)
	best, bestK, bestI := 0.0, 0, 0
	for k, tr := range env {
		for i, v := range tr {
			if float64(v) > best {
				best, bestK, bestI = float64(v), k, i
			}
		}
	}
	b, _ := s.Feature(FeatureBrightSpot)
	il, xl := s.FirstInline+bestK/s.Config.Crosslines, s.FirstCrossline+bestK%s.Config.Crosslines
	tMS := float64(bestI) * s.IntervalMS()
	// The box holds the interfaces; half a wavelet (20 ms) of slack in time.
	if il < b.InlineMin || il > b.InlineMax || xl < b.CrosslineMin || xl > b.CrosslineMax ||
		tMS < b.TimeMinMS-20 || tMS > b.TimeMaxMS+20 {
		t.Errorf("largest envelope %.3f at inline %d crossline %d %.0f ms, outside the bright spot %+v", best, il, xl, tMS, b)
	}
	// And by a margin: the next strongest feature (the seafloor, 0.18)
	// is well below the gas sand's top (-0.30 with the flat spot).
	second := 0.0
	for k, tr := range env {
		kil, kxl := s.FirstInline+k/s.Config.Crosslines, s.FirstCrossline+k%s.Config.Crosslines
		if kil >= b.InlineMin && kil <= b.InlineMax && kxl >= b.CrosslineMin && kxl <= b.CrosslineMax {
			continue
		}
		second = math.Max(second, maxAbs(tr))
	}
	if best < 1.25*second {
		t.Errorf("bright spot envelope %.3f, largest elsewhere %.3f: not clearly the brightest", best, second)
	}
}

// The wedge's composite envelope peaks near tuning thickness as Widess
// (1973) says; see checkTuning for the reference and tolerance.
func TestWedgeTuningEnvelope(t *testing.T) {
	s := defaultQuiet(t)
	xl := int(math.Round((wedgeU0 + wedgeU1) / 2 * float64(s.Config.Crosslines-1)))
	line := make([][]float32, s.Config.Inlines)
	for il := range line {
		line[il] = s.Traces[il*s.Config.Crosslines+xl]
	}
	env := attribute(t, s, "envelope", nil, line)
	_, thick, a := wedgeAmplitudes(s, func(il, _ int, t0, t1 float64) float64 {
		return maxAbs(env[il][sampleAt(s, t0) : sampleAt(s, t1)+1])
	})
	checkTuning(t, s, "envelope", thick, a)
}

// weightedFrequencyHz returns the mean, over the given traces, of the
// weighted average frequency (Barnes 1993: instantaneous frequency
// weighted by envelope squared) over the window t0..t1, read at the
// window's centre with the attribute's window set to the window's length.
func weightedFrequencyHz(t *testing.T, s *Survey, grid [][2]int, t0, t1 float64) float64 {
	t.Helper()
	traces := make([][]float32, len(grid))
	for i, g := range grid {
		traces[i] = s.Traces[g[0]*s.Config.Crosslines+g[1]]
	}
	raw := map[string]string{"window": strconv.FormatFloat(t1-t0, 'f', -1, 64)}
	wf := attribute(t, s, "weighted-frequency", raw, traces)
	mid := sampleAt(s, (t0+t1)/2)
	sum := 0.0
	for _, tr := range wf {
		sum += float64(tr[mid])
	}
	return sum / float64(len(wf))
}

// The weighted average frequency falls with depth as constant-Q
// attenuation says. Weighting instantaneous frequency by envelope squared
// gives the mean frequency of the power spectrum (Barnes 1993), so the
// deep-to-shallow ratio should match the ratio of power-spectrum means of
// the Ricker source (Ricker 1953) times exp(-pi f t/Q) (Kjartansson 1979)
// at the windows' centres. Both windows are 130 ms long, so the window's
// own smoothing of the spectrum is the same in both.
func TestWeightedFrequencyFallsWithDepth(t *testing.T) {
	s := defaultNoisy(t)
	var grid [][2]int
	for il := 0; il < s.Config.Inlines; il += 5 {
		for xl := 0; xl < 110; xl += 5 { // landward of the fault, away from the gas
			grid = append(grid, [2]int{il, xl})
		}
	}
	shallow := weightedFrequencyHz(t, s, grid, 120, 250)
	deep := weightedFrequencyHz(t, s, grid, 1260, 1390)
	want := modelCentroidHz(1.325) / modelCentroidHz(0.185)
	t.Logf("weighted frequency: %.1f Hz at 120-250 ms, %.1f Hz at 1260-1390 ms; ratio %.3f, constant-Q model %.3f", shallow, deep, deep/shallow, want)
	if deep >= shallow {
		t.Fatalf("weighted frequency %.1f Hz deep, not below %.1f Hz shallow", deep, shallow)
	}
	// 10 %: the layers' own reflectivity spectrum and the noise colour the
	// windows; the attenuation alone lowers the mean by about a third.
	if math.Abs((deep/shallow)/want-1) > 0.10 {
		t.Errorf("weighted frequency ratio deep/shallow %.3f, constant-Q model %.3f", deep/shallow, want)
	}
}

// Under the gas the weighted average frequency drops: the low-frequency
// shadow.
func TestWeightedFrequencyShadow(t *testing.T) {
	s := defaultNoisy(t)
	sh, _ := s.Feature(FeatureShadow)
	c := s.Config
	crestIL := int(math.Round(domeV * float64(c.Inlines-1)))
	crestXL := int(math.Round(domeU * float64(c.Crosslines-1)))
	var under, beside [][2]int
	for il := crestIL - 6; il <= crestIL+6; il += 2 {
		for xl := crestXL - 4; xl <= crestXL+4; xl += 2 {
			under = append(under, [2]int{il, xl})
		}
		for xl := c.Crosslines - 6; xl < c.Crosslines; xl++ {
			beside = append(beside, [2]int{il, xl})
		}
	}
	t0 := sh.TimeMinMS + 20
	fu := weightedFrequencyHz(t, s, under, t0, t0+250)
	fb := weightedFrequencyHz(t, s, beside, t0, t0+250)
	t.Logf("weighted frequency %.0f-%.0f ms: %.1f Hz under the gas, %.1f Hz beside it", t0, t0+250, fu, fb)
	if fu > 0.9*fb {
		t.Errorf("weighted frequency under the gas %.1f Hz, want at least 10 %% below %.1f Hz beside it", fu, fb)
	}
}
