package segy

import (
	"encoding/json"
	"math"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"quadtrace/segy/segytest"
)

// Interoperability with Debian's python3-segyio 1.8.3, run through
// /usr/bin/python3 (never python3 on PATH) with the helper script
// testdata/segy/segyio_interop.py.

const (
	systemPython  = segytest.Python
	interopScript = "../testdata/segy/segyio_interop.py"
)

type segyioDump struct {
	Endian     string         `json:"endian"`
	Format     int            `json:"format"`
	Tracecount int            `json:"tracecount"`
	Samples    int            `json:"samples"`
	Bin        map[string]int `json:"bin"`
	Text       string         `json:"text"`
	Traces     []struct {
		Header map[string]int `json:"header"`
		Bits   []uint32       `json:"bits"`
	} `json:"traces"`
}

func runScript(t *testing.T, args ...string) []byte {
	t.Helper()
	cmd := exec.Command(systemPython, append([]string{interopScript}, args...)...)
	var stderr strings.Builder
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("%s %v: %v\n%s", interopScript, args, err, stderr.String())
	}
	return out
}

func segyioRead(t *testing.T, path string) segyioDump {
	t.Helper()
	var d segyioDump
	if err := json.Unmarshal(runScript(t, "dump", path), &d); err != nil {
		t.Fatal(err)
	}
	return d
}

var headerWidth = func() map[int]int {
	m := map[int]int{}
	for _, w := range traceHeaderWords {
		m[w[0]] = w[1]
	}
	return m
}()

// compareWithSegyio checks that quadtrace reads f exactly as segyio does:
// every trace header field segyio knows, every sample bit pattern, sample
// count, format, byte order and the textual header.
func compareWithSegyio(t *testing.T, f *File, d segyioDump) {
	t.Helper()
	in := f.Info()
	if in.Format != d.Format || in.Traces != d.Tracecount || in.Samples != d.Samples || in.ByteOrder != d.Endian {
		t.Fatalf("quadtrace format %d traces %d samples %d %s; segyio %d %d %d %s",
			in.Format, in.Traces, in.Samples, in.ByteOrder, d.Format, d.Tracecount, d.Samples, d.Endian)
	}
	if d.Bin["3217"] > 0 && in.IntervalUS != d.Bin["3217"] {
		t.Errorf("interval %d, segyio %d", in.IntervalUS, d.Bin["3217"])
	}
	// quadtrace blanks control characters (segyio 1.8.3 writes a stray
	// 0x20, an EBCDIC control code, as the last byte of its textual header).
	text := strings.Map(func(r rune) rune {
		if r < 0x20 || r > 0x7e {
			return ' '
		}
		return r
	}, d.Text)
	var lines []string
	for i := 0; i+80 <= len(text); i += 80 {
		lines = append(lines, strings.TrimRight(text[i:i+80], " "))
	}
	if got := strings.Join(lines, "\n"); got != in.TextHeaders[0] {
		t.Errorf("textual header differs:\nquadtrace %q\nsegyio    %q", in.TextHeaders[0], got)
	}
	var buf []float32
	for i, tr := range d.Traces {
		h, err := f.TraceHeader(i)
		if err != nil {
			t.Fatal(err)
		}
		for key, want := range tr.Header {
			pos, _ := strconv.Atoi(key)
			w, ok := headerWidth[pos]
			if !ok {
				t.Fatalf("segyio field at byte %d not in quadtrace's header table", pos)
			}
			if got := h.Int(pos, w); got != want {
				t.Errorf("trace %d byte %d: quadtrace %d, segyio %d", i, pos, got, want)
			}
		}
		if buf, err = f.ReadTrace(i, buf); err != nil {
			t.Fatal(err)
		}
		for k, bits := range tr.Bits {
			if math.Float32bits(buf[k]) != bits {
				t.Fatalf("trace %d sample %d: quadtrace %g, segyio %g", i, k, buf[k], math.Float32frombits(bits))
			}
		}
	}
}

func TestSegyioWritesQuadtraceReads(t *testing.T) {
	segytest.NeedPython(t, "segyio", "numpy")
	dir := t.TempDir()
	var manifest []struct {
		Name     string `json:"name"`
		Format   int    `json:"format"`
		Endian   string `json:"endian"`
		Prestack bool   `json:"prestack"`
	}
	if err := json.Unmarshal(runScript(t, "write", dir), &manifest); err != nil {
		t.Fatal(err)
	}
	if len(manifest) < 12 {
		t.Fatalf("manifest lists %d files", len(manifest))
	}
	for _, m := range manifest {
		t.Run(m.Name, func(t *testing.T) {
			p := filepath.Join(dir, m.Name)
			f := openT(t, p, Options{})
			in := f.Info()
			if in.Format != m.Format || in.ByteOrder != m.Endian {
				t.Fatalf("format %d order %s, segyio wrote %d %s", in.Format, in.ByteOrder, m.Format, m.Endian)
			}
			wantLayout, offs := Layout3DInlineSorted, 0
			if m.Prestack {
				wantLayout, offs = LayoutPrestack, 2
			}
			if in.Layout != wantLayout || len(in.Offsets) != offs || in.Inline != (Range{1, 3, 1, 3}) || in.Crossline != (Range{10, 13, 1, 4}) || in.StartMS != 12 {
				t.Errorf("layout %s offsets %v %+v %+v start %v", in.Layout, in.Offsets, in.Inline, in.Crossline, in.StartMS)
			}
			// scalar -100 divides: CDP X of xl 10 = (100000 + 25000) / 100
			if in.MinX != 1250 || in.InlineSpacingM != 25 || in.CrosslineSpacingM != 25 {
				t.Errorf("minX %v spacing %v %v", in.MinX, in.InlineSpacingM, in.CrosslineSpacingM)
			}
			compareWithSegyio(t, f, segyioRead(t, p))
		})
	}
}

func TestQuadtraceWritesSegyioReads(t *testing.T) {
	segytest.NeedPython(t, "segyio", "numpy")
	dir := t.TempDir()
	type written struct {
		path   string
		values [][]float32 // what we asked to write, per trace
		format int
	}
	var files []written
	// From scratch, both output formats.
	for _, format := range []int{1, 5} {
		p := filepath.Join(dir, "new-"+strconv.Itoa(format)+".sgy")
		w, err := createNewFile(p, NewSpec{Samples: 9, IntervalUS: 2000, StartMS: 48, TextHeader: "C 1 INVENTED SURVEY FOR AN INTEROPERABILITY CHECK"}, WriteOptions{Format: format})
		if err != nil {
			t.Fatal(err)
		}
		var vals [][]float32
		for il := 5; il <= 7; il++ {
			for xl := 20; xl <= 26; xl += 2 {
				tr := make([]float32, 9)
				for k := range tr {
					tr[k] = float32(math.Sin(float64(il*xl+k))*1e3) / 7
				}
				tr[0] = -118.625
				if err := w.WriteTrace(NewTraceHeader(il, xl, 431000.5+12.5*float64(xl), 6780000.25+25*float64(il)), tr); err != nil {
					t.Fatal(err)
				}
				vals = append(vals, tr)
			}
		}
		if err := w.Commit(); err != nil {
			t.Fatal(err)
		}
		files = append(files, written{p, vals, format})
	}
	// Copies of little-endian inputs (corpus and segyio-written) to big-endian IEEE and IBM.
	for _, format := range []int{1, 5} {
		src := openT(t, segytest.CorpusFile(t, "small-lsb.sgy"), Options{})
		p := filepath.Join(dir, "copy-lsb-"+strconv.Itoa(format)+".sgy")
		copyVolume(t, src, p, WriteOptions{Format: format})
		var vals [][]float32
		for i := 0; i < src.Info().Traces; i++ {
			v, _ := src.ReadTrace(i, nil)
			vals = append(vals, v)
		}
		files = append(files, written{p, vals, format})
	}
	for _, wf := range files {
		t.Run(filepath.Base(wf.path), func(t *testing.T) {
			f := openT(t, wf.path, Options{})
			d := segyioRead(t, wf.path)
			compareWithSegyio(t, f, d)
			// segyio sees what we meant to write (IBM: after IBM rounding).
			for i, tr := range d.Traces {
				for k, bits := range tr.Bits {
					want := wf.values[i][k]
					if wf.format == 1 {
						want = IBMToFloat32(Float32ToIBM(want))
					}
					if math.Float32bits(want) != bits {
						t.Fatalf("trace %d sample %d: wrote %g, segyio reads %g", i, k, want, math.Float32frombits(bits))
					}
				}
			}
			// SEG-Y rev 1 binary header as segyio reads it.
			if d.Bin["3225"] != wf.format || d.Bin["3501"] != 0x0100 || d.Bin["3503"] != 1 || d.Bin["3505"] != 0 {
				t.Errorf("binary header per segyio: format %d revision %#x fixed %d ext %d", d.Bin["3225"], d.Bin["3501"], d.Bin["3503"], d.Bin["3505"])
			}
		})
	}
}
