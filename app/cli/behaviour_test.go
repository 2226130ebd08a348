//go:build unix

package cli

import (
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
	"testing"

	"quadtrace/app/apptest"
	"quadtrace/segy/segytest"
)

// TestEveryCommandBehavesAlike runs every command with help, a wrong call,
// a bad id or option name, a missing input and an output that is one of its
// inputs (or otherwise not writable as a file), and checks what the issue
// asks of all of them alike (the `go` command's conventions, common
// practice): help on stdout with exit 0 and nothing on stderr; a wrong
// call exits 2 with what is wrong and one line pointing at --help on
// stderr; a failure exits 1 with one line `quadtrace NAME: FILE: ...`; an
// unknown id or option suggests the nearest valid one; no input changes
// (SHA-256 before and after) and no file is left behind.
func TestEveryCommandBehavesAlike(t *testing.T) {
	dir := t.TempDir()
	src := segytest.CorpusFile(t, "small.sgy")
	raw, err := os.ReadFile(src)
	if err != nil {
		t.Fatal(err)
	}
	in := filepath.Join(dir, "in.sgy")
	// The same SEG-Y bytes under a figure's extension, so that the figure
	// command's --out can name its input without failing the format check.
	inPNG := filepath.Join(dir, "in.png")
	part := filepath.Join(dir, "part.sgy")
	for _, p := range []string{in, inPNG, part} {
		if err := os.WriteFile(p, raw, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	link := filepath.Join(dir, "link.sgy")
	if err := os.Symlink(in, link); err != nil {
		t.Fatal(err)
	}
	fifo := filepath.Join(dir, "fifo.png")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	folder := filepath.Join(dir, "folder.sgy")
	if err := os.Mkdir(folder, 0o755); err != nil {
		t.Fatal(err)
	}
	inputs := []string{in, inPNG, part}
	sums := map[string]string{}
	for _, p := range inputs {
		sums[p] = apptest.FileSum(t, p)
	}
	before := listDir(t, dir)
	missing := filepath.Join(dir, "missing.sgy")

	type call struct {
		what   string
		args   []string
		code   int
		stdout string // substring of stdout ("" : stdout must be empty)
		stderr string // substring of stderr ("" : stderr must be empty)
	}
	cmds := []struct {
		name  string
		run   func([]string, io.Writer, io.Writer) int
		calls []call
	}{
		{"scan", Scan, []call{
			{"wrong call", []string{}, 2, "", "want one FILE"},
			{"bad option", []string{in, "--jsn"}, 2, "", "unknown option --jsn (did you mean --json?)"},
			{"bad header byte", []string{in, "--inline-byte", "239"}, 2, "", "--inline-byte 239"},
			{"missing file", []string{missing}, 1, "", "quadtrace scan: " + missing + ": "},
		}},
		{"headers", Headers, []call{
			{"wrong call", []string{in, in}, 2, "", "want one FILE"},
			{"bad option", []string{in, "--trac", "2"}, 2, "", "(did you mean --trace?)"},
			{"trace out of range", []string{in, "--trace", "99"}, 1, "", "quadtrace headers: " + in + ": --trace 99: the traces are 0 to 24"},
			{"missing file", []string{missing}, 1, "", "quadtrace headers: " + missing + ": "},
		}},
		{"attributes", Attributes, []call{
			{"wrong call", []string{"envelope", "sweetness"}, 2, "", "at most one ID"},
			{"bad id", []string{"envlope"}, 2, "", `unknown attribute "envlope" (did you mean envelope?)`},
		}},
		{"version", Version, []call{
			{"wrong call", []string{"now"}, 2, "", "takes no arguments"},
		}},
		{"export", Export, []call{
			{"wrong call", []string{in, "--out", filepath.Join(dir, "e.sgy")}, 2, "", "--attribute"},
			{"bad id", []string{in, "--attribute", "envlope", "--out", filepath.Join(dir, "e.sgy")}, 2, "", "(did you mean envelope?)"},
			{"bad parameter", []string{in, "--attribute", "envelope", "--param", "pda=none", "--out", filepath.Join(dir, "e.sgy")}, 2, "", "(did you mean pad?)"},
			{"missing file", []string{missing, "--attribute", "envelope", "--out", filepath.Join(dir, "e.sgy")}, 1, "", "quadtrace export: " + missing + ": "},
			{"output is the input", []string{in, "--attribute", "envelope", "--out", in, "--quiet"}, 1, "", "is the input file"},
			{"output is a link to the input", []string{in, "--attribute", "envelope", "--out", link, "--quiet", "--follow-links"}, 1, "", "is the input file"},
		}},
		{"join", Join, []call{
			{"wrong call", []string{part}, 2, "", "--out"},
			{"bad option", []string{part, "--out", filepath.Join(dir, "j.sgy"), "--inline-bite", "9"}, 2, "", "(did you mean --inline-byte?)"},
			{"missing part", []string{missing, "--out", filepath.Join(dir, "j.sgy")}, 1, "", "quadtrace join: " + missing + ": "},
			{"output is a part", []string{in, part, "--out", part}, 1, "", "is the input file"},
			{"output is a fifo", []string{in, part, "--out", fifo}, 1, "", "is a FIFO"},
		}},
		{"figure", Figure, []call{
			{"wrong call", []string{in, "--out", filepath.Join(dir, "f.png")}, 2, "", "exactly one of --inline"},
			{"bad id", []string{in, "--inline", "2", "--attribute", "envlope", "--out", filepath.Join(dir, "f.png")}, 2, "", "(did you mean envelope?)"},
			{"bad parameter", []string{in, "--inline", "2", "--attribute", "envelope", "--param", "windw=100", "--out", filepath.Join(dir, "f.png")}, 2, "", `"windw"`},
			{"format by extension", []string{in, "--inline", "2", "--out", filepath.Join(dir, "f.svg")}, 2, "", "want .png, .jpg or .jpeg"},
			{"time out of range", []string{in, "--time", "999", "--out", filepath.Join(dir, "f.png")}, 1, "", "time 999 ms is outside the traces: 0 to 196 ms"},
			{"inline out of range", []string{in, "--inline", "9", "--out", filepath.Join(dir, "f.png")}, 1, "", "no inline 9: the inlines are 1 to 5"},
			{"missing file", []string{missing, "--inline", "2", "--out", filepath.Join(dir, "f.png")}, 1, "", "quadtrace figure: " + missing + ": "},
			{"output is the input", []string{inPNG, "--inline", "2", "--out", inPNG}, 1, "", "is the input file"},
			{"output is a fifo", []string{in, "--inline", "2", "--out", fifo}, 1, "", "is a FIFO"},
		}},
		{"track", Track, []call{
			{"wrong call", []string{in, "--out", filepath.Join(dir, "h.txt")}, 2, "", "--seed"},
			{"bad option", []string{in, "--sed", "2,21,100", "--out", filepath.Join(dir, "h.txt")}, 2, "", "(did you mean --seed?)"},
			{"missing file", []string{missing, "--seed", "2,21,100", "--out", filepath.Join(dir, "h.txt")}, 1, "", "quadtrace track: " + missing + ": "},
			{"output is the input", []string{in, "--seed", "2,21,100", "--out", in}, 1, "", "is the input file"},
		}},
		{"map", Map, []call{
			{"wrong call", []string{in, "--out", filepath.Join(dir, "m.png")}, 2, "", "--horizon"},
			{"bad id", []string{in, "--horizon", part, "--attribute", "envlope", "--out", filepath.Join(dir, "m.png")}, 2, "", "(did you mean envelope?)"},
			{"output is the input", []string{inPNG, "--horizon", part, "--attribute", "envelope", "--out", inPNG}, 1, "", "is the input file"},
		}},
		{"synth", Synth, []call{
			{"wrong call", []string{}, 2, "", "want one OUT.sgy"},
			{"bad option", []string{filepath.Join(dir, "s.sgy"), "--sed", "3"}, 2, "", "(did you mean --seed?)"},
			{"output is a folder", []string{folder, "--inlines", "4", "--crosslines", "4", "--samples", "50"}, 1, "", "is a folder"},
			{"output is a fifo", []string{fifo, "--inlines", "4", "--crosslines", "4", "--samples", "50"}, 1, "", "is a FIFO"},
		}},
	}
	for _, c := range cmds {
		calls := append([]call{
			{"--help", []string{"--help"}, 0, "usage: quadtrace " + c.name, ""},
			{"-h", []string{"-h"}, 0, "usage: quadtrace " + c.name, ""},
		}, c.calls...)
		for _, k := range calls {
			t.Run(c.name+"/"+k.what, func(t *testing.T) {
				var stdout, stderr strings.Builder
				code := c.run(k.args, &stdout, &stderr)
				if code != k.code {
					t.Errorf("exit %d, want %d; stderr %q", code, k.code, stderr.String())
				}
				check := func(stream, got, want string) {
					if want == "" && got != "" {
						t.Errorf("%s %q, want nothing", stream, got)
					}
					if !strings.Contains(got, want) {
						t.Errorf("%s %q, want it to contain %q", stream, got, want)
					}
				}
				check("stdout", stdout.String(), k.stdout)
				check("stderr", stderr.String(), k.stderr)
				lines := strings.Split(strings.TrimSuffix(stderr.String(), "\n"), "\n")
				switch k.code {
				case exitUsage:
					want := "Run 'quadtrace " + c.name + " --help' for usage."
					if len(lines) != 2 || !strings.HasPrefix(lines[0], "quadtrace "+c.name+": ") || lines[1] != want {
						t.Errorf("usage error %q: want one line of what is wrong and %q", stderr.String(), want)
					}
				case exitFailed:
					if len(lines) != 1 || !strings.HasPrefix(lines[0], "quadtrace "+c.name+": ") ||
						strings.Contains(lines[0], "quadtrace "+c.name+": "+c.name+":") {
						t.Errorf("failure %q: want one line `quadtrace %s: FILE: ...`", stderr.String(), c.name)
					}
				}
			})
		}
	}
	for _, p := range inputs {
		if apptest.FileSum(t, p) != sums[p] {
			t.Errorf("%s changed", p)
		}
	}
	if after := listDir(t, dir); !slices.Equal(after, before) {
		t.Errorf("files in the folder changed: before %v, after %v", before, after)
	}
}
