package outfile

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"syscall"
	"testing"
	"time"

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

// Write asks for a background sync every WritebackChunk bytes (Linux):
// with a sync that blocks until every write is done, Write never waits
// for it (requests merge), at least one and at most one per chunk are
// made, Commit waits for the one in progress, and the committed file holds
// exactly what was written, WriteAt included.
func TestWriteSyncsInBackground(t *testing.T) {
	dst := filepath.Join(t.TempDir(), "out.sgy")
	f, err := Create(dst, Options{})
	if err != nil {
		t.Fatal(err)
	}
	release := make(chan struct{})
	var mu sync.Mutex
	calls := 0
	f.syncData = func(fh *os.File) error {
		if fh != f.fh {
			t.Errorf("sync of another file")
		}
		<-release
		mu.Lock()
		calls++
		mu.Unlock()
		return nil
	}
	var want []byte
	piece := make([]byte, 1<<20+3)
	for i := range 41 {
		for j := range piece {
			piece[j] = byte(i*7 + j)
		}
		if _, err := f.Write(piece); err != nil {
			t.Fatal(err)
		}
		want = append(want, piece...)
	}
	if _, err := f.WriteAt([]byte("HEAD"), 0); err != nil {
		t.Fatal(err)
	}
	copy(want, "HEAD")
	close(release) // every write done without a sync having finished
	if err := f.Commit(); err != nil {
		t.Fatal(err)
	}
	if chunks := len(want) / WritebackChunk; calls < 1 || calls > chunks {
		t.Errorf("%d background syncs for %d chunks", calls, chunks)
	}
	if got, err := os.ReadFile(dst); err != nil || !bytes.Equal(got, want) {
		t.Errorf("committed file differs from what was written (%d bytes, %v)", len(got), err)
	}
}

// An error of a background sync (the system reports a write error to one
// sync only) is Commit's error, naming the destination, and nothing is
// put in place.
func TestBackgroundSyncErrorFailsCommit(t *testing.T) {
	dir := t.TempDir()
	dst := filepath.Join(dir, "out.sgy")
	f, err := Create(dst, Options{})
	if err != nil {
		t.Fatal(err)
	}
	f.syncData = func(*os.File) error { return syscall.EIO }
	if _, err := f.Write(make([]byte, WritebackChunk+1)); err != nil {
		t.Fatal(err)
	}
	err = f.Commit()
	if !errors.Is(err, syscall.EIO) || !strings.Contains(err.Error(), "out.sgy") {
		t.Fatalf("Commit after a failed background sync: %v, want EIO naming out.sgy", err)
	}
	if got := names(t, dir); len(got) != 0 {
		t.Errorf("folder holds %v after the failed commit", got)
	}
}

// Abort ends a background sync in progress before closing the file.
func TestAbortWaitsForBackgroundSync(t *testing.T) {
	dir := t.TempDir()
	f, err := Create(filepath.Join(dir, "out.sgy"), Options{})
	if err != nil {
		t.Fatal(err)
	}
	started, release, finished := make(chan struct{}), make(chan struct{}), make(chan struct{})
	var closedDuringSync bool
	f.syncData = func(fh *os.File) error {
		defer close(finished)
		close(started)
		<-release
		// A closed file fails Stat: the sync must still hold it open.
		_, err := fh.Stat()
		closedDuringSync = err != nil
		return nil
	}
	if _, err := f.Write(make([]byte, WritebackChunk)); err != nil {
		t.Fatal(err)
	}
	<-started
	// Give Abort time to reach its wait (not a timing check: without
	// the wait the close below would come under the blocked sync).
	go func() { time.Sleep(20 * time.Millisecond); close(release) }()
	f.Abort()
	<-finished
	if closedDuringSync {
		t.Error("the file was closed under a background sync")
	}
	if got := names(t, dir); len(got) != 0 {
		t.Errorf("folder holds %v after Abort", got)
	}
}
