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
}

// Instantaneous computes the InstantaneousSet of a section on all cores:
// per trace one forward real FFT and three inverse real FFTs (for h, x' and
// h'), with plans and buffers reused per worker. Cancellation and progress
// work as for Attribute.Compute.
func Instantaneous(ctx context.Context, in Section, end EndTreatment, progress func(done, total int)) (InstantaneousSet, error) {
	var set InstantaneousSet
	if err := in.validate(); err != nil {
		return set, fmt.Errorf("instantaneous attributes: %w", err)
	}
	if _, err := end.transformLength(1); err != nil {
		return set, fmt.Errorf("instantaneous attributes: %w", err)
	}
	set = InstantaneousSet{Envelope: newLike(in), Phase: newLike(in), Frequency: newLike(in), CosPhase: newLike(in)}
	n := in.Samples()
	if n == 0 {
		return set, nil
	}
	err := forEachTrace(ctx, len(in.Traces), func() *analytic { return new(analytic) }, func(p *analytic, i int) error {
		if err := p.setup(n, in.DT, end); err != nil {
			return err
		}
		p.load(in.Traces[i])
		p.quadrature()
		p.derivatives()
		a, ph, f, c := set.Envelope.Traces[i], set.Phase.Traces[i], set.Frequency.Traces[i], set.CosPhase.Traces[i]
		eps := p.stabilizer()
		const toDeg = 180 / math.Pi
		const inv2pi = 1 / (2 * math.Pi)
		x, h, dx, dh := p.x[:n], p.h[:n], p.dx[:n], p.dh[:n]
		dx, dh = dx[:len(x)], dh[:len(x)]
		a, ph, f, c = a[:len(x)], ph[:len(x)], f[:len(x)], c[:len(x)]
		for j, xj := range x {
			hj := h[j]
			a2 := xj*xj + hj*hj
			inv := 1 / (a2 + eps)
			r := math.Sqrt(a2)
			a[j] = float32(r)
			ph[j] = float32(fastAtan2(hj, xj) * toDeg)
			f[j] = float32((xj*dh[j] - hj*dx[j]) * inv2pi * inv)
			c[j] = float32(cosPhase(xj, r, inv))
		}
		if p.gaps > 0 {
			for j, g := range p.gap {
				if g {
					nan := float32(math.NaN())
					a[j], ph[j], f[j], c[j] = nan, nan, nan, nan
				}
			}
		}
		return nil
	}, progress)
	if err != nil {
		return InstantaneousSet{}, fmt.Errorf("instantaneous attributes: %w", err)
	}
	return set, nil
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
// p.x and p.h must be computed.
func (p *analytic) stabilizer() float64 {
	var s float64
	for j := range p.n {
		s += p.x[j]*p.x[j] + p.h[j]*p.h[j]
	}
	return 1e-8*s/float64(p.n) + 0x1p-1022
}
