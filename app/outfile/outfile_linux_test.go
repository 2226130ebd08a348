package outfile

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"syscall"
	"testing"

	"golang.org/x/sys/unix"

	"quadtrace/segy/segytest"
)

// TestReadOnlyFolder: creating an output in a folder that cannot be written
// fails at Create with the folder's error, leaving nothing. As root,
// permission bits do not stop writes, so the folder is a tmpfs mounted
// read-only.
func TestReadOnlyFolder(t *testing.T) {
	dir := t.TempDir()
	ro := filepath.Join(dir, "ro")
	os.Mkdir(ro, 0o755)
	if os.Geteuid() == 0 {
		if err := unix.Mount("tmpfs", ro, "tmpfs", unix.MS_RDONLY, "size=64k"); err != nil {
			segytest.SkipOutsideCI(t, "root but cannot mount a read-only tmpfs: %v", err)
		}
		defer unix.Unmount(ro, 0)
	} else {
		os.Chmod(ro, 0o555)
		defer os.Chmod(ro, 0o755)
	}
	err := write(t, filepath.Join(ro, "fig.png"), []byte("x"), Options{})
	if err == nil || !strings.Contains(err.Error(), "fig.png") {
		t.Fatalf("error %v", err)
	}
	if got := names(t, ro); len(got) != 0 {
		t.Errorf("read-only folder holds %v", got)
	}
	// A missing folder under it cannot be made either.
	if err := write(t, filepath.Join(ro, "a", "b", "fig.png"), []byte("x"), Options{}); err == nil {
		t.Fatal("created a folder in a read-only folder")
	}
}

// tinyFS mounts a tmpfs of size bytes in a temporary folder (root only).
func tinyFS(t *testing.T, size int) string {
	t.Helper()
	if os.Geteuid() != 0 {
		segytest.SkipOutsideCI(t, "full-filesystem case skipped: mounting a tiny tmpfs needs root")
	}
	dir := filepath.Join(t.TempDir(), "tiny")
	os.Mkdir(dir, 0o755)
	if err := unix.Mount("tmpfs", dir, "tmpfs", 0, fmt.Sprintf("size=%d", size)); err != nil {
		segytest.SkipOutsideCI(t, "root but cannot mount tmpfs: %v", err)
	}
	t.Cleanup(func() { unix.Unmount(dir, 0) })
	return dir
}

// TestFullFilesystem: a set of three outputs whose third fills the
// filesystem leaves nothing at all (issue 18: nine finished files were
// left when the tenth output hit a full disk).
func TestFullFilesystem(t *testing.T) {
	dir := tinyFS(t, 256<<10)
	s := NewSet(Options{})
	chunk := bytes.Repeat([]byte{7}, 16<<10)
	var failed error
	for k := 0; k < 3 && failed == nil; k++ {
		f, err := s.Create(filepath.Join(dir, fmt.Sprintf("part%d.sgy", k)))
		if err != nil {
			t.Fatal(err)
		}
		limit := 4 // 64 KiB for the first two
		if k == 2 {
			limit = 1000 // far more than the filesystem holds
		}
		for i := 0; i < limit; i++ {
			if _, err := f.Write(chunk); err != nil {
				failed = err
				break
			}
		}
	}
	if !errors.Is(failed, syscall.ENOSPC) {
		t.Fatalf("write error %v, want ENOSPC", failed)
	}
	s.Abort()
	if got := names(t, dir); len(got) != 0 {
		t.Errorf("full filesystem holds %v after abort", got)
	}
	var st unix.Statfs_t
	unix.Statfs(dir, &st)
	if used := (st.Blocks - st.Bfree) * uint64(st.Bsize); used > 16<<10 {
		t.Errorf("%d bytes still used after abort", used)
	}
}

// dataSync makes the system call: on a regular file it succeeds, on a
// pipe the system refuses it (EINVAL), so the call is really made.
func TestDataSyncSystemCall(t *testing.T) {
	fh, err := os.Create(filepath.Join(t.TempDir(), "f"))
	if err != nil {
		t.Fatal(err)
	}
	defer fh.Close()
	if _, err := fh.Write(make([]byte, 1<<20)); err != nil {
		t.Fatal(err)
	}
	if err := dataSync(fh); err != nil {
		t.Errorf("regular file: %v", err)
	}
	r, w, err := os.Pipe()
	if err != nil {
		t.Fatal(err)
	}
	defer r.Close()
	defer w.Close()
	if err := dataSync(w); !errors.Is(err, unix.EINVAL) {
		t.Errorf("pipe: error %v, want EINVAL", err)
	}
}
