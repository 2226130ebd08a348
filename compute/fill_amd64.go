//go:build amd64 && !purego

package compute

// instFillSIMD writes for samples j < n (n a multiple of 4; the rest are
// left alone) the envelope a, phase ph in degrees, frequency f in Hz and
// cosine of phase c of the analytic trace x + ih with derivatives dx, dh,
// by the formulas of InstantaneousSet.fill (atan2 by atan2s's polynomial),
// four samples per step with AVX2 and FMA (haveSIMD). Gaps are not its
// business.
//
//go:noescape
func instFillSIMD(a, ph, f, c *float32, x, h, dx, dh *float64, n int, eps float64)

// instFillVector runs instFillSIMD on the longest multiple of 4 of the
// trace and returns how many samples it wrote.
func instFillVector(a, ph, f, c []float32, x, h, dx, dh []float64, eps float64) int {
	n := len(x) &^ 3
	if !haveSIMD || n == 0 || len(a) < n || len(ph) < n || len(f) < n || len(c) < n || len(h) < n || len(dx) < n || len(dh) < n {
		return 0
	}
	instFillSIMD(&a[0], &ph[0], &f[0], &c[0], &x[0], &h[0], &dx[0], &dh[0], n, eps)
	return n
}

// envFillSIMD writes for samples j < n (n a multiple of 8; the rest are
// left alone) the envelope a[j] = float32(sqrt(x[j]² + h[j]²)), eight
// samples per step with AVX2 and FMA (haveSIMD). x² + h² is formed with
// one fused multiply-add, so it may differ from Go's x*x + h*h in the last
// bit of the float64; both are within one float32 rounding of math.Hypot
// (TestEnvelopeFillMatchesHypot).
//
//go:noescape
func envFillSIMD(a *float32, x, h *float64, n int)

// envFillVector runs envFillSIMD on the longest multiple of 8 of a and
// returns how many samples it wrote.
func envFillVector(a []float32, x, h []float64) int {
	n := len(a) &^ 7
	if !haveSIMD || n == 0 || len(x) < n || len(h) < n {
		return 0
	}
	envFillSIMD(&a[0], &x[0], &h[0], n)
	return n
}

// saturateSIMD clamps samples j < n (n a multiple of 8; the rest are left
// alone) to -math.MaxFloat32..math.MaxFloat32 as saturateTrace does,
// leaving NaN unchanged, eight at a time with AVX2 (haveSIMD).
//
//go:noescape
func saturateSIMD(tr *float32, n int)

// saturateVector runs saturateSIMD on the longest multiple of 8 of tr and
// returns how many samples it handled.
func saturateVector(tr []float32) int {
	n := len(tr) &^ 7
	if !haveSIMD || n == 0 {
		return 0
	}
	saturateSIMD(&tr[0], n)
	return n
}

// loadSIMD writes x[j] = float64(tr[j]) for j < n (n a multiple of 8; the
// rest are left alone), 0 where tr[j] is NaN or ±Inf, and returns how many
// such gap samples it met: analyticTrace.load's conversion, eight at a time
// with AVX2 (haveSIMD).
//
//go:noescape
func loadSIMD(x *float64, tr *float32, n int) (gaps int)

// loadVector runs loadSIMD on the longest multiple of 8 of tr and returns
// how many samples it converted and how many of them were gaps.
func loadVector(x []float64, tr []float32) (done, gaps int) {
	n := len(tr) &^ 7
	if !haveSIMD || n == 0 || len(x) < n {
		return 0, 0
	}
	return n, loadSIMD(&x[0], &tr[0], n)
}

// specOpSIMD writes, for bins k = 1 .. 2*pairs, the conjugated operator
// spectrum of analyticPair.apply: z_k and z_{m-k} from the spectrum s and
// the operator's gains (imaginary != 0: an imaginary response), two bins
// per step with AVX2 (haveSIMD). zk, sk and gain point at bin 1; zr and sr at
// bin m-2, the lower of the first pair of mirrored bins, and walk down.
// The products are Go's, so the results equal apply's loop bit for bit.
//
//go:noescape
func specOpSIMD(zk, zr, sk, sr *complex128, gain *float64, pairs, imaginary int)

// specOpVector runs specOpSIMD over the longest even run of bins 1..pos
// (pos = (m-1)/2, the positive frequencies below Nyquist) and returns how
// many bins it wrote.
func specOpVector(z, s []complex128, g []float64, m, pos int, imaginary bool) int {
	pairs := pos / 2
	if !haveSIMD || pairs == 0 || len(z) < m || len(s) < m || len(g) <= 2*pairs {
		return 0
	}
	im := 0
	if imaginary {
		im = 1
	}
	specOpSIMD(&z[1], &z[m-2], &s[1], &s[m-2], &g[1], pairs, im)
	return 2 * pairs
}

// interleaveSIMD writes z[j] = complex(a[j], b[j]) for j < n (n a multiple
// of 4; the rest are left alone), four at a time with AVX2 (haveSIMD):
// analyticPair.forward's packing of two traces.
//
//go:noescape
func interleaveSIMD(z *complex128, a, b *float64, n int)

// deinterleaveSIMD writes ra[j] = real(z[j]) and rb[j] = -imag(z[j]) for
// j < n (n a multiple of 4; the rest are left alone), four at a time with
// AVX2 (haveSIMD): analyticPair.unpack of two traces.
//
//go:noescape
func deinterleaveSIMD(ra, rb *float64, z *complex128, n int)

// interleaveVector runs interleaveSIMD on the longest multiple of 4 of a
// and returns how many samples it packed.
func interleaveVector(z []complex128, a, b []float64) int {
	n := len(a) &^ 3
	if !haveSIMD || n == 0 || len(b) < n || len(z) < n {
		return 0
	}
	interleaveSIMD(&z[0], &a[0], &b[0], n)
	return n
}

// deinterleaveVector runs deinterleaveSIMD on the longest multiple of 4 of
// ra and returns how many samples it unpacked.
func deinterleaveVector(ra, rb []float64, z []complex128) int {
	n := len(ra) &^ 3
	if !haveSIMD || n == 0 || len(rb) < n || len(z) < n {
		return 0
	}
	deinterleaveSIMD(&ra[0], &rb[0], &z[0], n)
	return n
}
