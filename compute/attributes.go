package compute

import (
	"context"
	"math"
)

// traceWork is one trace's state for the analytic-trace attributes: its
// analytic trace plus reused scratch buffers. Workers hold two, for the
// two traces analyticPair transforms together.
type traceWork struct {
	analyticTrace
	p   Params
	eps float64 // stabilizer of a², see analyticTrace.stabilizer

	a, f, v  []float64 // envelope, instantaneous frequency, scratch
	ddx, ddh []float64 // second derivatives (when asked for)
	num, den []float64 // window sums (prefix sums, n+1 long)
	mom      []float64
}

func (w *traceWork) prepare(n int) {
	if len(w.a) != n {
		w.a, w.f, w.v = make([]float64, n), make([]float64, n), make([]float64, n)
		w.ddx, w.ddh = make([]float64, n), make([]float64, n)
		w.num, w.den, w.mom = make([]float64, n+1), make([]float64, n+1), make([]float64, n+1)
	}
}

// endTreatment reads the pad and taper parameters (taper 0 when absent).
func endTreatment(p Params) EndTreatment {
	e := EndTreatment{Pad: p.String("pad"), TaperMS: p.Float("taper")}
	if math.IsNaN(e.TaperMS) {
		e.TaperMS = 0
	}
	return e
}

// What analyticRun computes before fill: the quadrature h always, and
// x', h' (withDerivatives), x”, h” (withSecond), or op(x) into v
// (withOp: an attribute that is a filter of the trace).
type analyticNeeds struct {
	derivatives, second bool
	// op, when set, makes the operator from the pair's setup and its
	// result goes into traceWork.v.
	op func(p *analyticPair) spectralOp
	// noStabilizer: fill never reads traceWork.eps, so it is not
	// computed (a pass over the trace saved).
	noStabilizer bool
}

// analyticRun computes an attribute trace by trace: it transforms the
// traces two at a time (analyticPair) for the quadrature and what needs
// asks for, then calls fill to write each output trace, clamps infinite
// samples as saturate does (runs that do not come here are wrapped in
// clampedAfter) and sets gap samples to NaN.
func analyticRun(ctx context.Context, in, out Section, p Params, progress func(done, total int), needs analyticNeeds, fill func(w *traceWork, out []float32)) error {
	n := in.Samples()
	end := endTreatment(p)
	plan, err := analyticPlan(n, end)
	if err != nil || n == 0 {
		return err
	}
	type worker struct {
		p    analyticPair
		a, b traceWork
		op   spectralOp
	}
	return forEachPair(ctx, len(in.Traces), func() *worker { return &worker{a: traceWork{p: p}, b: traceWork{p: p}} }, func(w *worker, i int, pair bool) error {
		if err := w.p.setup(n, in.DT, end, plan); err != nil {
			return err
		}
		if needs.op != nil && len(w.op.g) != w.p.m/2+1 {
			w.op = needs.op(&w.p)
		}
		var tb []float32
		var b *traceWork
		if pair {
			tb, b = in.Traces[i+1], &w.b
		}
		w.p.analyze(&w.a.analyticTrace, &w.b.analyticTrace, in.Traces[i], tb, needs.derivatives)
		w.a.prepare(n)
		var bdd, bddh, bv []float64
		if b != nil {
			b.prepare(n)
			bdd, bddh, bv = b.ddx, b.ddh, b.v
		}
		if needs.second {
			w.p.apply(&w.p.ddx, w.a.ddx, bdd)
			w.p.apply(&w.p.ddh, w.a.ddh, bddh)
		}
		if needs.op != nil {
			w.p.apply(&w.op, w.a.v, bv)
		}
		for k, t := range []*traceWork{&w.a, b} {
			if t == nil {
				break
			}
			if !needs.noStabilizer {
				t.eps = t.stabilizer()
			}
			o := out.Traces[i+k]
			fill(t, o)
			saturateTrace(o)
			t.markGaps(o)
		}
		return nil
	}, progress)
}

// markGaps writes NaN into out wherever the loaded trace had a gap.
func (t *analyticTrace) markGaps(out []float32) {
	if t.gaps == 0 {
		return
	}
	for j, g := range t.gap {
		if g {
			out[j] = float32(math.NaN())
		}
	}
}

// traceAttribute makes a computeFunc from a whole-trace formula of x, h
// and (when deriv is set) x', h' that does not divide by the envelope (it
// never reads traceWork.eps).
func traceAttribute(deriv bool, fill func(w *traceWork, out []float32)) computeFunc {
	return func(ctx context.Context, in, out Section, p Params, progress func(done, total int)) error {
		return analyticRun(ctx, in, out, p, progress, analyticNeeds{derivatives: deriv, noStabilizer: true}, fill)
	}
}

// sampleAttribute makes a computeFunc from a per-sample formula of x, h and
// (when deriv is set) x', h'.
func sampleAttribute(deriv bool, at func(w *traceWork, j int) float64) computeFunc {
	return func(ctx context.Context, in, out Section, p Params, progress func(done, total int)) error {
		return analyticRun(ctx, in, out, p, progress, analyticNeeds{derivatives: deriv}, func(w *traceWork, out []float32) {
			for j := range out {
				out[j] = float32(at(w, j))
			}
		})
	}
}

const twoPi = 2 * math.Pi

func quadratureAt(w *traceWork, j int) float64 { return w.h[j] }

// envelopeTrace writes the envelope sqrt(x² + h²) of a trace: eight
// samples at a time in fill_amd64.s where the processor allows (the
// export's hot path), the rest in envelopeScalar.
func envelopeTrace(w *traceWork, out []float32) {
	done := envFillVector(out, w.x, w.h)
	envelopeScalar(out[done:], w.x[done:], w.h[done:])
}

// envelopeScalar writes a[j] = sqrt(x[j]² + h[j]²) (x and h at least as
// long as a). x and h come from float32 samples, so x² + h² can neither
// overflow nor lose precision to underflow in float64, and math.Hypot's
// scaling is not needed.
func envelopeScalar(a []float32, x, h []float64) {
	x, h = x[:len(a)], h[:len(a)]
	for j, xj := range x {
		a[j] = float32(math.Sqrt(xj*xj + h[j]*h[j]))
	}
}

// phaseTrace writes the phase atan2(h, x) in degrees, -180..180.
func phaseTrace(w *traceWork, out []float32) {
	atan2s(w.v[:len(out)], w.h, w.x)
	for j, v := range w.v[:len(out)] {
		out[j] = float32(v * (180 / math.Pi))
	}
}

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
func envelopeSecondDerivative(ctx context.Context, in, out Section, p Params, progress func(done, total int)) error {
	return analyticRun(ctx, in, out, p, progress, analyticNeeds{derivatives: true, second: true}, func(w *traceWork, out []float32) {
		for j := range out {
			x, h, dx, dh := w.x[j], w.h[j], w.dx[j], w.dh[j]
			a := math.Sqrt(x*x + h*h + w.eps)
			da := (x*dx + h*dh) / a
			out[j] = float32((dx*dx + dh*dh + x*w.ddx[j] + h*w.ddh[j] - da*da) / a)
		}
	})
}
