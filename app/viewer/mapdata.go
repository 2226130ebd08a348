package viewer

import (
	"context"
	"fmt"
	"math"

	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/compute/horizon"
)

// The data behind the map view: the attribute samples kept along a horizon
// (strips), and the maps made from them. Nothing here touches fyne; the
// map view's jobs call it.

// stripMarginMS is how far above and below the window asked for the strips
// reach at least, so that widening the window a little, or switching from
// the value on the horizon to a window statistic, reuses them.
const stripMarginMS = 40

// mapStrips keeps, for every trace a horizon picks, the attribute's samples
// over a stretch around it: from keepFrom above the horizon to keepTo below
// it (or below the base horizon, for a window between two). A change of
// statistic, or of the window inside that stretch, maps from the strips
// without computing the attribute again.
//
// The strips are stored as a horizon.Source of short traces, all len
// samples long: trace k starts at sample start[k] of the survey's trace.
// horizon.Map runs on them with the horizons moved up by start[k] samples
// (shifted), which reads exactly the samples the whole trace would give:
// the strip holds every sample the window can reach, and samples past the
// end of the survey's trace are NaN (gaps, left out of every statistic).
type mapStrips struct {
	key                string // attribute, parameters, conditioning, offset (attrKey)
	top, base          *horizon.Horizon
	keepFrom, keepTo   float64 // ms, relative to top (keepFrom) and to base or top (keepTo)
	start              []int   // first survey sample of each trace's strip
	src                *horizon.Traces
	shiftTop, shiftBas *horizon.Horizon
}

// stripRange returns the first and last sample (inclusive) of the survey's
// trace that a map over [top+from, base+to] (base = top without a base)
// can read at trace k, with one sample of slack on each side for the
// interpolation of the value on the horizon; ok is false where the trace
// has no pick.
func stripRange(g horizon.Grid, top, base *horizon.Horizon, k int, from, to float64) (first, last int, ok bool) {
	t := top.TimeMS[k]
	if top.State[k] == horizon.Empty || math.IsNaN(t) {
		return 0, 0, false
	}
	end := t
	if base != nil {
		end = base.TimeMS[k]
		if base.State[k] == horizon.Empty || math.IsNaN(end) {
			return 0, 0, false
		}
	}
	lo, hi := math.Min(t, t+from), math.Max(t, end+to)
	sample := func(ms float64) float64 { return (ms/1000 - g.T0) / g.DT }
	f, l := math.Floor(sample(lo))-1, math.Ceil(sample(hi))+1
	f = math.Max(f, 0)
	l = math.Min(l, float64(g.Samples-1))
	if f > l {
		return 0, 0, false
	}
	return int(f), int(l), true
}

// attributeInline computes the attribute of one inline (grid index il) of
// the survey, trace by crossline grid index: the job's way of reading the
// attribute, swapped by tests.
type attributeInline func(ctx context.Context, il int) ([][]float32, error)

// surveyInlines reads the attribute a of the survey's inlines at offset,
// with parameters p and conditioning cond, through the survey's own
// attribute path (the one the sections use).
func surveyInlines(vol survey, inlines []int, offset int, a *compute.Attribute, p compute.Params, cond compute.Conditioning) attributeInline {
	return func(ctx context.Context, il int) ([][]float32, error) {
		sec, err := vol.Attribute(ctx, volume.Slice{Orientation: volume.Inline, Number: inlines[il], Offset: offset}, a, p, cond, nil)
		if err != nil {
			return nil, err
		}
		return sec.Traces, nil
	}
}

// computeStrips computes the attribute inline by inline (read) and keeps
// the strips for a map along top (and base) over windows inside
// [from, to] ms widened by stripMarginMS. It reads only inlines that hold
// picks. progress (may be nil) gets inlines done; ctx cancels.
func computeStrips(ctx context.Context, g horizon.Grid, key string, top, base *horizon.Horizon, from, to float64, read attributeInline, progress func(done, total int)) (*mapStrips, error) {
	if top == nil || top.Inlines != g.Inlines || top.Crosslines != g.Crosslines {
		return nil, fmt.Errorf("map: the horizon's grid does not match the survey's %d x %d traces", g.Inlines, g.Crosslines)
	}
	if base != nil && (base.Inlines != g.Inlines || base.Crosslines != g.Crosslines) {
		return nil, fmt.Errorf("map: the base horizon's grid does not match the survey's %d x %d traces", g.Inlines, g.Crosslines)
	}
	s := &mapStrips{key: key, top: top, base: base, keepFrom: math.Min(from, -stripMarginMS), keepTo: math.Max(to, stripMarginMS)}
	n := g.Inlines * g.Crosslines
	s.start = make([]int, n)
	last := make([]int, n)
	length := 1
	for k := range n {
		f, l, ok := stripRange(g, top, base, k, s.keepFrom, s.keepTo)
		if !ok {
			s.start[k], last[k] = -1, -1
			continue
		}
		s.start[k], last[k] = f, l
		length = max(length, l-f+1)
	}
	length = max(length, 3) // horizon.Grid needs three samples
	nan := float32(math.NaN())
	empty := make([]float32, length)
	for i := range empty {
		empty[i] = nan
	}
	traces := make([][]float32, n)
	for k := range traces {
		traces[k] = empty
	}
	for il := range g.Inlines {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		row := s.start[il*g.Crosslines : (il+1)*g.Crosslines]
		picked := false
		for _, f := range row {
			picked = picked || f >= 0
		}
		if picked {
			attr, err := read(ctx, il)
			if err != nil {
				return nil, fmt.Errorf("map: %w", err)
			}
			block := make([]float32, length*g.Crosslines)
			for xl, f := range row {
				if f < 0 || xl >= len(attr) {
					continue
				}
				k := il*g.Crosslines + xl
				strip := block[xl*length : (xl+1)*length]
				tr := attr[xl]
				for j := range strip {
					if i := f + j; i <= last[k] && i < len(tr) {
						strip[j] = tr[i]
					} else {
						strip[j] = nan
					}
				}
				traces[k] = strip
			}
		}
		if progress != nil {
			progress(il+1, g.Inlines)
		}
	}
	var err error
	if s.src, err = horizon.NewTraces(traces, g.Inlines, g.Crosslines, g.DT, g.T0); err != nil {
		return nil, fmt.Errorf("map: %w", err)
	}
	s.shiftTop, s.shiftBas = s.shifted(top, g.DT), s.shifted(base, g.DT)
	return s, nil
}

// shifted returns h with every pick moved up by its trace's strip start
// (nil for nil).
func (s *mapStrips) shifted(h *horizon.Horizon, dt float64) *horizon.Horizon {
	if h == nil {
		return nil
	}
	out := &horizon.Horizon{Inlines: h.Inlines, Crosslines: h.Crosslines, TimeMS: make([]float64, len(h.TimeMS)), Quality: h.Quality, State: h.State}
	for k, t := range h.TimeMS {
		if s.start[k] < 0 {
			out.TimeMS[k] = math.NaN()
			continue
		}
		out.TimeMS[k] = t - float64(s.start[k])*dt*1000
	}
	return out
}

// serves reports whether the strips hold what spec asks for along top
// with the attribute key.
func (s *mapStrips) serves(key string, top *horizon.Horizon, spec horizon.MapSpec) bool {
	if s == nil || s.key != key || s.top != top || s.base != spec.Base {
		return false
	}
	if spec.Stat == horizon.Value {
		return true
	}
	return spec.FromMS >= s.keepFrom && spec.ToMS <= s.keepTo
}

// mapOf computes the map spec asks for from the strips (horizon.Map on the
// shifted horizons).
func (s *mapStrips) mapOf(ctx context.Context, spec horizon.MapSpec) (*horizon.AttributeMap, error) {
	spec.Base = s.shiftBas
	return horizon.Map(ctx, s.src, s.shiftTop, spec, nil)
}

// timeMap returns the horizon's times as a map grid (rows are inlines), NaN
// where it has no pick.
func timeMap(h *horizon.Horizon) [][]float32 {
	out := make([][]float32, h.Inlines)
	flat := make([]float32, len(h.TimeMS))
	for k, t := range h.TimeMS {
		if h.State[k] == horizon.Empty {
			t = math.NaN()
		}
		flat[k] = float32(t)
	}
	for il := range out {
		out[il] = flat[il*h.Crosslines : (il+1)*h.Crosslines]
	}
	return out
}

// rows cuts an inline-major map into rows, one per inline.
func rows(m *horizon.AttributeMap) [][]float32 {
	out := make([][]float32, m.Inlines)
	for il := range out {
		out[il] = m.Values[il*m.Crosslines : (il+1)*m.Crosslines]
	}
	return out
}
