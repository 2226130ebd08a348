package segy

import (
	"errors"
	"io"
	"sync"
)

// prefetchWorkers is how many reads prefetch keeps in flight: enough for
// a disk (or a virtual one) to serve many requests at once, few enough to
// stay cheap in threads.
const prefetchWorkers = 32

// prefetch reads the given byte ranges (offset, length) of the file
// through r with prefetchWorkers reads at a time, and drops the bytes: the
// point is the page cache. On a cold cache the scattered reads of a
// sampled open (a few thousand headers and traces) then cost about one
// disk round trip per prefetchWorkers ranges instead of one each, and
// the ordinary reads that follow, one at a time, find the pages in
// memory. io.ReaderAt allows parallel calls. Errors are ignored: the
// reads that follow report them where they belong.
func prefetch(r io.ReaderAt, ranges [][2]int64) {
	if r == nil || len(ranges) == 0 {
		return
	}
	next := make(chan [2]int64)
	var wg sync.WaitGroup
	for w := 0; w < min(prefetchWorkers, len(ranges)); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			var buf []byte
			for rg := range next {
				if int64(cap(buf)) < rg[1] {
					buf = make([]byte, rg[1])
				}
				r.ReadAt(buf[:rg[1]], rg[0])
			}
		}()
	}
	for _, rg := range ranges {
		next <- rg
	}
	close(next)
	wg.Wait()
}

// readHeaders reads the header blocks of the given traces (each once,
// many reads in flight, see prefetch) and returns them by trace. Without
// a reader (data held in memory) it takes them from the data.
func (f *File) readHeaders(traces []int) (map[int][]byte, error) {
	out := make(map[int][]byte, len(traces))
	var todo []int
	for _, i := range traces {
		if _, ok := out[i]; !ok && i >= 0 && i < f.ntraces {
			out[i] = nil
			todo = append(todo, i)
		}
	}
	r := f.scatterReader()
	if r == nil || f.data != nil && len(todo) < 64 {
		for _, i := range todo {
			h, err := f.traceHeaderBytes(i, nil)
			if err != nil {
				return nil, err
			}
			out[i] = h
		}
		return out, nil
	}
	flat := make([]byte, int64(len(todo))*f.hdrSize)
	errs := make([]error, len(todo))
	next := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < min(prefetchWorkers, len(todo)); w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for k := range next {
				i := todo[k]
				off := f.dataStart + int64(i)*f.traceSize
				b := flat[int64(k)*f.hdrSize : int64(k+1)*f.hdrSize]
				if m, err := r.ReadAt(b, off); m < len(b) {
					if err == nil || errors.Is(err, io.EOF) {
						err = io.ErrUnexpectedEOF
					}
					errs[k] = f.errf(i, off+1, "reading trace header: %v", err)
				}
			}
		}()
	}
	for k := range todo {
		next <- k
	}
	close(next)
	wg.Wait()
	for k, i := range todo {
		if errs[k] != nil {
			return nil, errs[k]
		}
		out[i] = flat[int64(k)*f.hdrSize : int64(k+1)*f.hdrSize]
	}
	return out, nil
}

// scatterReader is the reader for scattered reads: the descriptor without
// read-ahead during a sampled open, else the file's reader.
func (f *File) scatterReader() io.ReaderAt {
	if f.scatter != nil {
		return f.scatter
	}
	return f.r
}

// firstHeaders adds the headers of the first k traces to got, read as one
// run of bytes (with the file's read-ahead).
func (f *File) firstHeaders(got map[int][]byte, k int) error {
	if k <= 0 {
		return nil
	}
	run, err := f.bytesAt(f.dataStart, int(int64(k)*f.traceSize), nil)
	if err != nil {
		return f.errf(0, f.dataStart+1, "reading the first %d traces: %v", k, err)
	}
	if f.data != nil {
		run = append([]byte(nil), run...) // a copy: the mapping may fault later
	}
	for i := 0; i < k; i++ {
		got[i] = run[int64(i)*f.traceSize : int64(i)*f.traceSize+f.hdrSize]
	}
	return nil
}
