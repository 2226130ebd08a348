//go:build unix

// Unix only: these tests make FIFOs and device nodes (mkfifo, mknod) and
// set the umask, which Windows lacks.

package outfile

import (
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
)

// names lists the entries of dir, sorted.
func names(t *testing.T, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, e := range es {
		out = append(out, e.Name())
	}
	return out
}

func write(t *testing.T, dst string, data []byte, opt Options) error {
	t.Helper()
	f, err := Create(dst, opt)
	if err != nil {
		return err
	}
	if _, err := f.Write(data); err != nil {
		f.Abort()
		return err
	}
	return f.Commit()
}

func TestCommitPutsCompleteFileInPlace(t *testing.T) {
	dir := t.TempDir()
	dst := filepath.Join(dir, "out.sgy")
	old := syscall.Umask(0o077) // a strict umask must not change the mode
	defer syscall.Umask(old)
	f, err := Create(dst, Options{})
	if err != nil {
		t.Fatal(err)
	}
	f.Write([]byte("hello "))
	if got := names(t, dir); len(got) != 0 {
		t.Fatalf("while writing, the folder holds %v; want nothing visible", got)
	}
	f.Write([]byte("world"))
	if err := f.Commit(); err != nil {
		t.Fatal(err)
	}
	b, err := os.ReadFile(dst)
	if err != nil || string(b) != "hello world" {
		t.Fatalf("content %q %v", b, err)
	}
	st, _ := os.Stat(dst)
	if st.Mode().Perm() != 0o644 {
		t.Errorf("mode %v, want 0644", st.Mode().Perm())
	}
	if got := names(t, dir); !slices.Equal(got, []string{"out.sgy"}) {
		t.Errorf("folder holds %v", got)
	}
	// Replacing an existing regular file is allowed.
	if err := write(t, dst, []byte("again"), Options{}); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(dst); string(b) != "again" {
		t.Errorf("replaced content %q", b)
	}
	if err := f.Commit(); err == nil {
		t.Error("second Commit succeeded")
	}
}

// TestRefusedDestinations: one case per kind of output path (issue 18.1).
// Device nodes are our own, made with mknod in a temporary folder (never a
// real one under /dev).
func TestRefusedDestinations(t *testing.T) {
	dir := t.TempDir()
	input := filepath.Join(dir, "input.sgy")
	os.WriteFile(input, []byte("input data"), 0o644)
	fifo := filepath.Join(dir, "fifo")
	if err := syscall.Mkfifo(fifo, 0o644); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(dir, "link.png")
	target := filepath.Join(dir, "target.png")
	os.WriteFile(target, []byte("target"), 0o644)
	os.Symlink(target, link)
	inputLink := filepath.Join(dir, "input-link.sgy")
	os.Symlink(input, inputLink)
	hard := filepath.Join(dir, "input-hard.sgy")
	if err := os.Link(input, hard); err != nil {
		t.Fatal(err)
	}
	sub := filepath.Join(dir, "folder")
	os.Mkdir(sub, 0o755)
	cases := []struct{ name, dst, want string }{
		{"fifo", fifo, "is a FIFO"},
		{"symlink", link, "is a symbolic link"},
		{"directory", sub, "is a folder"},
		{"input itself", input, "is the input file"},
		{"input through a relative path", filepath.Join(dir, "folder", "..", "input.sgy"), "is the input file"},
		{"hard link to the input", hard, "is the input file"},
	}
	dev := filepath.Join(dir, "null")
	if err := syscall.Mknod(dev, syscall.S_IFCHR|0o666, int(unix.Mkdev(1, 3))); err == nil {
		cases = append(cases, struct{ name, dst, want string }{"character device", dev, "is a character device"})
	} else {
		t.Logf("character device case skipped: mknod needs root (%v)", err)
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			before := names(t, dir)
			err := write(t, c.dst, []byte("x"), Options{Inputs: []string{input}})
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("error %v, want %q", err, c.want)
			}
			if after := names(t, dir); !slices.Equal(before, after) {
				t.Errorf("folder changed: %v -> %v", before, after)
			}
		})
	}
	// Symlink to the input, even when asked to follow links.
	if err := write(t, inputLink, []byte("x"), Options{FollowSymlink: true, Inputs: []string{input}}); err == nil || !strings.Contains(err.Error(), "is the input file") {
		t.Errorf("symlink to the input with FollowSymlink: %v", err)
	}
	if st, err := os.Lstat(dev); err == nil && st.Mode()&os.ModeCharDevice == 0 {
		t.Errorf("device node replaced: mode %v", st.Mode())
	}
	if st, _ := os.Lstat(fifo); st.Mode()&os.ModeNamedPipe == 0 {
		t.Errorf("FIFO replaced: mode %v", st.Mode())
	}
	if b, _ := os.ReadFile(input); string(b) != "input data" {
		t.Errorf("input changed: %q", b)
	}
	// Following a link when asked: the target is written, the link stays.
	if err := write(t, link, []byte("through"), Options{FollowSymlink: true}); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(target); string(b) != "through" {
		t.Errorf("target content %q", b)
	}
	if st, _ := os.Lstat(link); st.Mode()&os.ModeSymlink == 0 {
		t.Error("the link was replaced by a file")
	}
}

// TestSetAllOrNone: when one destination becomes unwritable between Create
// and Commit, no output of the set is put in place.
func TestSetAllOrNone(t *testing.T) {
	dir := t.TempDir()
	s := NewSet(Options{})
	for _, n := range []string{"a.sgy", "b.sgy", "c.sgy"} {
		f, err := s.Create(filepath.Join(dir, n))
		if err != nil {
			t.Fatal(err)
		}
		f.Write([]byte(n))
	}
	if err := syscall.Mkfifo(filepath.Join(dir, "c.sgy"), 0o644); err != nil {
		t.Fatal(err)
	}
	err := s.Commit()
	if err == nil || !strings.Contains(err.Error(), "c.sgy") {
		t.Fatalf("commit error %v, want one naming c.sgy", err)
	}
	if got := names(t, dir); !slices.Equal(got, []string{"c.sgy"}) {
		t.Errorf("folder holds %v, want only the FIFO", got)
	}
	// Same destination twice in one set.
	s = NewSet(Options{})
	s.Create(filepath.Join(dir, "x.sgy"))
	if _, err := s.Create(filepath.Join(dir, ".", "x.sgy")); err == nil {
		t.Error("one destination accepted twice")
	}
	s.Abort()
}

func TestFoldersMadeAndRemoved(t *testing.T) {
	dir := t.TempDir()
	f, err := Create(filepath.Join(dir, "a", "b", "out.png"), Options{})
	if err != nil {
		t.Fatal(err)
	}
	f.Abort()
	if got := names(t, dir); len(got) != 0 {
		t.Errorf("abort left %v", got)
	}
	if err := write(t, filepath.Join(dir, "a", "b", "out.png"), []byte("x"), Options{}); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(dir, "a", "b", "out.png")); err != nil {
		t.Fatal(err)
	}
	if err := write(t, filepath.Join(dir, "a", "b", "out.png", "x.png"), []byte("x"), Options{}); err == nil {
		t.Error("wrote below a file as if it were a folder")
	}
}

// TestStaleNamedTemporaries: a named temporary of ours whose writer is
// gone and which is older than StaleAge is removed by the next Create in
// its folder; one whose writer still holds the lock, a fresh one, and
// files of other names are kept.
func TestStaleNamedTemporaries(t *testing.T) {
	dir := t.TempDir()
	stale := tmpName(dir, "vol.sgy")
	os.WriteFile(stale, []byte("left by a killed writer"), 0o600)
	live, liveName, err := openNamed(dir, "vol2.sgy")
	if err != nil {
		t.Fatal(err)
	}
	defer live.Close()
	fresh := tmpName(dir, "vol3.sgy")
	os.WriteFile(fresh, nil, 0o600)
	other := filepath.Join(dir, ".vol.sgy.tmp-123")
	os.WriteFile(other, nil, 0o600)
	oldTime := time.Now().Add(-time.Minute)
	for _, p := range []string{stale, liveName, other} {
		os.Chtimes(p, oldTime, oldTime)
	}
	if err := write(t, filepath.Join(dir, "new.sgy"), []byte("x"), Options{}); err != nil {
		t.Fatal(err)
	}
	for p, keep := range map[string]bool{stale: false, liveName: true, fresh: true, other: true} {
		_, err := os.Stat(p)
		if (err == nil) != keep {
			t.Errorf("%s: kept %v, want %v", filepath.Base(p), err == nil, keep)
		}
	}
	if !isTmpName(filepath.Base(stale)) || isTmpName(".x.quadtrace-tmp-zz") || isTmpName("x.quadtrace-tmp-0123456789abcdef") {
		t.Error("isTmpName")
	}
}

// killChildEnv switches TestKillLeavesOnlyDestinations into its writer.
const killChildEnv = "QUADTRACE_OUTFILE_KILL_CHILD"

// TestKillLeavesOnlyDestinations kills a writer of a three-output set with
// SIGKILL at 50 random moments; after each kill the folder holds only
// complete destinations (or nothing): no temporary file, no partial output.
func TestKillLeavesOnlyDestinations(t *testing.T) {
	if dir := os.Getenv(killChildEnv); dir != "" {
		killChild(dir)
		return
	}
	dir := t.TempDir()
	r := rand.New(rand.NewPCG(18, 1))
	for k := 0; k < 50; k++ {
		cmd := exec.Command(os.Args[0], "-test.run=^TestKillLeavesOnlyDestinations$")
		cmd.Env = append(os.Environ(), killChildEnv+"="+dir)
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		time.Sleep(time.Duration(r.IntN(60)) * time.Millisecond)
		cmd.Process.Signal(syscall.SIGKILL)
		cmd.Wait()
		for _, n := range names(t, dir) {
			if !strings.HasPrefix(n, "part") {
				t.Fatalf("kill %d: folder holds %s", k, n)
			}
			b, _ := os.ReadFile(filepath.Join(dir, n))
			if len(b) != killSize || b[len(b)-1] != killLast {
				t.Fatalf("kill %d: %s is %d bytes, want a complete %d", k, n, len(b), killSize)
			}
		}
	}
	t.Logf("50 kills; folder at the end: %v", names(t, dir))
}

const (
	killSize = 2 << 20
	killLast = 0x5a
)

// killChild writes sets of three outputs of killSize bytes in 64 KiB
// writes, over and over, until killed.
func killChild(dir string) {
	chunk := make([]byte, 64<<10)
	for round := 0; ; round++ {
		s := NewSet(Options{})
		for k := 0; k < 3; k++ {
			f, err := s.Create(filepath.Join(dir, "part"+strconv.Itoa(k)+".sgy"))
			if err != nil {
				os.Exit(3)
			}
			for n := 0; n < killSize; n += len(chunk) {
				chunk[len(chunk)-1] = 0
				if n+len(chunk) == killSize {
					chunk[len(chunk)-1] = killLast
				}
				f.Write(chunk)
			}
		}
		if err := s.Commit(); err != nil {
			os.Exit(4)
		}
	}
}
