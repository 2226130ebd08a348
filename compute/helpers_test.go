package compute

import (
	"context"
	"encoding/binary"
	"fmt"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"testing"
)

// ricker is the Ricker wavelet of peak frequency fp at time t (Ricker,
// 1953; the common form (1 - 2π²fp²t²) exp(-π²fp²t²), whose amplitude
// spectrum is proportional to f² exp(-f²/fp²)).
func ricker(t, fp float64) float64 {
	u := math.Pi * math.Pi * fp * fp * t * t
	return (1 - 2*u) * math.Exp(-u)
}

// rotatedRicker is a Ricker wavelet centred at tc with every positive
// frequency component advanced in phase by theta radians, built by direct
// numerical integration of its amplitude spectrum (no FFT):
// x(t) = ∫ A(f) cos(2πf(t - tc) + θ) df, A(f) = f² exp(-f²/fp²).
// Its analytic trace is e^{iθ} times that of the zero-phase wavelet, so its
// phase at the envelope peak (t = tc) is θ. Normalised so that θ = 0 gives
// peak 1.
func rotatedRicker(n int, dt, tc, fp, theta float64) []float32 {
	const nf = 1200
	fmax := 6 * fp
	df := fmax / nf
	amp := make([]float64, nf)
	var norm float64
	for k := range amp {
		f := (float64(k) + 0.5) * df
		amp[k] = f * f * math.Exp(-f*f/(fp*fp))
		norm += amp[k]
	}
	out := make([]float32, n)
	for j := range out {
		t := float64(j)*dt - tc
		var s float64
		for k, a := range amp {
			f := (float64(k) + 0.5) * df
			s += a * math.Cos(2*math.Pi*f*t+theta)
		}
		out[j] = float32(s / norm)
	}
	return out
}

// section1 wraps one trace as a section.
func section1(tr []float32, dt float64) Section {
	return Section{Traces: [][]float32{tr}, DT: dt}
}

// compute runs a registry attribute with raw parameters on a section.
func compute(t *testing.T, id string, raw map[string]string, in Section) Section {
	t.Helper()
	a, err := Lookup(id)
	if err != nil {
		t.Fatal(err)
	}
	p, err := a.Resolve(raw)
	if err != nil {
		t.Fatal(err)
	}
	out, err := a.Compute(context.Background(), in, p, nil)
	if err != nil {
		t.Fatal(err)
	}
	return out
}

// sampled returns f(j*dt) for j < n as float32.
func sampled(n int, dt float64, f func(t float64) float64) []float32 {
	out := make([]float32, n)
	for j := range out {
		out[j] = float32(f(float64(j) * dt))
	}
	return out
}

// pythonWithScipy returns /usr/bin/python3 when it can import scipy, numpy
// and segyio. When it cannot, the test fails: a reference check that does
// not run is no check.
func pythonWithScipy(t *testing.T) string {
	t.Helper()
	const py = "/usr/bin/python3"
	err := exec.Command(py, "-c", "import numpy, scipy.signal, segyio").Run()
	if err == nil {
		return py
	}
	t.Fatalf("%s with numpy, scipy and segyio is needed (Debian python3-scipy, python3-segyio; bash .ci/deps installs them): %v", py, err)
	return ""
}

// corpusFile returns the path of a file of the project's copy of the open
// SEG-Y corpus, testdata/segy-corpus (its README.md names origin, licence
// and check values). compute's tests do not import segy/segytest, so this
// is the one copy of segytest.CorpusFile's lookup here. A missing file
// fails the test.
func corpusFile(t *testing.T, name string) string {
	t.Helper()
	p := filepath.Join("..", "testdata", "segy-corpus", name)
	if _, err := os.Stat(p); err != nil {
		t.Fatalf("corpus file missing (the project keeps it under testdata/segy-corpus): %v", err)
	}
	return p
}

const scipyScript = "../testdata/compute/scipy_reference.py"

// writeTraceFile writes traces in the trace-file format of
// scipy_reference.py.
func writeTraceFile(t *testing.T, path string, sec Section) {
	t.Helper()
	n := sec.Samples()
	buf := make([]byte, 16, 16+4*n*len(sec.Traces))
	binary.LittleEndian.PutUint32(buf[0:], uint32(len(sec.Traces)))
	binary.LittleEndian.PutUint32(buf[4:], uint32(n))
	binary.LittleEndian.PutUint64(buf[8:], math.Float64bits(sec.DT))
	for _, tr := range sec.Traces {
		for _, v := range tr {
			buf = binary.LittleEndian.AppendUint32(buf, math.Float32bits(v))
		}
	}
	if err := os.WriteFile(path, buf, 0o644); err != nil {
		t.Fatal(err)
	}
}

// readTraceFile reads the trace-file format of scipy_reference.py.
func readTraceFile(t *testing.T, path string) Section {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if len(b) < 16 {
		t.Fatalf("%s: %d bytes, too short for the header", path, len(b))
	}
	ntr := int(binary.LittleEndian.Uint32(b[0:]))
	ns := int(binary.LittleEndian.Uint32(b[4:]))
	dt := math.Float64frombits(binary.LittleEndian.Uint64(b[8:]))
	if len(b) != 16+4*ntr*ns {
		t.Fatalf("%s: %d bytes, want %d for %d traces of %d samples", path, len(b), 16+4*ntr*ns, ntr, ns)
	}
	sec := Section{Traces: make([][]float32, ntr), DT: dt}
	off := 16
	for i := range sec.Traces {
		tr := make([]float32, ns)
		for j := range tr {
			tr[j] = math.Float32frombits(binary.LittleEndian.Uint32(b[off:]))
			off += 4
		}
		sec.Traces[i] = tr
	}
	return sec
}

// hilbertJob asks scipy for scipy.signal.hilbert(x, N=NFFT)[:ns] of every
// trace of a section (NFFT 0 = no padding).
type hilbertJob struct {
	Sec  Section
	NFFT int
}

// hilbertRef holds scipy's quadrature, envelope and phase (rad) per trace.
type hilbertRef struct{ quad, env, phase [][]float64 }

// scipyHilbert runs all jobs in one call of scipy_reference.py.
func scipyHilbert(t *testing.T, py string, jobs []hilbertJob) []hilbertRef {
	t.Helper()
	dir := t.TempDir()
	args := []string{"hilbert"}
	for k, job := range jobs {
		in, out := filepath.Join(dir, fmt.Sprintf("in%d.bin", k)), filepath.Join(dir, fmt.Sprintf("out%d.bin", k))
		writeTraceFile(t, in, job.Sec)
		args = append(args, in, out, strconv.Itoa(job.NFFT))
	}
	if msg, err := runPython(py, args...); err != nil {
		t.Fatalf("%s hilbert: %v\n%s", scipyScript, err, msg)
	}
	refs := make([]hilbertRef, len(jobs))
	for k, job := range jobs {
		out := filepath.Join(dir, fmt.Sprintf("out%d.bin", k))
		b, err := os.ReadFile(out)
		if err != nil {
			t.Fatal(err)
		}
		ntr, ns := len(job.Sec.Traces), job.Sec.Samples()
		if len(b) != 3*8*ntr*ns {
			t.Fatalf("%s: %d bytes, want %d", out, len(b), 3*8*ntr*ns)
		}
		get := func(block int) [][]float64 {
			res := make([][]float64, ntr)
			for i := range res {
				res[i] = make([]float64, ns)
				for j := range res[i] {
					off := 8 * (block*ntr*ns + i*ns + j)
					res[i][j] = math.Float64frombits(binary.LittleEndian.Uint64(b[off:]))
				}
			}
			return res
		}
		refs[k] = hilbertRef{get(0), get(1), get(2)}
	}
	return refs
}

// maxRelDiff returns max|got - want| / max|want| over samples lo..hi-1.
func maxRelDiff(got []float32, want []float64, lo, hi int) float64 {
	var d, m float64
	for j := lo; j < hi; j++ {
		d = max(d, math.Abs(float64(got[j])-want[j]))
		m = max(m, math.Abs(want[j]))
	}
	if m == 0 {
		return d
	}
	return d / m
}

// angleDiffDeg returns the difference a - b of two angles in degrees,
// wrapped to -180..180.
func angleDiffDeg(a, b float64) float64 {
	return math.Remainder(a-b, 360)
}

// runPython runs scipy_reference.py with arguments.
func runPython(py string, args ...string) ([]byte, error) {
	return exec.Command(py, append([]string{scipyScript}, args...)...).CombinedOutput()
}
