package cli

import (
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"quadtrace/app/apptest"
	"quadtrace/segy/segytest"
)

// Checks: the export command applies the CPU grant of a Slurm task
// (export.LimitCPUs; the limit itself is tested in a child process in
// app/export): a SLURM_CPUS_PER_TASK that is not a number of CPUs is
// refused with a message naming it and nothing is written, and after an
// export under SLURM_CPUS_PER_TASK=1 this process's GOMAXPROCS is what it
// was (the command gives the runtime back its default).
func TestExportSlurmCPUs(t *testing.T) {
	if os.Getenv("GOMAXPROCS") != "" {
		segytest.SkipOutsideCI(t, "GOMAXPROCS is set in the environment: it decides, by design")
	}
	dir := t.TempDir()
	in := filepath.Join(dir, "in.sgy")
	apptest.WriteVolume(t, in, apptest.VolumeSpec{Inlines: [2]int{1, 3}, Crosslines: [2]int{1, 4}, Samples: 50, IntervalUS: 4000})
	out := filepath.Join(dir, "parts", "out.sgy")

	t.Setenv("SLURM_CPUS_PER_TASK", "all")
	var stderr strings.Builder
	if code := Export([]string{in, "--attribute", "envelope", "--out", out, "--quiet"}, &strings.Builder{}, &stderr); code != exitUsage {
		t.Errorf("SLURM_CPUS_PER_TASK=all: exit %d, want %d (%s)", code, exitUsage, stderr.String())
	}
	if !strings.Contains(stderr.String(), `SLURM_CPUS_PER_TASK="all"`) {
		t.Errorf("the message does not name the variable: %q", stderr.String())
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("%s written after a refused SLURM_CPUS_PER_TASK", out)
	}

	before := runtime.GOMAXPROCS(0)
	t.Setenv("SLURM_CPUS_PER_TASK", "1")
	stderr.Reset()
	if code := Export([]string{in, "--attribute", "envelope", "--out", out, "--quiet"}, &strings.Builder{}, &stderr); code != exitOK {
		t.Fatalf("SLURM_CPUS_PER_TASK=1: exit %d: %s", code, stderr.String())
	}
	if after := runtime.GOMAXPROCS(0); after != before {
		t.Errorf("GOMAXPROCS %d after the export, %d before", after, before)
	}
	if _, err := os.Stat(out); err != nil {
		t.Errorf("the export under SLURM_CPUS_PER_TASK=1 (into a folder it makes): %v", err)
	}
}
