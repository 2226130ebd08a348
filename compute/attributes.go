package compute

import (
	"context"
	"math"
)

// traceWork is one worker's state for the analytic-trace attributes: the
// FFT plan and analytic trace, plus reused scratch buffers.
type traceWork struct {
	analytic
	p   Params
	eps float64 // stabilizer of a², see analytic.stabilizer

	a, f, v  []float64 // envelope, instantaneous frequency, scratch
	ddx, ddh []float64 // second derivatives (envelope-second-derivative only)
	num, den []float64 // window sums (prefix sums, n+1 long)
	mom      []float64
}

func (w *traceWork) prepare(n int, dt float64, end EndTreatment) error {
	if err := w.setup(n, dt, end); err != nil {
		return err
	}
	if len(w.a) != n {
		w.a, w.f, w.v = make([]float64, n), make([]float64, n), make([]float64, n)
		w.ddx, w.ddh = nil, nil
		w.num, w.den, w.mom = make([]float64, n+1), make([]float64, n+1), make([]float64, n+1)
	}
	return nil
}

// endTreatment reads the pad and taper parameters (taper 0 when absent).
func endTreatment(p Params) EndTreatment {
	e := EndTreatment{Pad: p.String("pad"), TaperMS: p.Float("taper")}
	if math.IsNaN(e.TaperMS) {
		e.TaperMS = 0
	}
	return e
}

// analyticRun computes an attribute trace by trace: for each it loads the
// trace, computes the quadrature (and x', h' when deriv is set), then calls
// fill to write the output trace; gap samples are set to NaN afterwards.
func analyticRun(ctx context.Context, in Section, p Params, progress func(done, total int), deriv bool, fill func(w *traceWork, out []float32)) (Section, error) {
	out := newLike(in)
	n := in.Samples()
	end := endTreatment(p)
	if n == 0 {
		_, err := end.transformLength(1)
		return out, err
	}
	err := forEachTrace(ctx, len(in.Traces), func() *traceWork { return &traceWork{p: p} }, func(w *traceWork, i int) error {
		if err := w.prepare(n, in.DT, end); err != nil {
			return err
		}
		w.load(in.Traces[i])
		w.quadrature()
		if deriv {
			w.derivatives()
		}
		w.eps = w.stabilizer()
		o := out.Traces[i]
		fill(w, o)
		w.markGaps(o)
		return nil
	}, progress)
	return out, err
}

// markGaps writes NaN into out wherever the loaded trace had a gap.
func (p *analytic) markGaps(out []float32) {
	if p.gaps == 0 {
		return
	}
	for j, g := range p.gap {
		if g {
			out[j] = float32(math.NaN())
		}
	}
}

// sampleAttribute makes a computeFunc from a per-sample formula of x, h and
// (when deriv is set) x', h'.
func sampleAttribute(deriv bool, at func(w *traceWork, j int) float64) computeFunc {
	return func(ctx context.Context, in Section, p Params, progress func(done, total int)) (Section, error) {
		return analyticRun(ctx, in, p, progress, deriv, func(w *traceWork, out []float32) {
			for j := range out {
				out[j] = float32(at(w, j))
			}
		})
	}
}

const twoPi = 2 * math.Pi

func quadratureAt(w *traceWork, j int) float64 { return w.h[j] }

func envelopeAt(w *traceWork, j int) float64 { return math.Hypot(w.x[j], w.h[j]) }

// phaseAt is atan2(h, x) in degrees, -180..180.
func phaseAt(w *traceWork, j int) float64 { return fastAtan2(w.h[j], w.x[j]) * (180 / math.Pi) }

func cosPhaseAt(w *traceWork, j int) float64 {
	x, h := w.x[j], w.h[j]
	a2 := x*x + h*h
	return cosPhase(x, math.Sqrt(a2), 1/(a2+w.eps))
}

// frequencyAt is Taner, Koehler and Sheriff's (1979) derivative formula
// f = (x h' - h x') / (2π a²), ε-stabilized.
func frequencyAt(w *traceWork, j int) float64 {
	x, h := w.x[j], w.h[j]
	return (x*w.dh[j] - h*w.dx[j]) / (twoPi * (x*x + h*h + w.eps))
}

// bandwidthAt is Barnes' (1992) instantaneous bandwidth |a'/a| / 2π with
// a'/a = (x x' + h h') / a².
func bandwidthAt(w *traceWork, j int) float64 {
	x, h := w.x[j], w.h[j]
	return math.Abs(x*w.dx[j]+h*w.dh[j]) / (twoPi * (x*x + h*h + w.eps))
}

// dominantAt is Barnes' (1993) dominant frequency sqrt(f² + b²), which is
// |z'| / (2π a) for the analytic trace z.
func dominantAt(w *traceWork, j int) float64 {
	x, h, dx, dh := w.x[j], w.h[j], w.dx[j], w.dh[j]
	return math.Sqrt((dx*dx+dh*dh)/(x*x+h*h+w.eps)) / twoPi
}

// envelopeDerivativeAt is a' = (x x' + h h') / a.
func envelopeDerivativeAt(w *traceWork, j int) float64 {
	x, h := w.x[j], w.h[j]
	return (x*w.dx[j] + h*w.dh[j]) / math.Sqrt(x*x+h*h+w.eps)
}

// envelopeSecondDerivative computes a” from a² = x² + h²:
// a a” = x'² + h'² + x x” + h h” - a'², with x” and h” taken in the
// frequency domain (spectrum times -ω²).
func envelopeSecondDerivative(ctx context.Context, in Section, p Params, progress func(done, total int)) (Section, error) {
	return analyticRun(ctx, in, p, progress, true, func(w *traceWork, out []float32) {
		if len(w.ddx) != w.n {
			w.ddx, w.ddh = make([]float64, w.n), make([]float64, w.n)
		}
		w.secondDerivatives(w.ddx, w.ddh)
		for j := range out {
			x, h, dx, dh := w.x[j], w.h[j], w.dx[j], w.dh[j]
			a := math.Sqrt(x*x + h*h + w.eps)
			da := (x*dx + h*dh) / a
			out[j] = float32((dx*dx + dh*dh + x*w.ddx[j] + h*w.ddh[j] - da*da) / a)
		}
	})
}
