package app

import (
	"bytes"
	"strings"
	"testing"

	"quadtrace/segy/segytest"
)

// TestDispatch checks that the command words reach their commands and that
// wrong calls exit 2 with the usage, without opening a window.
func TestDispatch(t *testing.T) {
	small := segytest.CorpusFile(t, "small.sgy")
	for _, c := range []struct {
		args   []string
		code   int
		stdout string // substring
		stderr string // substring
	}{
		{[]string{"help"}, 0, "usage:", ""},
		{[]string{"version"}, 0, "quadtrace ", ""},
		{[]string{"attributes"}, 0, "instantaneous-phase", ""},
		{[]string{"scan", small, "--json"}, 0, `"layout": "3d-inline-sorted"`, ""},
		{[]string{"scan"}, 2, "", "want one FILE"},
		{[]string{"scan", "--help"}, 0, "usage: quadtrace scan", ""},
		{[]string{"help", "scan"}, 0, "usage: quadtrace scan", ""},
		{[]string{"--no-such-flag"}, 2, "", "Run 'quadtrace --help'"},
		{[]string{"exprot"}, 2, "", "did you mean export?"},
		{[]string{"a.sgy", "b.sgy"}, 2, "", "unknown command or option \"a.sgy\""},
		{[]string{"--snapshot"}, 2, "", "--snapshot takes"},
		{[]string{"export"}, 2, "", ""},
		{[]string{"join"}, 2, "", ""},
	} {
		var out, errb bytes.Buffer
		code := Main(c.args, &out, &errb)
		if code != c.code || !strings.Contains(out.String(), c.stdout) || !strings.Contains(errb.String(), c.stderr) {
			t.Errorf("quadtrace %v: exit %d, stdout %.80q, stderr %.120q; want exit %d, stdout with %q, stderr with %q",
				c.args, code, out.String(), errb.String(), c.code, c.stdout, c.stderr)
		}
	}
}
