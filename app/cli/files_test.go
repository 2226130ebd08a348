//go:build linux

// Linux only: these tests make FIFOs (mkfifo), send POSIX signals and read
// /proc/PID/fd, which other systems lack.

package cli

import (
	"bytes"
	"errors"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"golang.org/x/sys/unix"

	"quadtrace/app/apptest"
	"quadtrace/segy/segytest"
)

// TestOutputKinds: every command that writes refuses destinations that
// are not regular files, symbolic links (unless --follow-links) and its
// input, and leaves them as they were (issue 18: `--out /dev/null` as root
// replaced the machine's /dev/null). Device nodes are our own, made with
// mknod in a temporary folder; never a real one under /dev.
func TestOutputKinds(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "survey.sgy")
	apptest.WriteVolume(t, in, apptest.VolumeSpec{Inlines: [2]int{1, 4}, Crosslines: [2]int{1, 5}, Samples: 50, IntervalUS: 4000})
	inSum := apptest.FileSum(t, in)
	fifo := filepath.Join(dir, "fifo.out")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	target := filepath.Join(dir, "target.out")
	os.WriteFile(target, []byte("kept"), 0o644)
	link := filepath.Join(dir, "link.out")
	os.Symlink(target, link)
	folder := filepath.Join(dir, "folder.out")
	os.Mkdir(folder, 0o755)
	kinds := map[string]string{fifo: "is a FIFO", link: "is a symbolic link", in: "is the input"}
	dev := filepath.Join(dir, "null.out")
	if err := unix.Mknod(dev, unix.S_IFCHR|0o666, int(unix.Mkdev(1, 3))); err == nil {
		kinds[dev] = "is a character device"
	} else {
		t.Logf("device case skipped: mknod needs root (%v)", err)
	}
	commands := map[string]func(out string) (int, string){
		"export": func(out string) (int, string) {
			var stdout, stderr bytes.Buffer
			code := Export([]string{in, "--attribute", "envelope", "--out", out, "--quiet"}, &stdout, &stderr)
			return code, stderr.String()
		},
		"figure": func(out string) (int, string) {
			var stdout, stderr bytes.Buffer
			code := Figure([]string{in, "--inline", "2", "--size", "800x500", "--out", out}, &stdout, &stderr)
			return code, stderr.String()
		},
	}
	for name, run := range commands {
		for out, want := range kinds {
			t.Run(name+" "+filepath.Base(out), func(t *testing.T) {
				before := snapshot(t, dir)
				code, stderr := run(out)
				if code != exitFailed || !strings.Contains(stderr, want) || strings.Count(strings.TrimSpace(stderr), "\n") > 0 {
					t.Errorf("exit %d, stderr %q; want 1 and one line containing %q", code, stderr, want)
				}
				if after := snapshot(t, dir); !slices.Equal(before, after) {
					t.Errorf("folder changed: %v -> %v", before, after)
				}
			})
		}
	}
	if st, err := os.Lstat(dev); err == nil && st.Mode()&os.ModeCharDevice == 0 {
		t.Errorf("the device node was replaced: %v", st.Mode())
	}
	if apptest.FileSum(t, in) != inSum {
		t.Error("the input changed")
	}
	// A folder as figure output is refused; as export output it is where
	// the files go (documented).
	var stdout, stderr bytes.Buffer
	if code := Figure([]string{in, "--inline", "2", "--size", "800x500", "--out", folder}, &stdout, &stderr); code != exitFailed || !strings.Contains(stderr.String(), "is a folder") {
		t.Errorf("figure into a folder: exit %d %q", code, stderr.String())
	}
	// --follow-links writes at the target (a figure's name ends in .png:
	// the extension picks the format).
	pngTarget, pngLink := filepath.Join(dir, "target.png"), filepath.Join(dir, "link.png")
	os.WriteFile(pngTarget, []byte("kept"), 0o644)
	os.Symlink(pngTarget, pngLink)
	stderr.Reset()
	if code := Figure([]string{in, "--inline", "2", "--size", "800x500", "--out", pngLink, "--follow-links"}, &stdout, &stderr); code != exitOK {
		t.Fatalf("figure --follow-links: exit %d %q", code, stderr.String())
	}
	if b, _ := os.ReadFile(pngTarget); !bytes.HasPrefix(b, []byte("\x89PNG")) {
		t.Error("the link's target is not the figure")
	}
	if st, _ := os.Lstat(pngLink); st.Mode()&os.ModeSymlink == 0 {
		t.Error("the link itself was replaced")
	}
}

// snapshot lists dir's entries with their mode and size.
func snapshot(t *testing.T, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, e := range es {
		info, err := os.Lstat(filepath.Join(dir, e.Name()))
		if err != nil {
			t.Fatal(err)
		}
		out = append(out, e.Name()+" "+info.Mode().String()+" "+string(rune('0'+info.Size()%10)))
	}
	return out
}

// TestExportKilledLeavesOnlyDestinations kills `quadtrace export` of two
// attributes with SIGKILL at 50 random moments (opening, computing,
// writing, committing); after each kill the output folder holds nothing
// but complete destinations: no temporary file (issue 18: 14 of 22 kills
// left hidden files up to the output's size that nothing removed).
func TestExportKilledLeavesOnlyDestinations(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "survey.sgy")
	apptest.WriteVolume(t, in, apptest.VolumeSpec{Inlines: [2]int{1, 20}, Crosslines: [2]int{1, 50}, Samples: 400, IntervalUS: 2000})
	out := filepath.Join(dir, "out")
	wantSize := int64(3600 + 1000*(240+4*400))
	r := rand.New(rand.NewPCG(18, 50))
	export := func() *exec.Cmd {
		cmd := exec.Command(os.Args[0], in, "--attribute", "envelope,instantaneous-phase", "--out", out, "--quiet", "--budget", "1M")
		cmd.Env = append(os.Environ(), childEnv+"=export")
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		return cmd
	}
	// One whole run measures how long an export takes, so the kills fall
	// inside it; its outputs are the "previous" ones later kills may meet.
	start := time.Now()
	if err := export().Wait(); err != nil {
		t.Fatal(err)
	}
	whole := time.Since(start)
	complete := 0
	for k := 0; k < 50; k++ {
		os.RemoveAll(out)
		cmd := export()
		time.Sleep(time.Duration(r.Int64N(int64(whole))))
		cmd.Process.Signal(syscall.SIGKILL)
		cmd.Wait()
		es, _ := os.ReadDir(out)
		for _, e := range es {
			info, _ := e.Info()
			if !strings.HasPrefix(e.Name(), "survey-") || info.Size() != wantSize {
				t.Fatalf("kill %d: %s (%d bytes) in the output folder", k, e.Name(), info.Size())
			}
		}
		if len(es) == 2 {
			complete++
		}
		if left := apptest.StrayTemps(t, dir); len(left) > 0 {
			t.Fatalf("kill %d: temporary files %v", k, left)
		}
	}
	t.Logf("an export takes %v; 50 kills at random moments of it: %d found both outputs complete, the others none", whole, complete)
}

// bigSparse writes a SEG-Y file of n one-sample traces with zero headers
// (a sparse file: only the headers are written), whose header scan takes
// a noticeable time.
func bigSparse(t *testing.T, path string, n int) {
	t.Helper()
	s := segytest.File{Format: 5, Samples: 1, Interval: 4000}
	hdr := s.Bytes()
	fh, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	defer fh.Close()
	fh.Write(hdr)
	if err := fh.Truncate(int64(len(hdr)) + int64(n)*244); err != nil {
		t.Fatal(err)
	}
}

// TestSignalsDuringOpen: SIGINT or SIGTERM while export, figure and scan are
// still opening a large input (the header scan) ends them promptly with
// status 130 and nothing written (issue 18: export ignored signals until
// the input was open; figure ignored Ctrl-C and wrote its PNG).
func TestSignalsDuringOpen(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "big.sgy")
	bigSparse(t, in, 3_000_000) // 732 MB sparse; seconds of header scan
	for _, c := range []struct {
		mode string
		args []string
		sig  syscall.Signal
	}{
		{"export", []string{in, "--attribute", "envelope", "--out", filepath.Join(dir, "e.sgy"), "--progress", "json"}, syscall.SIGINT},
		{"export", []string{in, "--attribute", "envelope", "--out", filepath.Join(dir, "e.sgy"), "--progress", "json"}, syscall.SIGTERM},
		{"figure", []string{in, "--inline", "0", "--out", filepath.Join(dir, "f.png")}, syscall.SIGINT},
		{"figure", []string{in, "--inline", "0", "--out", filepath.Join(dir, "f.png")}, syscall.SIGTERM},
		{"scan", []string{in}, syscall.SIGINT},
	} {
		t.Run(c.mode+" "+c.sig.String(), func(t *testing.T) {
			cmd := exec.Command(os.Args[0], c.args...)
			cmd.Env = append(os.Environ(), childEnv+"="+c.mode)
			var stderr bytes.Buffer
			cmd.Stderr = &stderr
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			// The signal goes once the child has the input open (its
			// handler is installed before the open): found in
			// /proc/PID/fd, so the signal lands in the header scan.
			if !waitOpened(cmd.Process.Pid, in, 20*time.Second) {
				cmd.Process.Kill()
				t.Fatalf("the child never opened %s", in)
			}
			sent := time.Now()
			cmd.Process.Signal(c.sig)
			err := cmd.Wait()
			took := time.Since(sent)
			var exit *exec.ExitError
			if !errorsAs(err, &exit) || exit.ExitCode() != exitInterrupted {
				t.Fatalf("ended with %v, want status %d; stderr %q", err, exitInterrupted, stderr.String())
			}
			if strings.Contains(stderr.String(), `"done"`) {
				t.Errorf("the signal came after the open (progress reported): %q", stderr.String())
			}
			if took > 3*time.Second {
				t.Errorf("took %v to stop after the signal", took)
			}
			t.Logf("stopped %v after the signal: %q", took, strings.TrimSpace(stderr.String()))
			if left, _ := filepath.Glob(filepath.Join(dir, "[ef].*")); len(left) > 0 {
				t.Errorf("written: %v", left)
			}
			if left := apptest.StrayTemps(t, dir); len(left) > 0 {
				t.Errorf("temporary files %v", left)
			}
		})
	}
}

func errorsAs(err error, target any) bool { return errors.As(err, target) }

// waitOpened polls /proc/PID/fd until the process has path open.
func waitOpened(pid int, path string, limit time.Duration) bool {
	for end := time.Now().Add(limit); time.Now().Before(end); time.Sleep(2 * time.Millisecond) {
		fds, _ := os.ReadDir(filepath.Join("/proc", strconv.Itoa(pid), "fd"))
		for _, fd := range fds {
			if target, err := os.Readlink(filepath.Join("/proc", strconv.Itoa(pid), "fd", fd.Name())); err == nil && target == path {
				return true
			}
		}
	}
	return false
}

// TestExportFullDisk: a three-attribute export to a filesystem that fills
// up leaves nothing there and says which output failed (issue 18: a full
// disk on the tenth output left nine finished files). The filesystem is a
// 1 MiB tmpfs, so the test needs root; otherwise it is skipped.
func TestExportFullDisk(t *testing.T) {
	if os.Geteuid() != 0 {
		segytest.SkipOutsideCI(t, "needs root to mount a tiny tmpfs")
	}
	dir := t.TempDir()
	in := filepath.Join(dir, "survey.sgy")
	apptest.WriteVolume(t, in, apptest.VolumeSpec{Inlines: [2]int{1, 10}, Crosslines: [2]int{1, 30}, Samples: 400, IntervalUS: 2000}) // 0.55 MB an output
	full := filepath.Join(dir, "full")
	os.Mkdir(full, 0o755)
	if err := unix.Mount("tmpfs", full, "tmpfs", 0, "size=1m"); err != nil {
		segytest.SkipOutsideCI(t, "root but cannot mount tmpfs: %v", err)
	}
	defer unix.Unmount(full, 0)
	var stdout, stderr bytes.Buffer
	code := Export([]string{in, "--attribute", "envelope,instantaneous-phase,cosine-phase", "--out", filepath.Join(full, "out"), "--quiet"}, &stdout, &stderr)
	if code != exitFailed || !strings.Contains(stderr.String(), "no space left on device") {
		t.Fatalf("exit %d, stderr %q", code, stderr.String())
	}
	if es, _ := os.ReadDir(full); len(es) != 0 {
		t.Errorf("the full filesystem holds %v", es)
	}
	t.Logf("stderr: %s", strings.TrimSpace(stderr.String()))
}

// TestFigureTinyValues: a survey whose amplitudes are denormal (about
// 1e-40) draws as amplitude and as envelope, with wiggles and an overlay
// (issue 18: values below about 7.5e-37 panicked in render's colour scale,
// and the window crashed opening such a file); a constant survey draws too.
func TestFigureTinyValues(t *testing.T) {
	dir := t.TempDir()
	for name, value := range map[string]func(il, xl, k int) float64{
		"denormal": func(il, xl, k int) float64 { return 1e-40 * math.Sin(float64(k)*0.3+float64(xl)) },
		"constant": func(il, xl, k int) float64 { return 3 },
	} {
		s := segytest.File{Format: 5, Samples: 64, Interval: 4000, TraceSamples: segytest.SameAsBinary, TraceInterval: segytest.SameAsBinary}
		for il := 1; il <= 3; il++ {
			for xl := 1; xl <= 20; xl++ {
				tr := segytest.Trace{Inline: il, Crossline: xl}
				for k := 0; k < 64; k++ {
					tr.Values = append(tr.Values, value(il, xl, k))
				}
				s.Traces = append(s.Traces, tr)
			}
		}
		in := filepath.Join(dir, name+".sgy")
		if err := os.WriteFile(in, s.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		for _, args := range [][]string{
			{"--attribute", "amplitude", "--wiggle"},
			{"--attribute", "envelope", "--overlay", "instantaneous-phase"},
			{"--time", "100", "--attribute", "sweetness"},
		} {
			out := filepath.Join(dir, name+".png")
			var stdout, stderr bytes.Buffer
			full := append([]string{in, "--out", out, "--size", "800x500"}, args...)
			if !slices.Contains(args, "--time") {
				full = append(full, "--inline", "2")
			}
			if code := Figure(full, &stdout, &stderr); code != exitOK {
				t.Errorf("%s %v: exit %d %q", name, args, code, stderr.String())
			}
		}
	}
}
