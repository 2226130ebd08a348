package compute

import (
	"fmt"
	"math"
)

// End-treatment modes for the analytic trace (the `pad` parameter).
const (
	// PadNone transforms the trace at its own length: the result is the
	// plain discrete analytic signal of Marple (1999), "Computing the
	// discrete-time analytic signal via FFT", IEEE Transactions on Signal
	// Processing 47(9), 2600-2603, the same as scipy.signal.hilbert(x).
	// Its ends wrap round onto each other and lengths with large prime
	// factors transform slowly.
	PadNone = "none"
	// PadFast appends zeros up to the next power of two m (the fastest FFT
	// lengths in gonum); the result equals Marple's analytic signal of the
	// zero-padded trace, cut back to the trace length, i.e.
	// scipy.signal.hilbert(x, N=m)[:n]. This is the default.
	PadFast = "fast"
	// PadDouble appends zeros up to the next power of two of at least twice
	// the trace length, so the circular wrap-around of the transform falls
	// on the padding rather than on the other end of the trace.
	PadDouble = "double"
)

// PadModes lists the accepted values of the `pad` parameter.
func PadModes() []string { return []string{PadNone, PadFast, PadDouble} }

// EndTreatment says how a trace's ends are handled before its FFT.
//
// Zero padding (PadFast, PadDouble) keeps the far end of the trace from
// wrapping onto the near one, but a trace that is still strong at its ends
// then steps to zero there, and that step rings into the quadrature: about
// 3% in instantaneous frequency 0.2 s into a chirp at 26 Hz (see
// TestChirpInstantaneousFrequency). A taper of a wavelength or so
// (TaperMS ~ 100) removes it at the cost of the tapered samples' amplitude.
// Traces with quiet ends (mutes, decayed energy) need no taper.
type EndTreatment struct {
	// Pad is PadNone, PadFast or PadDouble ("" means PadFast).
	Pad string
	// TaperMS, when positive, multiplies the first and last TaperMS
	// milliseconds of the trace by a half Hann (cosine-squared) ramp,
	// w_j = sin²(π(j+½)/(2L)) for j = 0..L-1 (mirrored at the end), before
	// the transform. The analytic trace is then that of the tapered trace.
	// The ramp is cut to half the trace when the trace is shorter.
	TaperMS float64
}

// transformLength returns the FFT length used for traces of n samples.
func (e EndTreatment) transformLength(n int) (int, error) {
	switch e.Pad {
	case PadNone:
		return n, nil
	case PadFast, "":
		return NextPow2(n), nil
	case PadDouble:
		return NextPow2(2 * n), nil
	}
	return 0, fmt.Errorf("end treatment: unknown pad mode %q (want none, fast or double)", e.Pad)
}

// analyticTrace holds one trace's analytic signal z = x + i h and the time
// derivatives x', h' (per second) when they were asked for.
type analyticTrace struct {
	n    int
	dt   float64
	x, h []float64 // trace (gaps zeroed, tapered) and its Hilbert transform
	// dx, dh are the first time derivatives of x and h.
	dx, dh []float64
	gap    []bool // gap[j]: sample j was NaN or Inf
	gaps   int    // number of gap samples in the loaded trace
	// gapMarked: gap may hold a true (load clears it before a clean
	// trace).
	gapMarked bool
}

// resize readies t for traces of n samples at interval dt.
func (t *analyticTrace) resize(n int, dt float64) {
	t.n, t.dt = n, dt
	if len(t.x) != n {
		t.x, t.h, t.dx, t.dh = make([]float64, n), make([]float64, n), make([]float64, n), make([]float64, n)
		t.gap = make([]bool, n)
		t.gapMarked = false
	}
}

// load copies a trace into t.x (gaps set to zero and flagged, taper
// applied). t.gap is rewritten only when this trace or the last one
// loaded had a gap (t.gapMarked), so a clean trace costs one pass.
func (t *analyticTrace) load(tr []float32, taper []float64) {
	x := t.x[:len(tr)]
	// Eight samples at a time in fill_amd64.s where the processor allows,
	// the rest here.
	done, gaps := loadVector(x, tr)
	t.gaps = gaps
	for j := done; j < len(tr); j++ {
		f := float64(tr[j])
		// NaN fails every comparison; ±Inf exceeds the largest float32.
		if !(f >= -math.MaxFloat32 && f <= math.MaxFloat32) {
			t.gaps++
			f = 0
		}
		x[j] = f
	}
	if t.gaps > 0 {
		gap := t.gap[:len(tr)]
		for j, v := range tr {
			f := float64(v)
			gap[j] = !(f >= -math.MaxFloat32 && f <= math.MaxFloat32)
		}
		t.gapMarked = true
	} else if t.gapMarked {
		clear(t.gap)
		t.gapMarked = false
	}
	for j, w := range taper {
		x[j] *= w
		x[len(x)-1-j] *= w
	}
}

// spectralOp is a real linear time-invariant operator given by its
// frequency response at bins k = 0..m/2 (the positive frequencies; the
// negative frequency -k takes the conjugate response, so real signals stay
// real): g[k] when the response is real (zero phase: filters, |ω|, -ω²),
// i·g[k] when it is imaginary (Hilbert transform, iω, integration). Every
// operator quadtrace needs is one of the two, which keeps the per-bin work
// at two multiplications. g[0] and (m even) g[m/2] must be 0 for an
// imaginary response. The 1/m of the inverse transform is folded into g.
type spectralOp struct {
	g         []float64
	imaginary bool
	// kc, in convolution mode (see analyticPair.conv), is the operator as
	// a circular convolution kernel: the transform over conv.n of its
	// length-m kernel laid out round zero, divided by conv.n. apply makes
	// it on first use.
	kc []complex128
}

// analyticPair computes analytic traces two at a time: the real traces a
// and b are transformed together as a + ib with one complex FFT of length m
// (the padded length), and every real operator (Hilbert transform, time
// derivatives, filters) is applied to both at once: op(a) + i op(b) is the
// inverse transform of the operator's response times the spectrum of
// a + ib. A trace pair thus takes one forward and, for z and z', three
// inverse complex transforms: per trace half a forward transform and one
// and a half inverse ones (Press et al., Numerical Recipes, 3rd ed.,
// section 12.3.1, "transforms of two real functions simultaneously").
// A lone trace (b nil) takes the same path with b = 0.
type analyticPair struct {
	n, m  int
	dt    float64
	end   EndTreatment
	taper []float64
	plan  *fftPlan // shared by all workers
	work  *fftWork
	spec  []complex128 // m (conv.n in convolution mode): spectrum of a + ib (unnormalised)
	z     []complex128 // as spec: inverse-transform buffer

	// conv, when not nil, is convolution mode, taken when the plan of
	// length m is Bluestein's (m has a prime factor above maxDirectRadix,
	// e.g. pad=none at 1501 = 19·79). An operator applied at length m is a
	// circular convolution of length m with a real kernel c (c = the
	// inverse DFT of its response), and a circular convolution of length
	// m equals the first m samples of a circular convolution of length
	// M >= 2m-1 of the zero-padded trace with c laid out round zero
	// (c_t at t and c_{m-t} at M-t, t < m): no wrap-around term can reach
	// them. So the trace pair takes one forward and one inverse transform
	// of length M per operator, where Bluestein's algorithm takes two of
	// length M for each transform of length m: half the work. conv is the
	// Bluestein plan's own inner plan (M = goodSize(2m-1)), shared.
	conv     *fftPlan
	convWork *fftWork

	// Operators, built once per setup: the Hilbert transform -i sgn(ω)
	// with zero at DC and Nyquist (Marple 1999), the derivatives iω of x
	// and |ω| of h (the Nyquist bin of an even length has no defined
	// derivative and is dropped), and the second derivatives -ω² and
	// iω|ω|.
	hilbert, dx, dh, ddx, ddh spectralOp
}

// analyticPlan returns the transform plan for traces of n samples with the
// given end treatment, to be shared by every worker.
func analyticPlan(n int, end EndTreatment) (*fftPlan, error) {
	m, err := end.transformLength(max(n, 1))
	if err != nil {
		return nil, err
	}
	return newFFTPlan(m), nil
}

// setup readies p for traces of n samples at interval dt, with plan (may
// be nil: one is made) for the padded length. It keeps its state when
// nothing changed.
func (p *analyticPair) setup(n int, dt float64, end EndTreatment, plan *fftPlan) error {
	if p.plan != nil && p.n == n && p.dt == dt && p.end == end {
		return nil
	}
	m, err := end.transformLength(n)
	if err != nil {
		return err
	}
	if end.TaperMS < 0 || math.IsNaN(end.TaperMS) {
		return fmt.Errorf("end treatment: taper %v ms is negative", end.TaperMS)
	}
	if plan == nil || plan.n != m {
		plan = newFFTPlan(m)
	}
	p.n, p.m, p.dt, p.end, p.plan = n, m, dt, end, plan
	p.work = plan.newWork()
	p.conv, p.convWork = nil, nil
	size := m
	if plan.blue != nil {
		p.conv = plan.blue.inner
		p.convWork = p.conv.newWork()
		size = p.conv.n
	}
	p.spec, p.z = make([]complex128, size), make([]complex128, size)
	L := int(math.Round(end.TaperMS / 1000 / dt))
	if L > n/2 {
		L = n / 2
	}
	p.taper = make([]float64, L)
	for j := range p.taper {
		s := math.Sin(math.Pi * (float64(j) + 0.5) / float64(2*L))
		p.taper[j] = s * s
	}
	p.hilbert = p.makeOp(true, func(om float64) float64 { return -1 })
	p.dx = p.makeOp(true, func(om float64) float64 { return om })
	p.dh = p.makeOp(false, func(om float64) float64 { return om })
	p.ddx = p.makeOp(false, func(om float64) float64 { return -om * om })
	p.ddh = p.makeOp(true, func(om float64) float64 { return om * om })
	return nil
}

// makeOp builds the spectralOp with response resp(ω) (times i when
// imaginary) at the positive angular frequencies ω of bins 1..(m-1)/2,
// zero at DC and Nyquist.
func (p *analyticPair) makeOp(imaginary bool, resp func(om float64) float64) spectralOp {
	op := spectralOp{g: make([]float64, p.m/2+1), imaginary: imaginary}
	dw := 2 * math.Pi / (float64(p.m) * p.dt)
	for k := 1; k <= (p.m-1)/2; k++ {
		op.g[k] = resp(dw*float64(k)) / float64(p.m)
	}
	return op
}

// forward transforms the loaded traces a and b (b may be nil) together.
func (p *analyticPair) forward(a, b *analyticTrace) {
	z := p.spec
	if b == nil {
		for j, v := range a.x[:p.n] {
			z[j] = complex(v, 0)
		}
	} else {
		bx := b.x[:p.n]
		// Four samples at a time in fill_amd64.s where the processor
		// allows, the rest here.
		done := interleaveVector(z, a.x[:p.n], bx)
		for j := done; j < p.n; j++ {
			z[j] = complex(a.x[j], bx[j])
		}
	}
	clear(z[p.n:])
	if p.conv != nil {
		p.conv.transform(z, z, p.convWork)
		return
	}
	p.plan.transform(z, z, p.work)
}

// convKernel returns op's kc for convolution mode: its circular kernel of
// length m, c_j = Σ_k G_k exp(2πi jk/m) (G_k its response at bin k, the
// 1/m already in g), laid out round zero in length M and transformed, with
// the 1/M of the inverse transform folded in.
func (p *analyticPair) convKernel(op *spectralOp) []complex128 {
	m, M := p.m, p.conv.n
	c := make([]complex128, m)
	for k := 0; k <= m/2; k++ {
		v := complex(op.g[k], 0)
		if op.imaginary {
			// apply sets DC and Nyquist to zero for these.
			v = 0
			if k > 0 && 2*k != m {
				v = complex(0, op.g[k])
			}
		}
		// Conjugated, so that a forward transform gives the inverse's
		// conjugate; the kernel of a real operator is real.
		c[k] = complex(real(v), -imag(v))
		if k > 0 && m-k != k {
			c[m-k] = v
		}
	}
	p.plan.transform(c, c, p.work)
	kc := make([]complex128, M)
	inv := 1 / float64(M)
	kc[0] = complex(real(c[0])*inv, 0)
	for t := 1; t < m; t++ {
		kc[t] = complex(real(c[t])*inv, 0)
		kc[M-t] = complex(real(c[m-t])*inv, 0)
	}
	p.conv.transform(kc, kc, p.convWork)
	return kc
}

// apply stores op(a) in ra and op(b) in rb (nil for a lone trace), each the
// first n samples of the inverse transform.
func (p *analyticPair) apply(op *spectralOp, ra, rb []float64) {
	if p.conv != nil {
		p.applyConv(op, ra, rb)
		return
	}
	m, s, z := p.m, p.spec, p.z
	// z = conj(op·spec), so that a forward transform and a final conjugate
	// make the inverse: ifft(Y) = conj(fft(conj(Y))). At bin k, with
	// u = spec_k: real g: conj(g u) = g conj(u); imaginary: conj(i g u) =
	// g (-imag u - i real u). At bin m-k (response conjugated), with
	// v = spec_{m-k}: real: g conj(v); imaginary: conj(-i g v) =
	// g (imag v + i real v).
	pos := (m - 1) / 2
	g := op.g[:pos+1]
	// Bins 1..done two at a time in fill_amd64.s where the processor
	// allows (and the plan uses the vector passes), the rest here.
	done := 0
	if p.plan.simd {
		done = specOpVector(z, s, g, m, pos, op.imaginary)
	}
	if op.imaginary {
		z[0] = 0
		for k := 1 + done; k <= pos; k++ {
			c, u, v := g[k], s[k], s[m-k]
			z[k] = complex(-c*imag(u), -c*real(u))
			z[m-k] = complex(c*imag(v), c*real(v))
		}
		if m%2 == 0 {
			z[m/2] = 0
		}
	} else {
		z[0] = complex(g[0]*real(s[0]), -g[0]*imag(s[0]))
		for k := 1 + done; k <= pos; k++ {
			c, u, v := g[k], s[k], s[m-k]
			z[k] = complex(c*real(u), -c*imag(u))
			z[m-k] = complex(c*real(v), -c*imag(v))
		}
		if m%2 == 0 {
			v, c := s[m/2], op.g[m/2]
			z[m/2] = complex(c*real(v), -c*imag(v))
		}
	}
	p.plan.transform(z, z, p.work)
	p.unpack(ra, rb)
}

// applyConv is apply in convolution mode: z = conj(kc·spec) over length
// M, then the same forward transform and conjugate.
func (p *analyticPair) applyConv(op *spectralOp, ra, rb []float64) {
	if len(op.kc) != p.conv.n {
		op.kc = p.convKernel(op)
	}
	s, z := p.spec, p.z[:len(p.spec)]
	for k, c := range op.kc[:len(z)] {
		v := c * s[k]
		z[k] = complex(real(v), -imag(v))
	}
	p.conv.transform(z, z, p.convWork)
	p.unpack(ra, rb)
}

// unpack writes the first len(ra) samples of conj(z): the real parts to
// ra, the imaginary parts to rb (when not nil).
func (p *analyticPair) unpack(ra, rb []float64) {
	z := p.z
	if rb == nil {
		for j, v := range z[:len(ra)] {
			ra[j] = real(v)
		}
		return
	}
	rb = rb[:len(ra)]
	// Four samples at a time in fill_amd64.s where the processor allows,
	// the rest here.
	done := deinterleaveVector(ra, rb, z)
	for j := done; j < len(ra); j++ {
		v := z[j]
		ra[j], rb[j] = real(v), -imag(v)
	}
}

// analyze loads traces ta and tb (tb may be nil) into a and b and computes
// their Hilbert transforms, and with deriv their time derivatives.
func (p *analyticPair) analyze(a, b *analyticTrace, ta, tb []float32, deriv bool) {
	a.resize(p.n, p.dt)
	a.load(ta, p.taper)
	var bh, bdx, bdh []float64
	if tb != nil {
		b.resize(p.n, p.dt)
		b.load(tb, p.taper)
		bh, bdx, bdh = b.h, b.dx, b.dh
	} else {
		b = nil
	}
	p.forward(a, b)
	p.apply(&p.hilbert, a.h, bh)
	if deriv {
		p.apply(&p.dx, a.dx, bdx)
		p.apply(&p.dh, a.dh, bdh)
	}
}

// AnalyticTrace returns the analytic trace x + i h of one trace sampled at
// dt seconds with the given end treatment. Gap samples (NaN, Inf) are
// treated as zero in the transform and are NaN in the result.
func AnalyticTrace(trace []float32, dt float64, end EndTreatment) ([]complex128, error) {
	if !(dt > 0) || math.IsInf(dt, 0) {
		return nil, fmt.Errorf("analytic trace: sample interval %v s is not a positive number", dt)
	}
	out := make([]complex128, len(trace))
	if len(trace) == 0 {
		return out, nil
	}
	var p analyticPair
	if err := p.setup(len(trace), dt, end, nil); err != nil {
		return nil, fmt.Errorf("analytic trace: %w", err)
	}
	var a analyticTrace
	p.analyze(&a, nil, trace, nil, false)
	for j := range out {
		if a.gap[j] {
			out[j] = complex(math.NaN(), math.NaN())
			continue
		}
		out[j] = complex(a.x[j], a.h[j])
	}
	return out, nil
}
