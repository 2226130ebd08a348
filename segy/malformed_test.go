package segy

import (
	"bytes"
	"encoding/binary"
	"math"
	"math/rand/v2"
	"os"
	"runtime"
	"strings"
	"testing"
	"time"
)

func base3D() synthFile {
	return synthFile{format: 5, samples: 8, interval: 4000, trSamples: -1, trIntvl: -1,
		traces: grid3D(seq(1, 3, 1), seq(10, 13, 1), 8)}
}

// TestMalformedFiles is the bad-input suite: every case is generated here
// and has one expected behaviour, an error naming what was read and where,
// or an open file with the stated warning.
func TestMalformedFiles(t *testing.T) {
	good := base3D().bytes()
	traceSize := 240 + 8*4
	pngHeader := []byte("\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR")
	rng := rand.New(rand.NewPCG(7, 8))
	random := make([]byte, 9000)
	for i := range random {
		random[i] = byte(rng.Uint32())
	}
	cases := []struct {
		name    string
		data    func() []byte
		opt     Options
		wantErr string // substring of the error; "" = must open
		check   func(t *testing.T, f *File)
	}{
		{"empty file", func() []byte { return nil }, Options{}, "truncated inside the 3200-byte textual header", nil},
		{"truncated in textual header", func() []byte { return good[:1000] }, Options{}, "truncated inside the 3200-byte textual header", nil},
		{"truncated in binary header", func() []byte { return good[:3300] }, Options{}, "ends inside the binary header", nil},
		{"truncated in first trace header", func() []byte { return good[:3600+100] }, Options{}, "byte 3601: file ends 100 bytes into the first trace", nil},
		{"truncated mid-trace", func() []byte { return good[:3600+3*traceSize+50] }, Options{}, "trace 3: byte 4417: file ends 50 bytes into trace 3", nil},
		{"truncated mid-trace, partial tail allowed", func() []byte { return good[:3600+3*traceSize+50] }, Options{IgnorePartialTrace: true}, "",
			func(t *testing.T, f *File) {
				if f.Info().Traces != 3 || !hasWarning(f.Info(), "partial trace ignored") {
					t.Errorf("traces %d warnings %q", f.Info().Traces, f.Info().Warnings)
				}
			}},
		{"trailing bytes not a whole trace", func() []byte { return append(slicesClone(good), 1, 2, 3) }, Options{}, "file ends 3 bytes into trace 12", nil},
		{"sample count 0", func() []byte {
			s := base3D()
			s.samples, s.trSamples = 0, 0
			b := s.bytes()
			return append(b, make([]byte, 64)...)
		}, Options{}, "byte 3221: sample count 0 in the binary header and in the first trace header (byte 3715)", nil},
		{"sample count absurdly large", func() []byte {
			b := slicesClone(good)
			binary.BigEndian.PutUint16(b[3220:], 60000)
			binary.BigEndian.PutUint16(b[3600+114:], 60000)
			return b
		}, Options{}, "file ends 3264 bytes into the first trace: a trace is 240240 bytes", nil},
		{"unknown format code", func() []byte {
			s := base3D()
			s.format = 17
			return s.bytes()
		}, Options{}, "byte 3225: unknown sample format 17", nil},
		{"obsolete format 4", func() []byte {
			b := slicesClone(good)
			binary.BigEndian.PutUint16(b[3224:], 4)
			return b
		}, Options{}, "byte 3225: sample format 4", nil},
		{"little-endian without byte-order word", func() []byte {
			s := base3D()
			s.order = binary.LittleEndian
			return s.bytes()
		}, Options{}, "", func(t *testing.T, f *File) {
			checkGrid(t, f, 3, 4)
			if f.Info().ByteOrder != "little" {
				t.Error("not detected as little-endian")
			}
		}},
		{"rev 2 byte-order word, little-endian", func() []byte {
			s := base3D()
			s.order, s.byteOrderWord, s.revision = binary.LittleEndian, true, [2]byte{2, 0}
			return s.bytes()
		}, Options{}, "", func(t *testing.T, f *File) {
			checkGrid(t, f, 3, 4)
			if f.Info().Revision != "2.0" {
				t.Errorf("revision %q", f.Info().Revision)
			}
		}},
		{"pairwise byte-swapped word", func() []byte {
			b := slicesClone(good)
			copy(b[3296:], []byte{2, 1, 4, 3})
			return b
		}, Options{}, "byte 3297: byte-order word 0x02010403", nil},
		{"extended header count past the end", func() []byte {
			b := slicesClone(good)
			binary.BigEndian.PutUint16(b[3504:], 500)
			return b
		}, Options{}, "byte 3505: 500 extended textual headers need", nil},
		{"extended header count -1 without end stanza", func() []byte {
			s := base3D()
			s.extCount = -1
			s.extBlocks = []string{"((SEG: SOMETHING))"}
			return s.bytes()
		}, Options{}, "byte 3505: extended textual header count -1: no ((SEG: EndText)) stanza", nil},
		{"extended header count -1 with end stanza", func() []byte {
			s := base3D()
			s.extCount = -1
			s.extBlocks = []string{"((SEG: Processing ver 1.0))\nFREE TEXT", "((SEG: EndText))"}
			return s.bytes()
		}, Options{}, "", func(t *testing.T, f *File) {
			checkGrid(t, f, 3, 4)
			if n := len(f.Info().TextHeaders); n != 3 {
				t.Errorf("%d textual headers, want 3", n)
			}
		}},
		{"negative interval in binary header", func() []byte {
			s := base3D()
			s.interval, s.trIntvl = -4000, 2000
			return s.bytes()
		}, Options{}, "", func(t *testing.T, f *File) {
			if f.Info().IntervalUS != 2000 || !hasWarning(f.Info(), "binary header interval is -4000 (byte 3217)") {
				t.Errorf("interval %d warnings %q", f.Info().IntervalUS, f.Info().Warnings)
			}
		}},
		{"zero interval everywhere", func() []byte {
			s := base3D()
			s.interval, s.trIntvl = 0, 0
			return s.bytes()
		}, Options{}, "", func(t *testing.T, f *File) {
			if f.Info().IntervalUS != 0 || !hasWarning(f.Info(), "interval unknown") {
				t.Errorf("interval %d warnings %q", f.Info().IntervalUS, f.Info().Warnings)
			}
		}},
		{"disagreeing intervals", func() []byte {
			s := base3D()
			s.trIntvl = 2000
			return s.bytes()
		}, Options{}, "", func(t *testing.T, f *File) {
			if f.Info().IntervalUS != 4000 || !hasWarning(f.Info(), "binary header interval 4000 disagrees with trace headers 2000") {
				t.Errorf("interval %d warnings %q", f.Info().IntervalUS, f.Info().Warnings)
			}
		}},
		{"disagreeing sample counts, trace header fits", func() []byte {
			s := base3D()
			b := s.bytes()
			binary.BigEndian.PutUint16(b[3220:], 50)
			return b
		}, Options{}, "", func(t *testing.T, f *File) {
			checkGrid(t, f, 3, 4)
			if !hasWarning(f.Info(), "binary header sample count 50 (byte 3221) disagrees with the first trace header's 8 (byte 3715): using 8") {
				t.Errorf("warnings %q", f.Info().Warnings)
			}
		}},
		{"all-zero traces", func() []byte {
			s := base3D()
			for i := range s.traces {
				s.traces[i].values = nil
			}
			return s.bytes()
		}, Options{}, "", func(t *testing.T, f *File) {
			in := f.Info()
			if in.AmplitudeMin != 0 || in.AmplitudeMax != 0 || in.AmplitudeRMS != 0 {
				t.Errorf("amplitudes %v %v %v", in.AmplitudeMin, in.AmplitudeMax, in.AmplitudeRMS)
			}
		}},
		{"NaN and Inf samples", func() []byte {
			s := base3D()
			s.traces[2].values[3] = math.NaN()
			s.traces[5].values[0] = math.Inf(-1)
			return s.bytes()
		}, Options{}, "", func(t *testing.T, f *File) {
			if !hasWarning(f.Info(), "2 NaN or infinite samples") {
				t.Errorf("warnings %q", f.Info().Warnings)
			}
			if f.Info().AmplitudeMax != valueRule(3, 13, 7) && math.Abs(f.Info().AmplitudeMax-valueRule(3, 13, 7)) > 1e-5 {
				t.Errorf("max %v", f.Info().AmplitudeMax)
			}
		}},
		{"duplicate inline/crossline pairs", func() []byte {
			s := base3D()
			s.traces = append(s.traces, s.traces[4], s.traces[5])
			return s.bytes()
		}, Options{}, "", func(t *testing.T, f *File) {
			if f.Info().DuplicateTraces != 2 || !hasWarning(f.Info(), "2 duplicate traces") {
				t.Errorf("duplicates %d warnings %q", f.Info().DuplicateTraces, f.Info().Warnings)
			}
			if i, _ := f.TraceIndex(2, 10, 0); i != 4 {
				t.Errorf("duplicate lookup gave trace %d, want the first (4)", i)
			}
		}},
		{"unsorted traces", func() []byte {
			s := base3D()
			rng := rand.New(rand.NewPCG(3, 4))
			rng.Shuffle(len(s.traces), func(i, j int) { s.traces[i], s.traces[j] = s.traces[j], s.traces[i] })
			return s.bytes()
		}, Options{}, "", func(t *testing.T, f *File) {
			checkGrid(t, f, 3, 4)
			if !hasWarning(f.Info(), "sorted neither by inline nor by crossline") {
				t.Errorf("warnings %q", f.Info().Warnings)
			}
		}},
		{"missing traces", func() []byte {
			s := base3D()
			s.traces = append(s.traces[:5], s.traces[7:]...)
			return s.bytes()
		}, Options{}, "", func(t *testing.T, f *File) {
			if f.Info().MissingTraces != 2 || f.InlineTraces(2, 0)[1] != -1 {
				t.Errorf("missing %d, inline 2 %v", f.Info().MissingTraces, f.InlineTraces(2, 0))
			}
			sl, _ := f.TimeSlice(0, 0)
			if !math.IsNaN(float64(sl[1][1])) || !math.IsNaN(float64(sl[1][2])) || math.IsNaN(float64(sl[1][3])) {
				t.Errorf("time slice row %v", sl[1])
			}
		}},
		{"sparse numbering", func() []byte {
			s := base3D()
			s.traces[0].il = 1000000
			return s.bytes()
		}, Options{}, "", func(t *testing.T, f *File) {
			if f.Info().Layout != LayoutUnstructured {
				t.Errorf("layout %s", f.Info().Layout)
			}
			if i, ok := f.TraceIndex(1000000, 10, 0); !ok || i != 0 {
				t.Errorf("TraceIndex = %d %v", i, ok)
			}
		}},
		{"numbering at the int32 extremes", func() []byte {
			// regression: the grid size product overflowed (found by FuzzTraceHeaders)
			s := base3D()
			s.traces[0].il, s.traces[0].xl = math.MinInt32, math.MinInt32
			s.traces[1].il, s.traces[1].xl = math.MaxInt32, math.MaxInt32
			return s.bytes()
		}, Options{}, "", func(t *testing.T, f *File) {
			if f.Info().Layout != LayoutUnstructured || f.Info().Inline.Count != 1<<32 {
				t.Errorf("layout %s inline %+v", f.Info().Layout, f.Info().Inline)
			}
		}},
		{"PNG image", func() []byte { return append(slicesClone(pngHeader), random[:5000]...) }, Options{}, "unknown sample format", nil},
		{"random bytes", func() []byte { return random }, Options{}, "unknown sample format", nil},
		{"bad option", func() []byte { return good }, Options{InlineByte: 239}, "option InlineByte = 239", nil},
		{"bad byte order option", func() []byte { return good }, Options{ByteOrder: "middle"}, "option ByteOrder", nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			start := time.Now()
			data := c.data()
			for _, via := range []string{"mmap", "readat"} {
				var f *File
				var err error
				if via == "mmap" {
					f, err = Open(writeTemp(t, data), c.opt)
				} else {
					f, err = OpenReaderAt(bytes.NewReader(data), int64(len(data)), "mem.sgy", c.opt)
				}
				if c.wantErr != "" {
					if err == nil {
						f.Close()
						t.Fatalf("%s: opened, want error containing %q", via, c.wantErr)
					}
					if !strings.Contains(err.Error(), c.wantErr) {
						t.Fatalf("%s: error %q, want it to contain %q", via, err, c.wantErr)
					}
					continue
				}
				if err != nil {
					t.Fatalf("%s: %v", via, err)
				}
				if c.check != nil {
					c.check(t, f)
				}
				exerciseAll(t, f)
				f.Close()
			}
			if d := time.Since(start); d > time.Second {
				t.Errorf("took %v", d)
			}
		})
	}
}

func TestOpenDirectory(t *testing.T) {
	_, err := Open(t.TempDir(), Options{})
	if err == nil || !strings.Contains(err.Error(), "is a directory") {
		t.Fatalf("error %v", err)
	}
	if _, err := Open("/nonexistent/file.sgy", Options{}); err == nil || !os.IsNotExist(err) {
		t.Fatalf("missing file error %v", err)
	}
}

func slicesClone(b []byte) []byte { return append([]byte(nil), b...) }

// checkGrid verifies the README value rule over an inline-sorted grid of
// inlines 1..nil_ and crosslines 10..10+nxl-1 built by base3D.
func checkGrid(t *testing.T, f *File, nil_, nxl int) {
	t.Helper()
	in := f.Info()
	if in.Inline.Count != nil_ || in.Crossline.Count != nxl {
		t.Fatalf("grid %+v x %+v", in.Inline, in.Crossline)
	}
	var buf []float32
	for il := 1; il <= nil_; il++ {
		for j, tr := range f.InlineTraces(il, 0) {
			var err error
			if buf, err = f.ReadTrace(tr, buf); err != nil {
				t.Fatal(err)
			}
			for k, v := range buf {
				if w := float32(valueRule(il, 10+j, k)); v != w {
					t.Fatalf("(%d,%d) sample %d = %v, want %v", il, 10+j, k, v, w)
				}
			}
		}
	}
}

// exerciseAll reads every trace, header, line and slice: none may panic.
func exerciseAll(t *testing.T, f *File) {
	t.Helper()
	in := f.Info()
	var buf []float32
	for i := 0; i < in.Traces; i++ {
		if _, err := f.ReadTrace(i, buf); err != nil {
			t.Fatal(err)
		}
		if _, err := f.TraceHeader(i); err != nil {
			t.Fatal(err)
		}
	}
	for il := in.Inline.Min; il <= in.Inline.Max && in.Inline.Count > 0 && il-in.Inline.Min < 64*in.Inline.Step; il += max(1, in.Inline.Step) {
		f.InlineTraces(il, 0)
	}
	f.CrosslineTraces(in.Crossline.Min, 0)
	if in.Samples > 0 {
		f.TimeSlice(in.Samples-1, 0)
	}
	f.TraceIndex(in.Inline.Min, in.Crossline.Max, 0)
	f.ReadTrace(-1, nil)
	f.ReadTrace(in.Traces, nil)
}

// Headers claiming huge sizes must fail fast without allocating for them
// (issue: allocation follows the real file size only).
func TestHugeClaimsDoNotAllocate(t *testing.T) {
	cases := []struct {
		name string
		edit func(b []byte)
		want string
	}{
		{"rev 2 extended sample count 2e9", func(b []byte) {
			b[3500], b[3501] = 2, 0                          // SEG-Y rev 2.0: bytes 3501-3502 revision
			binary.BigEndian.PutUint32(b[3268:], 2000000000) // bytes 3269-3272 extended samples per trace
		}, "using 8"}, // the trace headers' count divides the file: opens with a warning
		{"rev 2 extended sample count 2e9 in every header", func(b []byte) {
			b[3500], b[3501] = 2, 0
			binary.BigEndian.PutUint32(b[3268:], 2000000000)
			binary.BigEndian.PutUint16(b[3600+114:], 0)
		}, "file ends"},
		{"65535 samples of 8 bytes", func(b []byte) {
			binary.BigEndian.PutUint16(b[3220:], 65535)
			binary.BigEndian.PutUint16(b[3224:], 6)
			binary.BigEndian.PutUint16(b[3600+114:], 65535)
		}, "file ends"},
		{"32767 extended textual headers", func(b []byte) {
			binary.BigEndian.PutUint16(b[3504:], 32767)
		}, "32767 extended textual headers need"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			b := base3D().bytes()
			c.edit(b)
			var before, after runtime.MemStats
			runtime.ReadMemStats(&before)
			f, err := openBytes(b, "huge.sgy", Options{})
			runtime.ReadMemStats(&after)
			switch {
			case err == nil && !hasWarning(f.Info(), c.want):
				t.Fatalf("opened with warnings %q, want %q", f.Info().Warnings, c.want)
			case err != nil && !strings.Contains(err.Error(), c.want):
				t.Fatalf("error %v, want %q", err, c.want)
			}
			if d := after.TotalAlloc - before.TotalAlloc; d > 1<<20 {
				t.Errorf("allocated %d bytes for a %d-byte file", d, len(b))
			}
		})
	}
}
