//go:build linux

package segy

import (
	"encoding/binary"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"testing"

	"golang.org/x/sys/unix"

	"quadtrace/segy/segytest"
)

// mmapChildEnv switches TestMmapRefusedFallsBack into its child process.
const mmapChildEnv = "QUADTRACE_SEGY_MMAP_CHILD"

// TestMmapRefusedFallsBack makes mmap fail for real and checks that Open
// then reads the file with ordinary reads. The refusal is produced in a
// child process (this test binary run again) whose address space is limited
// with RLIMIT_AS below the size of a 257 MB sparse SEG-Y file, so the
// kernel answers mmap with ENOMEM, as a filesystem without mmap support
// answers with ENODEV; Open must treat both the same. Linux only (the
// build constraint above): the check rests on how Linux enforces RLIMIT_AS.
func TestMmapRefusedFallsBack(t *testing.T) {
	if dir := os.Getenv(mmapChildEnv); dir != "" {
		mmapRefusedChild(t, dir)
		return
	}
	cmd := exec.Command(os.Args[0], "-test.run=^TestMmapRefusedFallsBack$", "-test.v")
	cmd.Env = append(os.Environ(), mmapChildEnv+"="+t.TempDir())
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("child: %v\n%s", err, out)
	}
	if !strings.Contains(string(out), "mmap refused:") || !strings.Contains(string(out), "PASS") {
		t.Fatalf("child did not run the check:\n%s", out)
	}
	t.Logf("child:\n%s", out)
}

func mmapRefusedChild(t *testing.T, dir string) {
	const (
		nIL, nXL = 40, 100
		samples  = 16000 // 64 KB of IEEE samples a trace
		traces   = nIL * nXL
	)
	vals := make([]float64, samples)
	for k := range vals {
		vals[k] = segytest.ValueRule(1, 1, k)
	}
	first := segytest.File{Format: 5, Samples: samples, Interval: 4000,
		TraceSamples: segytest.SameAsBinary, TraceInterval: segytest.SameAsBinary,
		Traces: []segytest.Trace{{Inline: 1, Crossline: 1, Values: vals}}}.Bytes()
	traceSize := int64(240 + 4*samples)
	size := 3600 + traces*traceSize
	path := filepath.Join(dir, "sparse.sgy")
	fh, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	// A sparse file: headers written, samples left as holes (zeros) except
	// those of the first trace.
	if err := fh.Truncate(size); err != nil {
		t.Fatal(err)
	}
	if _, err := fh.WriteAt(first, 0); err != nil {
		t.Fatal(err)
	}
	hdr := append([]byte(nil), first[3600:3600+240]...)
	for i := 1; i < traces; i++ {
		binary.BigEndian.PutUint32(hdr[0:], uint32(i+1))       // bytes 1-4 trace sequence number
		binary.BigEndian.PutUint32(hdr[188:], uint32(1+i/nXL)) // bytes 189-192 inline
		binary.BigEndian.PutUint32(hdr[192:], uint32(1+i%nXL)) // bytes 193-196 crossline
		if _, err := fh.WriteAt(hdr, 3600+int64(i)*traceSize); err != nil {
			t.Fatal(err)
		}
	}
	if err := fh.Close(); err != nil {
		t.Fatal(err)
	}

	// Without a limit the file maps.
	mapped, err := Open(path, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if mapped.data == nil {
		t.Fatal("file not mapped before the limit: the test would prove nothing")
	}
	mapped.Close()

	// Limit the address space to what is in use plus 96 MiB.
	status, err := os.ReadFile("/proc/self/status")
	if err != nil {
		t.Fatal(err)
	}
	var vmKB uint64
	for _, line := range strings.Split(string(status), "\n") {
		if rest, ok := strings.CutPrefix(line, "VmSize:"); ok {
			vmKB, _ = strconv.ParseUint(strings.TrimSuffix(strings.TrimSpace(rest), " kB"), 10, 64)
		}
	}
	if vmKB == 0 {
		t.Fatalf("no VmSize in /proc/self/status")
	}
	var lim syscall.Rlimit
	if err := syscall.Getrlimit(syscall.RLIMIT_AS, &lim); err != nil {
		t.Fatal(err)
	}
	lim.Cur = vmKB<<10 + 96<<20
	if err := syscall.Setrlimit(syscall.RLIMIT_AS, &lim); err != nil {
		t.Fatal(err)
	}
	probe, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	_, merr := unix.Mmap(int(probe.Fd()), 0, int(size), unix.PROT_READ, unix.MAP_SHARED)
	probe.Close()
	if merr == nil {
		t.Fatal("mmap still succeeds under the limit")
	}
	t.Logf("mmap refused: %v (file %d bytes, limit %d bytes)", merr, size, lim.Cur)

	f := openT(t, path, Options{})
	if f.data != nil || f.osf == nil {
		t.Fatal("Open did not fall back to ordinary reads")
	}
	in := f.Info()
	if in.Traces != traces || in.Samples != samples || in.Inline.Count != nIL || in.Crossline.Count != nXL || in.Layout != Layout3DInlineSorted {
		t.Fatalf("traces %d samples %d grid %+v x %+v layout %s", in.Traces, in.Samples, in.Inline, in.Crossline, in.Layout)
	}
	tr, err := f.ReadTrace(0, nil)
	if err != nil {
		t.Fatal(err)
	}
	for k, v := range tr {
		if v != float32(vals[k]) {
			t.Fatalf("trace 0 sample %d = %v, want %v", k, v, float32(vals[k]))
		}
	}
	last, err := f.ReadTrace(traces-1, nil)
	if err != nil {
		t.Fatal(err)
	}
	if last[samples-1] != 0 {
		t.Fatalf("last sample %v, want 0 (a hole)", last[samples-1])
	}
	if i, ok := f.TraceIndex(nIL, nXL, 0); !ok || i != traces-1 {
		t.Fatalf("TraceIndex(%d, %d) = %d %v", nIL, nXL, i, ok)
	}
}
