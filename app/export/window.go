package export

import (
	"io"
	"sync"
)

// readWindow is the size of the window windowReader reads at once.
const readWindow = 4 << 20

// windowReader serves small ReadAt calls from a window of the underlying
// file read in one call, so that reading a volume trace after trace (a
// header and the samples of each) costs one system call per window instead
// of two per trace. Reads larger than a quarter of the window, and all
// reads before enable, go straight through. It is safe for concurrent use.
type windowReader struct {
	mu  sync.Mutex
	r   io.ReaderAt
	buf []byte // nil until enable
	off int64  // file offset of buf[0]
	n   int    // valid bytes in buf
}

// enable starts serving reads from a window of size bytes.
func (w *windowReader) enable(size int) {
	w.mu.Lock()
	defer w.mu.Unlock()
	w.buf, w.off, w.n = make([]byte, size), 0, 0
}

// ReadAt implements io.ReaderAt.
func (w *windowReader) ReadAt(p []byte, off int64) (int, error) {
	w.mu.Lock()
	defer w.mu.Unlock()
	if w.buf == nil || len(p) > len(w.buf)/4 || off < 0 {
		return w.r.ReadAt(p, off)
	}
	if off < w.off || off+int64(len(p)) > w.off+int64(w.n) {
		n, err := w.r.ReadAt(w.buf, off)
		if err != nil && err != io.EOF {
			w.n = 0
			return 0, err
		}
		w.off, w.n = off, n
	}
	start := off - w.off
	c := copy(p, w.buf[start:w.n])
	if c < len(p) {
		return c, io.EOF
	}
	return c, nil
}
