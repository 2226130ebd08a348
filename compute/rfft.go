package compute

import "sync"

// realPlan transforms real sequences of one length n with the conventions
// of gonum's fourier.FFT: forward gives the n/2+1 non-negative-frequency
// coefficients X_k = Σ_j x_j exp(-2πi jk/n), inverse gives
// x_j = Σ_{k<n} X_k exp(2πi jk/n) (unnormalised: n times the inverse DFT),
// the coefficients above n/2 following by Hermitian symmetry and the
// imaginary parts of X_0 and (n even) X_{n/2} being ignored.
//
// One real sequence alone: for even n, a complex transform of length n/2
// carries the even samples in its real parts and the odd ones in its
// imaginary parts, and the two half-length spectra are separated and
// recombined with W^k = exp(-2πik/n) (the standard packing, e.g. Press et
// al., Numerical Recipes, 3rd ed., section 12.3.2); for odd n, one complex
// transform of length n. (Two real sequences at once share one complex
// transform as a + ib: see analyticPair.)
//
// A realPlan is read-only once made and may be shared by any number of
// goroutines, each with its own realWork.
type realPlan struct {
	n    int
	full *fftPlan     // length n odd
	half *fftPlan     // length n/2 (n even)
	tw   []complex128 // n even: W^k for k <= n/4
}

// realWork is one goroutine's work space for a realPlan.
type realWork struct {
	z          []complex128 // length n
	full, half *fftWork
}

func newRealPlan(n int) *realPlan {
	p := &realPlan{n: n}
	if n%2 == 0 {
		p.half = newFFTPlan(n / 2)
		p.tw = rootsOfUnity(n)[:n/4+1]
	} else {
		p.full = newFFTPlan(n)
	}
	return p
}

func (p *realPlan) newWork() *realWork {
	w := &realWork{z: make([]complex128, p.n)}
	if p.half != nil {
		w.half = p.half.newWork()
	} else {
		w.full = p.full.newWork()
	}
	return w
}

// forward stores the coefficients X_0..X_{n/2} of src (length n) in dst.
func (p *realPlan) forward(dst []complex128, src []float64, w *realWork) {
	n := p.n
	if p.half == nil {
		z := w.z[:n]
		for j, v := range src[:n] {
			z[j] = complex(v, 0)
		}
		p.full.transform(z, z, w.full)
		copy(dst[:n/2+1], z)
		return
	}
	m := n / 2
	z := w.z[:m]
	for k := range z {
		z[k] = complex(src[2*k], src[2*k+1])
	}
	p.half.transform(z, z, w.half)
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
		t := p.twiddle(k) * o
		dst[k] = e + t
		if k != m-k {
			u := e - t
			dst[m-k] = complex(real(u), -imag(u))
		}
	}
}

// twiddle returns W^k = exp(-2πik/n) for 0 <= k <= n/2 from the stored
// quarter (W^{n/2-k} = -conj(W^k)).
func (p *realPlan) twiddle(k int) complex128 {
	if k < len(p.tw) {
		return p.tw[k]
	}
	v := p.tw[p.n/2-k]
	return complex(-real(v), imag(v))
}

// inverse stores in dst (length n) the real sequence whose coefficients
// X_0..X_{n/2} are src.
func (p *realPlan) inverse(dst []float64, src []complex128, w *realWork) {
	n := p.n
	if p.half == nil {
		// The inverse as conj(FFT(conj(Z))): conj(Z)_k = conj(X_k) for
		// k <= n/2 and X_{n-k} above.
		z := w.z[:n]
		z[0] = complex(real(src[0]), 0)
		for k := 1; k <= n/2; k++ {
			v := src[k]
			z[k] = complex(real(v), -imag(v))
			z[n-k] = v
		}
		p.full.transform(z, z, w.full)
		for j, v := range z {
			dst[j] = real(v)
		}
		return
	}
	m := n / 2
	z := w.z[:m]
	x0, xm := real(src[0]), real(src[m])
	// Build conj of the packed spectrum (so a forward transform inverts):
	// with X_{k+m} = conj(X_{m-k}), e = X_k + X_{k+m} and
	// o = (X_k - X_{k+m}) W^-k give z_k = e + i o, z_{m-k} = conj(e) + i conj(o).
	z[0] = complex(x0+xm, -(x0 - xm))
	for k := 1; k <= m/2; k++ {
		a, b := src[k], src[m-k]
		b = complex(real(b), -imag(b))
		e := a + b
		t := p.twiddle(k)
		o := (a - b) * complex(real(t), -imag(t))
		v := e + complex(-imag(o), real(o)) // e + i·o
		z[k] = complex(real(v), -imag(v))
		if k != m-k {
			z[m-k] = complex(real(e)+imag(o), -(real(o) - imag(e))) // conj(conj(e) + i·conj(o))
		}
	}
	p.half.transform(z, z, w.half)
	for k, v := range z {
		dst[2*k], dst[2*k+1] = real(v), -imag(v)
	}
}

// RealFFT is quadtrace's real FFT of one length, with the interface and
// conventions of gonum's fourier.FFT (Coefficients returns the Len/2+1
// coefficients, Sequence inverts them, times Len). It is safe for
// concurrent use: the plan is shared and each call borrows work space from
// a pool.
type RealFFT struct {
	plan *realPlan
	pool sync.Pool
}

// NewRealFFT returns the real FFT of length n >= 1.
func NewRealFFT(n int) *RealFFT {
	f := &RealFFT{plan: newRealPlan(n)}
	f.pool.New = func() any { return f.plan.newWork() }
	return f
}

// Len returns the length of the sequences f transforms.
func (f *RealFFT) Len() int { return f.plan.n }

// Coefficients computes X_k = Σ_j seq_j exp(-2πi jk/n) for k = 0..n/2 into
// dst (allocated when nil) and returns it. seq must have Len elements.
func (f *RealFFT) Coefficients(dst []complex128, seq []float64) []complex128 {
	if len(seq) != f.plan.n {
		panic("compute: RealFFT.Coefficients: sequence length mismatch")
	}
	if dst == nil {
		dst = make([]complex128, f.plan.n/2+1)
	} else if len(dst) != f.plan.n/2+1 {
		panic("compute: RealFFT.Coefficients: destination length mismatch")
	}
	w := f.pool.Get().(*realWork)
	f.plan.forward(dst, seq, w)
	f.pool.Put(w)
	return dst
}

// Sequence computes seq_j = Σ_{k<n} X_k exp(2πi jk/n) from the n/2+1
// coefficients coeff into dst (allocated when nil) and returns it: Len
// times the inverse DFT.
func (f *RealFFT) Sequence(dst []float64, coeff []complex128) []float64 {
	if len(coeff) != f.plan.n/2+1 {
		panic("compute: RealFFT.Sequence: coefficients length mismatch")
	}
	if dst == nil {
		dst = make([]float64, f.plan.n)
	} else if len(dst) != f.plan.n {
		panic("compute: RealFFT.Sequence: destination length mismatch")
	}
	w := f.pool.Get().(*realWork)
	f.plan.inverse(dst, coeff, w)
	f.pool.Put(w)
	return dst
}
