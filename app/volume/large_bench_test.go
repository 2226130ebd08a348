//go:build linux

package volume

import (
	"context"
	"os"
	"sync"
	"testing"
	"time"

	"golang.org/x/sys/unix"

	"quadtrace/compute"
	"quadtrace/segy"
)

// The large-volume benchmarks (issue 16) read the SEG-Y file named by
// QUADTRACE_LARGE_SEGY, e.g. one written by
//
//	quadtrace synth /work/big/corrowdeep-8g.sgy --inlines 700 --crosslines 1000 --repeat 4
//
// (9.1 GB), and evict it from the page cache (posix_fadvise
// POSIX_FADV_DONTNEED, no privilege needed) before every time slice, so
// each one finds the file as a file larger than the page cache would be
// found. They use only Open, Read and Attribute (plus evictStores, see
// bricks_bench_test.go), so the same file measures older versions. Run
// them one at a time with few iterations, e.g.
//
//	QUADTRACE_LARGE_SEGY=/work/big/corrowdeep-8g.sgy go test -run '^$' -bench LargeEnvelopeSlice -benchtime 5x -timeout 60m ./app/volume/
func largeFile(b *testing.B) string {
	p := os.Getenv("QUADTRACE_LARGE_SEGY")
	if p == "" {
		b.Skip("QUADTRACE_LARGE_SEGY is not set: it names the large SEG-Y file (at least 8 GB) these benchmarks read")
	}
	return p
}

// evictFile drops path's pages from the page cache.
func evictFile(b *testing.B, path string) {
	f, err := os.Open(path)
	if err != nil {
		b.Fatal(err)
	}
	defer f.Close()
	if err := unix.Fadvise(int(f.Fd()), 0, 0, unix.FADV_DONTNEED); err != nil {
		b.Fatal(err)
	}
}

// largeRun is a large file opened, with its first time slice of one
// attribute taken: the testing package calls a benchmark function once
// with b.N = 1 before the measured run, and the first slice (minutes) must
// not be taken twice. Kept for the test process's life.
type largeRun struct {
	v                *Volume
	a                *compute.Attribute
	p                compute.Params
	first, firstPart time.Duration
}

var (
	largeMu   sync.Mutex
	largeRuns = map[string]*largeRun{}
)

// largeSlices measures the first time slice of attribute id on the large
// file (reported as first-s, with first-part-ms: when the first progress
// beyond zero came), then each later one at another sample, the file
// evicted before each. coldStores also evicts the volume's own stores.
func largeSlices(b *testing.B, id string, coldStores bool) {
	path := largeFile(b)
	largeMu.Lock()
	r := largeRuns[id]
	largeMu.Unlock()
	if r == nil {
		evictFile(b, path)
		v, err := Open(path, segy.Options{})
		if err != nil {
			b.Fatal(err)
		}
		r = &largeRun{v: v}
		if r.a, err = compute.Lookup(id); err != nil {
			b.Fatal(err)
		}
		if r.p, err = r.a.Resolve(nil); err != nil {
			b.Fatal(err)
		}
		evictFile(b, path)
		start := time.Now()
		largeSlice(b, r, v.Info().Samples/2, func(done, total int) {
			if done > 0 && r.firstPart == 0 {
				r.firstPart = time.Since(start)
			}
		})
		r.first = time.Since(start)
		largeMu.Lock()
		largeRuns[id] = r
		largeMu.Unlock()
	}
	ns := r.v.Info().Samples
	b.ResetTimer()
	for i := range b.N {
		b.StopTimer()
		evictFile(b, path)
		if coldStores {
			evictStores(b, r.v)
		}
		k := (ns/2 + 37*(i+1)) % ns // another sample, mostly another brick layer
		b.StartTimer()
		largeSlice(b, r, k, nil)
	}
	b.StopTimer()
	b.ReportMetric(r.first.Seconds(), "first-s")
	if r.firstPart > 0 {
		b.ReportMetric(float64(r.firstPart.Milliseconds()), "first-part-ms")
	}
}

// largeSlice takes the time slice at sample k of r's attribute.
func largeSlice(b *testing.B, r *largeRun, k int, progress func(done, total int)) {
	s := Slice{Orientation: TimeSlice, Number: k}
	var sec Section
	var err error
	if r.a.ID == "amplitude" {
		sec, err = r.v.Read(context.Background(), s)
	} else {
		sec, err = r.v.Attribute(context.Background(), s, r.a, r.p, compute.Conditioning{}, progress)
	}
	if err != nil {
		b.Fatal(err)
	}
	if len(sec.Traces) != r.v.Info().Inline.Count {
		b.Fatalf("time slice of %d rows, want %d", len(sec.Traces), r.v.Info().Inline.Count)
	}
}

// BenchmarkLargeAmplitudeSlice: later amplitude time slices of the large
// file, the file evicted before each.
func BenchmarkLargeAmplitudeSlice(b *testing.B) { largeSlices(b, "amplitude", false) }

// BenchmarkLargeAmplitudeSliceColdStore: the same with the volume's own
// store evicted too (as if it were larger than the page cache as well);
// it shares the opened volume and first slice with
// BenchmarkLargeAmplitudeSlice when both run in one process.
func BenchmarkLargeAmplitudeSliceColdStore(b *testing.B) { largeSlices(b, "amplitude", true) }

// BenchmarkLargeEnvelopeSlice: later envelope time slices of the large
// file; first-s is the whole volume's computation.
func BenchmarkLargeEnvelopeSlice(b *testing.B) { largeSlices(b, "envelope", false) }
