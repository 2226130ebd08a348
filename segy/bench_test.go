package segy

import (
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"quadtrace/segy/segytest"
	"testing"
)

// Benchmark volume: 400 inlines x 320 crosslines x 1000 samples of 4-byte
// IBM floats (the most common post-stack format, common practice), 4240
// bytes a trace, 542.7 MB. Generated once under os.TempDir() with a stable
// name and reused; only `go test -bench` builds it.
const (
	benchInlines, benchCrosslines, benchSamples = 400, 320, 1000
	benchTraceSize                              = 240 + 4*benchSamples
	benchSize                                   = 3600 + benchInlines*benchCrosslines*benchTraceSize
)

func benchVolume(b *testing.B) string {
	b.Helper()
	p := filepath.Join(os.TempDir(), "quadtrace-segy-bench-v1.sgy")
	if st, err := os.Stat(p); err == nil && st.Size() == benchSize {
		return p
	}
	b.Logf("generating %s (%.1f MB)", p, float64(benchSize)/1e6)
	w, err := createNewFile(p, NewSpec{Samples: benchSamples, IntervalUS: 2000, TextHeader: "C 1 QUADTRACE READ BENCHMARK VOLUME (INVENTED DATA)"}, WriteOptions{Format: 1})
	if err != nil {
		b.Fatal(err)
	}
	wave := make([]float32, benchSamples+benchInlines+benchCrosslines)
	for i := range wave {
		wave[i] = float32(math.Sin(float64(i)*0.07) * 1000)
	}
	for il := 0; il < benchInlines; il++ {
		for xl := 0; xl < benchCrosslines; xl++ {
			s := (il + xl) % (benchInlines + benchCrosslines)
			h := NewTraceHeader(1000+il, 2000+xl, 500000+12.5*float64(xl), 6000000+25*float64(il))
			if err := w.WriteTrace(h, wave[s:s+benchSamples]); err != nil {
				w.Abort()
				b.Fatal(err)
			}
		}
	}
	if err := w.Commit(); err != nil {
		b.Fatal(err)
	}
	return p
}

// BenchmarkVolumeRead reads inlines, crosslines and time slices of the
// 542.7 MB volume, next to `cat FILE > /dev/null` done in Go (io.Copy of
// the file to io.Discard). MB/s counts the file bytes of the traces
// covered (trace size x traces), so the "x-cat" metric is the speed of
// covering the volume relative to a plain sequential read in the same
// run. Warm page cache (the cat pass reads the whole file first).
//
//	go test -run '^$' -bench VolumeRead -benchtime 3x ./segy/   (or plain -bench)
func BenchmarkVolumeRead(b *testing.B) {
	path := benchVolume(b)
	var catMBs float64
	b.Run("cat", func(b *testing.B) {
		b.SetBytes(benchSize)
		for b.Loop() {
			fh, err := os.Open(path)
			if err != nil {
				b.Fatal(err)
			}
			if _, err := io.Copy(io.Discard, fh); err != nil {
				b.Fatal(err)
			}
			fh.Close()
		}
		catMBs = float64(benchSize) * float64(b.N) / b.Elapsed().Seconds() / 1e6
	})
	f, err := Open(path, Options{})
	if err != nil {
		b.Fatal(err)
	}
	defer f.Close()
	report := func(b *testing.B, tracesPerOp int) {
		sec := b.Elapsed().Seconds()
		b.ReportMetric(float64(tracesPerOp)*float64(b.N)/sec, "traces/s")
		mbs := float64(tracesPerOp) * benchTraceSize * float64(b.N) / sec / 1e6
		if catMBs > 0 {
			b.ReportMetric(mbs/catMBs, "x-cat")
		}
	}
	b.Run("inline", func(b *testing.B) {
		b.SetBytes(benchCrosslines * benchTraceSize)
		buf := make([]float32, benchSamples)
		n := 0
		for b.Loop() {
			for _, tr := range f.InlineTraces(1000+(n*37)%benchInlines, 0) {
				if buf, err = f.ReadTrace(tr, buf); err != nil {
					b.Fatal(err)
				}
			}
			n++
		}
		report(b, benchCrosslines)
	})
	b.Run("crossline", func(b *testing.B) {
		b.SetBytes(benchInlines * benchTraceSize)
		buf := make([]float32, benchSamples)
		n := 0
		for b.Loop() {
			for _, tr := range f.CrosslineTraces(2000+(n*37)%benchCrosslines, 0) {
				if buf, err = f.ReadTrace(tr, buf); err != nil {
					b.Fatal(err)
				}
			}
			n++
		}
		report(b, benchInlines)
	})
	b.Run("timeslice", func(b *testing.B) {
		b.SetBytes(benchInlines * benchCrosslines * benchTraceSize)
		n := 0
		for b.Loop() {
			if _, err := f.TimeSlice((n*131)%benchSamples, 0); err != nil {
				b.Fatal(err)
			}
			n++
		}
		report(b, benchInlines*benchCrosslines)
	})
}

// BenchmarkOpenVolume measures Open (header parse and the geometry scan of
// all 128,000 trace headers, plus the 1000-trace amplitude sample).
func BenchmarkOpenVolume(b *testing.B) {
	path := benchVolume(b)
	for b.Loop() {
		f, err := Open(path, Options{})
		if err != nil {
			b.Fatal(err)
		}
		f.Close()
	}
}

// BenchmarkReadTraceGuard measures what the read hold (RWMutex) and the
// memory-fault guard (debug.SetPanicOnFault around the mapped read) cost
// per trace: ReadTrace next to the same decode straight from the mapping
// without them, in one run; "x-bare" is guarded time over bare time.
// 4000 traces of 1000 IBM samples in a mapped temporary file, warm cache.
//
//	go test -run '^$' -bench ReadTraceGuard ./segy/
func BenchmarkReadTraceGuard(b *testing.B) {
	s := segytest.File{Format: 1, Samples: 1000, Interval: 2000, TraceSamples: segytest.SameAsBinary, TraceInterval: segytest.SameAsBinary,
		Traces: segytest.Grid3D(segytest.Seq(1, 40, 1), segytest.Seq(1, 100, 1), 1000)}
	path := filepath.Join(b.TempDir(), "guard.sgy")
	if err := os.WriteFile(path, s.Bytes(), 0o644); err != nil {
		b.Fatal(err)
	}
	f, err := Open(path, Options{})
	if err != nil {
		b.Fatal(err)
	}
	defer f.Close()
	if f.data == nil {
		b.Skip("not mapped")
	}
	n := f.Info().Traces
	buf := make([]float32, 1000)
	var bare float64
	b.Run("bare", func(b *testing.B) {
		i := 0
		for b.Loop() {
			off := f.dataStart + int64(i%n)*f.traceSize + f.hdrSize
			f.sf.decode(buf, f.data[off:off+4000], f.order)
			i++
		}
		bare = b.Elapsed().Seconds() / float64(b.N)
	})
	b.Run("guarded", func(b *testing.B) {
		i := 0
		for b.Loop() {
			if _, err := f.ReadTrace(i%n, buf); err != nil {
				b.Fatal(err)
			}
			i++
		}
		if bare > 0 {
			b.ReportMetric(b.Elapsed().Seconds()/float64(b.N)/bare, "x-bare")
		}
	})
}

// BenchmarkDecodeSavedIndex decodes the saved index of an 800 x 800 grid
// (the size of a 2 GB file of 751-sample traces), which every warm open
// of such a file pays before its first picture.
func BenchmarkDecodeSavedIndex(b *testing.B) {
	n := 800 * 800
	s := savedIndex{Version: savedVersion, Stamp: "bench", Size: 1 << 31,
		ILR: Range{Min: 1, Max: 800, Step: 1, Count: 800}, XLR: Range{Min: 1, Max: 800, Step: 1, Count: 800},
		Offsets: []int{0}, Grid: make([]int32, n), Probes: probeTraces(n)}
	for i := range s.Grid {
		s.Grid[i] = int32(i)
	}
	data, err := encodeSaved(s)
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		got, ok := decodeSaved(data)
		if !ok || len(got.Grid) != n || got.Grid[n-1] != int32(n-1) {
			b.Fatal("saved index did not decode")
		}
	}
}

// BenchmarkDecodeIEEE32 decodes big-endian 4-byte IEEE samples (format 5)
// with decodeIEEE32 and, in the same run, with the one-sample loop it
// replaced (decodeIEEE32Loop): one trace of 1501 samples decoded again and
// again (in cache: the cost of the loop) and 2500 such traces, 15 MB, one
// after the other (through memory: an export block).
//
//	go test -run '^$' -bench DecodeIEEE32 ./segy/
func BenchmarkDecodeIEEE32(b *testing.B) {
	const samples = 1501
	for _, traces := range []int{1, 2500} {
		src := make([]byte, traces*samples*4)
		for i := range src {
			src[i] = byte(i * 7)
		}
		dst := make([]float32, traces*samples)
		for _, c := range []struct {
			name   string
			decode func([]float32, []byte, binary.ByteOrder)
		}{{"words", decodeIEEE32}, {"loop", decodeIEEE32Loop}} {
			b.Run(fmt.Sprintf("%s/traces=%d", c.name, traces), func(b *testing.B) {
				b.SetBytes(int64(len(src)))
				for n := 0; n < b.N; n++ {
					for t := 0; t < traces; t++ {
						c.decode(dst[t*samples:(t+1)*samples], src[t*samples*4:(t+1)*samples*4], binary.BigEndian)
					}
				}
			})
		}
	}
}
