package cli

import (
	"bytes"
	"encoding/json"
	"fmt"
	"runtime"
	"strings"
	"testing"
	"time"

	"quadtrace/segy/segytest"
)

// hangGuard is how long one command may run on one malformed case before
// the test calls it a hang. It is a guard against endless loops, not a
// speed check (speed is measured by the benchmarks).
const hangGuard = 10 * time.Second

// runGuarded runs cmd with args and fails the test if it does not return
// within hangGuard.
func runGuarded(t *testing.T, cmd func([]string, *bytes.Buffer, *bytes.Buffer) int, args ...string) (int, string, string) {
	t.Helper()
	type result struct {
		code     int
		out, err string
	}
	done := make(chan result, 1)
	go func() {
		code, out, errs := run(cmd, args...)
		done <- result{code, out, errs}
	}()
	select {
	case r := <-done:
		return r.code, r.out, r.err
	case <-time.After(hangGuard):
		t.Fatalf("%v did not return within %v", args, hangGuard)
		return 0, "", ""
	}
}

// TestScanMalformed runs `quadtrace scan` on every case of the bad-input
// suite (segytest.Malformed): a file it cannot use exits 1 with exactly
// one line on stderr that names the file and says what is wrong and where
// (the trace and byte of segy's error); a usable one exits 0 and prints the
// expected "warning:" line, in the text report and in the JSON warnings.
func TestScanMalformed(t *testing.T) {
	for _, c := range segytest.Malformed() {
		t.Run(c.Name, func(t *testing.T) {
			path, err := c.Create(t.TempDir())
			if err != nil {
				t.Fatal(err)
			}
			code, out, errs := runGuarded(t, scanCmd, path)
			if !c.Expect.Usable() {
				if code != 1 {
					t.Fatalf("exit %d, want 1; stdout %q stderr %q", code, out, errs)
				}
				if out != "" {
					t.Errorf("stdout %q, want nothing", out)
				}
				line, rest, _ := strings.Cut(errs, "\n")
				if rest != "" || !strings.HasSuffix(errs, "\n") {
					t.Fatalf("stderr is not exactly one line: %q", errs)
				}
				want := []string{c.Expect.Err, path + ": "}
				if c.Expect.Trace != segytest.NoTrace {
					want = append(want, fmt.Sprintf("trace %d: ", c.Expect.Trace))
				}
				if c.Expect.Byte > 0 {
					want = append(want, fmt.Sprintf("byte %d: ", c.Expect.Byte))
				}
				for _, w := range want {
					if !strings.Contains(line, w) {
						t.Errorf("stderr %q does not say %q", line, w)
					}
				}
				return
			}
			if code != 0 || errs != "" {
				t.Fatalf("exit %d stderr %q, want 0 and nothing", code, errs)
			}
			if c.Expect.Warning != "" {
				found := false
				for _, line := range strings.Split(out, "\n") {
					if strings.HasPrefix(line, "warning:") && strings.Contains(line, c.Expect.Warning) {
						found = true
					}
				}
				if !found {
					t.Errorf("no \"warning:\" line containing %q in\n%s", c.Expect.Warning, out)
				}
			}
			code, out, errs = runGuarded(t, scanCmd, path, "--json")
			if code != 0 || errs != "" {
				t.Fatalf("--json: exit %d stderr %q", code, errs)
			}
			var rep struct {
				Warnings []string `json:"warnings"`
			}
			if err := json.Unmarshal([]byte(out), &rep); err != nil {
				t.Fatalf("--json: %v\n%s", err, out)
			}
			if c.Expect.Warning != "" && !strings.Contains(strings.Join(rep.Warnings, "\n"), c.Expect.Warning) {
				t.Errorf("--json warnings %q, want one containing %q", rep.Warnings, c.Expect.Warning)
			}
		})
	}
}

// TestScanHugeClaims: a file whose headers claim billions of samples or
// traces is scanned with memory in proportion to its real size (the
// TotalAlloc of the whole command, report included, stays under 8 times
// the file plus 256 KiB).
func TestScanHugeClaims(t *testing.T) {
	n := 0
	for _, c := range segytest.Malformed() {
		if !c.Expect.HugeClaim {
			continue
		}
		n++
		t.Run(c.Name, func(t *testing.T) {
			path, err := c.Create(t.TempDir())
			if err != nil {
				t.Fatal(err)
			}
			var out, errb bytes.Buffer
			var before, after runtime.MemStats
			runtime.ReadMemStats(&before)
			code := Scan([]string{path}, &out, &errb)
			runtime.ReadMemStats(&after)
			if (code == 0) != c.Expect.Usable() {
				t.Fatalf("exit %d, stderr %q", code, errb.String())
			}
			d := after.TotalAlloc - before.TotalAlloc
			bound := 8*uint64(len(c.Bytes)) + 256<<10
			t.Logf("scan allocated %d bytes for a %d-byte file", d, len(c.Bytes))
			if d > bound {
				t.Errorf("scan allocated %d bytes for a %d-byte file (bound %d)", d, len(c.Bytes), bound)
			}
		})
	}
	if n == 0 {
		t.Fatal("no huge-claim cases in segytest.Malformed")
	}
}
