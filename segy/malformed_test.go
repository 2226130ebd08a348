package segy

import (
	"bytes"
	"errors"
	"math"
	"os"
	"runtime"
	"slices"
	"strings"
	"testing"
	"time"

	"quadtrace/segy/segytest"
)

// malformedChecks holds what must hold beyond the expected warning for the
// usable cases of segytest.Malformed, by case name.
var malformedChecks = map[string]func(t *testing.T, f *File){
	"disagreeing sample counts": func(t *testing.T, f *File) { checkGrid(t, f, 3, 4) },
	"rev 2 extended sample count 2e9": func(t *testing.T, f *File) {
		if f.Info().Samples != 8 || f.Info().Traces != segytest.BaseTraces {
			t.Errorf("samples %d traces %d", f.Info().Samples, f.Info().Traces)
		}
	},
	"rev 2 trace count 5e9": func(t *testing.T, f *File) { checkGrid(t, f, 3, 4) },
	"negative interval in binary header": func(t *testing.T, f *File) {
		if f.Info().IntervalUS != 2000 {
			t.Errorf("interval %d, want the trace headers' 2000", f.Info().IntervalUS)
		}
	},
	"negative interval in trace headers": func(t *testing.T, f *File) {
		if f.Info().IntervalUS != 4000 {
			t.Errorf("interval %d, want the binary header's 4000", f.Info().IntervalUS)
		}
	},
	"negative interval in binary and trace headers": func(t *testing.T, f *File) {
		if f.Info().IntervalUS != 0 {
			t.Errorf("interval %d, want 0 (unknown)", f.Info().IntervalUS)
		}
	},
	"zero interval everywhere": func(t *testing.T, f *File) {
		if f.Info().IntervalUS != 0 {
			t.Errorf("interval %d, want 0 (unknown)", f.Info().IntervalUS)
		}
	},
	"disagreeing intervals": func(t *testing.T, f *File) {
		if f.Info().IntervalUS != 4000 {
			t.Errorf("interval %d, want the binary header's 4000", f.Info().IntervalUS)
		}
	},
	"little-endian without byte-order word": func(t *testing.T, f *File) {
		checkGrid(t, f, 3, 4)
		if f.Info().ByteOrder != "little" {
			t.Error("not detected as little-endian")
		}
	},
	"rev 2 little-endian with byte-order word": func(t *testing.T, f *File) {
		checkGrid(t, f, 3, 4)
		if f.Info().Revision != "2.0" || f.Info().ByteOrder != "little" {
			t.Errorf("revision %q order %s", f.Info().Revision, f.Info().ByteOrder)
		}
	},
	"extended header count -1 with end stanza": func(t *testing.T, f *File) {
		checkGrid(t, f, 3, 4)
		if n := len(f.Info().TextHeaders); n != 3 {
			t.Errorf("%d textual headers, want 3", n)
		}
	},
	"all-zero traces": func(t *testing.T, f *File) {
		in := f.Info()
		if in.AmplitudeMin != 0 || in.AmplitudeMax != 0 || in.AmplitudeRMS != 0 {
			t.Errorf("amplitudes %v %v %v", in.AmplitudeMin, in.AmplitudeMax, in.AmplitudeRMS)
		}
	},
	"NaN and Inf samples": func(t *testing.T, f *File) {
		if math.Abs(f.Info().AmplitudeMax-valueRule(3, 13, 7)) > 1e-5 {
			t.Errorf("max %v", f.Info().AmplitudeMax)
		}
		tr, _ := f.ReadTrace(2, nil)
		if !math.IsNaN(float64(tr[3])) {
			t.Errorf("trace 2 sample 3 = %v, want NaN kept", tr[3])
		}
		tr, _ = f.ReadTrace(5, nil)
		if !math.IsInf(float64(tr[0]), -1) {
			t.Errorf("trace 5 sample 0 = %v, want -Inf kept", tr[0])
		}
	},
	"duplicate inline/crossline pairs": func(t *testing.T, f *File) {
		if f.Info().DuplicateTraces != 2 {
			t.Errorf("duplicates %d", f.Info().DuplicateTraces)
		}
		if i, _ := f.TraceIndex(2, 10, 0); i != 4 {
			t.Errorf("duplicate lookup gave trace %d, want the first (4)", i)
		}
	},
	"unsorted traces": func(t *testing.T, f *File) { checkGrid(t, f, 3, 4) },
	"missing traces": func(t *testing.T, f *File) {
		if f.Info().MissingTraces != 2 || f.InlineTraces(2, 0)[1] != -1 {
			t.Errorf("missing %d, inline 2 %v", f.Info().MissingTraces, f.InlineTraces(2, 0))
		}
		sl, _ := f.TimeSlice(0, 0)
		if !math.IsNaN(float64(sl[1][1])) || !math.IsNaN(float64(sl[1][2])) || math.IsNaN(float64(sl[1][3])) {
			t.Errorf("time slice row %v", sl[1])
		}
	},
	"sparse numbering": func(t *testing.T, f *File) {
		// one trace far off: left out of the 3 x 4 grid, reported
		in := f.Info()
		want := []Outlier{{Trace: 0, Field: "inline", Value: 1000000, Byte: 189, FileByte: 3600 + 189}}
		if in.Layout != Layout3DInlineSorted || in.Inline != (Range{1, 3, 1, 3}) || !slices.Equal(in.Outliers, want) || in.MissingTraces != 1 {
			t.Errorf("layout %s inline %+v outliers %+v missing %d", in.Layout, in.Inline, in.Outliers, in.MissingTraces)
		}
		if _, ok := f.TraceIndex(1000000, 10, 0); ok {
			t.Error("the outlier is in the grid")
		}
		if in.HeaderInline.Max != 1000000 {
			t.Errorf("header inlines %+v", in.HeaderInline)
		}
	},
	"numbering at the int32 extremes": func(t *testing.T, f *File) {
		// regression: the grid size product overflowed (found by FuzzTraceHeaders)
		in := f.Info()
		if in.Layout != Layout3DInlineSorted || in.Inline.Count != 3 || in.OutlierTraces != 2 || in.MissingTraces != 2 {
			t.Errorf("layout %s inline %+v outliers %+v", in.Layout, in.Inline, in.Outliers)
		}
	},
	"flipped byte in one crossline": func(t *testing.T, f *File) {
		in := f.Info()
		if in.Layout != Layout3DInlineSorted || in.Crossline != (Range{10, 13, 1, 4}) || in.OutlierTraces != 1 ||
			in.Outliers[0].Field != "crossline" || in.Outliers[0].FileByte != 3600+5*segytest.BaseTraceSize+193 {
			t.Errorf("layout %s crossline %+v outliers %+v", in.Layout, in.Crossline, in.Outliers)
		}
	},
	"garbage numbering everywhere": func(t *testing.T, f *File) {
		in := f.Info()
		if in.Layout != LayoutUnstructured || in.Inline != (Range{0, 0, 1, 1}) || in.Crossline.Count != in.Traces {
			t.Errorf("layout %s inline %+v crossline %+v", in.Layout, in.Inline, in.Crossline)
		}
		for i := 0; i < in.Traces; i++ {
			if j, ok := f.TraceIndex(0, i+1, 0); !ok || j != i {
				t.Fatalf("position %d: trace %d %v", i+1, j, ok)
			}
		}
	},
	"headers only": func(t *testing.T, f *File) {
		if f.Info().Traces != 0 || f.Info().Layout != LayoutEmpty {
			t.Errorf("traces %d layout %s", f.Info().Traces, f.Info().Layout)
		}
	},
}

// TestMalformedFiles runs the bad-input suite of segytest.Malformed through
// both reading paths (the mapping and ReadAt): every case has one expected
// behaviour, an *Error naming what was read and where (message, trace and
// byte), or an open file with the stated warning.
func TestMalformedFiles(t *testing.T) {
	names := map[string]bool{}
	for _, c := range segytest.Malformed() {
		names[c.Name] = true
		t.Run(c.Name, func(t *testing.T) {
			start := time.Now()
			path, err := c.Create(t.TempDir())
			if err != nil {
				t.Fatal(err)
			}
			vias := []string{"mmap", "readat"}
			if c.Special() {
				vias = vias[:1]
			}
			for _, via := range vias {
				var f *File
				if via == "mmap" {
					f, err = Open(path, Options{})
				} else {
					f, err = OpenReaderAt(bytes.NewReader(c.Bytes), int64(len(c.Bytes)), path, Options{})
				}
				if !c.Expect.Usable() {
					if err == nil {
						f.Close()
						t.Fatalf("%s: opened, want error containing %q", via, c.Expect.Err)
					}
					checkCaseError(t, via, err, c.Expect)
					continue
				}
				if err != nil {
					t.Fatalf("%s: %v", via, err)
				}
				if c.Expect.Warning != "" && !hasWarning(f.Info(), c.Expect.Warning) {
					t.Errorf("%s: warnings %q, want one containing %q", via, f.Info().Warnings, c.Expect.Warning)
				}
				if check := malformedChecks[c.Name]; check != nil {
					check(t, f)
				}
				exerciseAll(t, f)
				f.Close()
			}
			if d := time.Since(start); d > time.Second {
				t.Errorf("took %v", d)
			}
		})
	}
	for name := range malformedChecks {
		if !names[name] {
			t.Errorf("check for %q: no such case in segytest.Malformed", name)
		}
	}
}

// checkCaseError checks err against an error expectation: the message, one
// line, and the trace and byte of the *Error.
func checkCaseError(t *testing.T, via string, err error, want segytest.Expect) {
	t.Helper()
	if !strings.Contains(err.Error(), want.Err) {
		t.Fatalf("%s: error %q, want it to contain %q", via, err, want.Err)
	}
	if strings.Contains(err.Error(), "\n") {
		t.Errorf("%s: error is more than one line: %q", via, err)
	}
	var se *Error
	if !errors.As(err, &se) {
		t.Fatalf("%s: error %q is a %T, not a *segy.Error", via, err, err)
	}
	if se.Trace != want.Trace || se.Byte != want.Byte {
		t.Errorf("%s: error at trace %d byte %d, want trace %d byte %d (%v)", via, se.Trace, se.Byte, want.Trace, want.Byte, err)
	}
}

// TestMalformedWithOptions covers the cases whose behaviour depends on
// Options.
func TestMalformedWithOptions(t *testing.T) {
	good := base3D().Bytes()
	const ts = segytest.BaseTraceSize
	cases := []struct {
		name    string
		data    []byte
		opt     Options
		wantErr string // substring of the error; "" = must open
		check   func(t *testing.T, f *File)
	}{
		{"truncated mid-trace, partial tail allowed", good[:3600+3*ts+50], Options{IgnorePartialTrace: true}, "",
			func(t *testing.T, f *File) {
				if f.Info().Traces != 3 || !hasWarning(f.Info(), "partial trace ignored") {
					t.Errorf("traces %d warnings %q", f.Info().Traces, f.Info().Warnings)
				}
			}},
		{"bad option", good, Options{InlineByte: 239}, "option InlineByte = 239", nil},
		{"bad byte order option", good, Options{ByteOrder: "middle"}, "option ByteOrder", nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			for _, via := range []string{"mmap", "readat"} {
				var f *File
				var err error
				if via == "mmap" {
					f, err = Open(writeTemp(t, c.data), c.opt)
				} else {
					f, err = OpenReaderAt(bytes.NewReader(c.data), int64(len(c.data)), "mem.sgy", c.opt)
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
				c.check(t, f)
				exerciseAll(t, f)
				f.Close()
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

// TestShortReads: a reader that delivers fewer bytes than the size it was
// opened with (a file cut short after Open measured it) gives an error
// naming the trace, never stale or zero samples.
func TestShortReads(t *testing.T) {
	good := base3D().Bytes()
	const ts = segytest.BaseTraceSize
	claimed := int64(len(good) + 2*ts) // two traces more than the reader holds
	_, err := OpenReaderAt(bytes.NewReader(good), claimed, "shrunk.sgy", Options{})
	if err == nil || !strings.Contains(err.Error(), "trace 12") || !strings.Contains(err.Error(), "EOF") {
		t.Fatalf("error %v, want one about trace 12 and the early end of data", err)
	}
	// Reading after the geometry scan: the reader loses the last trace.
	var r cutReader
	r.data = good
	f, err := OpenReaderAt(&r, int64(len(good)), "shrinking.sgy", Options{})
	if err != nil {
		t.Fatal(err)
	}
	r.data = good[:len(good)-100]
	if _, err := f.ReadTrace(segytest.BaseTraces-1, nil); err == nil {
		t.Fatal("read a trace past the end of the data without error")
	}
	if _, err := f.ReadTrace(0, nil); err != nil {
		t.Fatal(err)
	}
}

type cutReader struct{ data []byte }

func (r *cutReader) ReadAt(p []byte, off int64) (int, error) {
	return bytes.NewReader(r.data).ReadAt(p, off)
}

func slicesClone(b []byte) []byte { return append([]byte(nil), b...) }

// checkGrid verifies the corpus value rule over an inline-sorted grid of
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

// hugeAllocBound is the most Open may allocate for a file of size bytes
// whose headers claim far more: a small multiple of the real size plus a
// fixed allowance for the geometry index and the amplitude sample.
func hugeAllocBound(size int) uint64 { return 8*uint64(size) + 64<<10 }

// Headers claiming huge sizes (segytest cases marked HugeClaim) must not
// make Open allocate for them: allocation follows the real file size only
// (issue: resource limits).
func TestHugeClaimsDoNotAllocate(t *testing.T) {
	n := 0
	for _, c := range segytest.Malformed() {
		if !c.Expect.HugeClaim {
			continue
		}
		n++
		t.Run(c.Name, func(t *testing.T) {
			for _, via := range []string{"mapped", "readat"} {
				var before, after runtime.MemStats
				runtime.ReadMemStats(&before)
				var f *File
				var err error
				if via == "mapped" {
					f, err = openBytes(c.Bytes, "huge.sgy", Options{})
				} else {
					f, err = OpenReaderAt(bytes.NewReader(c.Bytes), int64(len(c.Bytes)), "huge.sgy", Options{})
				}
				runtime.ReadMemStats(&after)
				switch {
				case c.Expect.Usable() && err != nil:
					t.Fatalf("%s: %v", via, err)
				case c.Expect.Usable() && c.Expect.Warning != "" && !hasWarning(f.Info(), c.Expect.Warning):
					t.Fatalf("%s: opened with warnings %q, want %q", via, f.Info().Warnings, c.Expect.Warning)
				case !c.Expect.Usable() && err == nil:
					t.Fatalf("%s: opened, want error %q", via, c.Expect.Err)
				case !c.Expect.Usable():
					checkCaseError(t, via, err, c.Expect)
				}
				d := after.TotalAlloc - before.TotalAlloc
				t.Logf("%s: allocated %d bytes for a %d-byte file", via, d, len(c.Bytes))
				if d > hugeAllocBound(len(c.Bytes)) {
					t.Errorf("%s: allocated %d bytes for a %d-byte file (bound %d)", via, d, len(c.Bytes), hugeAllocBound(len(c.Bytes)))
				}
			}
		})
	}
	if n < 5 {
		t.Fatalf("only %d huge-claim cases in segytest.Malformed", n)
	}
}
