//go:build linux

package export

import (
	"context"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"golang.org/x/sys/unix"

	"quadtrace/app/apptest"
	"quadtrace/segy/segytest"
)

// cpuChildEnv marks the test binary started as the child of
// TestExportHonoursCPULimit.
const cpuChildEnv = "QUADTRACE_EXPORT_CPU_CHILD"

// TestMain lets the test binary act as the child process: it applies the
// export command's CPU limit (LimitCPUs), runs an export, and prints the
// worker count (GOMAXPROCS, which sizes every pool of the export) and the
// user CPU time and wall time the export took.
func TestMain(m *testing.M) {
	if dir := os.Getenv(cpuChildEnv); dir != "" {
		os.Exit(cpuChild(dir))
	}
	os.Exit(m.Run())
}

func cpuChild(dir string) int {
	restore, err := LimitCPUs(os.Getenv)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		return 2
	}
	defer restore()
	var before, after syscall.Rusage
	syscall.Getrusage(syscall.RUSAGE_SELF, &before)
	start := time.Now()
	_, err = Run(context.Background(), Job{Input: filepath.Join(dir, "in.sgy"),
		Attributes: []string{"envelope", "instantaneous-frequency", "sweetness"},
		Output:     filepath.Join(dir, "out-"+strconv.Itoa(os.Getpid()))}, nil)
	wall := time.Since(start)
	syscall.Getrusage(syscall.RUSAGE_SELF, &after)
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		return 1
	}
	user := time.Duration(after.Utime.Nano() - before.Utime.Nano())
	fmt.Printf("workers=%d user=%d wall=%d\n", runtime.GOMAXPROCS(0), user, wall)
	return 0
}

// childResult is what one child process measured.
type childResult struct {
	workers    int
	user, wall time.Duration
}

// runCPUChild starts the test binary as a child with extra environment
// variables; with oneCPU, the child starts bound to the first CPU of the
// parent's affinity mask (sched_setaffinity(2) on the parent's locked thread
// just before the fork: a child inherits its parent's mask).
func runCPUChild(t *testing.T, dir string, oneCPU bool, env ...string) childResult {
	t.Helper()
	cmd := exec.Command(os.Args[0], "-test.run=^$")
	cmd.Env = append(append(os.Environ(), cpuChildEnv+"="+dir), env...)
	var out, errOut strings.Builder
	cmd.Stdout, cmd.Stderr = &out, &errOut
	if oneCPU {
		runtime.LockOSThread()
		var old, one unix.CPUSet
		if err := unix.SchedGetaffinity(0, &old); err != nil {
			t.Fatal(err)
		}
		for c := 0; c < 1024; c++ {
			if old.IsSet(c) {
				one.Set(c)
				break
			}
		}
		if err := unix.SchedSetaffinity(0, &one); err != nil {
			t.Fatal(err)
		}
		err := cmd.Start()
		if rerr := unix.SchedSetaffinity(0, &old); rerr != nil {
			t.Fatal(rerr)
		}
		runtime.UnlockOSThread()
		if err != nil {
			t.Fatal(err)
		}
	} else if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	if err := cmd.Wait(); err != nil {
		t.Fatalf("child: %v\n%s", err, errOut.String())
	}
	var r childResult
	var user, wall int64
	if _, err := fmt.Sscanf(out.String(), "workers=%d user=%d wall=%d", &r.workers, &user, &wall); err != nil {
		t.Fatalf("child printed %q: %v", out.String(), err)
	}
	r.user, r.wall = time.Duration(user), time.Duration(wall)
	return r
}

// Checks: the export uses no more CPUs than the process was granted, given
// by Slurm's SLURM_CPUS_PER_TASK (sbatch(1), "OUTPUT ENVIRONMENT
// VARIABLES") or by the CPU affinity the process starts with
// (sched_setaffinity(2), inherited across fork). In each case the child's
// worker count is 1, and its user CPU time stays within its wall time
// (one CPU cannot run for longer than the clock; 25% margin for the
// runtime's own threads), where an unlimited export on this machine's
// cores could reach their number times the wall time. Without either, the
// child gets every CPU this process has (the control).
func TestExportHonoursCPULimit(t *testing.T) {
	all := runtime.GOMAXPROCS(0) // this process's CPUs: affinity and quota, as the child's
	if all < 2 {
		segytest.SkipOutsideCI(t, "one CPU: a limit of one cannot be told from no limit")
	}
	if os.Getenv("GOMAXPROCS") != "" {
		segytest.SkipOutsideCI(t, "GOMAXPROCS is set in the environment: it decides, by design")
	}
	dir := t.TempDir()
	apptest.WriteVolume(t, filepath.Join(dir, "in.sgy"), apptest.VolumeSpec{
		Inlines: [2]int{1, 30}, Crosslines: [2]int{1, 60}, Samples: 1001, IntervalUS: 2000})

	control := runCPUChild(t, dir, false)
	if control.workers != all {
		t.Errorf("no limit: the export used %d workers, want every CPU granted (%d)", control.workers, all)
	}
	t.Logf("no limit: %d workers, user CPU %v in %v", control.workers, control.user, control.wall)
	for _, c := range []struct {
		name   string
		oneCPU bool
		env    []string
	}{
		{"SLURM_CPUS_PER_TASK=1", false, []string{"SLURM_CPUS_PER_TASK=1"}},
		{"affinity to one CPU", true, nil},
		{"affinity to one CPU and SLURM_CPUS_PER_TASK=2", true, []string{"SLURM_CPUS_PER_TASK=2"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			r := runCPUChild(t, dir, c.oneCPU, c.env...)
			t.Logf("%d workers, user CPU %v in %v", r.workers, r.user, r.wall)
			if r.workers != 1 {
				t.Errorf("the export used %d workers, want 1", r.workers)
			}
			if r.user > r.wall*5/4 {
				t.Errorf("user CPU time %v over a wall time of %v: more than one CPU computed", r.user, r.wall)
			}
		})
	}
}

// Checks: SLURM_CPUS_PER_TASK is read as a positive integer; anything else
// is an error naming the variable; unset or empty means no limit.
func TestSlurmCPUs(t *testing.T) {
	for _, c := range []struct {
		value   string
		n       int
		ok, err bool
	}{
		{"", 0, false, false}, {"4", 4, true, false}, {" 2\n", 2, true, false},
		{"0", 0, false, true}, {"-3", 0, false, true}, {"two", 0, false, true}, {"2(x3)", 0, false, true},
	} {
		n, ok, err := SlurmCPUs(func(string) string { return c.value })
		if n != c.n || ok != c.ok || (err != nil) != c.err {
			t.Errorf("SLURM_CPUS_PER_TASK=%q: got %d %v %v", c.value, n, ok, err)
		}
		if err != nil && !strings.Contains(err.Error(), "SLURM_CPUS_PER_TASK") {
			t.Errorf("error %q does not name the variable", err)
		}
	}
}
