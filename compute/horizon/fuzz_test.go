package horizon_test

import (
	"bytes"
	"strings"
	"testing"

	"quadtrace/compute/horizon"
)

// FuzzReadHorizon: Read never panics, its errors are one line naming a
// line, and what it accepts writes and reads back to the same picks.
func FuzzReadHorizon(f *testing.F) {
	f.Add(horizon.Header + "\n1000 2000 1.5 2.5 812.25 0.9 tracked\n1001 2000 0 0 -3 1 seed\n")
	f.Add(horizon.Header + "\r\n\r\n1000\t2000 1e3 -2 0.001 -1 tracked")
	f.Add("inline crossline\n1 2\n")
	f.Add("")
	f.Fuzz(func(t *testing.T, text string) {
		picks, err := horizon.Read(strings.NewReader(text))
		if err != nil {
			if msg := err.Error(); !strings.HasPrefix(msg, "line ") || strings.Contains(msg, "\n") {
				t.Fatalf("error %q: want one line starting with the line number", msg)
			}
			return
		}
		var buf bytes.Buffer
		if err := horizon.Write(&buf, picks); err != nil {
			t.Fatalf("accepted picks do not write: %v", err)
		}
		again, err := horizon.Read(&buf)
		if err != nil || len(again) != len(picks) {
			t.Fatalf("written picks do not read back: %v (%d of %d)", err, len(again), len(picks))
		}
		for i, p := range picks {
			q := again[i]
			if p.Inline != q.Inline || p.Crossline != q.Crossline || p.Seed != q.Seed {
				t.Fatalf("pick %d: %+v read back as %+v", i, p, q)
			}
		}
	})
}
