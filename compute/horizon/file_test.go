package horizon_test

import (
	"bytes"
	"math"
	"strings"
	"testing"

	"quadtrace/compute/horizon"
)

// A horizon written and read back is the same horizon: every trace's
// state, time to the 0.001 ms written, quality to 0.0001, on layouts with
// steps other than one.
func TestHorizonFileRoundTrip(t *testing.T) {
	for _, l := range []horizon.Layout{
		{Inlines: 7, Crosslines: 5, FirstInline: 1000, InlineStep: 1, FirstCrossline: 2000, CrosslineStep: 1},
		{Inlines: 4, Crosslines: 9, FirstInline: 10, InlineStep: 2, FirstCrossline: 500, CrosslineStep: -4,
			XY: func(il, xl int) (float64, float64) { return 512000 + 25.5*float64(xl), 6780000 - 12.25*float64(il) }},
	} {
		h := horizon.New(l.Inlines, l.Crosslines)
		for k := range h.State {
			switch k % 3 {
			case 0:
				continue
			case 1:
				h.State[k] = horizon.Tracked
			case 2:
				h.State[k] = horizon.Seeded
			}
			h.TimeMS[k] = 100 + 7.123456*float64(k)
			h.Quality[k] = float32(math.Sin(float64(k)))
		}
		var buf bytes.Buffer
		if err := horizon.Write(&buf, h.Picks(l)); err != nil {
			t.Fatal(err)
		}
		if first, _, _ := strings.Cut(buf.String(), "\n"); first != horizon.Header {
			t.Errorf("first line %q, want the header", first)
		}
		picks, err := horizon.Read(&buf)
		if err != nil {
			t.Fatal(err)
		}
		got, err := horizon.FromPicks(l, picks)
		if err != nil {
			t.Fatal(err)
		}
		for k := range h.State {
			if got.State[k] != h.State[k] {
				t.Errorf("trace %d: state %v, want %v", k, got.State[k], h.State[k])
				continue
			}
			if h.State[k] == horizon.Empty {
				if !math.IsNaN(got.TimeMS[k]) {
					t.Errorf("trace %d: empty with time %v", k, got.TimeMS[k])
				}
				continue
			}
			if math.Abs(got.TimeMS[k]-h.TimeMS[k]) > 0.0005 || math.Abs(float64(got.Quality[k]-h.Quality[k])) > 0.00005 {
				t.Errorf("trace %d: %v ms quality %v, want %v ms quality %v", k, got.TimeMS[k], got.Quality[k], h.TimeMS[k], h.Quality[k])
			}
		}
		if l.XY != nil {
			p := picks[0]
			il, xl := (p.Inline-l.FirstInline)/l.InlineStep, (p.Crossline-l.FirstCrossline)/l.CrosslineStep
			x, y := l.XY(il, xl)
			if math.Abs(p.X-x) > 0.005 || math.Abs(p.Y-y) > 0.005 {
				t.Errorf("first pick at %v, %v, want %v, %v", p.X, p.Y, x, y)
			}
		}
	}
}

// Malformed horizon files give a one-line error naming the line (and the
// column where one is at fault).
func TestMalformedHorizonFiles(t *testing.T) {
	const h = horizon.Header + "\n"
	const ok = "1000 2000 1.5 2.5 812.25 0.9 tracked\n"
	for _, tc := range []struct {
		name, text, want string
	}{
		{"empty", "", "line 1: no header"},
		{"blank lines only", "\n\n", "line 3: no header"},
		{"wrong header", "il xl x y t q o\n" + ok, "line 1: "},
		{"short row", h + "1000 2000 1 2 3 0.5\n", "line 2: 6 columns, want 7"},
		{"too many columns", h + ok + "1000 2001 1 2 3 0.5 tracked extra\n", "line 3: 8 columns"},
		{"inline not a whole number", h + "1000.5 2000 1 2 3 0.5 tracked\n", "line 2: column 1 (inline)"},
		{"crossline text", h + "1000 abc 1 2 3 0.5 tracked\n", "line 2: column 2 (crossline)"},
		{"comma decimal", h + ok + ok[:0] + "1001 2000 1 2 12,5 0.5 tracked\n", "line 3: column 5 (time_ms): \"12,5\" is not a number"},
		{"NaN time", h + "1000 2000 1 2 NaN 0.5 tracked\n", "line 2: column 5 (time_ms): \"NaN\" is not a finite number"},
		{"Inf x", h + "1000 2000 +Inf 2 3 0.5 tracked\n", "line 2: column 3 (x)"},
		{"huge y", h + "1000 2000 1 1e999 3 0.5 tracked\n", "line 2: column 4 (y): \"1e999\" is not a finite number"},
		{"quality out of range", h + "1000 2000 1 2 3 1.5 tracked\n", "line 2: column 6 (quality): \"1.5\" is outside -1..1"},
		{"bad origin", h + "1000 2000 1 2 3 0.5 guessed\n", "line 2: column 7 (origin)"},
		{"duplicate", h + ok + "\n" + ok, "line 4: inline 1000 crossline 2000 again (first on line 2)"},
		{"long line", h + strings.Repeat("1", 5000) + "\n", "line 2: longer than"},
		{"binary", h + "\x00\x01\x02 \xff\xfe 1 2 3 4 5\n", "line 2: column 1 (inline)"},
	} {
		_, err := horizon.Read(strings.NewReader(tc.text))
		if err == nil {
			t.Errorf("%s: no error", tc.name)
			continue
		}
		if msg := err.Error(); !strings.HasPrefix(msg, tc.want) || strings.Contains(msg, "\n") {
			t.Errorf("%s: error %q, want one line starting %q", tc.name, msg, tc.want)
		}
	}
	// Accepted variations: CRLF, tabs, runs of spaces, blank lines.
	picks, err := horizon.Read(strings.NewReader("\r\n" + horizon.Header + "\r\n1000\t2000  1.5 2.5 812.25 0.9 seed\r\n\r\n"))
	if err != nil || len(picks) != 1 || !picks[0].Seed || picks[0].TimeMS != 812.25 || picks[0].Line != 3 {
		t.Errorf("CRLF and tabs: %+v, %v", picks, err)
	}
}

// Picks off the grid, or twice on one trace, are refused naming the line.
func TestPicksOffTheGrid(t *testing.T) {
	l := horizon.Layout{Inlines: 3, Crosslines: 3, FirstInline: 10, InlineStep: 2, FirstCrossline: 1, CrosslineStep: 1}
	for _, tc := range []struct {
		p    horizon.Pick
		want string
	}{
		{horizon.Pick{Inline: 11, Crossline: 1, Line: 4}, "line 4: inline 11 crossline 1 is not on the survey's grid (inlines 10 to 14, crosslines 1 to 3)"},
		{horizon.Pick{Inline: 16, Crossline: 1, Line: 5}, "line 5: inline 16"},
		{horizon.Pick{Inline: 10, Crossline: 0}, "pick 1: inline 10 crossline 0"},
	} {
		if _, err := horizon.FromPicks(l, []horizon.Pick{tc.p}); err == nil || !strings.HasPrefix(err.Error(), tc.want) {
			t.Errorf("%+v: %v, want %q", tc.p, err, tc.want)
		}
	}
	two := []horizon.Pick{{Inline: 12, Crossline: 2, Line: 2}, {Inline: 12, Crossline: 2, Line: 9}}
	if _, err := horizon.FromPicks(l, two); err == nil || !strings.HasPrefix(err.Error(), "line 9: inline 12 crossline 2 picked twice") {
		t.Errorf("twice: %v", err)
	}
	if err := horizon.Write(&bytes.Buffer{}, []horizon.Pick{{TimeMS: math.NaN()}}); err == nil {
		t.Error("Write accepted a NaN time")
	}
}

// A map file has the header line and one row per trace with a value, the
// value as written reading back to the float32 it was.
func TestWriteMap(t *testing.T) {
	l := horizon.Layout{Inlines: 2, Crosslines: 3, FirstInline: 5, InlineStep: 1, FirstCrossline: 100, CrosslineStep: 2}
	nan := float32(math.NaN())
	m := &horizon.AttributeMap{Inlines: 2, Crosslines: 3, Values: []float32{1.2345678, nan, -3e-7, 4, nan, 6.5e12}}
	var buf bytes.Buffer
	if err := horizon.WriteMap(&buf, m, l); err != nil {
		t.Fatal(err)
	}
	want := horizon.MapHeader + "\n5 100 0.00 0.00 1.234568\n5 104 0.00 0.00 -3e-07\n6 100 0.00 0.00 4\n6 104 0.00 0.00 6.5e+12\n"
	if buf.String() != want {
		t.Errorf("map file:\n%s\nwant:\n%s", buf.String(), want)
	}
	if err := horizon.WriteMap(&buf, m, horizon.Layout{Inlines: 3, Crosslines: 3}); err == nil {
		t.Error("a map on another grid was written")
	}
}
