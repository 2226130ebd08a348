package outfile

import (
	"os"

	"golang.org/x/sys/unix"
)

// backgroundSync: File.Write syncs long outputs behind the writer (see
// flusher).
const backgroundSync = true

// dataSync writes fh's data (and the metadata needed to read them back) to
// the device: fdatasync(2).
func dataSync(fh *os.File) error {
	rc, err := fh.SyscallConn()
	if err != nil {
		return err
	}
	var serr error
	if err := rc.Control(func(fd uintptr) {
		serr = unix.Fdatasync(int(fd))
	}); err != nil {
		return err
	}
	return serr
}
