package cli

import (
	"io"
	"reflect"
	"strings"
	"testing"

	"quadtrace/app/export"
	"quadtrace/segy"
)

func TestParseExportArgs(t *testing.T) {
	base := exportArgs{input: "in.sgy", out: "o.sgy", format: 5, budget: export.DefaultBudget, progress: progressBar, params: map[string]string{}}
	with := func(f func(*exportArgs)) exportArgs { a := base; a.params = map[string]string{}; f(&a); return a }
	cases := []struct {
		name string
		args string
		want exportArgs
		fail string // part of the error, "" for success
	}{
		{"minimal", "in.sgy --attribute envelope --out o.sgy",
			with(func(a *exportArgs) { a.attributes = []string{"envelope"} }), ""},
		{"flags before the file, lists and repeats",
			"--attribute envelope,sweetness --attribute=instantaneous-phase --out o.sgy in.sgy --param window=24 --param pad=none",
			with(func(a *exportArgs) {
				a.attributes = []string{"envelope", "sweetness", "instantaneous-phase"}
				a.params = map[string]string{"window": "24", "pad": "none"}
			}), ""},
		{"everything", "in.sgy --attribute envelope --out o.sgy --format ibm --inlines 10:20 --crosslines 5 --budget 1G --progress json --condition band:8-60 --inline-byte 9 --crossline-byte 21 --byte-order little",
			with(func(a *exportArgs) {
				a.attributes = []string{"envelope"}
				a.format, a.inlines, a.crosslines, a.budget, a.progress = 1, &export.Range{First: 10, Last: 20}, &export.Range{First: 5, Last: 5}, 1<<30, progressJSON
				a.condition, a.segy = "band:8-60", segy.Options{InlineByte: 9, CrosslineByte: 21, ByteOrder: "little"}
			}), ""},
		{"quiet", "in.sgy --attribute envelope --out o.sgy --quiet",
			with(func(a *exportArgs) { a.attributes = []string{"envelope"}; a.progress, a.quiet = progressNone, true }), ""},
		{"no file", "--attribute envelope --out o.sgy", exportArgs{}, "no input FILE"},
		{"two files", "a.sgy b.sgy --attribute envelope --out o.sgy", exportArgs{}, "one input FILE expected"},
		{"no attribute", "in.sgy --out o.sgy", exportArgs{}, "--attribute"},
		{"no out", "in.sgy --attribute envelope", exportArgs{}, "--out"},
		{"bad format", "in.sgy --attribute envelope --out o --format ibm32", exportArgs{}, "--format"},
		{"bad param", "in.sgy --attribute envelope --out o --param window", exportArgs{}, "NAME=VALUE"},
		{"param twice", "in.sgy --attribute envelope --out o --param a=1 --param a=2", exportArgs{}, "given twice"},
		{"bad range", "in.sgy --attribute envelope --out o --inlines 20:10", exportArgs{}, "--inlines"},
		{"bad budget", "in.sgy --attribute envelope --out o --budget lots", exportArgs{}, "--budget"},
		{"bad progress", "in.sgy --attribute envelope --out o --progress dots", exportArgs{}, "--progress"},
		{"quiet and json", "in.sgy --attribute envelope --out o --quiet --progress json", exportArgs{}, "contradict"},
		{"bad byte", "in.sgy --attribute envelope --out o --inline-byte 239", exportArgs{}, "--inline-byte"},
		{"bad byte order", "in.sgy --attribute envelope --out o --byte-order middle", exportArgs{}, "--byte-order"},
		{"unknown flag", "in.sgy --attribute envelope --out o --colour red", exportArgs{}, "colour"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			var stderr strings.Builder
			got, code, done := parseExportArgs(strings.Fields(c.args), io.Discard, &stderr)
			if c.fail != "" {
				if !done || code != exitUsage || !strings.Contains(stderr.String(), c.fail) {
					t.Fatalf("exit %d, stderr %q, want %d and a message mentioning %q", code, stderr.String(), exitUsage, c.fail)
				}
				return
			}
			if done {
				t.Fatalf("exit %d: %s", code, stderr.String())
			}
			if !reflect.DeepEqual(*got, c.want) {
				t.Errorf("got  %+v\nwant %+v", *got, c.want)
			}
		})
	}
	var help strings.Builder
	if _, code, done := parseExportArgs([]string{"--help"}, &help, io.Discard); !done || code != exitOK || !strings.Contains(help.String(), "usage: quadtrace export") {
		t.Errorf("--help: exit %d, printed %q", code, help.String())
	}
}

func TestParseJoinArgs(t *testing.T) {
	a, code, done := parseJoinArgs(strings.Fields("a.sgy --out all.sgy b.sgy c.sgy --quiet --inline-byte 9"), io.Discard, io.Discard)
	if done || !reflect.DeepEqual(a.parts, []string{"a.sgy", "b.sgy", "c.sgy"}) || a.out != "all.sgy" || !a.quiet || a.segy.InlineByte != 9 {
		t.Errorf("join args: %+v, exit %d", a, code)
	}
	for _, bad := range []string{"--out all.sgy", "a.sgy b.sgy", "a.sgy --out", "a.sgy --out b.sgy --crossline-byte 400"} {
		if _, code, done := parseJoinArgs(strings.Fields(bad), io.Discard, io.Discard); !done || code != exitUsage {
			t.Errorf("join %q: exit %d, want %d", bad, code, exitUsage)
		}
	}
}
