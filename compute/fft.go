package compute

import (
	"math"
	"math/bits"
)

// This file is quadtrace's own FFT: the one hot kernel the project writes
// by hand instead of taking it from a library (the house-rule exception of
// issue 13: profiles of the instantaneous attributes and the export showed
// gonum's dsp/fourier as the bottleneck). gonum's fourier.FFT and
// fourier.CmplxFFT stay the reference it is tested against (fft_test.go),
// with scipy.fft beside them.
//
// Precision: float64 throughout (complex128). The same kernel with
// complex64 measured slower, not faster (best of 30 rounds, one core,
// interleaved: 11-12 µs against 15.5-16 µs per complex transform of 2048,
// 20-23 against 29-56 µs at 3072): Go computes both with scalar SSE2
// instructions and converts complex64 products, so nothing was gained for
// losing eight digits. Measured error against scipy.fft and gonum at every
// length 1..4100 and the long and prime lengths of fft_test.go:
// ‖X - X_ref‖₂ / ‖X_ref‖₂ at most 3e-15; the tests require 1e-12.

// fftPlan is a complex discrete Fourier transform of one length n,
//
//	X_k = Σ_{j<n} x_j exp(-2πi jk/n),   k = 0..n-1,
//
// unnormalised, as gonum's fourier.CmplxFFT.Coefficients and scipy.fft.fft.
// A plan is read-only once made, so any number of goroutines may share it;
// each brings its own work buffer (newWork).
//
// Lengths whose factors are all small (2, 3, 4, 5 and odd factors up to
// maxDirectRadix) use a Stockham autosort mixed-radix transform (no bit
// reversal: each pass reads one buffer and writes the other in natural
// order; Stockham 1966, in the form of Van Loan, "Computational Frameworks
// for the Fast Fourier Transform", SIAM 1992, section 1.7). Other lengths,
// or lengths where it is estimated cheaper, use Bluestein's chirp-z
// algorithm (Bluestein 1970, "A linear filtering approach to the
// computation of discrete Fourier transform", IEEE Trans. Audio
// Electroacoustics 18(4), 451-455): a circular convolution of length M >=
// 2n-1 with M a product of 2, 3 and 5, done with two mixed-radix
// transforms of length M.
//
// Twiddle factors are computed once per plan, each directly with
// math.Sincos (no recurrences, so no accumulated rounding).
type fftPlan struct {
	n      int
	stages []fftStage
	blue   *bluestein // non-nil: Bluestein's algorithm
	// simd: radix-4 and radix-2 passes with an even stride run in
	// fft_amd64.s (AVX2 and FMA: two complex values per register) instead
	// of Go. Set from haveSIMD; tests clear it to check the Go passes.
	simd bool
}

// fftStage is one Stockham pass of radix r over a transform of length N:
// with the span l = r*m and stride s (s*l = N), it maps x to y by
//
//	y[q + s(r p + j)] = W_l^{jp} Σ_{k<r} x[q + s(p + k m)] W_r^{jk}
//
// for p < m, q < s, j < r, where W_l = exp(-2πi/l).
type fftStage struct {
	r, m, s int
	tw      []complex128 // W_l^{jp} at [p*(r-1) + j-1], j = 1..r-1, p = 0..m-1
	root    []complex128 // W_r^{j} for j < r (generic odd radix only)
	// twPair is tw for the vector first pass (radix 4, s = 1, m even):
	// per pair p, p+1 the twiddles of both side by side, at
	// [6(p/2) + 2(j-1) + p%2].
	twPair []complex128
}

// maxDirectRadix is the largest odd prime factor the mixed-radix path
// handles itself; a length with a larger one goes through Bluestein.
const maxDirectRadix = 13

// fftWork is one goroutine's work space for a plan: the ping-pong buffer of
// the Stockham passes and, for Bluestein plans, the convolution buffers.
type fftWork struct {
	buf   []complex128
	odd   []complex128 // generic odd radix: scratch for 2r values
	conv  []complex128 // Bluestein: the convolution, length M
	inner *fftWork     // Bluestein: the inner plan's work
}

// newFFTPlan returns the plan for length n >= 1.
func newFFTPlan(n int) *fftPlan {
	p := &fftPlan{n: n, simd: haveSIMD}
	if n <= 1 {
		return p
	}
	if f := factorize(n); f != nil && mixedCost(n, f) <= bluesteinCost(n) {
		p.stages = makeStages(n, f)
		return p
	}
	p.blue = newBluestein(n)
	return p
}

// newWork returns a work buffer for p.
func (p *fftPlan) newWork() *fftWork {
	w := &fftWork{buf: make([]complex128, p.n), odd: make([]complex128, 2*maxDirectRadix)}
	if p.blue != nil {
		w.conv = make([]complex128, p.blue.inner.n)
		w.inner = p.blue.inner.newWork()
	}
	return w
}

// factorize splits n into radices for the Stockham passes (radix 8 was
// tried and measured slower than radix 4 except as the first pass): fours first,
// then a two, threes, fives and larger odd primes up to maxDirectRadix. It
// returns nil when n has a larger prime factor.
func factorize(n int) []int {
	var f []int
	for n%4 == 0 {
		f = append(f, 4)
		n /= 4
	}
	if n%2 == 0 {
		f = append(f, 2)
		n /= 2
	}
	for r := 3; r <= maxDirectRadix && n > 1; r += 2 {
		for n%r == 0 {
			f = append(f, r)
			n /= r
		}
	}
	if n != 1 {
		return nil
	}
	return f
}

// mixedCost estimates the work of a mixed-radix transform in units of
// about one complex multiply-add per sample and pass (radix 4 does two
// levels for the price of ~1.25; a generic odd radix r costs ~r/2).
func mixedCost(n int, f []int) float64 {
	c := 0.0
	for _, r := range f {
		switch r {
		case 2:
			c += 1
		case 3:
			c += 1.5
		case 4:
			c += 1.25
		case 5:
			c += 2
		default:
			c += float64(r) / 2
		}
	}
	return float64(n) * c
}

// bluesteinCost estimates Bluestein's work for length n: two transforms of
// the convolution length and three pointwise passes.
func bluesteinCost(n int) float64 {
	M := goodSize(2*n - 1)
	return 2*mixedCost(M, factorize(M)) + 3*float64(M)
}

// goodSize returns the smallest m >= n whose only prime factors are 2, 3
// and 5 (a "5-smooth" number).
func goodSize(n int) int {
	best := NextPow2(n)
	for p5 := 1; p5 < best; p5 *= 5 {
		for p35 := p5; p35 < best; p35 *= 3 {
			m := p35
			for m < n {
				m *= 2
			}
			if m < best {
				best = m
			}
		}
	}
	return best
}

// rootsOfUnity returns exp(-2πi k/n) for k < n, each from math.Sincos.
func rootsOfUnity(n int) []complex128 {
	w := make([]complex128, n)
	for k := range w {
		s, c := math.Sincos(-2 * math.Pi * float64(k) / float64(n))
		w[k] = complex(c, s)
	}
	return w
}

// makeStages lays out the Stockham passes for the radices f of n.
func makeStages(n int, f []int) []fftStage {
	root := rootsOfUnity(n)
	st := make([]fftStage, len(f))
	s := 1
	for i, r := range f {
		l := n / s // span of this pass
		m := l / r
		g := fftStage{r: r, m: m, s: s, tw: make([]complex128, m*(r-1))}
		for p := range m {
			for j := 1; j < r; j++ {
				// W_l^{jp} = W_n^{jps}; jp < l so jps < n.
				g.tw[p*(r-1)+j-1] = root[j*p*s]
			}
		}
		if r == 4 && s == 1 && m%2 == 0 {
			g.twPair = make([]complex128, len(g.tw))
			for p := range m {
				for j := 1; j < 4; j++ {
					g.twPair[6*(p/2)+2*(j-1)+p%2] = g.tw[3*p+j-1]
				}
			}
		}
		if r > 5 {
			g.root = make([]complex128, r)
			for j := range g.root {
				g.root[j] = root[j*(n/r)]
			}
		}
		st[i] = g
		s *= r
	}
	return st
}

// transform stores the DFT of src in dst (both of length n; they may be the
// same slice), using w (from p.newWork) as scratch.
func (p *fftPlan) transform(dst, src []complex128, w *fftWork) {
	switch {
	case p.n <= 1:
		copy(dst, src)
	case p.blue != nil:
		p.blue.transform(dst, src, w)
	default:
		runStages(p.stages, dst, src, w.buf, w.odd, p.simd)
	}
}

// runStages applies the passes from src into dst, ping-ponging with buf so
// that the last pass writes dst.
func runStages(stages []fftStage, dst, src, buf, odd []complex128, simd bool) {
	in := src
	// Choose the first output so the last pass lands in dst.
	out := dst
	if len(stages)%2 == 0 {
		out = buf
	}
	if &in[0] == &out[0] { // src is dst with an odd number of passes
		copy(buf, src)
		in = buf
		out = dst
		// now the passes go buf->dst->buf->...: odd count ends in dst
	}
	for i := range stages {
		stages[i].apply(out, in, odd, simd)
		next := buf
		if &out[0] == &buf[0] {
			next = dst
		}
		in, out = out, next
	}
}

// apply runs one pass from x into y, with the vector passes when simd is
// set and the stride allows.
func (g *fftStage) apply(y, x, odd []complex128, simd bool) {
	if simd && g.applySIMD(y, x) {
		return
	}
	switch g.r {
	case 4:
		g.radix4(y, x)
	case 2:
		g.radix2(y, x)
	case 3:
		g.radix3(y, x)
	case 5:
		g.radix5(y, x)
	default:
		g.radixOdd(y, x, odd)
	}
}

func (g *fftStage) radix2(y, x []complex128) {
	m, s := g.m, g.s
	for p := range m {
		x0 := x[s*p : s*p+s]
		x1 := x[s*(p+m) : s*(p+m)+s]
		y0 := y[s*2*p : s*2*p+s]
		y1 := y[s*(2*p+1) : s*(2*p+1)+s]
		x1, y0, y1 = x1[:len(x0)], y0[:len(x0)], y1[:len(x0)]
		if p == 0 {
			for q, a := range x0 {
				b := x1[q]
				y0[q], y1[q] = a+b, a-b
			}
			continue
		}
		w1 := g.tw[p]
		for q, a := range x0 {
			b := x1[q]
			y0[q], y1[q] = a+b, w1*(a-b)
		}
	}
}

// radix4 is the radix-4 pass: with W_4 = -i,
// b0 = (a0+a2)+(a1+a3), b1 = (a0-a2)-i(a1-a3), b2 = (a0+a2)-(a1+a3),
// b3 = (a0-a2)+i(a1-a3).
func (g *fftStage) radix4(y, x []complex128) {
	m, s := g.m, g.s
	if s == 1 {
		// First pass: one butterfly per p, outputs side by side.
		x0, x1, x2, x3 := x[:m], x[m:2*m], x[2*m:3*m], x[3*m:4*m]
		x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
		tw := g.tw
		for p, a0 := range x0 {
			a1, a2, a3 := x1[p], x2[p], x3[p]
			apc, amc := a0+a2, a0-a2
			bpd, bmd := a1+a3, a1-a3
			jbmd := complex(-imag(bmd), real(bmd))
			yy := y[4*p : 4*p+4 : 4*p+4]
			yy[0] = apc + bpd
			if p == 0 {
				yy[1], yy[2], yy[3] = amc-jbmd, apc-bpd, amc+jbmd
				continue
			}
			t := tw[3*p : 3*p+3 : 3*p+3]
			yy[1] = t[0] * (amc - jbmd)
			yy[2] = t[1] * (apc - bpd)
			yy[3] = t[2] * (amc + jbmd)
		}
		return
	}
	for p := range m {
		x0 := x[s*p : s*p+s]
		x1 := x[s*(p+m) : s*(p+m)+s]
		x2 := x[s*(p+2*m) : s*(p+2*m)+s]
		x3 := x[s*(p+3*m) : s*(p+3*m)+s]
		o := s * 4 * p
		y0, y1, y2, y3 := y[o:o+s], y[o+s:o+2*s], y[o+2*s:o+3*s], y[o+3*s:o+4*s]
		x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
		y0, y1, y2, y3 = y0[:len(x0)], y1[:len(x0)], y2[:len(x0)], y3[:len(x0)]
		if p == 0 {
			for q, a0 := range x0 {
				a1, a2, a3 := x1[q], x2[q], x3[q]
				apc, amc := a0+a2, a0-a2
				bpd, bmd := a1+a3, a1-a3
				jbmd := complex(-imag(bmd), real(bmd))
				y0[q], y1[q], y2[q], y3[q] = apc+bpd, amc-jbmd, apc-bpd, amc+jbmd
			}
			continue
		}
		w1, w2, w3 := g.tw[3*p], g.tw[3*p+1], g.tw[3*p+2]
		for q, a0 := range x0 {
			a1, a2, a3 := x1[q], x2[q], x3[q]
			apc, amc := a0+a2, a0-a2
			bpd, bmd := a1+a3, a1-a3
			jbmd := complex(-imag(bmd), real(bmd))
			y0[q] = apc + bpd
			y1[q] = w1 * (amc - jbmd)
			y2[q] = w2 * (apc - bpd)
			y3[q] = w3 * (amc + jbmd)
		}
	}
}

// radix3: b0 = a0+a1+a2, b1,2 = a0 - (a1+a2)/2 ∓ i(√3/2)(a1-a2).
func (g *fftStage) radix3(y, x []complex128) {
	const h = 0.86602540378443864676 // sin(2π/3)
	m, s := g.m, g.s
	for p := range m {
		x0 := x[s*p : s*p+s]
		x1 := x[s*(p+m) : s*(p+m)+s]
		x2 := x[s*(p+2*m) : s*(p+2*m)+s]
		o := s * 3 * p
		y0, y1, y2 := y[o:o+s], y[o+s:o+2*s], y[o+2*s:o+3*s]
		x1, x2 = x1[:len(x0)], x2[:len(x0)]
		y0, y1, y2 = y0[:len(x0)], y1[:len(x0)], y2[:len(x0)]
		w1, w2 := complex(1, 0), complex(1, 0)
		if p > 0 {
			w1, w2 = g.tw[2*p], g.tw[2*p+1]
		}
		for q, a0 := range x0 {
			a1, a2 := x1[q], x2[q]
			t1 := a1 + a2
			t2 := a0 - 0.5*t1
			d := a1 - a2
			t3 := complex(h*imag(d), -h*real(d)) // -i h d
			y0[q] = a0 + t1
			y1[q] = w1 * (t2 + t3)
			y2[q] = w2 * (t2 - t3)
		}
	}
}

// radix5 with c1,2 = cos(2π/5), cos(4π/5) and s1,2 = sin(2π/5), sin(4π/5):
// b1,4 = a0 + c1 t1 + c2 t2 ∓ i(s1 t3 + s2 t4), b2,3 = a0 + c2 t1 + c1 t2
// ∓ i(s2 t3 - s1 t4), with t1 = a1+a4, t2 = a2+a3, t3 = a1-a4, t4 = a2-a3.
func (g *fftStage) radix5(y, x []complex128) {
	const (
		c1 = 0.30901699437494742410
		c2 = -0.80901699437494742410
		s1 = 0.95105651629515357212
		s2 = 0.58778525229247312917
	)
	m, s := g.m, g.s
	for p := range m {
		x0 := x[s*p : s*p+s]
		x1 := x[s*(p+m) : s*(p+m)+s]
		x2 := x[s*(p+2*m) : s*(p+2*m)+s]
		x3 := x[s*(p+3*m) : s*(p+3*m)+s]
		x4 := x[s*(p+4*m) : s*(p+4*m)+s]
		o := s * 5 * p
		y0, y1, y2, y3, y4 := y[o:o+s], y[o+s:o+2*s], y[o+2*s:o+3*s], y[o+3*s:o+4*s], y[o+4*s:o+5*s]
		x1, x2, x3, x4 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)], x4[:len(x0)]
		y0, y1, y2, y3, y4 = y0[:len(x0)], y1[:len(x0)], y2[:len(x0)], y3[:len(x0)], y4[:len(x0)]
		w1, w2, w3, w4 := complex(1, 0), complex(1, 0), complex(1, 0), complex(1, 0)
		if p > 0 {
			t := g.tw[4*p : 4*p+4]
			w1, w2, w3, w4 = t[0], t[1], t[2], t[3]
		}
		for q, a0 := range x0 {
			a1, a2, a3, a4 := x1[q], x2[q], x3[q], x4[q]
			t1, t2, t3, t4 := a1+a4, a2+a3, a1-a4, a2-a3
			r1 := a0 + complex(c1, 0)*t1 + complex(c2, 0)*t2
			r2 := a0 + complex(c2, 0)*t1 + complex(c1, 0)*t2
			i1 := complex(s1, 0)*t3 + complex(s2, 0)*t4
			i2 := complex(s2, 0)*t3 - complex(s1, 0)*t4
			ji1 := complex(-imag(i1), real(i1))
			ji2 := complex(-imag(i2), real(i2))
			y0[q] = a0 + t1 + t2
			y1[q] = w1 * (r1 - ji1)
			y2[q] = w2 * (r2 - ji2)
			y3[q] = w3 * (r2 + ji2)
			y4[q] = w4 * (r1 + ji1)
		}
	}
}

// radixOdd is the pass for an odd radix r > 5: each butterfly is a direct
// DFT of r points, pairing j and r-j (their sums and differences share the
// cosine and sine terms).
func (g *fftStage) radixOdd(y, x, scratch []complex128) {
	r, m, s := g.r, g.m, g.s
	half := (r - 1) / 2
	sum, dif := scratch[:half+1], scratch[half+1:2*half+2]
	for p := range m {
		for q := range s {
			a0 := x[q+s*p]
			b0 := a0
			for k := 1; k <= half; k++ {
				a, b := x[q+s*(p+k*m)], x[q+s*(p+(r-k)*m)]
				sum[k], dif[k] = a+b, a-b
				b0 += a + b
			}
			y[q+s*r*p] = b0
			for j := 1; j <= half; j++ {
				re, im := a0, complex(0, 0)
				jk := 0
				for k := 1; k <= half; k++ {
					jk += j
					if jk >= r {
						jk -= r
					}
					w := g.root[jk] // cos - i sin
					re += complex(real(w), 0) * sum[k]
					im += complex(imag(w), 0) * dif[k] // -sin·dif
				}
				// b_j = re + i·im_(as -sin·dif, times i), b_{r-j} = re - i·im.
				iim := complex(-imag(im), real(im))
				bj, brj := re+iim, re-iim
				if p > 0 {
					bj *= g.tw[p*(r-1)+j-1]
					brj *= g.tw[p*(r-1)+r-j-1]
				}
				y[q+s*(r*p+j)] = bj
				y[q+s*(r*p+r-j)] = brj
			}
		}
	}
}

// bluestein holds Bluestein's algorithm for length n: with the chirp
// c_j = exp(-πi j²/n),
//
//	X_k = c_k Σ_j (x_j c_j) conj(c_{k-j}),
//
// a circular convolution of length M computed as
// IFFT_M(FFT_M(a) · B) with B = FFT_M(conj(c)) / M precomputed.
type bluestein struct {
	n     int
	chirp []complex128 // c_j, j < n
	b     []complex128 // FFT_M of conj(c) wrapped round, divided by M
	inner *fftPlan     // mixed radix, length M
}

func newBluestein(n int) *bluestein {
	M := goodSize(2*n - 1)
	bl := &bluestein{n: n, chirp: make([]complex128, n), b: make([]complex128, M), inner: &fftPlan{n: M, simd: haveSIMD}}
	bl.inner.stages = makeStages(M, factorize(M))
	for j := range bl.chirp {
		// j² mod 2n in integers keeps the angle small and exact.
		jj := (uint64(j) * uint64(j)) % uint64(2*n)
		s, c := math.Sincos(-math.Pi * float64(jj) / float64(n))
		bl.chirp[j] = complex(c, s)
	}
	inv := complex(1/float64(M), 0)
	bl.b[0] = inv
	for j := 1; j < n; j++ {
		v := complex(real(bl.chirp[j]), -imag(bl.chirp[j])) * inv
		bl.b[j], bl.b[M-j] = v, v
	}
	w := bl.inner.newWork()
	bl.inner.transform(bl.b, bl.b, w)
	return bl
}

func (bl *bluestein) transform(dst, src []complex128, w *fftWork) {
	n, a := bl.n, w.conv
	for j, c := range bl.chirp[:n] {
		a[j] = src[j] * c
	}
	clear(a[n:])
	bl.inner.transform(a, a, w.inner)
	// The inverse transform as conj(FFT(conj(·))): conjugate on the way in
	// and on the way out.
	for k, v := range a {
		v *= bl.b[k]
		a[k] = complex(real(v), -imag(v))
	}
	bl.inner.transform(a, a, w.inner)
	for k, c := range bl.chirp[:n] {
		v := a[k]
		dst[k] = complex(real(v), -imag(v)) * c
	}
}

// NextPow2 returns the smallest power of two >= n (1 for n < 1).
func NextPow2(n int) int {
	if n <= 1 {
		return 1
	}
	return 1 << bits.Len(uint(n-1))
}
