package compute

import (
	"context"
	"fmt"
	"math"
)

// InstantaneousSet holds the classic instantaneous attributes of a section,
// computed together from one analytic trace per input trace (Taner, Koehler
// and Sheriff, 1979, "Complex seismic trace analysis", Geophysics 44(6),
// 1041-1063). Each field has the shape and sampling of the input.
type InstantaneousSet struct {
	Envelope  Section // a = sqrt(x² + h²)
	Phase     Section // atan2(h, x) in degrees, -180..180
	Frequency Section // (x h' - h x') / (2π a²) in Hz
	CosPhase  Section // cos of the phase, x / a, in -1..1

	simd bool // fill four samples at a time in fill_amd64.s (haveSIMD)
}

// Instantaneous computes the InstantaneousSet of a section on all cores
// into new sections; see InstantaneousInto.
func Instantaneous(ctx context.Context, in Section, end EndTreatment, progress func(done, total int)) (InstantaneousSet, error) {
	// Shaped by trace 0; InstantaneousInto validates in.
	set := InstantaneousSet{Envelope: newLike(in), Phase: newLike(in), Frequency: newLike(in), CosPhase: newLike(in)}
	if err := InstantaneousInto(ctx, in, &set, end, progress); err != nil {
		return InstantaneousSet{}, err
	}
	return set, nil
}

// InstantaneousInto computes the InstantaneousSet of a section on all
// cores into the sections of out, which must each have in's number of
// traces, every trace in's number of samples (Instantaneous allocates
// them; a caller computing section after section passes the same set
// again, so the output memory is touched once, not once per section).
// Traces go through the transform two at a time (see analyticPair: per
// trace half a forward and one and a half inverse complex FFTs, for h, x'
// and h'), with one FFT plan shared by all workers and buffers reused per
// worker. out's DT and T0 are set from in. Cancellation and progress work
// as for Attribute.Compute; on error out's samples are undefined.
func InstantaneousInto(ctx context.Context, in Section, out *InstantaneousSet, end EndTreatment, progress func(done, total int)) error {
	if err := in.validate(); err != nil {
		return fmt.Errorf("instantaneous attributes: %w", err)
	}
	if _, err := end.transformLength(1); err != nil {
		return fmt.Errorf("instantaneous attributes: %w", err)
	}
	n := in.Samples()
	for _, o := range []struct {
		name string
		s    *Section
	}{{"envelope", &out.Envelope}, {"phase", &out.Phase}, {"frequency", &out.Frequency}, {"cosine of phase", &out.CosPhase}} {
		if len(o.s.Traces) != len(in.Traces) {
			return fmt.Errorf("instantaneous attributes: %s output has %d traces for %d input traces", o.name, len(o.s.Traces), len(in.Traces))
		}
		for i, tr := range o.s.Traces {
			if len(tr) != n {
				return fmt.Errorf("instantaneous attributes: %s output trace %d has %d samples, want %d", o.name, i, len(tr), n)
			}
		}
		o.s.DT, o.s.T0 = in.DT, in.T0
	}
	out.simd = haveSIMD
	if n == 0 {
		return nil
	}
	plan, err := analyticPlan(n, end)
	if err != nil {
		return fmt.Errorf("instantaneous attributes: %w", err)
	}
	type worker struct {
		p     analyticPair
		a, b  analyticTrace
		phase []float64
	}
	err = forEachPair(ctx, len(in.Traces), func() *worker { return &worker{phase: make([]float64, n)} }, func(w *worker, i int, pair bool) error {
		if err := w.p.setup(n, in.DT, end, plan); err != nil {
			return err
		}
		var tb []float32
		if pair {
			tb = in.Traces[i+1]
		}
		w.p.analyze(&w.a, &w.b, in.Traces[i], tb, true)
		out.fill(i, &w.a, w.phase)
		if pair {
			out.fill(i+1, &w.b, w.phase)
		}
		return nil
	}, progress)
	if err != nil {
		return fmt.Errorf("instantaneous attributes: %w", err)
	}
	return nil
}

// fill writes trace i of the set from its analytic trace t; phase (n
// long) is scratch.
func (set *InstantaneousSet) fill(i int, t *analyticTrace, phase []float64) {
	n := t.n
	a, ph, f, c := set.Envelope.Traces[i], set.Phase.Traces[i], set.Frequency.Traces[i], set.CosPhase.Traces[i]
	eps := t.stabilizer()
	x, h, dx, dh := t.x[:n], t.h[:n], t.dx[:n], t.dh[:n]
	// The same formulas four samples at a time (fill_amd64.s) where the
	// processor allows, the rest here.
	done := 0
	if set.simd {
		done = instFillVector(a, ph, f, c, x, h, dx, dh, eps)
	}
	fillScalar(a[done:n], ph[done:n], f[done:n], c[done:n], x[done:], h[done:], dx[done:], dh[done:], eps, phase)
	if t.gaps > 0 {
		for j, g := range t.gap {
			if g {
				nan := float32(math.NaN())
				a[j], ph[j], f[j], c[j] = nan, nan, nan, nan
			}
		}
	}
}

// fillScalar is fill's loop over samples in Go: envelope a, phase ph
// (degrees), frequency f and cosine of phase c from x, h, dx, dh (at least
// len(a) each), with phase (as long) as scratch.
func fillScalar(a, ph, f, c []float32, x, h, dx, dh []float64, eps float64, phase []float64) {
	const toDeg = 180 / math.Pi
	const inv2pi = 1 / (2 * math.Pi)
	x, h = x[:len(a)], h[:len(a)]
	dx, dh = dx[:len(x)], dh[:len(x)]
	ph, f, c = ph[:len(x)], f[:len(x)], c[:len(x)]
	phase = phase[:len(x)]
	atan2s(phase, h, x)
	for j, xj := range x {
		hj := h[j]
		a2 := xj*xj + hj*hj
		inv := 1 / (a2 + eps)
		r := math.Sqrt(a2)
		a[j] = float32(r)
		ph[j] = float32(phase[j] * toDeg)
		f[j] = float32((xj*dh[j] - hj*dx[j]) * inv2pi * inv)
		// cosPhase with its clamp as rarely taken branches.
		cp := xj * r * inv
		if cp > 1 {
			cp = 1
		} else if cp < -1 {
			cp = -1
		}
		c[j] = float32(cp)
	}
}

// cosPhase returns the cosine of the instantaneous phase as x·a/(a² + ε)
// (inv = 1/(a² + ε)): x/a wherever the envelope is not negligible, 0 for a
// dead trace, and always in -1..1 since |x| <= a.
func cosPhase(x, a, inv float64) float64 {
	return min(1, max(-1, x*a*inv))
}

// stabilizer returns the small number ε added to a² wherever the squared
// envelope divides (instantaneous frequency and bandwidth, cosine of phase):
// 1e-8 of the trace's mean a², plus the smallest normal float64 so a dead
// trace gives 0 rather than NaN. It changes values only where the envelope
// is below about 1e-4 of its RMS, where those quotients are undefined.
// t.x and t.h must be computed.
func (t *analyticTrace) stabilizer() float64 {
	var s float64
	h := t.h[:len(t.x)]
	for j, x := range t.x {
		s += x*x + h[j]*h[j]
	}
	return 1e-8*s/float64(t.n) + 0x1p-1022
}
