package export

import (
	"bytes"
	"io"
	"math/rand/v2"
	"testing"
)

// Checks: windowReader returns what bytes.Reader (the standard library's
// io.ReaderAt over the same bytes) returns for sequential, backward,
// straddling, large and past-the-end reads.
func TestWindowReaderMatchesDirectReads(t *testing.T) {
	data := make([]byte, 100_003)
	rng := rand.New(rand.NewPCG(1, 2))
	for i := range data {
		data[i] = byte(rng.Uint32())
	}
	direct := bytes.NewReader(data)
	w := &windowReader{r: bytes.NewReader(data)}
	w.enable(4096)
	type read struct {
		off int64
		n   int
	}
	var reads []read
	for off := int64(0); off < int64(len(data)); off += 1234 {
		reads = append(reads, read{off, 240}, read{off + 240, 994})
	}
	reads = append(reads, read{10, 50}, read{4090, 20}, read{500, 2000}, read{99_990, 50}, read{100_003, 1}, read{200_000, 4})
	for k := 0; k < 500; k++ {
		reads = append(reads, read{rng.Int64N(int64(len(data))), rng.IntN(1500)})
	}
	for _, r := range reads {
		a, b := make([]byte, r.n), make([]byte, r.n)
		na, ea := direct.ReadAt(a, r.off)
		nb, eb := w.ReadAt(b, r.off)
		if na != nb || (ea == io.EOF) != (eb == io.EOF) || (ea == nil) != (eb == nil) || !bytes.Equal(a[:na], b[:nb]) {
			t.Fatalf("read of %d at %d: window gives %d, %v; direct %d, %v", r.n, r.off, nb, eb, na, ea)
		}
	}
}
