package compute

import (
	"math"
	"math/bits"

	"gonum.org/v1/gonum/dsp/fourier"
)

// realFFT is an unnormalised real FFT of one length, with the interface
// and conventions of gonum's fourier.FFT: Coefficients returns the Len/2+1
// non-negative-frequency coefficients, Sequence inverts them (times Len).
type realFFT interface {
	Len() int
	Coefficients(dst []complex128, seq []float64) []complex128
	Sequence(dst []float64, coeff []complex128) []float64
}

// newRealFFT returns the fastest real FFT of length n that gonum offers: for
// powers of two from 8 up, a half-length complex transform with gonum's
// in-place radix-4 (or radix-2) routines; otherwise gonum's mixed-radix
// FFTPACK port (fourier.FFT). On this project's machines the radix-4 path
// is about twice as fast as FFTPACK at the same length.
func newRealFFT(n int) realFFT {
	if n >= 8 && n&(n-1) == 0 {
		return newPow2FFT(n)
	}
	return fourier.NewFFT(n)
}

// NextPow2 returns the smallest power of two >= n (1 for n < 1).
func NextPow2(n int) int {
	if n <= 1 {
		return 1
	}
	return 1 << bits.Len(uint(n-1))
}

// pow2FFT computes a real FFT of length n = 2m, m a power of two, with one
// complex FFT of length m: the even samples go into the real parts and the
// odd ones into the imaginary parts, and the two half-length spectra are
// separated and recombined with the twiddles W^k = exp(-2πik/n) (the
// standard packing, e.g. Press et al., Numerical Recipes, section 12.3).
// gonum's radix routines run in place on the work buffer z.
type pow2FFT struct {
	n, m   int
	radix4 bool         // m is a power of 4
	tw     []complex128 // W^k for k = 0..m-1, computed with math.Sincos
	z      []complex128 // length m
}

func newPow2FFT(n int) *pow2FFT {
	m := n / 2
	f := &pow2FFT{n: n, m: m, radix4: bits.TrailingZeros(uint(m))%2 == 0, tw: make([]complex128, m), z: make([]complex128, m)}
	for k := range f.tw {
		s, c := math.Sincos(-2 * math.Pi * float64(k) / float64(n))
		f.tw[k] = complex(c, s)
	}
	return f
}

func (f *pow2FFT) Len() int { return f.n }

// Coefficients computes X_k = Σ x_j exp(-2πijk/n) for k = 0..m into dst
// (length m+1) from seq (length n).
func (f *pow2FFT) Coefficients(dst []complex128, seq []float64) []complex128 {
	m, z := f.m, f.z
	for k := range z {
		z[k] = complex(seq[2*k], seq[2*k+1])
	}
	if f.radix4 {
		fourier.CoefficientsRadix4(z)
	} else {
		fourier.CoefficientsRadix2(z)
	}
	z0 := z[0]
	dst[0] = complex(real(z0)+imag(z0), 0)
	dst[m] = complex(real(z0)-imag(z0), 0)
	// Bins k and m-k share their inputs: with e and o the spectra of the
	// even and odd samples at k, X_k = e + W^k o and X_{m-k} = conj(e - W^k o).
	for k := 1; k <= m/2; k++ {
		a, b := z[k], z[m-k]
		b = complex(real(b), -imag(b))
		e := (a + b) * 0.5
		d := a - b
		o := complex(0.5*imag(d), -0.5*real(d)) // (a - b)/(2i)
		t := f.tw[k] * o
		dst[k] = e + t
		if k != m-k {
			u := e - t
			dst[m-k] = complex(real(u), -imag(u))
		}
	}
	return dst
}

// Sequence computes x_j = Σ_{k<n} X_k exp(2πijk/n) into dst (length n)
// from the m+1 coefficients (the rest follow by Hermitian symmetry; the
// imaginary parts of X_0 and X_m are ignored).
func (f *pow2FFT) Sequence(dst []float64, coeff []complex128) []float64 {
	m, z := f.m, f.z
	x0, xm := real(coeff[0]), real(coeff[m])
	z[0] = complex(x0+xm, x0-xm)
	// With X_{k+m} = conj(X_{m-k}): e = X_k + X_{k+m} and
	// o = (X_k - X_{k+m}) W^-k at k, and their conjugates at m-k.
	for k := 1; k <= m/2; k++ {
		a, b := coeff[k], coeff[m-k]
		b = complex(real(b), -imag(b))
		e := a + b
		w := f.tw[k]
		o := (a - b) * complex(real(w), -imag(w))
		z[k] = e + complex(-imag(o), real(o)) // e + i·o
		if k != m-k {
			z[m-k] = complex(real(e)+imag(o), real(o)-imag(e)) // conj(e) + i·conj(o)
		}
	}
	if f.radix4 {
		fourier.SequenceRadix4(z)
	} else {
		fourier.SequenceRadix2(z)
	}
	for k, v := range z {
		dst[2*k], dst[2*k+1] = real(v), imag(v)
	}
	return dst
}
