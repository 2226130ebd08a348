package cli

import (
	"errors"
	"io"
	"reflect"
	"strings"
	"testing"

	"quadtrace/app/export"
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
				a.condition, a.inlineByte, a.crosslineByte, a.byteOrder = "band:8-60", 9, 21, "little"
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
			got, err := parseExportArgs(strings.Fields(c.args), io.Discard)
			if c.fail != "" {
				if err == nil || !strings.Contains(err.Error(), c.fail) {
					t.Fatalf("error %v, want one mentioning %q", err, c.fail)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(*got, c.want) {
				t.Errorf("got  %+v\nwant %+v", *got, c.want)
			}
		})
	}
	var help strings.Builder
	if _, err := parseExportArgs([]string{"--help"}, &help); !errors.Is(err, errHelp) || !strings.Contains(help.String(), "usage: quadtrace export") {
		t.Errorf("--help: error %v, printed %q", err, help.String())
	}
}

func TestParseJoinArgs(t *testing.T) {
	parts, out, quiet, _, err := parseJoinArgs(strings.Fields("a.sgy --out all.sgy b.sgy c.sgy --quiet"), io.Discard)
	if err != nil || !reflect.DeepEqual(parts, []string{"a.sgy", "b.sgy", "c.sgy"}) || out != "all.sgy" || !quiet {
		t.Errorf("join args: %v %q %v %v", parts, out, quiet, err)
	}
	for _, bad := range []string{"--out all.sgy", "a.sgy b.sgy", "a.sgy --out"} {
		if _, _, _, _, err := parseJoinArgs(strings.Fields(bad), io.Discard); err == nil {
			t.Errorf("join %q: no error", bad)
		}
	}
}
