//go:build linux

// Linux only: BenchmarkExportPeakMemory reads ru_maxrss, a field of
// getrusage(2) that Windows lacks, and the speed benchmarks time cp and
// /usr/bin/python3.

package export

import (
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"quadtrace/compute"
	"quadtrace/segy/segytest"
)

// benchVolume returns the path of an invented volume of spec v under
// $TMPDIR/quadtrace-export-bench, generating it through the segy writer the
// first time (the writer's atomic rename means a file found there is
// complete; its size is checked anyway). These files are large and never
// committed; delete the folder to reclaim the space.
func benchVolume(b *testing.B, v volumeSpec) string {
	b.Helper()
	dir := filepath.Join(os.TempDir(), "quadtrace-export-bench")
	if err := os.MkdirAll(dir, 0o755); err != nil {
		b.Fatal(err)
	}
	path := filepath.Join(dir, fmt.Sprintf("harrowmere-%dx%dx%d.sgy", v.inlines[1]-v.inlines[0]+1, v.crosslines[1]-v.crosslines[0]+1, v.samples))
	if st, err := os.Stat(path); err == nil && st.Size() == v.bytes() {
		return path
	}
	start := time.Now()
	writeVolume(b, path, v)
	b.Logf("generated %s (%.0f MB) in %v", path, float64(v.bytes())/1e6, time.Since(start).Round(time.Millisecond))
	return path
}

// warm reads a file through so that it sits in the page cache.
func warm(b *testing.B, path string) {
	b.Helper()
	f, err := os.Open(path)
	if err != nil {
		b.Fatal(err)
	}
	defer f.Close()
	if _, err := io.Copy(io.Discard, f); err != nil {
		b.Fatal(err)
	}
}

// timeCommand runs a command and returns its wall time.
func timeCommand(b *testing.B, name string, args ...string) time.Duration {
	b.Helper()
	start := time.Now()
	if out, err := exec.Command(name, args...).CombinedOutput(); err != nil {
		b.Fatalf("%s %v: %v: %s", name, args, err, out)
	}
	return time.Since(start)
}

// BenchmarkExportEnvelope measures, in one run on the same 250 MB volume
// (40000 traces of 1501 samples at 2 ms, in the page cache), the export of
// envelope in MB/s of input, next to:
//   - `cp` of the file (the I/O limit the issue sets: goal within 2x), and
//     `cp` followed by `sync FILE` (the export's writer fsyncs before its
//     rename, cp does not);
//   - the scipy pipeline, testdata/export/scipy_envelope.py: Debian's
//     python3-segyio reading and writing, python3-scipy's hilbert.
//
// It also reports the envelope computed alone on the volume held in memory
// (compute-only), the floor that reading and writing add to.
// It reports each rate and the ratios export/cp (how many times slower than
// a copy) and scipy/export (how many times faster than the scipy pipeline).
// Run with -benchtime=1x: one iteration takes tens of seconds.
func BenchmarkExportEnvelope(b *testing.B) {
	segytest.NeedPython(b, "segyio", "scipy", "numpy")
	v := volumeSpec{inlines: [2]int{1, 200}, crosslines: [2]int{1, 200}, samples: 1501, intervalUS: 2000}
	src := benchVolume(b, v)
	warm(b, src)
	dir := b.TempDir()
	script := filepath.Join(projectRoot(b), "testdata", "export", "scipy_envelope.py")
	mb := float64(v.bytes()) / 1e6
	// The envelope alone, on the volume held in memory, in blocks as the
	// export computes it: the floor the file handling adds to.
	sec, _ := readSection(b, src)
	env, err := compute.Lookup("envelope")
	if err != nil {
		b.Fatal(err)
	}
	var tCompute, tCp, tCpSync, tExport, tScipy time.Duration
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		dst := filepath.Join(dir, "copy.sgy")
		d := timeCommand(b, "cp", src, dst)
		tCp += d
		os.Remove(dst)
		d = timeCommand(b, "cp", src, dst)
		tCpSync += d + timeCommand(b, "sync", dst)
		os.Remove(dst)

		out := filepath.Join(dir, "envelope.sgy")
		start := time.Now()
		if _, err := Run(context.Background(), Job{Input: src, Attributes: []string{"envelope"}, Output: out}, nil); err != nil {
			b.Fatal(err)
		}
		tExport += time.Since(start)
		os.Remove(out)

		start = time.Now()
		for a := 0; a < len(sec.Traces); a += 5000 {
			blk := sec
			blk.Traces = sec.Traces[a:min(a+5000, len(sec.Traces))]
			if _, err := env.Compute(context.Background(), blk, compute.Params{}, nil); err != nil {
				b.Fatal(err)
			}
		}
		tCompute += time.Since(start)

		pyOut := filepath.Join(dir, "scipy-envelope.sgy")
		res, err := exec.Command(python, script, src, pyOut).Output()
		if err != nil {
			b.Fatalf("scipy pipeline: %v", err)
		}
		var r struct{ Seconds float64 }
		if err := json.Unmarshal(res, &r); err != nil {
			b.Fatal(err)
		}
		tScipy += time.Duration(r.Seconds * float64(time.Second))
		os.Remove(pyOut)
	}
	b.StopTimer()
	rate := func(d time.Duration) float64 { return mb * float64(b.N) / d.Seconds() }
	b.ReportMetric(rate(tExport), "export-MB/s")
	b.ReportMetric(rate(tCompute), "compute-only-MB/s")
	b.ReportMetric(rate(tCp), "cp-MB/s")
	b.ReportMetric(rate(tCpSync), "cp+sync-MB/s")
	b.ReportMetric(rate(tScipy), "scipy-MB/s")
	b.ReportMetric(tExport.Seconds()/tCp.Seconds(), "export/cp")
	b.ReportMetric(tExport.Seconds()/tCpSync.Seconds(), "export/cp+sync")
	b.ReportMetric(tScipy.Seconds()/tExport.Seconds(), "scipy/export")
}

// BenchmarkExportPeakMemory exports envelope from a volume of 1.25 GB
// (200000 traces of 1501 samples) with --budget 256M in a child process and
// reads its peak resident set size from the kernel (getrusage ru_maxrss, as
// returned by wait4: the same figure as VmHWM in /proc/PID/status and
// "Maximum resident set size" of /usr/bin/time -v). It fails when the peak
// exceeds the budget plus runtimeOverhead, the overhead the export command
// allows for (runtime, FFT work buffers, write buffers, geometry index).
// Run with -benchtime=1x.
func BenchmarkExportPeakMemory(b *testing.B) {
	v := volumeSpec{inlines: [2]int{1, 400}, crosslines: [2]int{1, 500}, samples: 1501, intervalUS: 2000}
	src := benchVolume(b, v)
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
	b.ReportMetric(float64(v.bytes())/(1<<20), "input-MiB")
	b.ReportMetric(float64(v.bytes())*float64(b.N)/1e6/took.Seconds(), "MB/s")
	if limit := int64(budget + runtimeOverhead); peak > limit {
		b.Errorf("peak resident memory %.0f MiB exceeds the budget of 256 MiB plus the stated overhead of %d MiB",
			float64(peak)/(1<<20), runtimeOverhead>>20)
	}
}
