package cli

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"quadtrace/app/apptest"
	"quadtrace/segy"
	"quadtrace/segy/segytest"
)

// exportRefuses lists the usable cases of segytest.Malformed that segy
// opens but an export cannot compute, with the reason the export must give:
// an attribute needs traces and a known sample interval.
var exportRefuses = map[string]string{
	"headers only": "no traces",
	"negative interval in binary and trace headers": "sample interval unknown",
	"zero interval everywhere":                      "sample interval unknown",
}

// TestExportMalformed runs `quadtrace export FILE --attribute envelope` on
// every case of the bad-input suite (segytest.Malformed). A file that
// cannot be used (or cannot be computed, exportRefuses) exits 1 with the
// reason on stderr and leaves the output folder empty: no file, no
// temporary file. A usable file is exported; compute treats NaN and ±Inf
// samples as gaps (go doc quadtrace/compute Section), so the envelope is NaN
// exactly where the input sample is NaN or infinite and finite everywhere
// else.
func TestExportMalformed(t *testing.T) {
	for name := range exportRefuses {
		if _, err := segytest.Find(name); err != nil {
			t.Errorf("exportRefuses: %v", err)
		}
	}
	for _, c := range segytest.Malformed() {
		t.Run(c.Name, func(t *testing.T) {
			in, err := c.Create(t.TempDir())
			if err != nil {
				t.Fatal(err)
			}
			outDir := t.TempDir()
			out := filepath.Join(outDir, "envelope.sgy")
			code, stdout, stderr := runExportGuarded(t, in, out)
			refusal, refused := exportRefuses[c.Name]
			if !c.Expect.Usable() || refused {
				want := c.Expect.Err
				if refused {
					want = refusal
				}
				if code != exitFailed {
					t.Errorf("exit %d, want %d; stderr %q", code, exitFailed, stderr)
				}
				if !strings.Contains(stderr, want) || !strings.Contains(stderr, in) {
					t.Errorf("stderr %q, want it to name %s and say %q", stderr, in, want)
				}
				if n := strings.Count(strings.TrimSuffix(stderr, "\n"), "\n"); n != 0 {
					t.Errorf("stderr has %d lines, want 1: %q", n+1, stderr)
				}
				if stdout != "" {
					t.Errorf("stdout %q, want nothing", stdout)
				}
				if left := listDir(t, outDir); len(left) != 0 {
					t.Errorf("output folder holds %q after a failed export, want nothing", left)
				}
				return
			}
			if code != exitOK || stderr != "" {
				t.Fatalf("exit %d stderr %q, want 0 and nothing", code, stderr)
			}
			if left := listDir(t, outDir); len(left) != 1 || left[0] != "envelope.sgy" {
				t.Errorf("output folder holds %q, want only envelope.sgy", left)
			}
			gaps := checkGapsPreserved(t, in, out)
			if c.Name == "NaN and Inf samples" && gaps != 2 {
				t.Errorf("%d gap samples in the input, want the case's 2 (a NaN and a -Inf)", gaps)
			}
		})
	}
}

// runExportGuarded runs Command as `quadtrace export IN --attribute envelope
// --out OUT --quiet` and fails the test if it has not returned within
// 10 s: a guard against hangs, not a speed check.
func runExportGuarded(t *testing.T, in, out string) (code int, stdout, stderr string) {
	t.Helper()
	type result struct {
		code     int
		out, err string
	}
	done := make(chan result, 1)
	go func() {
		var o, e bytes.Buffer
		code := Export([]string{in, "--attribute", "envelope", "--out", out, "--quiet"}, &o, &e)
		done <- result{code, o.String(), e.String()}
	}()
	select {
	case r := <-done:
		return r.code, r.out, r.err
	case <-time.After(10 * time.Second):
		t.Fatalf("export of %s did not return within 10 s", in)
		return 0, "", ""
	}
}

func listDir(t *testing.T, dir string) []string {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	return names
}

// checkGapsPreserved compares the exported envelope with its input trace
// by trace: same trace count and samples, NaN where the input is NaN or
// infinite, finite and not negative (an envelope is a magnitude) elsewhere.
// It returns the number of gap samples found in the input.
func checkGapsPreserved(t *testing.T, inPath, outPath string) int {
	t.Helper()
	src, err := segy.Open(inPath, segy.Options{})
	if err != nil {
		t.Fatal(err)
		return 0
	}
	defer src.Close()
	dst, err := segy.Open(outPath, segy.Options{})
	if err != nil {
		t.Fatalf("reading the export: %v", err)
	}
	defer dst.Close()
	si, di := src.Info(), dst.Info()
	if di.Traces != si.Traces || di.Samples != si.Samples {
		t.Fatalf("export has %d traces of %d samples, input %d of %d", di.Traces, di.Samples, si.Traces, si.Samples)
	}
	gaps := 0
	var a, b []float32
	for i := 0; i < si.Traces; i++ {
		if a, err = src.ReadTrace(i, a); err != nil {
			t.Fatal(err)
		}
		if b, err = dst.ReadTrace(i, b); err != nil {
			t.Fatal(err)
		}
		for k := range a {
			gap := math.IsNaN(float64(a[k])) || math.IsInf(float64(a[k]), 0)
			switch {
			case gap && !math.IsNaN(float64(b[k])):
				t.Errorf("trace %d sample %d: input %v, envelope %v, want NaN", i, k, a[k], b[k])
			case !gap && (math.IsNaN(float64(b[k])) || math.IsInf(float64(b[k]), 0) || b[k] < 0):
				t.Errorf("trace %d sample %d: input %v, envelope %v, want finite and >= 0", i, k, a[k], b[k])
			}
			if gap {
				gaps++
			}
		}
	}
	return gaps
}

// TestExportCommandRefusesTheInput: `quadtrace export` exits 1 when --out
// names its input (directly or through a symlink) and leaves it unchanged.
func TestExportCommandRefusesTheInput(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "in.sgy")
	apptest.WriteVolume(t, in, apptest.VolumeSpec{Inlines: [2]int{1, 3}, Crosslines: [2]int{1, 4}, Samples: 50, IntervalUS: 4000})
	link := filepath.Join(dir, "link.sgy")
	if err := os.Symlink(in, link); err != nil {
		t.Fatal(err)
	}
	sum := apptest.FileSum(t, in)
	for _, out := range []string{in, link} {
		var stderr strings.Builder
		if code := Export([]string{in, "--attribute", "envelope", "--out", out, "--quiet"}, &strings.Builder{}, &stderr); code != exitFailed {
			t.Errorf("--out %s: exit %d, want %d (%s)", out, code, exitFailed, stderr.String())
		}
	}
	if apptest.FileSum(t, in) != sum {
		t.Error("the input changed")
	}
}
