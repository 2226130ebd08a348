package compute

import (
	"context"
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Conditioning is the optional preparation applied to traces before an
// attribute: a zero-phase band-pass, then automatic gain control.
//
// Band-pass: the trace, zero-padded to a power of two at least twice its
// own (so the filter does not wrap one end onto the other), is multiplied
// in the frequency domain by a real, non-negative gain, so no phase shift.
// Each corner f_c is the half-amplitude (-6 dB) point of a cosine-squared
// ramp one octave wide in log frequency, from f_c/√2 to f_c·√2: low-cut
// gain sin²(π/2 · log2(f√2/f_c)) and high-cut gain cos²(π/2 · log2(f√2/f_c))
// inside the ramp, 0 or 1 outside it. A corner of 0 switches that side off.
//
// AGC (common practice): each sample is divided by the RMS of the trace
// over a centred window of AGCWindowMS (truncated at the trace ends, gaps
// left out); where that RMS is below 1e-7 of the trace's overall RMS (a
// dead or muted stretch) the output is 0.
type Conditioning struct {
	LowCutHz, HighCutHz float64 // band-pass corners in Hz; 0 = that side off
	AGCWindowMS         float64 // AGC window in ms; 0 = off
}

// IsZero reports whether the conditioning does nothing.
func (c Conditioning) IsZero() bool { return c == Conditioning{} }

// String renders the conditioning in the syntax ParseConditioning reads,
// "" when it is off.
func (c Conditioning) String() string {
	var parts []string
	if c.LowCutHz != 0 || c.HighCutHz != 0 {
		parts = append(parts, "bandpass="+fmtNum(c.LowCutHz)+"-"+fmtNum(c.HighCutHz))
	}
	if c.AGCWindowMS != 0 {
		parts = append(parts, "agc="+fmtNum(c.AGCWindowMS))
	}
	return strings.Join(parts, ",")
}

func fmtNum(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// ParseConditioning reads a conditioning spec: comma-separated steps,
//
//	bandpass=LOW-HIGH   corners in Hz (half-amplitude points); 0 = side off
//	agc=WINDOW          AGC window in ms
//
// e.g. "bandpass=8-60,agc=500", "bandpass=0-45" (high-cut only), "agc=300".
// Spaces are ignored; "" and "none" mean no conditioning. The band-pass is
// always applied before the AGC whatever the order written.
func ParseConditioning(spec string) (Conditioning, error) {
	var c Conditioning
	spec = strings.ReplaceAll(spec, " ", "")
	if spec == "" || spec == "none" {
		return c, nil
	}
	seen := map[string]bool{}
	for _, step := range strings.Split(spec, ",") {
		key, val, ok := strings.Cut(step, "=")
		if !ok {
			return Conditioning{}, fmt.Errorf("conditioning %q: step %q: want bandpass=LOW-HIGH or agc=WINDOW", spec, step)
		}
		if seen[key] {
			return Conditioning{}, fmt.Errorf("conditioning %q: step %q given twice", spec, key)
		}
		seen[key] = true
		switch key {
		case "bandpass":
			lo, hi, ok := strings.Cut(val, "-")
			if !ok {
				return Conditioning{}, fmt.Errorf("conditioning %q: bandpass %q: want LOW-HIGH in Hz", spec, val)
			}
			var err error
			if c.LowCutHz, err = parseNonNegative(lo); err != nil {
				return Conditioning{}, fmt.Errorf("conditioning %q: bandpass low corner: %w", spec, err)
			}
			if c.HighCutHz, err = parseNonNegative(hi); err != nil {
				return Conditioning{}, fmt.Errorf("conditioning %q: bandpass high corner: %w", spec, err)
			}
		case "agc":
			var err error
			if c.AGCWindowMS, err = parseNonNegative(val); err != nil {
				return Conditioning{}, fmt.Errorf("conditioning %q: agc window: %w", spec, err)
			}
		default:
			return Conditioning{}, fmt.Errorf("conditioning %q: unknown step %q (want bandpass or agc)", spec, key)
		}
	}
	if err := c.check(); err != nil {
		return Conditioning{}, fmt.Errorf("conditioning %q: %w", spec, err)
	}
	return c, nil
}

func parseNonNegative(s string) (float64, error) {
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%q is not a number", s)
	}
	if v < 0 {
		return 0, fmt.Errorf("%s is negative", s)
	}
	return v, nil
}

// check validates the fields that do not depend on the data.
func (c Conditioning) check() error {
	for _, v := range []float64{c.LowCutHz, c.HighCutHz, c.AGCWindowMS} {
		if !(v >= 0) || math.IsInf(v, 0) {
			return fmt.Errorf("%v is not a non-negative number", v)
		}
	}
	if c.LowCutHz > 0 && c.HighCutHz > 0 && c.LowCutHz >= c.HighCutHz {
		return fmt.Errorf("band-pass low corner %s Hz is not below the high corner %s Hz", fmtNum(c.LowCutHz), fmtNum(c.HighCutHz))
	}
	return nil
}

// lowCutGain is the low-cut amplitude at frequency f for corner fc (see
// Conditioning); 1 when fc is 0.
func lowCutGain(f, fc float64) float64 {
	if fc <= 0 {
		return 1
	}
	u := math.Log2(f * math.Sqrt2 / fc)
	switch {
	case u <= 0:
		return 0
	case u >= 1:
		return 1
	}
	s := math.Sin(math.Pi / 2 * u)
	return s * s
}

// highCutGain is the high-cut amplitude at frequency f for corner fc; 1
// when fc is 0.
func highCutGain(f, fc float64) float64 {
	if fc <= 0 {
		return 1
	}
	u := math.Log2(f * math.Sqrt2 / fc)
	switch {
	case u <= 0:
		return 1
	case u >= 1:
		return 0
	}
	c := math.Cos(math.Pi / 2 * u)
	return c * c
}

// Apply conditions every trace of a section on all cores, band-pass first,
// then AGC; gap samples stay NaN. A corner at or above the Nyquist
// frequency is an error. With nothing to do it returns a copy. Cancellation
// and progress work as for Attribute.Compute.
func (c Conditioning) Apply(ctx context.Context, in Section, progress func(done, total int)) (Section, error) {
	out := newLike(in) // shaped by trace 0; applyInto validates in
	if err := c.applyInto(ctx, in, out, progress); err != nil {
		return Section{}, err
	}
	return out, nil
}

// applyInto is Apply writing into out (the shape of in, checked by the
// caller).
func (c Conditioning) applyInto(ctx context.Context, in, out Section, progress func(done, total int)) error {
	if err := c.check(); err != nil {
		return fmt.Errorf("conditioning %q: %w", c.String(), err)
	}
	if err := in.validate(); err != nil {
		return fmt.Errorf("conditioning %q: %w", c.String(), err)
	}
	nyq := 0.5 / in.DT
	if c.HighCutHz >= nyq {
		return fmt.Errorf("conditioning %q: high corner %s Hz is not below the Nyquist frequency %s Hz", c.String(), fmtNum(c.HighCutHz), fmtNum(nyq))
	}
	if c.LowCutHz >= nyq {
		return fmt.Errorf("conditioning %q: low corner %s Hz is not below the Nyquist frequency %s Hz", c.String(), fmtNum(c.LowCutHz), fmtNum(nyq))
	}
	n := in.Samples()
	if n == 0 {
		return nil
	}
	bandpass := c.LowCutHz > 0 || c.HighCutHz > 0
	half := windowHalf(c.AGCWindowMS, in.DT)
	pad := EndTreatment{Pad: PadDouble}
	var plan *fftPlan
	if bandpass {
		plan = newFFTPlan(NextPow2(2 * n))
	}
	type trace struct {
		analyticTrace
		sq, cnt, v, k []float64
	}
	type work struct {
		p    analyticPair
		op   spectralOp
		a, b trace
	}
	newTrace := func() trace {
		return trace{sq: make([]float64, n+1), cnt: make([]float64, n+1), v: make([]float64, n), k: make([]float64, n)}
	}
	err := forEachPair(ctx, len(in.Traces), func() *work {
		return &work{a: newTrace(), b: newTrace()}
	}, func(w *work, i int, pair bool) error {
		ts := []*trace{&w.a}
		if pair {
			ts = append(ts, &w.b)
		}
		if bandpass {
			// The two traces go through one complex transform (see
			// analyticPair); the gain is real, so each comes back real.
			if err := w.p.setup(n, in.DT, pad, plan); err != nil {
				return err
			}
			if w.op.g == nil {
				w.op = c.bandpassOp(&w.p)
			}
			w.a.resize(n, in.DT)
			w.a.load(in.Traces[i], nil)
			var b *analyticTrace
			var bv []float64
			if pair {
				w.b.resize(n, in.DT)
				w.b.load(in.Traces[i+1], nil)
				b, bv = &w.b.analyticTrace, w.b.v
			}
			w.p.forward(&w.a.analyticTrace, b)
			w.p.apply(&w.op, w.a.v, bv)
		}
		for k, t := range ts {
			c.finish(t.v, t.sq, t.cnt, t.k, in.Traces[i+k], out.Traces[i+k], bandpass, half)
		}
		return nil
	}, progress)
	if err != nil {
		return fmt.Errorf("conditioning %q: %w", c.String(), err)
	}
	return nil
}

// bandpassOp is the band-pass gain as a spectralOp for p's padded length
// (real, so zero phase; DC and Nyquist included).
func (c Conditioning) bandpassOp(p *analyticPair) spectralOp {
	op := spectralOp{g: make([]float64, p.m/2+1)}
	df := 1 / (float64(p.m) * p.dt)
	s := 1 / float64(p.m)
	for k := range op.g {
		f := df * float64(k)
		op.g[k] = lowCutGain(f, c.LowCutHz) * highCutGain(f, c.HighCutHz) * s
	}
	return op
}

// finish applies the AGC (when on) to v, the band-passed trace (or tr
// itself when filtered is false), and writes the result into o, gaps as
// NaN. sq and cnt (n+1) and k (n) are scratch.
func (c Conditioning) finish(v, sq, cnt, k []float64, tr, o []float32, filtered bool, half int) {
	if !filtered {
		for j, s := range tr {
			v[j] = 0
			if !isGap(s) {
				v[j] = float64(s)
			}
		}
	}
	if c.AGCWindowMS > 0 {
		total, count := 0.0, 0.0
		for j, s := range tr {
			k[j] = 0
			if !isGap(s) {
				k[j] = 1
				total += v[j] * v[j]
				count++
			}
		}
		floor := 1e-7 * math.Sqrt(ratio(total, count))
		sq[0] = 0
		for j, x := range v {
			sq[j+1] = sq[j] + x*x*k[j]
		}
		prefix(cnt, k)
		for j, x := range v {
			rms := math.Sqrt(ratio(windowSum(sq, j, half), windowSum(cnt, j, half)))
			if rms > floor && rms > 0 {
				v[j] = x / rms
			} else {
				v[j] = 0
			}
		}
	}
	for j, s := range tr {
		if isGap(s) {
			o[j] = float32(math.NaN())
		} else {
			o[j] = float32(v[j])
		}
	}
}

func runBandpass(ctx context.Context, in, out Section, p Params, progress func(done, total int)) error {
	return Conditioning{LowCutHz: p.Float("low-cut"), HighCutHz: p.Float("high-cut")}.applyInto(ctx, in, out, progress)
}

func runAGC(ctx context.Context, in, out Section, p Params, progress func(done, total int)) error {
	return Conditioning{AGCWindowMS: p.Float("window")}.applyInto(ctx, in, out, progress)
}
