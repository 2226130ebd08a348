package cli

import (
	"encoding/json"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"quadtrace/app/apptest"
	"quadtrace/segy"
	"quadtrace/segy/segytest"
)

// TestHeaderFieldsAgainstSegyio checks the field tables of `quadtrace
// headers` against Debian's python3-segyio (segyio.BinField and
// segyio.TraceField, which number fields by their first byte): every field
// segyio knows starts a field of ours, every trace header field of ours is
// one of segyio's, and the values read agree on the corpus files small.sgy
// (big-endian) and small-lsb.sgy (little-endian), trace 3. segyio reads
// bytes 3501-3502 as one 16-bit revision number; ours are the rev 2.0
// major and minor bytes, so that field is compared as major*256+minor.
func TestHeaderFieldsAgainstSegyio(t *testing.T) {
	segytest.NeedPython(t, "segyio")
	script := filepath.Join(apptest.ProjectRoot(t), "testdata", "cli", "headers.py")
	for _, c := range []struct{ name, endian string }{{"small.sgy", "big"}, {"small-lsb.sgy", "little"}} {
		name := c.name
		path := segytest.CorpusFile(t, name)
		out, err := exec.Command(apptest.Python, script, path, "3", c.endian).Output()
		if err != nil {
			t.Fatalf("%s: headers.py: %v", name, err)
		}
		var ref struct {
			Bin, Trace map[string]int
		}
		if err := json.Unmarshal(out, &ref); err != nil {
			t.Fatal(err)
		}
		f, err := segy.Open(path, segy.Options{})
		if err != nil {
			t.Fatal(err)
		}
		bin, err := f.RawBinaryHeader()
		if err != nil {
			t.Fatal(err)
		}
		th, err := f.RawTraceHeader(3)
		if err != nil {
			t.Fatal(err)
		}
		order := f.ByteOrder()
		f.Close()
		check := func(what string, fields []headerField, ref map[string]int, block []byte, base int) {
			ours := map[int]headerField{}
			for _, fl := range fields {
				ours[fl.byte] = fl
			}
			for key, want := range ref {
				pos, _ := strconv.Atoi(key)
				fl, ok := ours[pos]
				if !ok {
					if what == "trace" && pos >= 233 { // unassigned bytes 233-240
						continue
					}
					t.Errorf("%s %s: segyio has a field at byte %d, we do not", name, what, pos)
					continue
				}
				got, _ := strconv.Atoi(fl.value(block, base, order))
				if pos == 3501 {
					minor, _ := strconv.Atoi(ours[3502].value(block, base, order))
					got = got*256 + minor
				}
				if got != want {
					t.Errorf("%s %s byte %d (%s): %d, segyio reads %d", name, what, pos, fl.name, got, want)
				}
			}
			if what == "trace" {
				for _, fl := range fields {
					if _, ok := ref[strconv.Itoa(fl.byte)]; !ok {
						t.Errorf("%s: our trace header field at byte %d (%s) is not one of segyio's", name, fl.byte, fl.name)
					}
				}
			}
		}
		check("binary", binaryHeaderFields, ref.Bin, bin, 3201)
		check("trace", traceHeaderFields, ref.Trace, th, 1)
	}
}

// TestHeadersCommand prints the header of the corpus file small.sgy: the
// sample interval (4000 us) and count (50) of its README, and the inline
// and crossline of trace 6 (the corpus README's geometry: inlines 1-5 by
// crosslines 20-24, inline-sorted, so trace 6 is inline 2, crossline 21).
func TestHeadersCommand(t *testing.T) {
	path := segytest.CorpusFile(t, "small.sgy")
	var stdout, stderr strings.Builder
	if code := Headers([]string{path, "--trace", "6"}, &stdout, &stderr); code != 0 {
		t.Fatalf("exit %d: %s", code, stderr.String())
	}
	for _, want := range []string{`3217-3218 +int16 +4000 +sample interval`, `3221-3222 +int16 +50 +samples per data trace`,
		`\n +189-192 +int32 +2 +inline number`, `\n +193-196 +int32 +21 +crossline number`} {
		if !regexp.MustCompile(want).MatchString(stdout.String()) {
			t.Errorf("output lacks %q:\n%s", want, stdout.String())
		}
	}
	stderr.Reset()
	if code := Headers([]string{path, "--trace", "25"}, &strings.Builder{}, &stderr); code != exitFailed || !strings.Contains(stderr.String(), "the traces are 0 to 24") {
		t.Errorf("--trace 25: exit %d, stderr %q", code, stderr.String())
	}
}
