//go:build linux

package cli

import (
	"os"
	"os/exec"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"quadtrace/app/apptest"
)

// BenchmarkExportPeakMemory exports envelope from a volume of 1.25 GB
// (200000 traces of 1501 samples) with --budget 256M in a child process and
// reads its peak resident set size from the kernel (getrusage ru_maxrss, as
// returned by wait4: the same figure as VmHWM in /proc/PID/status and
// "Maximum resident set size" of /usr/bin/time -v). It fails when the peak
// exceeds the budget plus runtimeOverhead, the overhead the export command
// allows for (runtime, FFT work buffers, write buffers, geometry index).
// Run with -benchtime=1x.
func BenchmarkExportPeakMemory(b *testing.B) {
	v := apptest.VolumeSpec{Inlines: [2]int{1, 400}, Crosslines: [2]int{1, 500}, Samples: 1501, IntervalUS: 2000}
	src := apptest.BenchVolume(b, v)
	const budget = 256 << 20
	dir := b.TempDir()
	var peak int64
	var took time.Duration
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		cmd := exec.Command(os.Args[0], src, "--attribute", "envelope", "--out", filepath.Join(dir, "envelope.sgy"),
			"--budget", "256M", "--progress", "none")
		cmd.Env = append(os.Environ(), childEnv+"=export")
		start := time.Now()
		if out, err := cmd.CombinedOutput(); err != nil {
			b.Fatalf("export: %v: %s", err, out)
		}
		took += time.Since(start)
		ru := cmd.ProcessState.SysUsage().(*syscall.Rusage)
		peak = max(peak, ru.Maxrss*1024) // ru_maxrss is in KiB on Linux (getrusage(2))
	}
	b.StopTimer()
	b.ReportMetric(float64(peak)/(1<<20), "peak-RSS-MiB")
	b.ReportMetric(float64(v.Bytes())/(1<<20), "input-MiB")
	b.ReportMetric(float64(v.Bytes())*float64(b.N)/1e6/took.Seconds(), "MB/s")
	if limit := int64(budget + runtimeOverhead); peak > limit {
		b.Errorf("peak resident memory %.0f MiB exceeds the budget of 256 MiB plus the stated overhead of %d MiB",
			float64(peak)/(1<<20), runtimeOverhead>>20)
	}
}
