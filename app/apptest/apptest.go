// Package apptest holds test helpers shared by the app packages' tests (the
// export job and the commands): an invented test volume written through the
// segy writer, file checksums, and readers that check what was written
// through segy and through Debian's python3-segyio.
package apptest

import (
	"crypto/sha256"
	"encoding/binary"
	"encoding/hex"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"quadtrace/app/outfile"
	"quadtrace/compute"
	"quadtrace/segy"
	"quadtrace/segy/segytest"
)

// Python is Debian's interpreter (segytest.Python), called by its full
// path: the outside references (python3-segyio, python3-scipy) are Debian's
// packages for it.
const Python = segytest.Python

// ProjectRoot is the repository root, two folders above this package.
func ProjectRoot(t testing.TB) string {
	t.Helper()
	root, err := filepath.Abs("../..")
	if err != nil {
		t.Fatal(err)
	}
	return root
}

// VolumeSpec describes an invented test volume: a regular inline-sorted
// grid of band-limited traces (a Ricker wavelet convolved with random
// reflectivity) with CDP coordinates on 12.5 m bins.
type VolumeSpec struct {
	Inlines, Crosslines [2]int // first and last
	Samples, IntervalUS int
	StartMS             float64
}

// traces is the number of traces of the grid.
func (v VolumeSpec) Traces() int {
	return (v.Inlines[1] - v.Inlines[0] + 1) * (v.Crosslines[1] - v.Crosslines[0] + 1)
}

// bytes is the file size of the volume in IEEE format.
func (v VolumeSpec) Bytes() int64 {
	return 3600 + int64(v.Traces())*int64(240+4*v.Samples)
}

// WriteVolume writes the volume to path through the segy writer.
func WriteVolume(t testing.TB, path string, v VolumeSpec) {
	t.Helper()
	of, err := outfile.Create(path, outfile.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer of.Abort()
	w, err := segy.NewWriterSpec(of, path, segy.NewSpec{Samples: v.Samples, IntervalUS: v.IntervalUS, StartMS: v.StartMS,
		TextHeader: "C 1 INVENTED TEST VOLUME FOR THE QUADTRACE EXPORT TESTS\nC 2 SURVEY: HARROWMERE TEST BLOCK\nC40 END TEXTUAL HEADER"},
		segy.WriteOptions{Format: 5})
	if err != nil {
		t.Fatal(err)
	}
	bank := TraceBank(v.Samples, v.IntervalUS, 97)
	tr := make([]float32, v.Samples)
	for il := v.Inlines[0]; il <= v.Inlines[1]; il++ {
		for xl := v.Crosslines[0]; xl <= v.Crosslines[1]; xl++ {
			src := bank[(il*31+xl*7)%len(bank)]
			gain := float32(1 + 0.01*float64(il-v.Inlines[0]) - 0.002*float64(xl-v.Crosslines[0]))
			for k := range tr {
				tr[k] = gain * src[k]
			}
			h := segy.NewTraceHeader(il, xl, 612000.5+12.5*float64(xl), 7130000.25+12.5*float64(il))
			if err := w.WriteTrace(h, tr); err != nil {
				t.Fatal(err)
			}
		}
	}
	if err := w.Finish(); err != nil {
		t.Fatal(err)
	}
	if err := of.Commit(); err != nil {
		t.Fatal(err)
	}
}

// TraceBank returns n invented traces: random reflectivity convolved with a
// 30 Hz Ricker wavelet.
func TraceBank(samples, intervalUS, n int) [][]float32 {
	rng := rand.New(rand.NewPCG(7, 11))
	dt := float64(intervalUS) * 1e-6
	half := int(0.06/dt) + 1
	wavelet := make([]float64, 2*half+1)
	for j := range wavelet {
		tt := float64(j-half) * dt
		a := math.Pi * 30 * tt
		wavelet[j] = (1 - 2*a*a) * math.Exp(-a*a)
	}
	bank := make([][]float32, n)
	for i := range bank {
		refl := make([]float64, samples)
		for k := range refl {
			if rng.Float64() < 0.08 {
				refl[k] = rng.NormFloat64()
			}
		}
		tr := make([]float32, samples)
		for k := range tr {
			s := 0.0
			for j, w := range wavelet {
				if m := k + j - half; m >= 0 && m < samples {
					s += w * refl[m]
				}
			}
			tr[k] = float32(1000 * s)
		}
		bank[i] = tr
	}
	return bank
}

// FileSum is the SHA-256 of a file, hex.
func FileSum(t testing.TB, path string) string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		t.Fatal(err)
	}
	return hex.EncodeToString(h.Sum(nil))
}

// ReadSection reads every trace of a SEG-Y file through the segy reader.
func ReadSection(t testing.TB, path string) (compute.Section, []segy.TraceHeader) {
	t.Helper()
	f, err := segy.Open(path, segy.Options{})
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	info := f.Info()
	sec := compute.Section{DT: float64(info.IntervalUS) * 1e-6, T0: info.StartMS * 1e-3}
	hs := make([]segy.TraceHeader, info.Traces)
	for i := range info.Traces {
		tr, err := f.ReadTrace(i, nil)
		if err != nil {
			t.Fatal(err)
		}
		if hs[i], err = f.TraceHeader(i); err != nil {
			t.Fatal(err)
		}
		sec.Traces = append(sec.Traces, tr)
	}
	return sec, hs
}

// SegyioDump is what testdata/export/readback.py reports of a file.
type SegyioDump struct {
	Version    string           `json:"segyio_version"`
	Samples    int              `json:"samples"`
	IntervalUS int              `json:"interval_us"`
	Format     int              `json:"format"`
	Traces     int              `json:"traces"`
	Text       string           `json:"text"`
	Bin        map[string]int   `json:"bin"`
	Headers    []map[string]int `json:"headers"`
	Data       [][]float32      `json:"-"`
}

// ReadBySegyio reads a SEG-Y file with Debian's python3-segyio through
// testdata/export/readback.py.
func ReadBySegyio(t testing.TB, path string) SegyioDump {
	t.Helper()
	script := filepath.Join(ProjectRoot(t), "testdata", "export", "readback.py")
	data := filepath.Join(t.TempDir(), "samples.f32")
	cmd := exec.Command(Python, script, path, data)
	var stderr strings.Builder
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("segyio could not read %s: %v\n%s", path, err, stderr.String())
	}
	var d SegyioDump
	if err := json.Unmarshal(out, &d); err != nil {
		t.Fatalf("readback.py output: %v", err)
	}
	raw, err := os.ReadFile(data)
	if err != nil {
		t.Fatal(err)
	}
	if len(raw) != 4*d.Samples*d.Traces {
		t.Fatalf("segyio returned %d bytes of samples for %d traces of %d", len(raw), d.Traces, d.Samples)
	}
	for i := range d.Traces {
		tr := make([]float32, d.Samples)
		for k := range tr {
			tr[k] = math.Float32frombits(binary.LittleEndian.Uint32(raw[4*(i*d.Samples+k):]))
		}
		d.Data = append(d.Data, tr)
	}
	return d
}

// TraceSampleBytes returns the raw sample bytes of every trace of a
// fixed-length SEG-Y file with no extended textual headers (the layout the
// segy writer writes), located by the byte positions of SEG-Y rev 1 (2002):
// 3600 bytes of file headers, then per trace 240 header bytes and the samples.
func TraceSampleBytes(t testing.TB, path string, samples int) (headers, data [][]byte) {
	t.Helper()
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	size := 240 + 4*samples
	if (len(raw)-3600)%size != 0 {
		t.Fatalf("%s: %d bytes after the file headers is not a whole number of %d-byte traces", path, len(raw)-3600, size)
	}
	for off := 3600; off < len(raw); off += size {
		headers = append(headers, raw[off:off+240])
		data = append(data, raw[off+240:off+size])
	}
	return headers, data
}

// BenchVolume returns the path of an invented volume of spec v under
// $TMPDIR/quadtrace-export-bench, generating it through the segy writer the
// first time (the writer's atomic rename means a file found there is
// complete; its size is checked anyway). These files are large and never
// committed; delete the folder to reclaim the space.
func BenchVolume(b testing.TB, v VolumeSpec) string {
	b.Helper()
	dir := filepath.Join(os.TempDir(), "quadtrace-export-bench")
	if err := os.MkdirAll(dir, 0o755); err != nil {
		b.Fatal(err)
	}
	path := filepath.Join(dir, fmt.Sprintf("harrowmere-%dx%dx%d.sgy", v.Inlines[1]-v.Inlines[0]+1, v.Crosslines[1]-v.Crosslines[0]+1, v.Samples))
	if st, err := os.Stat(path); err == nil && st.Size() == v.Bytes() {
		return path
	}
	start := time.Now()
	WriteVolume(b, path, v)
	b.Logf("generated %s (%.0f MB) in %v", path, float64(v.Bytes())/1e6, time.Since(start).Round(time.Millisecond))
	return path
}

// StrayTemps lists temporary files of ours in dir: app/outfile's named
// temporaries (".NAME.quadtrace-tmp-*") and the older writer pattern
// (".NAME.tmp-*").
func StrayTemps(t testing.TB, dir string) []string {
	t.Helper()
	var all []string
	for _, pat := range []string{".*.tmp-*", ".*.quadtrace-tmp-*", ".*.tmp"} {
		m, err := filepath.Glob(filepath.Join(dir, pat))
		if err != nil {
			t.Fatal(err)
		}
		all = append(all, m...)
	}
	return all
}

// NoLeftovers fails t when folder dir holds anything, or when a file this
// process has open (/proc/self/fd, Linux) lies in it: what a cache that
// promises no leftovers must leave after it is closed.
func NoLeftovers(t testing.TB, dir string) {
	t.Helper()
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		t.Errorf("left behind in %s: %s", dir, e.Name())
	}
	fds, _ := os.ReadDir("/proc/self/fd")
	for _, fd := range fds {
		if target, err := os.Readlink(filepath.Join("/proc/self/fd", fd.Name())); err == nil && strings.HasPrefix(target, dir) {
			t.Errorf("still open in %s: %s", dir, target)
		}
	}
}
