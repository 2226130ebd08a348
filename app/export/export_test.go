package export

import (
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"quadtrace/app/apptest"
	"quadtrace/app/version"
	"quadtrace/compute"
	"quadtrace/segy/segytest"
)

// expected computes what an export of attribute id should hold: the same
// attribute on the whole input section in memory, after the conditioning.
func expected(t *testing.T, in compute.Section, id string, params map[string]string, cond string) compute.Section {
	t.Helper()
	c, err := compute.ParseConditioning(cond)
	if err != nil {
		t.Fatal(err)
	}
	if !c.IsZero() {
		if in, err = c.Apply(context.Background(), in, nil); err != nil {
			t.Fatal(err)
		}
	}
	a, err := compute.Lookup(id)
	if err != nil {
		t.Fatal(err)
	}
	mine := map[string]string{}
	for _, s := range a.Params {
		if v, ok := params[s.Name]; ok {
			mine[s.Name] = v
		}
	}
	p, err := a.Resolve(mine)
	if err != nil {
		t.Fatal(err)
	}
	out, err := a.Compute(context.Background(), in, p, nil)
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// Checks: an exported volume read back by Debian's python3-segyio (an
// outside SEG-Y implementation, testdata/export/readback.py) holds, trace by
// trace, the attribute computed in memory on the whole input; its binary
// and trace headers equal the input's as segyio decodes both (except the
// fields a new file must change: sample format code, revision, the
// original-recording copies of interval and sample count that the segy
// writer sets); its textual header records attribute, parameters,
// conditioning, source and version. The IBM case starts from
// testdata/segy-corpus/small.sgy, written by segyio itself.
func TestExportReadBackBySegyio(t *testing.T) {
	segytest.NeedPython(t, "segyio", "numpy")
	dir := t.TempDir()
	invented := filepath.Join(dir, "harrowmere.sgy")
	apptest.WriteVolume(t, invented, apptest.VolumeSpec{Inlines: [2]int{101, 108}, Crosslines: [2]int{20, 34}, Samples: 301, IntervalUS: 2000, StartMS: 100})
	cases := []struct {
		name   string
		input  string
		ids    []string
		params map[string]string
		cond   string
		format int
		budget int64
	}{
		{"invented volume, three attributes, IEEE, small blocks", invented,
			[]string{"envelope", "instantaneous-phase", "weighted-frequency"}, map[string]string{"window": "40"}, "", 5, 200 << 10},
		{"invented volume, conditioned, IBM", invented,
			[]string{"envelope"}, map[string]string{"pad": "double"}, "bandpass=6-70,agc=200", 1, 0},
		{"segyio's small.sgy, IBM in, IEEE out", segytest.CorpusFile(t, "small.sgy"), []string{"envelope", "cosine-phase"}, nil, "", 5, 0},
		{"segyio's small.sgy, IBM in and out", segytest.CorpusFile(t, "small.sgy"), []string{"quadrature"}, nil, "", 1, 0},
	}
	for n, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out := filepath.Join(dir, "out"+strconv.Itoa(n))
			if len(c.ids) == 1 {
				out += ".sgy"
			}
			cond, err := compute.ParseConditioning(c.cond)
			if err != nil {
				t.Fatal(err)
			}
			paths, err := Run(context.Background(), Job{Input: c.input, Attributes: c.ids, Params: c.params,
				Conditioning: cond, Output: out, Format: c.format, BudgetBytes: c.budget}, nil)
			if err != nil {
				t.Fatal(err)
			}
			if len(paths) != len(c.ids) {
				t.Fatalf("%d paths for %d attributes", len(paths), len(c.ids))
			}
			in, _ := apptest.ReadSection(t, c.input)
			src := apptest.ReadBySegyio(t, c.input)
			for k, id := range c.ids {
				if len(c.ids) > 1 {
					want := filepath.Join(out, strings.TrimSuffix(filepath.Base(c.input), ".sgy")+"-"+id+".sgy")
					if paths[k] != want {
						t.Errorf("output %d written to %s, want %s", k, paths[k], want)
					}
				}
				got := apptest.ReadBySegyio(t, paths[k])
				checkSamples(t, id, got, expected(t, in, id, c.params, c.cond), c.format)
				checkHeaders(t, id, got, src, c.format)
				for _, s := range []string{"quadtrace " + version.Version, "attribute: " + id, "source file: " + filepath.Base(c.input)} {
					if !strings.Contains(got.Text, s) {
						t.Errorf("%s: textual header lacks %q:\n%s", id, s, got.Text)
					}
				}
				if c.cond != "" && !strings.Contains(got.Text, "conditioning: "+cond.String()) {
					t.Errorf("%s: textual header does not record the conditioning %s:\n%s", id, cond.String(), got.Text)
				}
				for name, v := range c.params {
					a, _ := compute.Lookup(id)
					for _, s := range a.Params {
						if s.Name == name && !strings.Contains(got.Text, name+"="+v) {
							t.Errorf("%s: textual header does not record %s=%s:\n%s", id, name, v, got.Text)
						}
					}
				}
			}
		})
	}
}

// checkSamples compares segyio's samples with the in-memory computation:
// bit for bit in IEEE format (NaN matching NaN), and within the precision
// of IBM hexadecimal floats otherwise (a 24-bit fraction whose leading hex
// digit may hold three zero bits: relative error at most 2^-21 after
// rounding, IBM System/370 Principles of Operation).
func checkSamples(t *testing.T, id string, got apptest.SegyioDump, want compute.Section, format int) {
	t.Helper()
	if got.Format != format {
		t.Errorf("%s: segyio reads format %d, want %d", id, got.Format, format)
	}
	if got.Traces != len(want.Traces) || got.Samples != want.Samples() {
		t.Fatalf("%s: segyio reads %d traces of %d samples, want %d of %d", id, got.Traces, got.Samples, len(want.Traces), want.Samples())
	}
	bad := 0
	for i, tr := range want.Traces {
		for k, w := range tr {
			g := got.Data[i][k]
			var ok bool
			if format == 5 {
				ok = math.Float32bits(g) == math.Float32bits(w) || (g != g && w != w)
			} else {
				ok = math.Abs(float64(g)-float64(w)) <= math.Abs(float64(w))*0x1p-21 || (g != g && w == 0)
			}
			if !ok && bad < 5 {
				t.Errorf("%s: trace %d sample %d: segyio reads %v, computed in memory %v", id, i, k, g, w)
			}
			if !ok {
				bad++
			}
		}
	}
	if bad > 0 {
		t.Errorf("%s: %d samples differ", id, bad)
	}
}

// checkHeaders compares binary and trace header fields as segyio decodes
// them, output against input.
func checkHeaders(t *testing.T, id string, got, src apptest.SegyioDump, format int) {
	t.Helper()
	if got.IntervalUS != src.IntervalUS {
		t.Errorf("%s: interval %d us, input %d us", id, got.IntervalUS, src.IntervalUS)
	}
	// Binary header bytes 3201-3260 are carried over (SEG-Y rev 1, table 2);
	// 3225 is the format code, 3219 and 3223 the original recording interval
	// and sample count, which the segy writer sets to the file's own.
	changed := map[string]bool{"3225": true, "3219": true, "3223": true}
	for k, v := range src.Bin {
		pos, _ := strconv.Atoi(k)
		if pos >= 3261 || changed[k] {
			continue
		}
		if got.Bin[k] != v {
			t.Errorf("%s: binary header byte %s = %d, input %d", id, k, got.Bin[k], v)
		}
	}
	if got.Bin["3225"] != format {
		t.Errorf("%s: binary header format code %d, want %d", id, got.Bin["3225"], format)
	}
	// Trace header bytes 115-116 (samples) and 117-118 (interval) are
	// "highly recommended" in SEG-Y rev 1 (2002), table 3; the writer
	// fills them where the input left them 0, as segyio's small.sgy does.
	filled := map[string]int{"115": got.Samples, "117": got.IntervalUS}
	bad := 0
	for i := range src.Headers {
		for k, v := range src.Headers[i] {
			if f, ok := filled[k]; ok && v == 0 && got.Headers[i][k] == f {
				continue
			}
			if got.Headers[i][k] != v {
				if bad < 5 {
					t.Errorf("%s: trace %d header byte %s = %d, input %d", id, i, k, got.Headers[i][k], v)
				}
				bad++
			}
		}
	}
}

// Checks: --inlines/--crosslines parts are complete SEG-Y files holding just
// their traces, and joined in order they are byte-identical, headers and
// samples, to one whole export (raw bytes located by the SEG-Y rev 1 layout).
func TestExportPartsJoinToTheWholeExport(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.sgy")
	v := apptest.VolumeSpec{Inlines: [2]int{1, 9}, Crosslines: [2]int{1, 11}, Samples: 201, IntervalUS: 4000}
	apptest.WriteVolume(t, in, v)
	for _, format := range []int{5, 1} {
		whole := filepath.Join(dir, "whole.sgy")
		if _, err := Run(context.Background(), Job{Input: in, Attributes: []string{"envelope"}, Output: whole, Format: format}, nil); err != nil {
			t.Fatal(err)
		}
		for _, split := range []struct {
			name   string
			ranges [][2]*Range // inlines, crosslines
		}{
			{"by inlines", [][2]*Range{{{1, 3}, nil}, {{4, 4}, nil}, {{5, 9}, nil}}},
			{"by inlines, range beyond the survey", [][2]*Range{{{-5, 6}, nil}, {{7, 100}, nil}}},
			{"by crosslines of inline blocks", [][2]*Range{{{1, 5}, nil}, {{6, 9}, {1, 11}}}},
		} {
			var parts []string
			for k, r := range split.ranges {
				p := filepath.Join(dir, "part"+strconv.Itoa(k)+".sgy")
				if _, err := Run(context.Background(), Job{Input: in, Attributes: []string{"envelope"}, Output: p,
					Format: format, Inlines: r[0], Crosslines: r[1]}, nil); err != nil {
					t.Fatal(err)
				}
				parts = append(parts, p)
			}
			joined := filepath.Join(dir, "joined.sgy")
			if _, err := Join(context.Background(), parts, joined, JoinOptions{}); err != nil {
				t.Fatalf("format %d %s: join: %v", format, split.name, err)
			}
			wh, wd := apptest.TraceSampleBytes(t, whole, v.Samples)
			jh, jd := apptest.TraceSampleBytes(t, joined, v.Samples)
			if len(jd) != len(wd) {
				t.Fatalf("format %d %s: joined %d traces, whole export %d", format, split.name, len(jd), len(wd))
			}
			for i := range wd {
				if string(jd[i]) != string(wd[i]) || string(jh[i]) != string(wh[i]) {
					t.Fatalf("format %d %s: trace %d differs between the joined parts and the whole export", format, split.name, i)
				}
			}
			// The parts record the source they were cut from, so the joined
			// file says "whole volume" again: it is the whole export, byte
			// for byte, file headers included.
			if apptest.FileSum(t, joined) != apptest.FileSum(t, whole) {
				t.Errorf("format %d %s: joined file differs from the whole export in its file headers", format, split.name)
			}
		}
	}
}

// Checks: the export refuses to write over its input (directly, through a
// symlink, or as the file of a folder output), before writing anything,
// and leaves the input unchanged.
func TestExportRefusesTheInputAsOutput(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in-envelope.sgy")
	apptest.WriteVolume(t, in, apptest.VolumeSpec{Inlines: [2]int{1, 3}, Crosslines: [2]int{1, 4}, Samples: 50, IntervalUS: 4000})
	link := filepath.Join(dir, "link.sgy")
	if err := os.Symlink(in, link); err != nil {
		t.Fatal(err)
	}
	sum := apptest.FileSum(t, in)
	for _, out := range []string{in, link, dir} {
		// With --out dir, the envelope of in-envelope.sgy would be named
		// dir/in-envelope-envelope.sgy: not the input. Name the input so
		// that the folder form hits it: export the input's own stem.
		input := in
		if out == dir {
			input = filepath.Join(dir, "in.sgy")
			if err := os.Link(in, input); err != nil {
				t.Fatal(err)
			}
		}
		_, err := Run(context.Background(), Job{Input: input, Attributes: []string{"envelope"}, Output: out}, nil)
		if err == nil || !strings.Contains(err.Error(), "input") {
			t.Errorf("--out %s over input %s: error %v, want a refusal", out, input, err)
		}
	}
	if apptest.FileSum(t, in) != sum {
		t.Error("the input changed")
	}
	if left := apptest.StrayTemps(t, dir); len(left) > 0 {
		t.Errorf("temporary files left: %v", left)
	}
}

// Checks: cancelling the context part-way returns context.Canceled, removes
// every temporary file and leaves each destination as it was (absent, or the
// previous file byte for byte), for one output and for a folder of several.
func TestExportCancelledLeavesDestinationsAsTheyWere(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.sgy")
	apptest.WriteVolume(t, in, apptest.VolumeSpec{Inlines: [2]int{1, 20}, Crosslines: [2]int{1, 30}, Samples: 200, IntervalUS: 4000})
	previous := filepath.Join(dir, "previous.sgy")
	if err := os.WriteFile(previous, []byte("an earlier export"), 0o644); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name string
		out  string
		ids  []string
	}{
		{"new file", filepath.Join(dir, "new.sgy"), []string{"envelope"}},
		{"previous file", previous, []string{"envelope"}},
		{"new folder", filepath.Join(dir, "several"), []string{"envelope", "instantaneous-phase"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, statErr := os.Stat(c.out)
			before := ""
			if statErr == nil {
				before = apptest.FileSum(t, c.out)
			}
			ctx, cancel := context.WithCancel(context.Background())
			defer cancel()
			calls := 0
			_, err := Run(ctx, Job{Input: in, Attributes: c.ids, Output: c.out, BudgetBytes: 64 << 10}, func(p Progress) {
				calls++
				if calls == 2 {
					if p.Done >= p.Total {
						t.Errorf("progress at %d of %d after two blocks: blocks too large for the test", p.Done, p.Total)
					}
					cancel()
				}
			})
			if !errors.Is(err, context.Canceled) {
				t.Fatalf("error %v, want context.Canceled", err)
			}
			if statErr != nil {
				if _, err := os.Stat(c.out); !os.IsNotExist(err) {
					t.Errorf("%s exists after cancellation", c.out)
				}
			} else if apptest.FileSum(t, c.out) != before {
				t.Errorf("%s changed after cancellation", c.out)
			}
			if left := apptest.StrayTemps(t, dir); len(left) > 0 {
				t.Errorf("temporary files left: %v", left)
			}
		})
	}
}

// Checks: --param goes to the attributes that have the parameter, and a
// parameter none of them has, an unknown attribute, a repeated attribute,
// an impossible budget and a format other than 1 or 5 are errors that write
// nothing.
func TestExportJobErrors(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.sgy")
	apptest.WriteVolume(t, in, apptest.VolumeSpec{Inlines: [2]int{1, 2}, Crosslines: [2]int{1, 3}, Samples: 100, IntervalUS: 4000})
	cases := []struct {
		name string
		job  Job
		want string
	}{
		{"parameter nobody has", Job{Attributes: []string{"envelope", "instantaneous-phase"}, Params: map[string]string{"window": "20"}}, "window"},
		{"bad parameter value", Job{Attributes: []string{"weighted-frequency"}, Params: map[string]string{"window": "-3"}}, "window"},
		{"unknown attribute", Job{Attributes: []string{"envelope", "glitter"}}, "glitter"},
		{"attribute twice", Job{Attributes: []string{"envelope", "envelope"}}, "twice"},
		{"budget below a trace", Job{Attributes: []string{"envelope"}, BudgetBytes: 1000}, "budget"},
		{"format 3", Job{Attributes: []string{"envelope"}, Format: 3}, "format"},
		{"no such input", Job{Input: filepath.Join(dir, "absent.sgy"), Attributes: []string{"envelope"}}, "absent.sgy"},
		{"range outside the survey", Job{Attributes: []string{"envelope"}, Inlines: &Range{50, 60}}, "no trace"},
		{"no attribute", Job{}, "no attribute"},
	}
	for _, c := range cases {
		if c.job.Input == "" {
			c.job.Input = in
		}
		c.job.Output = filepath.Join(dir, "out")
		_, err := Run(context.Background(), c.job, nil)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one mentioning %q", c.name, err, c.want)
		}
		if _, err := os.Stat(c.job.Output); !os.IsNotExist(err) {
			t.Errorf("%s: %s exists after the error", c.name, c.job.Output)
		}
	}
	// The parameter reaches only the attribute that has it: the output of
	// weighted-frequency with window=60 equals that attribute computed with
	// window=60, and envelope beside it is unaffected.
	paths, err := Run(context.Background(), Job{Input: in, Attributes: []string{"envelope", "weighted-frequency"},
		Params: map[string]string{"window": "60"}, Output: filepath.Join(dir, "both")}, nil)
	if err != nil {
		t.Fatal(err)
	}
	sec, _ := apptest.ReadSection(t, in)
	for k, id := range []string{"envelope", "weighted-frequency"} {
		got, _ := apptest.ReadSection(t, paths[k])
		want := expected(t, sec, id, map[string]string{"window": "60"}, "")
		for i := range want.Traces {
			for s := range want.Traces[i] {
				if g, w := got.Traces[i][s], want.Traces[i][s]; math.Float32bits(g) != math.Float32bits(w) {
					t.Fatalf("%s trace %d sample %d: %v, want %v", id, i, s, g, w)
				}
			}
		}
	}
}

// Checks: join refuses parts that differ in sampling or format, that repeat
// or miss traces, and a destination that is one of the parts; it writes
// nothing then. Parts without the export's records are checked against the
// regular grid they span.
func TestJoinRefusesBadParts(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.sgy")
	apptest.WriteVolume(t, in, apptest.VolumeSpec{Inlines: [2]int{1, 6}, Crosslines: [2]int{1, 5}, Samples: 80, IntervalUS: 4000})
	other := filepath.Join(dir, "other.sgy")
	apptest.WriteVolume(t, other, apptest.VolumeSpec{Inlines: [2]int{7, 8}, Crosslines: [2]int{1, 5}, Samples: 81, IntervalUS: 4000})
	// Raw volumes without records: a grid split in two by inlines, and the
	// same second half with a hole.
	rawA := filepath.Join(dir, "rawA.sgy")
	apptest.WriteVolume(t, rawA, apptest.VolumeSpec{Inlines: [2]int{1, 3}, Crosslines: [2]int{1, 5}, Samples: 80, IntervalUS: 4000})
	rawB := filepath.Join(dir, "rawB.sgy")
	apptest.WriteVolume(t, rawB, apptest.VolumeSpec{Inlines: [2]int{4, 6}, Crosslines: [2]int{1, 5}, Samples: 80, IntervalUS: 4000})
	rawC := filepath.Join(dir, "rawC.sgy")
	apptest.WriteVolume(t, rawC, apptest.VolumeSpec{Inlines: [2]int{5, 6}, Crosslines: [2]int{1, 5}, Samples: 80, IntervalUS: 4000})
	part := func(name string, il *Range, format int) string {
		p := filepath.Join(dir, name)
		if _, err := Run(context.Background(), Job{Input: in, Attributes: []string{"envelope"}, Output: p, Inlines: il, Format: format}, nil); err != nil {
			t.Fatal(err)
		}
		return p
	}
	a, b, c := part("a.sgy", &Range{1, 2}, 5), part("b.sgy", &Range{3, 4}, 5), part("c.sgy", &Range{5, 6}, 5)
	// Parts of another attribute, other parameters, another source file
	// (a copy of in under another name) for issue 18.5.
	partOf := func(name, input string, attrs []string, params map[string]string, il *Range) string {
		p := filepath.Join(dir, name)
		if _, err := Run(context.Background(), Job{Input: input, Attributes: attrs, Params: params, Output: p, Inlines: il}, nil); err != nil {
			t.Fatal(err)
		}
		return p
	}
	bPhase := partOf("b-phase.sgy", in, []string{"instantaneous-phase"}, nil, &Range{3, 4})
	bTaper := partOf("b-taper.sgy", in, []string{"envelope"}, map[string]string{"taper": "20"}, &Range{3, 4})
	in2 := filepath.Join(dir, "in2.sgy")
	apptest.WriteVolume(t, in2, apptest.VolumeSpec{Inlines: [2]int{1, 6}, Crosslines: [2]int{1, 5}, Samples: 80, IntervalUS: 4000})
	bOther := partOf("b-other.sgy", in2, []string{"envelope"}, nil, &Range{3, 4})
	bIBM := part("b-ibm.sgy", &Range{3, 4}, 1)
	ab := part("ab.sgy", &Range{1, 4}, 5)
	out := filepath.Join(dir, "joined.sgy")
	cases := []struct {
		name  string
		parts []string
		out   string
		want  string
	}{
		{"missing part", []string{a, c}, out, "no part holds inlines 3:4 (their part is missing"},
		{"missing parts", []string{b}, out, "no part holds inlines 1:2, 5:6 (their part is missing"},
		{"repeated part", []string{a, b, b, c}, out, "again in part 3"},
		{"overlapping parts", []string{ab, b, c}, out, "again in part 2"},
		{"different sample count", []string{a, b, c, other}, out, "81 samples"},
		{"different format", []string{a, bIBM, c}, out, "sample format 1"},
		{"destination is a part", []string{a, b, c}, c, "one of the parts"},
		{"raw parts with a hole", []string{rawA, rawC}, out, "inline 4 crossline 1 is missing"},
		{"first lines missing", []string{b, c}, out, "the trace at inline 1 crossline 1 is missing"},
		{"last lines missing", []string{a, b}, out, "the trace at inline 5 crossline 1 is missing"},
		{"another attribute", []string{a, bPhase, c}, out, "part 2 (" + bPhase + "): attribute instantaneous-phase"},
		{"other parameters", []string{a, bTaper, c}, out, "part 2 (" + bTaper + "): parameters"},
		{"another source file", []string{a, bOther, c}, out, "part 2 (" + bOther + "): source file in2.sgy, part 1 has in.sgy"},
		{"an export part with a raw volume", []string{a, rawB}, out, "part 2 (" + rawB + ") has no export records"},
	}
	for _, tc := range cases {
		before := apptest.FileSum(t, tc.parts[len(tc.parts)-1])
		_, err := Join(context.Background(), tc.parts, tc.out, JoinOptions{})
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v; want one with %q", tc.name, err, tc.want)
		}
		if tc.out == out {
			if _, err := os.Stat(out); !os.IsNotExist(err) {
				t.Errorf("%s: %s written", tc.name, out)
			}
		} else if apptest.FileSum(t, tc.out) != before {
			t.Errorf("%s: the part named as destination changed", tc.name)
		}
	}
	if left := apptest.StrayTemps(t, dir); len(left) > 0 {
		t.Errorf("temporary files left: %v", left)
	}
	// Raw parts that fill their grid join.
	if _, err := Join(context.Background(), []string{rawA, rawB}, out, JoinOptions{}); err != nil {
		t.Errorf("raw parts filling the grid: %v", err)
	}
}
