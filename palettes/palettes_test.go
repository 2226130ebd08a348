package palettes

import (
	"image/color"
	"math"
	"strings"
	"sync"
	"testing"

	colorful "github.com/lucasb-eyer/go-colorful"
)

// toColorful converts an 8-bit table entry to a go-colorful colour.
func toColorful(c color.RGBA) colorful.Color {
	return colorful.Color{R: float64(c.R) / 255, G: float64(c.G) / 255, B: float64(c.B) / 255}
}

// lightness returns CIELAB L* (0..100, D65) of an 8-bit colour.
func lightness(c color.RGBA) float64 {
	l, _, _ := toColorful(c).Lab()
	return 100 * l
}

// coefficientOfVariation returns standard deviation / mean.
func coefficientOfVariation(x []float64) float64 {
	mean := 0.0
	for _, v := range x {
		mean += v
	}
	mean /= float64(len(x))
	ss := 0.0
	for _, v := range x {
		ss += (v - mean) * (v - mean)
	}
	return math.Sqrt(ss/float64(len(x))) / mean
}

// TestCIEDE2000SharmaPairs checks go-colorful's DistanceCIEDE2000, which
// every palette check below relies on, against the test data of Sharma, Wu
// and Dalal (2005), "The CIEDE2000 color-difference formula: implementation
// notes, supplementary test data, and mathematical observations", Color Res.
// Appl. 30(1), Table 1 (all 34 pairs; values found with a source search in a
// public copy of the table, not recalled). The pairs are given in CIELAB; they
// go through go-colorful's Lab -> sRGB -> Lab round trip, which is exact to
// about 1e-12 in float64.
func TestCIEDE2000SharmaPairs(t *testing.T) {
	pairs := [][7]float64{
		{50.0000, 2.6772, -79.7751, 50.0000, 0.0000, -82.7485, 2.0425},
		{50.0000, 3.1571, -77.2803, 50.0000, 0.0000, -82.7485, 2.8615},
		{50.0000, 2.8361, -74.0200, 50.0000, 0.0000, -82.7485, 3.4412},
		{50.0000, -1.3802, -84.2814, 50.0000, 0.0000, -82.7485, 1.0000},
		{50.0000, -1.1848, -84.8006, 50.0000, 0.0000, -82.7485, 1.0000},
		{50.0000, -0.9009, -85.5211, 50.0000, 0.0000, -82.7485, 1.0000},
		{50.0000, 0.0000, 0.0000, 50.0000, -1.0000, 2.0000, 2.3669},
		{50.0000, -1.0000, 2.0000, 50.0000, 0.0000, 0.0000, 2.3669},
		{50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0009, 7.1792},
		{50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0010, 7.1792},
		{50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0011, 7.2195},
		{50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0012, 7.2195},
		{50.0000, -0.0010, 2.4900, 50.0000, 0.0009, -2.4900, 4.8045},
		{50.0000, -0.0010, 2.4900, 50.0000, 0.0010, -2.4900, 4.8045},
		{50.0000, -0.0010, 2.4900, 50.0000, 0.0011, -2.4900, 4.7461},
		{50.0000, 2.5000, 0.0000, 50.0000, 0.0000, -2.5000, 4.3065},
		{50.0000, 2.5000, 0.0000, 73.0000, 25.0000, -18.0000, 27.1492},
		{50.0000, 2.5000, 0.0000, 61.0000, -5.0000, 29.0000, 22.8977},
		{50.0000, 2.5000, 0.0000, 56.0000, -27.0000, -3.0000, 31.9030},
		{50.0000, 2.5000, 0.0000, 58.0000, 24.0000, 15.0000, 19.4535},
		{50.0000, 2.5000, 0.0000, 50.0000, 3.1736, 0.5854, 1.0000},
		{50.0000, 2.5000, 0.0000, 50.0000, 3.2972, 0.0000, 1.0000},
		{50.0000, 2.5000, 0.0000, 50.0000, 1.8634, 0.5757, 1.0000},
		{50.0000, 2.5000, 0.0000, 50.0000, 3.2592, 0.3350, 1.0000},
		{60.2574, -34.0099, 36.2677, 60.4626, -34.1751, 39.4387, 1.2644},
		{63.0109, -31.0961, -5.8663, 62.8187, -29.7946, -4.0864, 1.2630},
		{61.2901, 3.7196, -5.3901, 61.4292, 2.2480, -4.9620, 1.8731},
		{35.0831, -44.1164, 3.7933, 35.0232, -40.0716, 1.5901, 1.8645},
		{22.7233, 20.0904, -46.6940, 23.0331, 14.9730, -42.5619, 2.0373},
		{36.4612, 47.8580, 18.3852, 36.2715, 50.5065, 21.2231, 1.4146},
		{90.8027, -2.0831, 1.4410, 91.1528, -1.6435, 0.0447, 1.4441},
		{90.9257, -0.5406, -0.9208, 88.6381, -0.8985, -0.7239, 1.5381},
		{6.7747, -0.2908, -2.4247, 5.8714, -0.0985, -2.2286, 0.6377},
		{2.0776, 0.0795, -1.1350, 0.9033, -0.0636, -0.5514, 0.9082},
	}
	for i, p := range pairs {
		want := []float64{p[6]}
		if i+1 == 10 {
			// Pair 10 is built to sit exactly on the discontinuity of the mean
			// hue (|h1'-h2'| = 180 degrees, Sharma et al. section on
			// discontinuities); the float round trip lands on either side,
			// where the value is that of pair 9 (7.1792) or pair 11 (7.2195).
			want = append(want, pairs[10][6])
		}
		c1 := colorful.Lab(p[0]/100, p[1]/100, p[2]/100)
		c2 := colorful.Lab(p[3]/100, p[4]/100, p[5]/100)
		for _, got := range []float64{ciede2000(c1, c2), ciede2000(c2, c1)} {
			// The table gives 4 decimals.
			ok := false
			for _, w := range want {
				ok = ok || math.Abs(got-w) <= 0.00005+1e-9
			}
			if !ok {
				t.Errorf("pair %d: CIEDE2000 = %.5f, Sharma et al. Table 1 gives %.4f", i+1, got, p[6])
			}
		}
	}
}

// rising lists the palettes whose lightness must rise from entry 0 to 255.
func rising(t *testing.T) []*Palette {
	var out []*Palette
	for _, p := range All() {
		if p.Family == Sequential || p.Family == Grey || p.Family == Overlay {
			out = append(out, p)
		}
	}
	if len(out) < 3 {
		t.Fatalf("want a sequential, a grey and an overlay palette, got %d rising palettes", len(out))
	}
	return out
}

// TestRisingLightnessMonotonic: a magnitude map must not suggest a bright
// spot that is not in the data, so CIELAB L* must never fall from one entry
// to the next (common practice for perceptual sequential maps) and must
// span a wide range. Equal neighbours are allowed: a grey ramp from L* 4 to
// 98 has fewer than 256 distinct 8-bit greys.
func TestRisingLightnessMonotonic(t *testing.T) {
	for _, p := range rising(t) {
		for k := 1; k < 256; k++ {
			if a, b := lightness(p.Table[k-1]), lightness(p.Table[k]); b < a {
				t.Errorf("%s: L*[%d]=%.3f below L*[%d]=%.3f", p.Name, k, b, k-1, a)
			}
		}
		if span := lightness(p.Table[255]) - lightness(p.Table[0]); span < 50 {
			t.Errorf("%s: L* spans only %.1f", p.Name, span)
		}
	}
}

// TestRisingEvenSteps: consecutive CIEDE2000 (CIE 142-2001) steps must be
// even, coefficient of variation below 10% (the criterion). On the
// 8-bit table, steps are measured between every 16th entry (16 steps): one
// 8-bit code value is worth up to about 0.5 CIEDE2000, as large as a single
// table step, so finer steps would measure rounding, not the design. The
// unrounded design curve is checked at all 255 steps.
func TestRisingEvenSteps(t *testing.T) {
	for _, p := range rising(t) {
		var steps []float64
		for k := 16; k < 256; k += 16 {
			steps = append(steps, ciede2000(toColorful(p.Table[k-16]), toColorful(p.Table[k])))
		}
		steps = append(steps, ciede2000(toColorful(p.Table[240]), toColorful(p.Table[255]))*16/15)
		if cv := coefficientOfVariation(steps); cv >= 0.10 {
			t.Errorf("%s: table steps (every 16th entry) CV = %.3f, want < 0.10; steps %.2f", p.Name, cv, steps)
		}
		d := designByName(t, p.Name)
		curve := d.curve(256)
		fine := make([]float64, 255)
		for k := range fine {
			fine[k] = ciede2000(curve[k], curve[k+1])
		}
		if cv := coefficientOfVariation(fine); cv >= 0.10 {
			t.Errorf("%s: design curve CV of 255 steps = %.3f, want < 0.10", p.Name, cv)
		}
	}
}

func designByName(t *testing.T, name string) design {
	for _, d := range designs() {
		if d.name == name {
			return d
		}
	}
	t.Fatalf("no design %q", name)
	return design{}
}

// TestDivergingMatchedLightness: a signed map must not make one sign look
// stronger than the other, so entries at equal distance from the centre
// have equal L* (within 1 unit, about two 8-bit code values), and the centre
// is neutral (C*ab below 2) and the lightest entry (common practice).
func TestDivergingMatchedLightness(t *testing.T) {
	found := false
	for _, p := range All() {
		if p.Family != Diverging {
			continue
		}
		found = true
		for k := range 128 {
			lo, hi := lightness(p.Table[127-k]), lightness(p.Table[128+k])
			if math.Abs(lo-hi) > 1 {
				t.Errorf("%s: L* at %d steps from centre: %.2f (negative) vs %.2f (positive)", p.Name, k, lo, hi)
			}
		}
		for _, k := range []int{127, 128} {
			_, a, b := toColorful(p.Table[k]).Lab()
			if c := 100 * math.Hypot(a, b); c > 2 {
				t.Errorf("%s: centre entry %d has chroma %.2f, want neutral (< 2)", p.Name, k, c)
			}
		}
		centre := lightness(p.Table[128])
		for k, c := range p.Table {
			if lightness(c) > centre+0.5 {
				t.Errorf("%s: entry %d lighter than the centre", p.Name, k)
			}
		}
	}
	if !found {
		t.Fatal("no diverging palette")
	}
}

// TestCyclicWrap: a phase map must show no seam at +-180 degrees: the step
// from the last entry back to the first is no larger than the largest other
// step, At(0) and At(1) are the same colour, and all steps are even (CV of
// the 256 steps around the loop below 10%, measured every 16th entry as for
// the sequential maps).
func TestCyclicWrap(t *testing.T) {
	found := false
	for _, p := range All() {
		if p.Family != Cyclic {
			continue
		}
		found = true
		maxStep := 0.0
		for k := 1; k < 256; k++ {
			maxStep = math.Max(maxStep, ciede2000(toColorful(p.Table[k-1]), toColorful(p.Table[k])))
		}
		wrap := ciede2000(toColorful(p.Table[255]), toColorful(p.Table[0]))
		if wrap > maxStep {
			t.Errorf("%s: wrap step %.3f larger than the largest other step %.3f", p.Name, wrap, maxStep)
		}
		if p.At(0) != p.At(1) || p.At(-0.25) != p.At(0.75) {
			t.Errorf("%s: ends do not meet: At(0)=%v At(1)=%v", p.Name, p.At(0), p.At(1))
		}
		var coarse []float64
		for k := 0; k < 256; k += 16 {
			coarse = append(coarse, ciede2000(toColorful(p.Table[k]), toColorful(p.Table[(k+16)%256])))
		}
		if cv := coefficientOfVariation(coarse); cv >= 0.10 {
			t.Errorf("%s: steps around the loop CV = %.3f, want < 0.10", p.Name, cv)
		}
	}
	if !found {
		t.Fatal("no cyclic palette")
	}
}

// TestSequentialUnderDichromacy: after simulating protanopia and
// deuteranopia (Machado, Oliveira and Fernandes 2009, severity 1, in linear
// RGB) the sequential maps' CIELAB L* still never falls from entry to entry,
// both in the unrounded design and in the 8-bit table.
func TestSequentialUnderDichromacy(t *testing.T) {
	for _, p := range rising(t) {
		for _, d := range []Deficiency{Protanopia, Deuteranopia} {
			design := designByName(t, p.Name).curve(256)
			for k := 1; k < 256; k++ {
				a, _, _ := simulate(design[k-1], d).Lab()
				b, _, _ := simulate(design[k], d).Lab()
				if b < a {
					t.Errorf("%s design under %s: L*[%d]=%.3f below L*[%d]=%.3f", p.Name, d, k, 100*b, k-1, 100*a)
				}
			}
			prev := math.Inf(-1)
			for k, c := range p.Table {
				// Unrounded simulation: the table is what is judged, not
				// a second 8-bit rounding after the simulation.
				l, _, _ := simulate(toColorful(c), d).Lab()
				l *= 100
				if l < prev {
					t.Errorf("%s under %s: L*[%d]=%.3f below L*[%d]=%.3f", p.Name, d, k, l, k-1, prev)
				}
				prev = l
			}
		}
	}
}

// TestSimulateKeepsNeutrals: the Machado et al. (2009) matrices have rows
// summing to 1, so greys look the same to dichromats; and the simulation
// must change a saturated red (values checked against the matrices by
// hand: linear red (1,0,0) maps to the first column of each matrix).
func TestSimulateKeepsNeutrals(t *testing.T) {
	for _, d := range []Deficiency{Protanopia, Deuteranopia} {
		for _, v := range []uint8{0, 60, 128, 200, 255} {
			g := color.RGBA{v, v, v, 255}
			s := Simulate(g, d)
			if diff := math.Abs(float64(s.R)-float64(v)) + math.Abs(float64(s.G)-float64(v)) + math.Abs(float64(s.B)-float64(v)); diff > 3 {
				t.Errorf("%s: grey %d simulated as %v", d, v, s)
			}
		}
		m := machadoSeverity1[d]
		want := colorful.LinearRgb(m[0][0], m[1][0], math.Max(m[2][0], 0)).Clamped()
		got := toColorful(Simulate(color.RGBA{255, 0, 0, 255}, d))
		if got.DistanceRgb(want) > 2.0/255 {
			t.Errorf("%s: red simulated as %v, want %v", d, got, want)
		}
	}
}

func TestAtClampsWrapsAndGaps(t *testing.T) {
	seq, cyc := Default(Sequential), Default(Cyclic)
	tests := []struct {
		name string
		p    *Palette
		t    float64
		want color.RGBA
	}{
		{"below clamps", seq, -3, seq.Table[0]},
		{"above clamps", seq, 7, seq.Table[255]},
		{"one is last", seq, 1, seq.Table[255]},
		{"bin of 0.5", seq, 0.5, seq.Table[128]},
		{"bin edge", seq, 10.0 / 256, seq.Table[10]},
		{"NaN is transparent", seq, math.NaN(), color.RGBA{}},
		{"cyclic wraps above", cyc, 1.25, cyc.Table[64]},
		{"cyclic wraps below", cyc, -0.25, cyc.Table[192]},
		{"cyclic one is zero", cyc, 1, cyc.Table[0]},
		{"cyclic NaN", cyc, math.NaN(), color.RGBA{}},
		{"cyclic Inf", cyc, math.Inf(1), color.RGBA{}},
	}
	for _, tc := range tests {
		if got := tc.p.At(tc.t); got != tc.want {
			t.Errorf("%s: At(%v) = %v, want %v", tc.name, tc.t, got, tc.want)
		}
	}
}

func TestReversed(t *testing.T) {
	for _, p := range All() {
		r := p.Reversed()
		if r.Name != p.Name+"-r" || r.Family != p.Family {
			t.Errorf("%s: reversed is %q %v", p.Name, r.Name, r.Family)
		}
		if rr := r.Reversed(); rr.Table != p.Table || rr.Name != p.Name {
			t.Errorf("%s: reversing twice does not give the palette back", p.Name)
		}
		for _, x := range []float64{0.1, 0.3, 0.77} {
			want := p.At(1 - x)
			if p.Family == Cyclic {
				want = p.At(-x)
			}
			// 1-x can fall on the neighbouring bin edge; compare table indices.
			if got := r.At(x); got != want && got != p.Table[p.Index(1-x)+1] {
				t.Errorf("%s: reversed At(%v) = %v, want %v", p.Name, x, got, want)
			}
		}
		q, err := ByName(p.Name + "-r")
		if err != nil || q.Table != r.Table {
			t.Errorf("%s: ByName(-r) = %v, %v", p.Name, q, err)
		}
	}
}

func TestCatalogue(t *testing.T) {
	all := All()
	seen := map[string]bool{}
	families := map[Family]bool{}
	for _, p := range all {
		if p.Name != strings.ToLower(p.Name) || p.Name == "" || seen[p.Name] {
			t.Errorf("bad or repeated name %q", p.Name)
		}
		seen[p.Name] = true
		families[p.Family] = true
		if p.Description == "" {
			t.Errorf("%s: no description", p.Name)
		}
		for k, c := range p.Table {
			if c.A != 255 {
				t.Errorf("%s: entry %d not opaque", p.Name, k)
			}
		}
		q, err := ByName(strings.ToUpper(p.Name))
		if err != nil || q.Table != p.Table {
			t.Errorf("ByName(%q): %v", p.Name, err)
		}
	}
	for _, f := range []Family{Sequential, Diverging, Cyclic, Grey, Overlay} {
		if !families[f] {
			t.Errorf("no %s palette", f)
		}
		if d := Default(f); d.Family != f {
			t.Errorf("Default(%s) is %s", f, d.Family)
		}
	}
	// Copies: changing one does not change the next.
	all[0].Table[0] = color.RGBA{1, 2, 3, 4}
	all[0].Name = "changed"
	if All()[0].Table[0] == (color.RGBA{1, 2, 3, 4}) || All()[0].Name == "changed" {
		t.Error("All returns shared palettes")
	}
	if _, err := ByName("no-such-map"); err == nil || !strings.Contains(err.Error(), "no-such-map") {
		t.Errorf("unknown name error = %v", err)
	}
}

// BenchmarkGenerate times generating each built-in palette from its
// design (what the first ByName of that name costs a process; All
// generates every one).
//
// Run: go test -run '^$' -bench Generate ./palettes/
func BenchmarkGenerate(b *testing.B) {
	for _, d := range designs() {
		b.Run(d.name, func(b *testing.B) {
			for b.Loop() {
				d.build()
			}
		})
	}
}

// TestConcurrentFirstUse: palettes generated on first use are the same
// whichever goroutines ask first and in what order (run with -race).
func TestConcurrentFirstUse(t *testing.T) {
	names := []string{"lumbry", "kestrine", "orbel", "slatine", "pyrrel"}
	got := make([][]*Palette, 8)
	var wg sync.WaitGroup
	for g := range got {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := range names {
				p, err := ByName(names[(k+g)%len(names)])
				if err != nil {
					t.Error(err)
					return
				}
				got[g] = append(got[g], p)
			}
		}()
	}
	wg.Wait()
	for _, p := range All() {
		for g := range got {
			for _, q := range got[g] {
				if q.Name == p.Name && q.Table != p.Table {
					t.Errorf("%s: goroutine %d got another table", p.Name, g)
				}
			}
		}
	}
}
