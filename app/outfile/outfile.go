// Package outfile is quadtrace's file-system policy for everything it
// writes (exported volumes, figures, joined volumes, snapshots): an output
// never destroys anything but the file the user named, and appears only
// complete.
//
// Rules, checked when an output is created and again just before it is put
// in place:
//
//   - A destination that exists must be a regular file: a directory, a
//     device node, a FIFO or a socket is refused (writing "over" /dev/null
//     must never replace it). A symlink is refused unless
//     Options.FollowSymlink is set; then its target is written.
//   - A destination equal to any input (Options.Inputs) is refused: same
//     path, a symlink to it, or another hard link to the same file.
//   - Missing output folders are created (mode 0755); on Abort the folders
//     this package created are removed again when empty.
//   - Data goes to a temporary file that is not visible under the
//     destination's name until complete. On Linux it is an unnamed file
//     (open(2) O_TMPFILE) in the destination's folder, linked into place by
//     linkat(2) through /proc/self/fd on Commit, so a process killed at any
//     moment leaves no temporary file behind (the kernel frees unnamed
//     files). Elsewhere, or on filesystems without O_TMPFILE, it is a named
//     hidden file ".NAME.quadtrace-tmp-RANDOM" that its writer holds an
//     exclusive flock(2) on; each Create removes such files in the folder
//     whose writer is gone (the lock can be taken) and that are older than
//     StaleAge.
//   - Finished outputs have mode 0644 whatever the umask.
//   - A Set of outputs is committed all or none (see Set.Commit): new
//     destinations are linked first and removed again if any later step
//     fails; existing destinations are replaced last.
//
// Not covered: a destination replaced by another kind of file between the
// last check and the rename (a window of microseconds), and power loss
// (Commit syncs the file, not the folder).
package outfile

import (
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"time"
)

// Options say what a Set may write over and what it reads.
type Options struct {
	// FollowSymlink writes at the target of a destination that is a
	// symbolic link instead of refusing it.
	FollowSymlink bool
	// Inputs are the files the job reads; no output may be one of them.
	Inputs []string
}

// StaleAge is how old a named temporary file of ours must be, besides
// having no writer holding its lock, before Create removes it (a writer
// that has just created its file may not hold the lock yet).
const StaleAge = 2 * time.Second

// tmpMarker is in the name of every named temporary file of this package:
// "." + destination name + tmpMarker + random hex.
const tmpMarker = ".quadtrace-tmp-"

// Mode is the permission of every finished output.
const Mode os.FileMode = 0o644

// Set is a group of outputs committed all or none. It is not safe for
// concurrent use; the Files it creates may be written concurrently (each
// by one goroutine).
type Set struct {
	opt   Options
	files []*File
	made  []string // folders created, outermost first
	done  bool
}

// NewSet starts a group of outputs.
func NewSet(opt Options) *Set { return &Set{opt: opt} }

// File is one output being written. Write to it, then Commit (or Abort)
// its Set.
type File struct {
	set  *Set
	dst  string   // destination (symlink resolved when followed)
	fh   *os.File // the temporary file
	name string   // its name when named ("" for an unnamed O_TMPFILE)

	// Write's background syncs (see Write): written is the end of the
	// bytes Write has written, sent where it stood at the last request to
	// the flusher (WriteAt is left to Commit's fsync).
	written, sent int64
	flusher       *flusher
	syncData      func(fh *os.File) error // dataSync; tests replace it
}

// WritebackChunk is how many bytes Write lets accumulate before it asks
// for a background sync of the file (Linux, see flusher): without it a
// long output waits in memory until Commit's fsync, which then waits for
// all of it (0.15 s for 240 MB on the development machine, a quarter of
// an export's time, whatever was done to start the writing earlier).
const WritebackChunk = 8 << 20

// flusher syncs a file's data in the background while its writer goes on
// (fdatasync(2) on Linux), so that Commit's fsync finds little left to do.
// On the development machine (a virtual disk) the time of an fsync grew
// with the data written since the last one, about 0.6 ms per MiB, even
// when the data were already on their way to the device (sync_file_range
// did not shorten it); syncing every WritebackChunk bytes behind the
// writer brought the final fsync of 240 MB from 0.15 s to under 0.01 s.
type flusher struct {
	req  chan struct{} // a sync is wanted (capacity 1: requests merge)
	done chan struct{} // closed when the goroutine has ended
	err  error         // first error of a background sync; read after done
}

// requestSync asks the flusher (started on first use) for a sync; a sync
// already waiting absorbs the request.
func (f *File) requestSync() {
	if f.flusher == nil {
		sync := f.syncData
		if sync == nil {
			sync = dataSync
		}
		fl := &flusher{req: make(chan struct{}, 1), done: make(chan struct{})}
		go func() {
			defer close(fl.done)
			for range fl.req {
				if err := sync(f.fh); err != nil && fl.err == nil {
					fl.err = err
				}
			}
		}()
		f.flusher = fl
	}
	select {
	case f.flusher.req <- struct{}{}:
	default:
	}
}

// stopFlusher ends the flusher, waiting for a sync in progress, and
// returns the first error a background sync met: the system reports a
// write error to one sync only, so Commit must hear of it from here.
func (f *File) stopFlusher() error {
	fl := f.flusher
	if fl == nil {
		return nil
	}
	f.flusher = nil
	close(fl.req)
	<-fl.done
	return fl.err
}

// Create checks dst under the rules of the package and opens the temporary
// file that will become it. A single output can be committed with
// File.Commit.
func Create(dst string, opt Options) (*File, error) {
	return NewSet(opt).Create(dst)
}

// Check applies the destination rules to dst without creating anything,
// so that a command can refuse a destination before doing its work.
func Check(dst string, opt Options) error {
	_, err := NewSet(opt).check(dst)
	return err
}

// Create adds an output to the set.
func (s *Set) Create(dst string) (*File, error) {
	if s.done {
		return nil, fmt.Errorf("%s: output set already committed or aborted", dst)
	}
	target, err := s.check(dst)
	if err != nil {
		return nil, err
	}
	for _, f := range s.files {
		if same(f.dst, target) {
			return nil, fmt.Errorf("%s: named twice as an output", dst)
		}
	}
	dir := filepath.Dir(target)
	if err := s.makeDirs(dir); err != nil {
		return nil, err
	}
	removeStale(dir)
	f := &File{set: s, dst: target}
	f.fh, err = openUnnamed(dir)
	if err != nil {
		f.fh, f.name, err = openNamed(dir, filepath.Base(target))
	}
	if err != nil {
		return nil, fmt.Errorf("%s: cannot create the output: %w", dst, err)
	}
	s.files = append(s.files, f)
	return f, nil
}

// check applies the destination rules and returns the path to write.
func (s *Set) check(dst string) (string, error) {
	if dst == "" {
		return "", errors.New("no output file named")
	}
	target := dst
	st, err := os.Lstat(dst)
	if err == nil && st.Mode()&os.ModeSymlink != 0 {
		if !s.opt.FollowSymlink {
			return "", fmt.Errorf("%s: is a symbolic link; refusing to write through it (name the file itself, or ask to follow links)", dst)
		}
		if target, err = filepath.EvalSymlinks(dst); err != nil {
			// a dangling link: write where it points
			l, lerr := os.Readlink(dst)
			if lerr != nil {
				return "", fmt.Errorf("%s: %w", dst, lerr)
			}
			if !filepath.IsAbs(l) {
				l = filepath.Join(filepath.Dir(dst), l)
			}
			target = l
		}
		st, err = os.Lstat(target)
		if err == nil && st.Mode()&os.ModeSymlink != 0 {
			return "", fmt.Errorf("%s: link target %s is itself a link that cannot be resolved", dst, target)
		}
	}
	if err == nil {
		if err := refuseKind(dst, st.Mode()); err != nil {
			return "", err
		}
	} else if !errors.Is(err, os.ErrNotExist) {
		return "", fmt.Errorf("%s: %w", dst, err)
	}
	for _, in := range s.opt.Inputs {
		if same(target, in) {
			return "", fmt.Errorf("%s: is the input file %s; refusing to write over it", dst, in)
		}
	}
	return target, nil
}

// refuseKind fails for an existing destination that is not a regular file.
func refuseKind(dst string, m os.FileMode) error {
	if m.IsRegular() {
		return nil
	}
	kind := "not a regular file"
	switch {
	case m.IsDir():
		kind = "is a folder; name a file inside it"
	case m&os.ModeCharDevice != 0:
		kind = "is a character device"
	case m&os.ModeDevice != 0:
		kind = "is a block device"
	case m&os.ModeNamedPipe != 0:
		kind = "is a FIFO (named pipe)"
	case m&os.ModeSocket != 0:
		kind = "is a socket"
	case m&os.ModeSymlink != 0:
		kind = "is a symbolic link"
	}
	return fmt.Errorf("%s: %s; refusing to write over it", dst, kind)
}

// same reports whether a and b name the same file: the same cleaned
// absolute path, the same path after resolving links, or the same inode.
func same(a, b string) bool {
	aa, err1 := filepath.Abs(a)
	bb, err2 := filepath.Abs(b)
	if err1 == nil && err2 == nil && aa == bb {
		return true
	}
	if ra, err := filepath.EvalSymlinks(a); err == nil {
		if rb, err := filepath.EvalSymlinks(b); err == nil && ra == rb {
			return true
		}
	}
	sa, err1 := os.Stat(a)
	sb, err2 := os.Stat(b)
	return err1 == nil && err2 == nil && os.SameFile(sa, sb)
}

// makeDirs creates dir and its missing parents, remembering which it made.
func (s *Set) makeDirs(dir string) error {
	var missing []string
	for d := dir; ; d = filepath.Dir(d) {
		st, err := os.Stat(d)
		if err == nil {
			if !st.IsDir() {
				return fmt.Errorf("%s: is not a folder", d)
			}
			break
		}
		if !errors.Is(err, os.ErrNotExist) {
			return fmt.Errorf("output folder %s: %w", d, err)
		}
		missing = append(missing, d)
		if filepath.Dir(d) == d {
			break
		}
	}
	for i := len(missing) - 1; i >= 0; i-- {
		if err := os.Mkdir(missing[i], 0o755); err != nil && !errors.Is(err, os.ErrExist) {
			return fmt.Errorf("creating output folder %s: %w", missing[i], err)
		}
		s.made = append(s.made, missing[i])
	}
	return nil
}

// Write writes to the temporary file. Errors are the system's (e.g.
// syscall.ENOSPC) without the temporary file's name, which means nothing
// to the user: the caller names the destination. Every WritebackChunk
// bytes it asks for a sync of the data in the background (Linux, see
// flusher), so the device works while the job computes instead of all at
// Commit; an error of such a sync is Commit's error.
func (f *File) Write(p []byte) (int, error) {
	n, err := f.fh.Write(p)
	f.written += int64(n)
	if backgroundSync && f.written-f.sent >= WritebackChunk {
		f.requestSync()
		f.sent = f.written
	}
	return n, bare(err)
}

// WriteAt writes to the temporary file at offset off; errors as Write.
func (f *File) WriteAt(p []byte, off int64) (int, error) {
	n, err := f.fh.WriteAt(p, off)
	return n, bare(err)
}

// bare strips the path of an *os.PathError.
func bare(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// Destination is the path the file will have after Commit.
func (f *File) Destination() string { return f.dst }

// Commit commits the Set the file belongs to.
func (f *File) Commit() error { return f.set.Commit() }

// Abort aborts the Set the file belongs to.
func (f *File) Abort() error { return f.set.Abort() }

// Commit puts every output of the set in place, or none. Every file is
// first synced and given mode 0644 and every destination checked again;
// then unnamed files (Linux) are linked (linkat(2)) straight to
// destinations that do not exist yet, and only then are the existing
// destinations replaced: each is unlinked and the new file linked in its
// place at once. A process killed at any moment of Commit therefore leaves
// complete outputs only, never a temporary file; the price is a moment of
// a few microseconds, per replaced output, when its name is absent.
// Named temporary files (other systems) are renamed over their
// destinations, which is atomic. A failure before the first replacement
// removes everything this commit linked; the error names the output that
// failed (and, in the unlikely failure of a later replacement, the outputs
// already in place).
func (s *Set) Commit() error {
	if s.done {
		return errors.New("output set already committed or aborted")
	}
	s.done = true
	var placed []string // destinations created by this commit
	fail := func(err error) error {
		for _, p := range placed {
			os.Remove(p)
		}
		s.discard()
		return err
	}
	for _, f := range s.files {
		if err := f.stopFlusher(); err != nil {
			return fail(fmt.Errorf("%s: writing: %w", f.dst, err))
		}
		if err := f.fh.Chmod(Mode); err != nil {
			return fail(fmt.Errorf("%s: %w", f.dst, err))
		}
		if err := f.fh.Sync(); err != nil {
			return fail(fmt.Errorf("%s: writing: %w", f.dst, err))
		}
		if _, err := s.check(f.dst); err != nil {
			return fail(err)
		}
	}
	var replace []*File
	for _, f := range s.files {
		if f.name != "" {
			replace = append(replace, f)
			continue
		}
		if _, err := os.Lstat(f.dst); !errors.Is(err, os.ErrNotExist) {
			replace = append(replace, f)
			continue
		}
		if err := linkUnnamedAt(f.fh, f.dst); err != nil {
			if errors.Is(err, os.ErrExist) { // created meanwhile
				replace = append(replace, f)
				continue
			}
			return fail(fmt.Errorf("%s: %w", f.dst, err))
		}
		placed = append(placed, f.dst)
	}
	for i, f := range replace {
		_, err := s.check(f.dst)
		switch {
		case err != nil:
		case f.name != "":
			err = os.Rename(f.name, f.dst)
		default:
			if err = os.Remove(f.dst); err == nil || errors.Is(err, os.ErrNotExist) {
				err = linkUnnamedAt(f.fh, f.dst)
			}
		}
		if err != nil {
			err = fmt.Errorf("%s: %w", f.dst, err)
			if i == 0 {
				return fail(err)
			}
			for _, g := range replace[:i] {
				placed = append(placed, g.dst)
			}
			s.discard()
			return fmt.Errorf("%w (already in place: %s)", err, strings.Join(placed, ", "))
		}
		f.name = ""
	}
	for _, f := range s.files {
		f.fh.Close()
	}
	return nil
}

// Abort discards every output of the set and the folders it created. It
// is safe to call after Commit (it then does nothing) and more than once.
func (s *Set) Abort() error {
	if s.done {
		return nil
	}
	s.done = true
	s.discard()
	return nil
}

func (s *Set) discard() {
	s.discardFrom(0)
	for i := len(s.made) - 1; i >= 0; i-- {
		os.Remove(s.made[i]) // only empty folders go
	}
}

// discardFrom closes files i.. and removes their temporary names.
func (s *Set) discardFrom(i int) {
	for _, f := range s.files {
		f.stopFlusher() // before any Close; its error no longer matters
	}
	for _, f := range s.files[i:] {
		f.fh.Close()
		if f.name != "" {
			os.Remove(f.name)
		}
		f.name = ""
	}
	for _, f := range s.files[:i] {
		f.fh.Close()
	}
}

// tmpName is a fresh hidden name for base in dir.
func tmpName(dir, base string) string {
	var r [8]byte
	rand.Read(r[:])
	return filepath.Join(dir, "."+base+tmpMarker+hex.EncodeToString(r[:]))
}

// isTmpName reports whether name follows the naming pattern of tmpName.
func isTmpName(name string) bool {
	i := strings.LastIndex(name, tmpMarker)
	if !strings.HasPrefix(name, ".") || i < 2 {
		return false
	}
	h := name[i+len(tmpMarker):]
	if len(h) != 16 {
		return false
	}
	_, err := hex.DecodeString(h)
	return err == nil
}

// removeStale removes named temporaries of this package in dir whose
// writer is gone: no process holds their lock and they are older than
// StaleAge. Errors are ignored: this is housekeeping.
func removeStale(dir string) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return
	}
	for _, e := range entries {
		if !e.Type().IsRegular() || !isTmpName(e.Name()) {
			continue
		}
		info, err := e.Info()
		if err != nil || time.Since(info.ModTime()) < StaleAge {
			continue
		}
		p := filepath.Join(dir, e.Name())
		if writerGone(p) {
			os.Remove(p)
		}
	}
}

// Scratch opens a read-write scratch file in the system's temporary folder
// that no kill can leave behind: on Linux an unnamed file (O_TMPFILE), on
// other Unix systems a named one unlinked at once; where neither works
// (Windows) a named file that the caller removes. Name() is then the path;
// for an unnamed file it names no directory entry and removing it does
// nothing. For caches the program writes and reads itself, never outputs.
func Scratch(pattern string) (*os.File, error) { return ScratchIn(os.TempDir(), pattern) }

// ScratchIn is Scratch in folder dir (e.g. the user's cache folder).
func ScratchIn(dir, pattern string) (*os.File, error) {
	if fh, err := openUnnamed(dir); err == nil {
		return fh, nil
	}
	fh, err := os.CreateTemp(dir, pattern)
	if err != nil {
		return nil, err
	}
	unlinkOpen(fh)
	return fh, nil
}
