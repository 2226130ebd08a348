package export

import (
	"errors"
	"testing"
)

func TestBlockSize(t *testing.T) {
	cases := []struct {
		name     string
		budget   int64
		samples  int
		outputs  int
		cond     bool
		total    int
		want     int
		wantFail bool
	}{
		// 256 MiB / ((1501*4*2 + 320) * 3 * 1.25) = 5806 traces, capped
		// at 4 MiB of input samples: 4 MiB / (1501*4) = 698.
		{"envelope, big volume", 256 << 20, 1501, 1, false, 1_000_000, 698, false},
		{"envelope, budget below the cache cap", 16 << 20, 1501, 1, false, 1_000_000, 16 << 20 * 4 / ((1501*4*2 + 320) * 3 * 5), false},
		{"three attributes and conditioning", 64 << 20, 1501, 3, true, 1_000_000, 64 << 20 * 4 / ((1501*4*5 + 320) * 3 * 5), false},
		{"small volume cut in 16 blocks", 256 << 20, 1501, 1, false, 8000, 500, false},
		{"long traces keep 64 traces a block", 256 << 20, 60000, 1, false, 1_000_000, 64, false},
		{"tiny volume keeps 64 traces a block", 256 << 20, 100, 1, false, 10, 64, false},
		{"budget for one trace", (1000*4*2 + 320) * 3 * 5 / 4, 1000, 1, false, 1000, 1, false},
		{"budget below one trace", (1000*4*2+320)*3*5/4 - 1, 1000, 1, false, 1000, 0, true},
	}
	for _, c := range cases {
		got, err := blockSize(c.budget, c.samples, c.outputs, c.cond, c.total)
		if (err != nil) != c.wantFail || got != c.want {
			t.Errorf("%s: blockSize = %d, %v; want %d (fail %v)", c.name, got, err, c.want, c.wantFail)
		}
	}
}

func TestSelectRuns(t *testing.T) {
	// An invented inline-sorted grid: inlines 10..13, crosslines 1..5.
	key := func(i int) (int, int, error) { return 10 + i/5, 1 + i%5, nil }
	cases := []struct {
		name    string
		il, xl  *Range
		want    []traceRun
		noTrace bool
	}{
		{"whole", nil, nil, []traceRun{{0, 20}}, false},
		{"inlines", &Range{11, 12}, nil, []traceRun{{5, 10}}, false},
		{"crosslines", nil, &Range{2, 3}, []traceRun{{1, 2}, {6, 2}, {11, 2}, {16, 2}}, false},
		{"both", &Range{13, 99}, &Range{5, 5}, []traceRun{{19, 1}}, false},
		{"outside", &Range{20, 30}, nil, nil, true},
	}
	for _, c := range cases {
		got, err := selectRuns(20, c.il, c.xl, key)
		if c.noTrace {
			if !errors.Is(err, errNoTraces) {
				t.Errorf("%s: error %v, want no traces", c.name, err)
			}
			continue
		}
		if err != nil || len(got) != len(c.want) {
			t.Fatalf("%s: runs %v, %v; want %v", c.name, got, err, c.want)
		}
		for i := range got {
			if got[i] != c.want[i] {
				t.Errorf("%s: runs %v, want %v", c.name, got, c.want)
			}
		}
	}
}

func TestParseRange(t *testing.T) {
	cases := []struct {
		in   string
		want *Range
	}{
		{"100:200", &Range{100, 200}},
		{" 5 : 5 ", &Range{5, 5}},
		{"7", &Range{7, 7}},
		{"-3:4", &Range{-3, 4}},
		{"200:100", nil},
		{"a:b", nil},
		{"1:", nil},
		{"", nil},
	}
	for _, c := range cases {
		got, err := ParseRange(c.in)
		if c.want == nil {
			if err == nil {
				t.Errorf("ParseRange(%q) = %v, want an error", c.in, got)
			}
			continue
		}
		if err != nil || *got != *c.want {
			t.Errorf("ParseRange(%q) = %v, %v; want %v", c.in, got, err, c.want)
		}
	}
}
