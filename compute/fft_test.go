package compute

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

// fftTestLengths returns every length 1..4100 and the long and prime
// lengths issue 13 names: 8192, 65536, 1501 and 3001 (traces of 0..6 s at
// 4 and 2 ms), primes up to 65537. withSlow adds nothing for now; prime
// lengths above 10007 are left out of the gonum comparison only (its
// FFTPACK port transforms a prime length in O(n²)).
func fftTestLengths() []int {
	var ns []int
	for n := 1; n <= 4100; n++ {
		ns = append(ns, n)
	}
	return append(ns, 8192, 65536, 4507, 7919, 8191, 10007, 65537, 3*5*7*11*13, 2*2*3*3*5*5*7*11)
}

// testSequence is the deterministic input shared with
// testdata/compute/scipy_fft.py: exact in float64, the same in both.
func testSequence(n, s int) []float64 {
	x := make([]float64, n)
	for j := range x {
		v := (1103515245*(int64(j)+7919*int64(s)) + 12345) % 2147483648
		x[j] = float64(v)/2147483648 - 0.5
	}
	return x
}

func complexTestSequence(n int) []complex128 {
	re, im := testSequence(n, 2*n), testSequence(n, 2*n+1)
	z := make([]complex128, n)
	for j := range z {
		z[j] = complex(re[j], im[j])
	}
	return z
}

// relErr is ‖got - want‖₂ / ‖want‖₂.
func relErr(got, want []complex128) float64 {
	var num, den float64
	for k := range want {
		d := got[k] - want[k]
		num += real(d)*real(d) + imag(d)*imag(d)
		den += real(want[k])*real(want[k]) + imag(want[k])*imag(want[k])
	}
	if den == 0 {
		return math.Sqrt(num)
	}
	return math.Sqrt(num / den)
}

func relErrReal(got, want []float64) float64 {
	var num, den float64
	for k := range want {
		d := got[k] - want[k]
		num += d * d
		den += want[k] * want[k]
	}
	if den == 0 {
		return math.Sqrt(num)
	}
	return math.Sqrt(num / den)
}

// Source: gonum's fourier.CmplxFFT (FFTPACK port, gonum v0.16) as the
// reference. At every test length the complex transform, the real
// transform and its inverse agree with gonum's to 1e-12 relative (2-norm
// over all bins).
//
// The real transform is checked against gonum's complex transform (the
// Hermitian part of the transform of z, whose real part is the real test
// input), not against gonum's real fourier.FFT: that one
// loses accuracy at lengths with large prime factors (measured: 1e-12 at
// n = 331, 6e-10 at n = 7919, against both scipy.fft.rfft and gonum's own
// complex transform, which agree with each other to 1e-15), so it cannot
// serve as a 1e-12 reference there.
func TestFFTMatchesGonum(t *testing.T) {
	const tol = 1e-12
	worst := map[string]float64{}
	for _, n := range fftTestLengths() {
		if n > 10007 && factorize(n) == nil {
			continue // gonum would take O(n²)
		}
		z := complexTestSequence(n)
		p := newFFTPlan(n)
		w := p.newWork()
		got := make([]complex128, n)
		p.transform(got, z, w)
		want := fourier.NewCmplxFFT(n).Coefficients(nil, z)
		if e := relErr(got, want); e > tol {
			t.Errorf("complex n=%d: relative error %.3g", n, e)
		} else {
			worst["complex"] = max(worst["complex"], e)
		}
		// In place.
		in := append([]complex128(nil), z...)
		p.transform(in, in, w)
		if e := relErr(in, want); e > tol {
			t.Errorf("complex in place n=%d: relative error %.3g", n, e)
		}
		// The Go passes, where the vector ones of fft_amd64.s ran above.
		if p.simd {
			g := withoutSIMD(p)
			g.transform(got, z, g.newWork())
			if e := relErr(got, want); e > tol {
				t.Errorf("complex, Go passes, n=%d: relative error %.3g", n, e)
			} else {
				worst["complex, Go passes"] = max(worst["complex, Go passes"], e)
			}
		}

		x := testSequence(n, 2*n)
		rp := newRealPlan(n)
		rw := rp.newWork()
		// The spectrum of x = Re z is the Hermitian part of gonum's
		// transform of z, and the inverse of that spectrum is n·x.
		rwant := make([]complex128, n/2+1)
		seqWant := make([]float64, n)
		for k := range rwant {
			rwant[k] = 0.5 * (want[k] + cmplx.Conj(want[(n-k)%n]))
		}
		for j, v := range x {
			seqWant[j] = float64(n) * v
		}
		rgot := make([]complex128, n/2+1)
		rp.forward(rgot, x, rw)
		if e := relErr(rgot, rwant); e > tol {
			t.Errorf("real n=%d: relative error %.3g", n, e)
		} else {
			worst["real"] = max(worst["real"], e)
		}
		back := make([]float64, n)
		rp.inverse(back, rwant, rw)
		if e := relErrReal(back, seqWant); e > tol {
			t.Errorf("real inverse n=%d: relative error %.3g", n, e)
		} else {
			worst["real inverse"] = max(worst["real inverse"], e)
		}
	}
	t.Logf("largest relative errors against gonum: %v", worst)
}

// withoutSIMD returns a copy of p that runs every pass in Go.
func withoutSIMD(p *fftPlan) *fftPlan {
	q := *p
	q.simd = false
	if q.blue != nil {
		b := *q.blue
		b.inner = withoutSIMD(b.inner)
		q.blue = &b
	}
	return &q
}

// Source: scipy.fft.fft and scipy.fft.rfft (Debian python3-scipy,
// pocketfft, float64) through testdata/compute/scipy_fft.py, at every test
// length: relative error (2-norm) below 1e-12. One record is corrupted on
// purpose to prove that the script's comparison can fail.
func TestFFTMatchesScipy(t *testing.T) {
	py := pythonWithScipy(t)
	dir := t.TempDir()
	in, out := filepath.Join(dir, "fft.bin"), filepath.Join(dir, "fft.txt")
	f, err := os.Create(in)
	if err != nil {
		t.Fatal(err)
	}
	bw := bufio.NewWriterSize(f, 1<<20)
	put := func(kind, n int, v []complex128) {
		binary.Write(bw, binary.LittleEndian, [2]int32{int32(kind), int32(n)})
		buf := make([]byte, 16*len(v))
		for k, c := range v {
			binary.LittleEndian.PutUint64(buf[16*k:], math.Float64bits(real(c)))
			binary.LittleEndian.PutUint64(buf[16*k+8:], math.Float64bits(imag(c)))
		}
		bw.Write(buf)
	}
	lengths := fftTestLengths()
	for _, n := range lengths {
		p := newFFTPlan(n)
		z := complexTestSequence(n)
		p.transform(z, z, p.newWork())
		put(0, n, z)
		rp := newRealPlan(n)
		X := make([]complex128, n/2+1)
		rp.forward(X, testSequence(n, 2*n), rp.newWork())
		put(1, n, X)
	}
	// The canary: a wrong transform (one bin off by 1e-9 of the norm).
	canary := newFFTPlan(1000)
	z := complexTestSequence(1000)
	canary.transform(z, z, canary.newWork())
	z[17] += complex(1e-9*math.Sqrt(float64(1000)*1000/6), 0)
	put(0, 1000, z)
	if err := bw.Flush(); err != nil {
		t.Fatal(err)
	}
	f.Close()
	if msg, err := exec.Command(py, "../testdata/compute/scipy_fft.py", in, out).CombinedOutput(); err != nil {
		t.Fatalf("scipy_fft.py: %v: %s", err, msg)
	}
	res, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(res)), "\n")
	if len(lines) != 2*len(lengths)+1 {
		t.Fatalf("scipy_fft.py returned %d lines, want %d", len(lines), 2*len(lengths)+1)
	}
	worst := [2]float64{}
	for i, line := range lines {
		var kind, n int
		var e float64
		if _, err := fmt.Sscan(line, &kind, &n, &e); err != nil {
			t.Fatalf("line %d %q: %v", i+1, line, err)
		}
		if i == len(lines)-1 {
			if e < 1e-10 {
				t.Errorf("the corrupted record reads %.3g relative error: the comparison cannot fail", e)
			}
			continue
		}
		if want := lengths[i/2]; n != want || kind != i%2 {
			t.Fatalf("line %d: kind %d n %d, want kind %d n %d", i+1, kind, n, i%2, want)
		}
		if e > 1e-12 {
			t.Errorf("kind %d n=%d: relative error %.3g against scipy", kind, n, e)
		}
		worst[kind] = max(worst[kind], e)
	}
	t.Logf("largest relative errors against scipy: complex %.3g, real %.3g", worst[0], worst[1])
}

// Many goroutines share one plan of each kind (mixed radix, Bluestein and
// the real packing), each with its own work space; every result equals the
// one computed alone. Run with -race to check that sharing is race-free.
func TestFFTPlanSharedByGoroutines(t *testing.T) {
	for _, n := range []int{2048, 1501, 3000} {
		p := newFFTPlan(n)
		rp := newRealPlan(n)
		pub := NewRealFFT(n)
		const workers, rounds = 16, 8
		inputs := make([][]complex128, workers)
		want := make([][]complex128, workers)
		for i := range inputs {
			inputs[i] = complexTestSequence(n)
			for j := range inputs[i] {
				inputs[i][j] *= complex(float64(i+1), 0)
			}
			want[i] = fourier.NewCmplxFFT(n).Coefficients(nil, inputs[i])
		}
		var wg sync.WaitGroup
		errs := make(chan string, workers*rounds)
		for i := range workers {
			wg.Add(1)
			go func() {
				defer wg.Done()
				w, rw := p.newWork(), rp.newWork()
				out := make([]complex128, n)
				X := make([]complex128, n/2+1)
				re := make([]float64, n)
				for j := range re {
					re[j] = real(inputs[i][j])
				}
				for range rounds {
					p.transform(out, inputs[i], w)
					if e := relErr(out, want[i]); e > 1e-12 {
						errs <- fmt.Sprintf("n=%d worker %d: complex error %.3g", n, i, e)
						return
					}
					rp.forward(X, re, rw)
					Y := pub.Coefficients(nil, re)
					for k := range X {
						// Hermitian part of the complex result = spectrum of re.
						h := 0.5 * (want[i][k] + cmplx.Conj(want[i][(n-k)%n]))
						if cmplx.Abs(X[k]-h) > 1e-9*float64(i+1)*math.Sqrt(float64(n)) || X[k] != Y[k] {
							errs <- fmt.Sprintf("n=%d worker %d: real bin %d differs: %v, want %v (public %v)", n, i, k, X[k], h, Y[k])
							return
						}
					}
				}
			}()
		}
		wg.Wait()
		close(errs)
		for e := range errs {
			t.Error(e)
		}
	}
}

// gonumReal returns, from gonum's complex transform, the n/2+1
// coefficients of the real sequence x and the sequence those coefficients
// give back by Hermitian symmetry (n times x).
func gonumReal(x []float64) ([]complex128, []float64) {
	n := len(x)
	z := make([]complex128, n)
	for j, v := range x {
		z[j] = complex(v, 0)
	}
	f := fourier.NewCmplxFFT(n)
	X := f.Coefficients(nil, z)
	back := f.Sequence(nil, X)
	seq := make([]float64, n)
	for j, v := range back {
		seq[j] = real(v)
	}
	return X[:n/2+1], seq
}

// RealFFT (the exported plan compute/synth uses) against gonum's
// fourier.FFT, both directions, at lengths with small factors (where
// fourier.FFT is accurate: see TestFFTMatchesGonum), and against gonum's
// complex transform at 751 and 1501 (prime, and 19·79).
func TestRealFFTMatchesGonum(t *testing.T) {
	for _, n := range []int{1, 2, 3, 750, 751, 1024, 1500, 1501} {
		x := testSequence(n, 2*n)
		f := NewRealFFT(n)
		if f.Len() != n {
			t.Fatalf("Len %d, want %d", f.Len(), n)
		}
		X := f.Coefficients(nil, x)
		wantX, wantSeq := gonumReal(x)
		if factorize(n) != nil {
			g := fourier.NewFFT(n)
			wantX, wantSeq = g.Coefficients(nil, x), g.Sequence(nil, g.Coefficients(nil, x))
		}
		if e := relErr(X, wantX); e > 1e-12 {
			t.Errorf("n=%d coefficients: relative error %.3g", n, e)
		}
		if e := relErrReal(f.Sequence(nil, X), wantSeq); e > 1e-12 {
			t.Errorf("n=%d sequence: relative error %.3g", n, e)
		}
	}
}

func BenchmarkFFT(b *testing.B) {
	for _, n := range []int{1024, 2048, 1501, 3072, 4096} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			p := newFFTPlan(n)
			w := p.newWork()
			z := complexTestSequence(n)
			for b.Loop() {
				p.transform(z, z, w)
			}
		})
		b.Run(fmt.Sprintf("gonum/n=%d", n), func(b *testing.B) {
			p := fourier.NewCmplxFFT(n)
			z := complexTestSequence(n)
			for b.Loop() {
				p.Coefficients(z, z)
			}
		})
	}
}

// Source: gonum's fourier.CmplxFFT (reference library). At lengths with a
// prime factor above maxDirectRadix, analyticPair applies its operators as
// circular convolutions over a longer transform (convolution mode). Each
// operator (Hilbert transform, first and second derivatives of x and h) on
// a pair of traces a, b must equal gonum's IDFT_m(G·DFT_m(a + ib)), with G
// the operator's response (g, times i for an imaginary one; DC and
// Nyquist zero for those), split into real and imaginary parts: relative
// 2-norm error under 1e-12, lone trace (b = 0) included.
func TestConvolutionModeMatchesGonum(t *testing.T) {
	for _, n := range []int{17, 38, 1009, 1501, 2001, 3001} {
		var p analyticPair
		if err := p.setup(n, 0.004, EndTreatment{Pad: PadNone}, nil); err != nil {
			t.Fatal(err)
		}
		if p.conv == nil {
			t.Fatalf("n=%d: not in convolution mode", n)
		}
		if p.conv.n < 2*n-1 {
			t.Fatalf("n=%d: convolution length %d below 2n-1", n, p.conv.n)
		}
		ref := fourier.NewCmplxFFT(n)
		for _, lone := range []bool{false, true} {
			var a, b analyticTrace
			ta, tb := randomTraces(2, n, uint64(n)).Traces[0], randomTraces(2, n, uint64(n)).Traces[1]
			if lone {
				tb = nil
			}
			p.analyze(&a, &b, ta, tb, false)
			z := make([]complex128, n)
			for j := range z {
				z[j] = complex(a.x[j], 0)
				if !lone {
					z[j] += complex(0, b.x[j])
				}
			}
			spec := ref.Coefficients(nil, z)
			for name, op := range map[string]*spectralOp{"hilbert": &p.hilbert, "dx": &p.dx, "dh": &p.dh, "ddx": &p.ddx, "ddh": &p.ddh} {
				prod := make([]complex128, n)
				for k := range prod {
					kk, conj := k, false
					if k > n/2 {
						kk, conj = n-k, true
					}
					g := complex(op.g[kk], 0)
					if op.imaginary {
						g = complex(0, op.g[kk])
						if kk == 0 || 2*kk == n {
							g = 0
						}
					}
					if conj {
						g = cmplx.Conj(g)
					}
					prod[k] = g * spec[k]
				}
				want := ref.Sequence(nil, prod)
				ra, rb := make([]float64, n), make([]float64, n)
				if lone {
					rb = nil
				}
				p.apply(op, ra, rb)
				wantA, wantB := make([]float64, n), make([]float64, n)
				for j, v := range want {
					wantA[j], wantB[j] = real(v), imag(v)
				}
				if e := relErrReal(ra, wantA); e > 1e-12 {
					t.Errorf("n=%d %s lone=%v: trace a: relative error %.3g", n, name, lone, e)
				}
				if !lone {
					if e := relErrReal(rb, wantB); e > 1e-12 {
						t.Errorf("n=%d %s: trace b: relative error %.3g", n, name, e)
					}
				}
			}
		}
	}
}
