package outfile

import (
	"os"

	"golang.org/x/sys/unix"
)

// startWriteback asks the kernel to start writing bytes [off, off+n) of fh
// to the device without waiting for them (sync_file_range(2) with
// SYNC_FILE_RANGE_WRITE), so that Commit's fsync finds most of a long
// output already on its way. It is advice: data and errors still reach
// the user through Commit's fsync, which waits for everything.
func startWriteback(fh *os.File, off, n int64) error {
	rc, err := fh.SyscallConn()
	if err != nil {
		return err
	}
	var serr error
	if err := rc.Control(func(fd uintptr) {
		serr = unix.SyncFileRange(int(fd), off, n, unix.SYNC_FILE_RANGE_WRITE)
	}); err != nil {
		return err
	}
	return serr
}
