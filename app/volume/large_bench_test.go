package volume

import (
	"context"
	"os"
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

// largeSlices measures the first time slice of attribute id on the large
// file (reported as first-s, with first-part-ms: when the first progress
// beyond zero came), then each later one at another sample, the file
// evicted before each. coldStores also evicts the volume's own stores.
func largeSlices(b *testing.B, id string, coldStores bool) {
	path := largeFile(b)
	evictFile(b, path)
	v, err := Open(path, segy.Options{})
	if err != nil {
		b.Fatal(err)
	}
	defer v.Close()
	a, err := compute.Lookup(id)
	if err != nil {
		b.Fatal(err)
	}
	p, err := a.Resolve(nil)
	if err != nil {
		b.Fatal(err)
	}
	ns := v.Info().Samples
	ctx := context.Background()
	slice := func(k int, progress func(done, total int)) {
		s := Slice{Orientation: TimeSlice, Number: k}
		var sec Section
		var err error
		if id == "amplitude" {
			sec, err = v.Read(ctx, s)
		} else {
			sec, err = v.Attribute(ctx, s, a, p, compute.Conditioning{}, progress)
		}
		if err != nil {
			b.Fatal(err)
		}
		if len(sec.Traces) != v.Info().Inline.Count {
			b.Fatalf("time slice of %d rows, want %d", len(sec.Traces), v.Info().Inline.Count)
		}
	}
	evictFile(b, path)
	start := time.Now()
	var firstPart time.Duration
	slice(ns/2, func(done, total int) {
		if done > 0 && firstPart == 0 {
			firstPart = time.Since(start)
		}
	})
	first := time.Since(start)
	b.ResetTimer()
	for i := range b.N {
		b.StopTimer()
		evictFile(b, path)
		if coldStores {
			evictStores(b, v)
		}
		k := (ns/2 + 37*(i+1)) % ns // another sample, mostly another brick layer
		b.StartTimer()
		slice(k, nil)
	}
	b.StopTimer()
	b.ReportMetric(first.Seconds(), "first-s")
	if firstPart > 0 {
		b.ReportMetric(float64(firstPart.Milliseconds()), "first-part-ms")
	}
}

// BenchmarkLargeAmplitudeSlice: later amplitude time slices of the large
// file, the file evicted before each.
func BenchmarkLargeAmplitudeSlice(b *testing.B) { largeSlices(b, "amplitude", false) }

// BenchmarkLargeAmplitudeSliceColdStore: the same with the volume's own
// store evicted too (as if it were larger than the page cache as well).
func BenchmarkLargeAmplitudeSliceColdStore(b *testing.B) { largeSlices(b, "amplitude", true) }

// BenchmarkLargeEnvelopeSlice: later envelope time slices of the large
// file; first-s is the whole volume's computation.
func BenchmarkLargeEnvelopeSlice(b *testing.B) { largeSlices(b, "envelope", false) }
