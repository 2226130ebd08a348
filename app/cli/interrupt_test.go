package cli

import (
	"bufio"
	"encoding/json"
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"quadtrace/app/apptest"
)

// startExport starts the test binary as `quadtrace export` with args and
// returns it with a scanner over its stderr.
func startExport(t *testing.T, args ...string) (*exec.Cmd, *bufio.Scanner) {
	t.Helper()
	cmd := exec.Command(os.Args[0], args...)
	cmd.Env = append(os.Environ(), childEnv+"=export")
	stderr, err := cmd.StderrPipe()
	if err != nil {
		t.Fatal(err)
	}
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	return cmd, bufio.NewScanner(stderr)
}

// Checks (issue 7, interruption): an export process interrupted part-way by
// SIGINT or SIGTERM exits with status 130, removes its temporary files and
// leaves each destination absent or the previous file unchanged; killed by
// SIGKILL it leaves the destination absent or unchanged too (only a
// temporary file may remain). The input's SHA-256 never changes. Part-way is
// observed, not guessed: the signal goes after the first --progress json
// line reporting some but not all traces written.
func TestExportInterruptedBySignal(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "survey.sgy")
	v := apptest.VolumeSpec{Inlines: [2]int{1, 60}, Crosslines: [2]int{1, 200}, Samples: 1501, IntervalUS: 2000}
	apptest.WriteVolume(t, in, v) // 12000 traces, 75 MB: seconds of work on two cores
	inSum := apptest.FileSum(t, in)
	previous := filepath.Join(dir, "previous.sgy")
	cases := []struct {
		name     string
		sig      syscall.Signal
		out      string
		ids      string
		previous bool
	}{
		{"SIGINT, new file", syscall.SIGINT, filepath.Join(dir, "new.sgy"), "envelope", false},
		{"SIGINT, previous file", syscall.SIGINT, previous, "envelope", true},
		{"SIGTERM, new folder of two", syscall.SIGTERM, filepath.Join(dir, "two"), "envelope,instantaneous-phase", false},
		{"SIGKILL, new file", syscall.SIGKILL, filepath.Join(dir, "killed.sgy"), "envelope", false},
		{"SIGKILL, previous file", syscall.SIGKILL, previous, "envelope", true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			before := ""
			if c.previous {
				if err := os.WriteFile(c.out, []byte("a complete earlier export"), 0o644); err != nil {
					t.Fatal(err)
				}
				before = apptest.FileSum(t, c.out)
			}
			cmd, lines := startExport(t, in, "--attribute", c.ids, "--out", c.out, "--budget", "2M", "--progress", "json")
			signalled := false
			var tail []string
			for lines.Scan() {
				tail = append(tail, lines.Text())
				var p progressLine
				if signalled || json.Unmarshal(lines.Bytes(), &p) != nil {
					continue
				}
				if p.Done > 0 && p.Done < p.Total {
					if err := cmd.Process.Signal(c.sig); err != nil {
						t.Fatal(err)
					}
					signalled = true
				}
			}
			err := cmd.Wait()
			if !signalled {
				t.Fatalf("no progress line caught the export part-way; stderr:\n%s", strings.Join(tail, "\n"))
			}
			var exit *exec.ExitError
			if !errors.As(err, &exit) {
				t.Fatalf("export ended with %v, want an interrupted exit", err)
			}
			if c.sig == syscall.SIGKILL {
				if ws := exit.Sys().(syscall.WaitStatus); !ws.Signaled() || ws.Signal() != syscall.SIGKILL {
					t.Fatalf("export ended with %v, want death by SIGKILL", err)
				}
			} else {
				if exit.ExitCode() != exitInterrupted {
					t.Errorf("exit status %d, want %d", exit.ExitCode(), exitInterrupted)
				}
				if left := apptest.StrayTemps(t, filepath.Dir(c.out)); len(left) > 0 {
					t.Errorf("temporary files left after %v: %v", c.sig, left)
				}
				if left := apptest.StrayTemps(t, c.out); len(left) > 0 {
					t.Errorf("temporary files left after %v: %v", c.sig, left)
				}
			}
			if c.previous {
				if apptest.FileSum(t, c.out) != before {
					t.Errorf("the previous %s changed", c.out)
				}
			} else if _, err := os.Stat(c.out); !os.IsNotExist(err) {
				t.Errorf("%s exists after %v", c.out, c.sig)
			}
			if apptest.FileSum(t, in) != inSum {
				t.Fatal("the input changed")
			}
		})
	}
	// After SIGKILL the writer's temporary files may remain (nothing can
	// remove them); they are hidden files beside the destination, never at
	// its name.
	t.Logf("temporary files left by SIGKILL: %v", apptest.StrayTemps(t, dir))
}
