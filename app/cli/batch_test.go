package cli

import (
	"bytes"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"quadtrace/segy/segytest"
)

func run(cmd func([]string, *bytes.Buffer, *bytes.Buffer) int, args ...string) (int, string, string) {
	var out, errb bytes.Buffer
	code := cmd(args, &out, &errb)
	return code, out.String(), errb.String()
}

func scanCmd(a []string, o, e *bytes.Buffer) int       { return Scan(a, o, e) }
func attributesCmd(a []string, o, e *bytes.Buffer) int { return Attributes(a, o, e) }
func figureCmd(a []string, o, e *bytes.Buffer) int     { return Figure(a, o, e) }
func synthCmd(a []string, o, e *bytes.Buffer) int      { return Synth(a, o, e) }

// TestScanJSONCorpus checks `scan --json` against the check values of the
// corpus README (geometry of small.sgy: inlines 1..5, crosslines 20..24, 25
// traces, 50 samples at 4 ms, format 1 IBM float, big-endian; small-lsb.sgy
// is the same file little-endian).
func TestScanJSONCorpus(t *testing.T) {
	for _, c := range []struct {
		file, order string
	}{{"small.sgy", "big"}, {"small-lsb.sgy", "little"}} {
		t.Run(c.file, func(t *testing.T) {
			code, out, errs := run(scanCmd, segytest.CorpusFile(t, c.file), "--json")
			if code != 0 {
				t.Fatalf("exit %d, stderr %s", code, errs)
			}
			var got map[string]any
			if err := json.Unmarshal([]byte(out), &got); err != nil {
				t.Fatalf("not one JSON object: %v\n%s", err, out)
			}
			// The keys the issue promises scripts.
			for _, k := range []string{"revision", "format", "byte_order", "samples", "interval_us", "start_ms", "traces", "layout", "inline", "crossline", "missing_traces", "text_header"} {
				if _, ok := got[k]; !ok {
					t.Errorf("key %q missing", k)
				}
			}
			want := map[string]any{"format": 1.0, "byte_order": c.order, "samples": 50.0, "interval_us": 4000.0, "traces": 25.0, "missing_traces": 0.0, "layout": "3d-inline-sorted"}
			for k, v := range want {
				if got[k] != v {
					t.Errorf("%s = %v, want %v", k, got[k], v)
				}
			}
			il := got["inline"].(map[string]any)
			xl := got["crossline"].(map[string]any)
			if il["min"] != 1.0 || il["max"] != 5.0 || il["step"] != 1.0 || il["count"] != 5.0 {
				t.Errorf("inline = %v, want 1..5 step 1 count 5", il)
			}
			if xl["min"] != 20.0 || xl["max"] != 24.0 || xl["count"] != 5.0 {
				t.Errorf("crossline = %v, want 20..24 count 5", xl)
			}
		})
	}
}

// TestScanText checks the human report names the facts and the text header.
func TestScanText(t *testing.T) {
	code, out, errs := run(scanCmd, segytest.CorpusFile(t, "normal-small.sgy"))
	if code != 0 {
		t.Fatalf("exit %d, stderr %s", code, errs)
	}
	for _, want := range []string{"samples per trace:     50", "sample interval:       4 ms", "inlines:               1 to 5 step 1 (5 lines)", "textual header:", "bin spacing:"} {
		if !strings.Contains(out, want) {
			t.Errorf("report lacks %q:\n%s", want, out)
		}
	}
}

// TestScanFailures: a file that cannot be opened gives a non-zero exit and
// one error line on stderr; a header-only file (corpus text.sgy) opens and
// says it has no traces.
func TestScanFailures(t *testing.T) {
	dir := t.TempDir()
	notSegy := filepath.Join(dir, "picture.png")
	if err := os.WriteFile(notSegy, []byte("\x89PNG\r\n\x1a\n not a seismic file"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, args := range [][]string{{notSegy}, {filepath.Join(dir, "absent.sgy")}, {dir}} {
		code, out, errs := run(scanCmd, args...)
		if code == 0 || out != "" || strings.Count(strings.TrimSpace(errs), "\n") != 0 || !strings.HasPrefix(errs, "quadtrace scan: ") {
			t.Errorf("scan %v: exit %d, stdout %q, stderr %q; want non-zero, nothing, one error line", args, code, out, errs)
		}
	}
	if code, _, _ := run(scanCmd); code != 2 {
		t.Errorf("scan without a file: exit %d, want 2", code)
	}
	code, out, errs := run(scanCmd, segytest.CorpusFile(t, "text.sgy"))
	if code != 0 || !strings.Contains(out, "no traces") {
		t.Errorf("text.sgy: exit %d, stderr %q, report:\n%s\nwant exit 0 and a 'no traces' warning", code, errs, out)
	}
}

// TestAttributesList checks one line per attribute with the id first and
// the ids the command line relies on (issue: attributes) present.
func TestAttributesList(t *testing.T) {
	code, out, _ := run(attributesCmd)
	if code != 0 {
		t.Fatalf("exit %d", code)
	}
	ids := map[string]bool{}
	for _, line := range strings.Split(strings.TrimSpace(out), "\n") {
		ids[strings.Fields(line)[0]] = true
	}
	for _, id := range []string{"amplitude", "quadrature", "envelope", "instantaneous-phase", "cosine-phase", "instantaneous-frequency", "instantaneous-bandwidth", "dominant-frequency", "apparent-polarity", "response-phase", "response-frequency", "response-amplitude", "weighted-frequency", "weighted-bandwidth", "sweetness", "relative-impedance", "rms-amplitude"} {
		if !ids[id] {
			t.Errorf("id %q not listed first on a line", id)
		}
	}
}

// TestSynthReadBySegyio writes a small demo survey and reads it with
// Debian's python3-segyio (an independent SEG-Y implementation): the
// geometry it declares (inline and crossline numbers at bytes 189/193 of
// the SEG-Y revision 1 trace header) and the sample interval must come back.
func TestSynthReadBySegyio(t *testing.T) {
	py := segytest.NeedPython(t, "segyio")
	out := filepath.Join(t.TempDir(), "demo.sgy")
	code, _, errs := run(synthCmd, out, "--inlines", "12", "--crosslines", "9", "--samples", "200", "--seed", "7")
	if code != 0 {
		t.Fatalf("synth: exit %d: %s", code, errs)
	}
	script := `
import sys, segyio, json
with segyio.open(sys.argv[1], iline=189, xline=193) as f:
    print(json.dumps({"ilines": [int(i) for i in f.ilines], "xlines": [int(x) for x in f.xlines],
        "samples": len(f.samples), "dt": segyio.tools.dt(f), "sorting": int(f.sorting),
        "format": int(f.format)}))
`
	raw, err := exec.Command(py, "-c", script, out).Output()
	if err != nil {
		t.Fatalf("segyio could not open the synth file: %v", err)
	}
	var got struct {
		Ilines, Xlines []int
		Samples        int
		DT             float64
		Sorting        int
		Format         int
	}
	if err := json.Unmarshal(raw, &got); err != nil {
		t.Fatal(err)
	}
	if len(got.Ilines) != 12 || len(got.Xlines) != 9 || got.Samples != 200 || got.DT != 2000 || got.Format != 5 {
		t.Errorf("segyio read %+v; want 12 inlines, 9 crosslines, 200 samples, dt 2000 us, format 5", got)
	}
	if got.Sorting != 2 { // segyio.TraceSortingFormat.INLINE_SORTING == 2 (segyio documentation)
		t.Errorf("segyio sorting %d, want inline sorting (2)", got.Sorting)
	}
}
