package compute

import (
	"context"
	"errors"
	"math"
	"regexp"
	"runtime"
	"slices"
	"strings"
	"sync"
	"testing"
)

// The ids the command line and scripts rely on (issue 3, item 5).
var requiredIDs = []string{"amplitude", "quadrature", "envelope", "instantaneous-phase", "cosine-phase",
	"instantaneous-frequency", "instantaneous-bandwidth", "dominant-frequency", "apparent-polarity",
	"response-phase", "response-frequency", "response-amplitude", "weighted-frequency",
	"weighted-bandwidth", "sweetness", "relative-impedance", "rms-amplitude",
	"envelope-derivative", "envelope-second-derivative", "thin-bed",
	"amplitude-weighted-cosine-phase", "amplitude-weighted-frequency", "bandpass", "agc"}

func TestRegistryEntries(t *testing.T) {
	kebab := regexp.MustCompile(`^[a-z]+(-[a-z]+)*$`)
	seen := map[string]bool{}
	groupOrder := map[Group]int{GroupAmplitude: 1, GroupInstantaneous: 2, GroupResponse: 3, GroupWeighted: 4, GroupConditioning: 5}
	last := 0
	for _, a := range Attributes() {
		if !kebab.MatchString(a.ID) {
			t.Errorf("id %q is not kebab-case", a.ID)
		}
		if seen[a.ID] {
			t.Errorf("id %q registered twice", a.ID)
		}
		seen[a.ID] = true
		if a.Name == "" || a.Description == "" || a.Source == "" || a.run == nil {
			t.Errorf("%s: name, description, source and compute are all required: %+v", a.ID, a)
		}
		if strings.Contains(a.Description, "\n") {
			t.Errorf("%s: description is more than one line", a.ID)
		}
		if s := a.Kind.String(); s != "magnitude" && s != "signed" && s != "cyclic" {
			t.Errorf("%s: kind %v", a.ID, a.Kind)
		}
		g, ok := groupOrder[a.Group]
		if !ok || g < last {
			t.Errorf("%s: group %q out of order", a.ID, a.Group)
		}
		last = g
		if _, err := a.Resolve(nil); err != nil {
			t.Errorf("%s: defaults do not resolve: %v", a.ID, err)
		}
	}
	for _, id := range requiredIDs {
		if !seen[id] {
			t.Errorf("required id %q missing", id)
		}
	}
	// Phase outputs are degrees, frequencies Hz (DESIGN.md conventions).
	for id, unit := range map[string]string{"instantaneous-phase": "deg", "response-phase": "deg", "instantaneous-frequency": "Hz", "weighted-frequency": "Hz"} {
		if a, _ := Lookup(id); a.Unit != unit {
			t.Errorf("%s: unit %q, want %q", id, a.Unit, unit)
		}
	}
	// A fresh table each call.
	Attributes()[0].ID = "changed"
	if Attributes()[0].ID == "changed" {
		t.Error("Attributes shares its table between calls")
	}
}

func TestLookupUnknown(t *testing.T) {
	_, err := Lookup("sweetnes")
	if err == nil || err.Error() != `unknown attribute "sweetnes" (did you mean sweetness?)` {
		t.Errorf("Lookup error %v", err)
	}
	// Nothing near: no suggestion.
	if _, err := Lookup("zzzzqqqq"); err == nil || err.Error() != `unknown attribute "zzzzqqqq"` {
		t.Errorf("Lookup error %v", err)
	}
	// A copy each call: changing it leaves the registry alone.
	a, _ := Lookup("envelope")
	a.Params = nil
	if b, _ := Lookup("envelope"); len(b.Params) == 0 {
		t.Error("Lookup shares its entries with its callers")
	}
}

func TestResolve(t *testing.T) {
	cases := []struct {
		id      string
		raw     map[string]string
		wantErr string
		check   func(Params) bool
	}{
		{"sweetness", nil, "", func(p Params) bool {
			return p.Float("window") == 40 && p.String("pad") == "fast" && p.Float("min-frequency") == 2
		}},
		{"sweetness", map[string]string{"window": "0"}, `attribute "sweetness": parameter "window": 0 is below the minimum 4 ms`, nil},
		{"sweetness", map[string]string{"window": "20000"}, `attribute "sweetness": parameter "window": 20000 is above the maximum 10000 ms`, nil},
		{"sweetness", map[string]string{"window": "wide"}, `attribute "sweetness": parameter "window": "wide" is not a number`, nil},
		{"sweetness", map[string]string{"window": "NaN"}, `attribute "sweetness": parameter "window": "NaN" is not a number`, nil},
		{"envelope", map[string]string{"pad": "quick"}, `attribute "envelope": parameter "pad": "quick" is not one of none, fast, double`, nil},
		{"envelope", map[string]string{"windw": "3"}, `attribute "envelope": unknown parameter "windw" (it takes pad, taper)`, nil},
		{"amplitude", map[string]string{"pad": "none"}, `attribute "amplitude": unknown parameter "pad" (it takes none)`, nil},
		{"envelope", map[string]string{"pad": "none", "taper": " 20 "}, "", func(p Params) bool {
			return p.String("pad") == "none" && p.Float("taper") == 20 && p.Encode() == "pad=none,taper=20"
		}},
		{"rms-amplitude", map[string]string{"window": "100"}, "", func(p Params) bool {
			return p.Float("window") == 100 && math.IsNaN(p.Float("pad")) && p.String("nothing") == ""
		}},
	}
	for _, tc := range cases {
		a, err := Lookup(tc.id)
		if err != nil {
			t.Fatal(err)
		}
		p, err := a.Resolve(tc.raw)
		if tc.wantErr != "" {
			if err == nil || err.Error() != tc.wantErr {
				t.Errorf("%s %v: error %v, want %s", tc.id, tc.raw, err, tc.wantErr)
			}
			continue
		}
		if err != nil || !tc.check(p) {
			t.Errorf("%s %v: %v, %+v", tc.id, tc.raw, err, p)
		}
	}
	if raw, err := ParseParams([]string{"window=40", "pad=none"}); err != nil || raw["window"] != "40" || raw["pad"] != "none" {
		t.Errorf("ParseParams: %v %v", raw, err)
	}
	for _, bad := range [][]string{{"window"}, {"=3"}, {"a=1", "a=2"}} {
		if _, err := ParseParams(bad); err == nil {
			t.Errorf("ParseParams(%q) accepted", bad)
		}
	}
}

// Params resolved for one attribute are refused by another.
func TestComputeRefusesForeignParams(t *testing.T) {
	env, _ := Lookup("envelope")
	sw, _ := Lookup("sweetness")
	p, _ := sw.Resolve(nil)
	if _, err := env.Compute(context.Background(), randomTraces(2, 50, 1), p, nil); err == nil {
		t.Error("envelope accepted sweetness parameters")
	}
}

// Every attribute keeps the shape, sampling and gaps of its input, is
// finite elsewhere, and matches the InstantaneousSet where they overlap.
func TestEveryAttributeShapeGapsAndFinite(t *testing.T) {
	sec := randomTraces(5, 300, 9)
	sec.T0 = 0.1
	sec.Traces[1][17] = float32(math.NaN())
	sec.Traces[3][0] = float32(math.Inf(1))
	sec.Traces[3][150] = float32(math.Inf(-1))
	gap := func(i, j int) bool { return (i == 1 && j == 17) || (i == 3 && (j == 0 || j == 150)) }
	for _, a := range Attributes() {
		out := compute(t, a.ID, nil, sec)
		if len(out.Traces) != len(sec.Traces) || out.DT != sec.DT || out.T0 != sec.T0 {
			t.Fatalf("%s: shape or sampling changed", a.ID)
		}
		for i, tr := range out.Traces {
			if len(tr) != 300 {
				t.Fatalf("%s: trace %d has %d samples", a.ID, i, len(tr))
			}
			for j, v := range tr {
				f := float64(v)
				if gap(i, j) != math.IsNaN(f) || math.IsInf(f, 0) {
					t.Fatalf("%s: trace %d sample %d: %v (gap %v)", a.ID, i, j, v, gap(i, j))
				}
			}
		}
	}
	// Gaps are treated as zeros: away from the gap samples the result equals
	// that of the trace with zeros written in.
	zeroed := Section{DT: sec.DT, Traces: make([][]float32, len(sec.Traces))}
	for i, tr := range sec.Traces {
		zeroed.Traces[i] = append([]float32(nil), tr...)
		for j := range tr {
			if gap(i, j) {
				zeroed.Traces[i][j] = 0
			}
		}
	}
	a := compute(t, "envelope", nil, sec)
	b := compute(t, "envelope", nil, zeroed)
	for i := range a.Traces {
		for j := range a.Traces[i] {
			if !gap(i, j) && a.Traces[i][j] != b.Traces[i][j] {
				t.Fatalf("trace %d sample %d: %v with gaps, %v with zeros", i, j, a.Traces[i][j], b.Traces[i][j])
			}
		}
	}
	// The fast path and the registry agree.
	set, err := Instantaneous(context.Background(), sec, EndTreatment{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	for id, s := range map[string]Section{"envelope": set.Envelope, "instantaneous-phase": set.Phase,
		"instantaneous-frequency": set.Frequency, "cosine-phase": set.CosPhase} {
		r := compute(t, id, nil, sec)
		for i := range r.Traces {
			for j := range r.Traces[i] {
				x, y := float64(r.Traces[i][j]), float64(s.Traces[i][j])
				if math.IsNaN(x) != math.IsNaN(y) || math.Abs(x-y) > 1e-5*(1+math.Abs(x)) {
					t.Fatalf("%s: trace %d sample %d: registry %v, Instantaneous %v", id, i, j, x, y)
				}
			}
		}
	}
	// The amplitude attribute is the input unchanged.
	amp := compute(t, "amplitude", nil, sec)
	for i := range amp.Traces {
		for j, v := range amp.Traces[i] {
			w := sec.Traces[i][j]
			if v != w && !(gap(i, j) && math.IsNaN(float64(v))) {
				t.Fatalf("amplitude: trace %d sample %d: %v, input %v", i, j, v, w)
			}
		}
	}
}

func TestBadSectionsAndEmpty(t *testing.T) {
	env, _ := Lookup("envelope")
	ctx := context.Background()
	for name, sec := range map[string]Section{
		"zero dt":     {Traces: [][]float32{{1, 2}}, DT: 0},
		"ragged":      {Traces: [][]float32{{1, 2, 3}, {1, 2}}, DT: 0.004},
		"infinite t0": {Traces: [][]float32{{1, 2}}, DT: 0.004, T0: math.Inf(1)},
		"negative dt": {Traces: [][]float32{{1, 2}}, DT: -0.004},
	} {
		if _, err := env.Compute(ctx, sec, Params{}, nil); err == nil {
			t.Errorf("%s: accepted", name)
		}
	}
	for _, a := range Attributes() {
		out, err := a.Compute(ctx, Section{DT: 0.004}, Params{}, nil)
		if err != nil || len(out.Traces) != 0 {
			t.Errorf("%s on an empty section: %v %v", a.ID, out, err)
		}
		out, err = a.Compute(ctx, Section{Traces: [][]float32{{}, {}}, DT: 0.004}, Params{}, nil)
		if err != nil || len(out.Traces) != 2 {
			t.Errorf("%s on zero-length traces: %v %v", a.ID, out, err)
		}
		one := Section{Traces: [][]float32{{3}, {0}}, DT: 0.004}
		if _, err = a.Compute(ctx, one, Params{}, nil); err != nil {
			t.Errorf("%s on one-sample traces: %v", a.ID, err)
		}
	}
}

func TestCancelAndProgress(t *testing.T) {
	sec := randomTraces(400, 256, 4)
	env, _ := Lookup("weighted-frequency")
	var mu sync.Mutex
	var calls [][2]int
	_, err := env.Compute(context.Background(), sec, Params{}, func(done, total int) {
		mu.Lock()
		calls = append(calls, [2]int{done, total})
		mu.Unlock()
	})
	if err != nil {
		t.Fatal(err)
	}
	if len(calls) == 0 || calls[len(calls)-1] != [2]int{400, 400} {
		t.Fatalf("progress calls end with %v, want [400 400]", calls[len(calls)-1:])
	}
	for k := 1; k < len(calls); k++ {
		if calls[k][0] < calls[k-1][0] {
			t.Fatalf("progress went back: %v then %v", calls[k-1], calls[k])
		}
	}
	ctx, cancel := context.WithCancel(context.Background())
	_, err = env.Compute(ctx, sec, Params{}, func(done, total int) {
		if done >= 10 {
			cancel()
		}
	})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("cancelled compute returned %v", err)
	}
	if _, err := Instantaneous(ctx, sec, EndTreatment{}, nil); !errors.Is(err, context.Canceled) {
		t.Fatalf("cancelled Instantaneous returned %v", err)
	}
	if _, err := (Conditioning{AGCWindowMS: 100}).Apply(ctx, sec, nil); !errors.Is(err, context.Canceled) {
		t.Fatalf("cancelled Apply returned %v", err)
	}
}

// TestNearest: edit distances of Levenshtein (1966); "kitten" -> "sitting"
// is 3, the textbook example (common practice).
func TestNearest(t *testing.T) {
	for _, c := range []struct {
		word string
		want string
		ok   bool
	}{
		{"envlope", "envelope", true},
		{"windw", "window", true},
		{"pda", "pad", true}, // a swapped pair: two substitutions
		{"Sweetness", "sweetness", true},
		{"instantaneous-phse", "instantaneous-phase", true},
		{"kitten", "sitting", false}, // 3 edits in 7 letters: more than a third
		{"xyz", "sitting", false},
	} {
		got, ok := Nearest(c.word, []string{"envelope", "window", "sweetness", "instantaneous-phase", "sitting", "pad"})
		if ok != c.ok || (ok && got != c.want) {
			t.Errorf("Nearest(%q) = %q, %v; want %q, %v", c.word, got, ok, c.want, c.ok)
		}
	}
}

// TestResolveAll: a setting reaches every chosen attribute that has it; a
// name none has is refused with the nearest one suggested.
func TestResolveAll(t *testing.T) {
	env, _ := Lookup("envelope")
	wf, _ := Lookup("weighted-frequency")
	amp, _ := Lookup("amplitude")
	ps, err := ResolveAll([]*Attribute{env, wf}, map[string]string{"window": "100"})
	if err != nil {
		t.Fatal(err)
	}
	if got := ps[1].Float("window"); got != 100 {
		t.Errorf("weighted-frequency window %v, want 100", got)
	}
	if _, err := ResolveAll([]*Attribute{env, wf}, map[string]string{"windw": "100"}); err == nil || !strings.Contains(err.Error(), `"windw" (did you mean window?)`) {
		t.Errorf("windw: error %v, want a refusal suggesting window", err)
	}
	if _, err := ResolveAll([]*Attribute{amp}, map[string]string{"pad": "fast"}); err == nil || !strings.Contains(err.Error(), "they take none") {
		t.Errorf("amplitude with pad: error %v, want a refusal", err)
	}
}

// ComputeInto writes every sample of the output it is given: into traces
// full of a stale value (and with gap samples in the input) it gives
// exactly what Compute gives into fresh memory, for every attribute and
// each padding mode; a wrongly shaped output is refused.
func TestComputeIntoReusedOutput(t *testing.T) {
	sec := randomTraces(5, 301, 11)
	sec.Traces[1][7] = float32(math.NaN())
	sec.Traces[3][0] = float32(math.Inf(1))
	for _, a := range Attributes() {
		for pad, raw := range padChoices(a) {
			p, err := a.Resolve(raw)
			if err != nil {
				t.Fatal(err)
			}
			want, err := a.Compute(context.Background(), sec, p, nil)
			if err != nil {
				t.Fatal(err)
			}
			out := newLike(sec)
			for _, tr := range out.Traces {
				for j := range tr {
					tr[j] = 12345
				}
			}
			if err := a.ComputeInto(context.Background(), sec, out, p, nil); err != nil {
				t.Fatal(err)
			}
			for i := range want.Traces {
				for j, v := range want.Traces[i] {
					if g := out.Traces[i][j]; math.Float32bits(g) != math.Float32bits(v) && !(isGap(g) && isGap(v)) {
						t.Fatalf("%s pad=%s: trace %d sample %d: %v into a used output, %v into a fresh one", a.ID, pad, i, j, g, v)
					}
				}
			}
		}
		short := newLike(sec)
		short.Traces[2] = short.Traces[2][:300]
		if err := a.ComputeInto(context.Background(), sec, short, Params{}, nil); err == nil {
			t.Errorf("%s: a short output trace accepted", a.ID)
		}
		if err := a.ComputeInto(context.Background(), sec, Section{Traces: short.Traces[:4]}, Params{}, nil); err == nil {
			t.Errorf("%s: an output with a trace missing accepted", a.ID)
		}
	}
}

// A worker that has just loaded a trace with gaps and then a clean one
// must not carry the gap flags over: on one core (one worker, traces in
// order) every attribute of clean traces following gapped ones equals,
// bit for bit, its value where the same slots held clean traces.
func TestGapFlagsDoNotLeakToNextTrace(t *testing.T) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(1))
	clean := randomTraces(6, 200, 31)
	gapped := Section{DT: clean.DT, Traces: make([][]float32, len(clean.Traces))}
	for i, tr := range clean.Traces {
		gapped.Traces[i] = append([]float32(nil), tr...)
	}
	for j := 0; j < 200; j += 3 { // the first pair full of gaps
		gapped.Traces[0][j] = float32(math.NaN())
		gapped.Traces[1][j+1] = float32(math.Inf(1))
	}
	for _, a := range Attributes() {
		want := compute(t, a.ID, nil, clean)
		got := compute(t, a.ID, nil, gapped)
		for i := 2; i < len(clean.Traces); i++ {
			for j := range want.Traces[i] {
				w, g := want.Traces[i][j], got.Traces[i][j]
				if w != g && !(math.IsNaN(float64(w)) && math.IsNaN(float64(g))) {
					t.Fatalf("%s: clean trace %d sample %d after gapped traces: %v, alone %v", a.ID, i, j, g, w)
				}
			}
		}
	}
}

// InstantaneousInto into a set already holding another section's values
// gives bit for bit what Instantaneous gives, with every padding mode, and
// takes DT and T0 from the input; wrongly shaped outputs are refused with
// the output named.
func TestInstantaneousIntoReusedSet(t *testing.T) {
	first := randomTraces(5, 301, 12)
	sec := randomTraces(5, 301, 13)
	sec.DT, sec.T0 = 0.002, 0.25
	sec.Traces[2][40] = float32(math.NaN())
	for _, pad := range PadModes() {
		end := EndTreatment{Pad: pad}
		set, err := Instantaneous(context.Background(), first, end, nil)
		if err != nil {
			t.Fatal(err)
		}
		if err := InstantaneousInto(context.Background(), sec, &set, end, nil); err != nil {
			t.Fatal(err)
		}
		want, err := Instantaneous(context.Background(), sec, end, nil)
		if err != nil {
			t.Fatal(err)
		}
		pairs := map[string][2]Section{"envelope": {want.Envelope, set.Envelope}, "phase": {want.Phase, set.Phase},
			"frequency": {want.Frequency, set.Frequency}, "cosine of phase": {want.CosPhase, set.CosPhase}}
		for name, p := range pairs {
			if p[1].DT != sec.DT || p[1].T0 != sec.T0 {
				t.Errorf("pad=%s %s: sampling %v, %v; input %v, %v", pad, name, p[1].DT, p[1].T0, sec.DT, sec.T0)
			}
			for i := range p[0].Traces {
				for j, v := range p[0].Traces[i] {
					if g := p[1].Traces[i][j]; math.Float32bits(g) != math.Float32bits(v) && !(isGap(g) && isGap(v)) {
						t.Fatalf("pad=%s %s: trace %d sample %d: %v into a used set, %v from Instantaneous", pad, name, i, j, g, v)
					}
				}
			}
		}
	}
	set, err := Instantaneous(context.Background(), sec, EndTreatment{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	set.Frequency.Traces[3] = set.Frequency.Traces[3][:300]
	if err := InstantaneousInto(context.Background(), sec, &set, EndTreatment{}, nil); err == nil || !strings.Contains(err.Error(), "frequency output trace 3 has 300 samples") {
		t.Errorf("short frequency trace: error %v", err)
	}
	set.Frequency.Traces = set.Frequency.Traces[:4]
	if err := InstantaneousInto(context.Background(), sec, &set, EndTreatment{}, nil); err == nil || !strings.Contains(err.Error(), "frequency output has 4 traces for 5") {
		t.Errorf("missing frequency trace: error %v", err)
	}
}

// No attribute writes an infinite sample, whatever the amplitudes: traces
// of the largest float32 values, alternating in sign and in spikes, give
// finite outputs (or NaN where a formula is undefined) with every padding
// mode, whether an attribute clamps trace by trace or ComputeInto clamps
// the whole output afterwards.
func TestNoInfiniteOutput(t *testing.T) {
	sec := Section{DT: 0.004, Traces: make([][]float32, 4)}
	for i := range sec.Traces {
		tr := make([]float32, 257)
		for j := range tr {
			switch {
			case i == 0:
				tr[j] = math.MaxFloat32 * float32(1-2*(j%2))
			case i == 1 && j%17 == 0:
				tr[j] = -math.MaxFloat32
			case i == 2:
				tr[j] = math.MaxFloat32 * float32(math.Sin(float64(j)))
			default:
				tr[j] = 1e30 * float32(j%3-1)
			}
		}
		sec.Traces[i] = tr
	}
	for _, a := range Attributes() {
		for pad, raw := range padChoices(a) {
			out := compute(t, a.ID, raw, sec)
			for i, tr := range out.Traces {
				for j, v := range tr {
					if math.IsInf(float64(v), 0) {
						t.Fatalf("%s pad=%s: trace %d sample %d is %v", a.ID, pad, i, j, v)
					}
				}
			}
		}
	}
}

// padChoices returns, for each padding mode an attribute accepts, the raw
// parameters that choose it (only PadFast, with no parameter, for an
// attribute without a pad parameter).
func padChoices(a *Attribute) map[string]map[string]string {
	if !slices.ContainsFunc(a.Params, func(s ParamSpec) bool { return s.Name == "pad" }) {
		return map[string]map[string]string{PadFast: {}}
	}
	out := map[string]map[string]string{}
	for _, pad := range PadModes() {
		out[pad] = map[string]string{"pad": pad}
	}
	return out
}
