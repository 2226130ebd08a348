// Package horizonjob is the glue between surveys (SEG-Y files, the demo
// survey) and compute/horizon: trace sources over a file's grid, the
// numbering and coordinates horizon files record, seeds given by line
// numbers, and attribute maps computed inline by inline. It imports no
// fyne; the commands (and later the window) share it.
package horizonjob

import (
	"context"
	"fmt"
	"math"

	"quadtrace/compute"
	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
	"quadtrace/segy"
)

// FileSource is a horizon.Source over the inline x crossline grid of an
// opened SEG-Y file (post-stack, or the first offset of a pre-stack one).
// Grid positions without a trace read as all-NaN traces, which the tracker
// leaves empty. It is safe for concurrent use, like segy.File.
type FileSource struct {
	f      *segy.File
	grid   horizon.Grid
	il, xl segy.Range
	offset int
}

// NewFileSource wraps f. It fails when the file has no regular 3D grid or
// no sample interval.
func NewFileSource(f *segy.File) (*FileSource, error) {
	info := f.Info()
	if info.IntervalUS <= 0 {
		return nil, fmt.Errorf("%s: no sample interval in the headers: cannot track in time", f.Path())
	}
	if info.Inline.Count < 1 || info.Crossline.Count < 1 || info.Layout == segy.Layout2D && info.Inline.Count != 1 {
		return nil, fmt.Errorf("%s: no inline x crossline grid (layout %s)", f.Path(), info.Layout)
	}
	s := &FileSource{
		f: f, il: info.Inline, xl: info.Crossline,
		grid: horizon.Grid{
			Inlines: info.Inline.Count, Crosslines: info.Crossline.Count, Samples: info.Samples,
			DT: float64(info.IntervalUS) * 1e-6, T0: info.StartMS * 1e-3,
		},
	}
	if len(info.Offsets) > 0 {
		s.offset = info.Offsets[0]
	}
	return s, nil
}

// Grid implements horizon.Source.
func (s *FileSource) Grid() horizon.Grid { return s.grid }

// numbers returns the inline and crossline numbers of grid index (il, xl).
func (s *FileSource) numbers(il, xl int) (int, int) {
	return s.il.Min + il*step(s.il), s.xl.Min + xl*step(s.xl)
}

func step(r segy.Range) int {
	if r.Step == 0 {
		return 1
	}
	return r.Step
}

// Trace implements horizon.Source.
func (s *FileSource) Trace(il, xl int, buf []float32) ([]float32, error) {
	if il < 0 || il >= s.grid.Inlines || xl < 0 || xl >= s.grid.Crosslines {
		return nil, fmt.Errorf("%s: grid index (%d, %d) outside the %d x %d grid", s.f.Path(), il, xl, s.grid.Inlines, s.grid.Crosslines)
	}
	inl, xln := s.numbers(il, xl)
	i, ok := s.f.TraceIndex(inl, xln, s.offset)
	if !ok {
		if cap(buf) < s.grid.Samples {
			buf = make([]float32, s.grid.Samples)
		}
		buf = buf[:s.grid.Samples]
		nan := float32(math.NaN())
		for j := range buf {
			buf[j] = nan
		}
		return buf, nil
	}
	return s.f.ReadTrace(i, buf)
}

// Live reports whether the file has a trace at grid index (il, xl) (the
// survey's outline on map figures).
func (s *FileSource) Live(il, xl int) bool {
	if il < 0 || il >= s.grid.Inlines || xl < 0 || xl >= s.grid.Crosslines {
		return false
	}
	inl, xln := s.numbers(il, xl)
	_, ok := s.f.TraceIndex(inl, xln, s.offset)
	return ok
}

// Layout returns the numbering of the file's grid, with coordinates read
// from each trace's header (zero where a trace is missing or unreadable).
func (s *FileSource) Layout() horizon.Layout {
	return horizon.Layout{
		Inlines: s.grid.Inlines, Crosslines: s.grid.Crosslines,
		FirstInline: s.il.Min, InlineStep: step(s.il), FirstCrossline: s.xl.Min, CrosslineStep: step(s.xl),
		XY: func(il, xl int) (float64, float64) {
			inl, xln := s.numbers(il, xl)
			i, ok := s.f.TraceIndex(inl, xln, s.offset)
			if !ok {
				return 0, 0
			}
			h, err := s.f.TraceHeader(i)
			if err != nil {
				return 0, 0
			}
			return h.CDPX, h.CDPY
		},
	}
}

// SurveySource returns the demo survey's traces as a horizon.Source and
// its numbering and coordinates.
func SurveySource(s *synth.Survey) (*horizon.Traces, horizon.Layout, error) {
	src, err := horizon.NewTraces(s.Traces, s.Config.Inlines, s.Config.Crosslines, s.IntervalMS()/1000, 0)
	if err != nil {
		return nil, horizon.Layout{}, err
	}
	l := horizon.Layout{
		Inlines: s.Config.Inlines, Crosslines: s.Config.Crosslines,
		FirstInline: s.FirstInline, InlineStep: 1, FirstCrossline: s.FirstCrossline, CrosslineStep: 1,
		XY: func(il, xl int) (float64, float64) { return s.CDP(s.FirstInline+il, s.FirstCrossline+xl) },
	}
	return src, l, nil
}

// Seed returns the tracker's seed at inline and crossline numbers of l.
func Seed(l horizon.Layout, inline, crossline int, ms float64) (horizon.Seed, error) {
	di, dx := inline-l.FirstInline, crossline-l.FirstCrossline
	il, xl := di/l.InlineStep, dx/l.CrosslineStep
	if l.InlineStep == 0 || l.CrosslineStep == 0 || di%l.InlineStep != 0 || dx%l.CrosslineStep != 0 ||
		il < 0 || il >= l.Inlines || xl < 0 || xl >= l.Crosslines {
		return horizon.Seed{}, fmt.Errorf("seed at inline %d crossline %d: not on the survey's grid (inlines %d to %d, crosslines %d to %d)",
			inline, crossline, l.FirstInline, l.FirstInline+(l.Inlines-1)*l.InlineStep, l.FirstCrossline, l.FirstCrossline+(l.Crosslines-1)*l.CrosslineStep)
	}
	if math.IsNaN(ms) || math.IsInf(ms, 0) {
		return horizon.Seed{}, fmt.Errorf("seed at inline %d crossline %d: time %v ms is not a number", inline, crossline, ms)
	}
	return horizon.Seed{Inline: il, Crossline: xl, TimeMS: ms}, nil
}

// MapAttribute maps attribute a (with parameters p) of src's traces along
// top as spec says. It computes the attribute one inline at a time (all
// cores within the inline), so it holds one inline's attribute, never the
// volume. progress (may be nil) gets inlines done.
func MapAttribute(ctx context.Context, src horizon.Source, top *horizon.Horizon, a *compute.Attribute, p compute.Params, spec horizon.MapSpec, progress func(done, total int)) (*horizon.AttributeMap, error) {
	g := src.Grid()
	if top == nil || top.Inlines != g.Inlines || top.Crosslines != g.Crosslines {
		return nil, fmt.Errorf("map: the horizon's grid does not match the survey's %d x %d traces", g.Inlines, g.Crosslines)
	}
	if spec.Base != nil && (spec.Base.Inlines != g.Inlines || spec.Base.Crosslines != g.Crosslines) {
		return nil, fmt.Errorf("map: the base horizon's grid does not match the survey's %d x %d traces", g.Inlines, g.Crosslines)
	}
	if err := spec.Validate(); err != nil {
		return nil, err
	}
	out := &horizon.AttributeMap{Inlines: g.Inlines, Crosslines: g.Crosslines, Values: make([]float32, g.Inlines*g.Crosslines)}
	nx := g.Crosslines
	back := make([]float32, nx*g.Samples)
	sec := compute.Section{Traces: make([][]float32, nx), DT: g.DT, T0: g.T0}
	for il := range g.Inlines {
		if err := ctx.Err(); err != nil {
			return nil, err
		}
		row := func(h *horizon.Horizon) *horizon.Horizon {
			if h == nil {
				return nil
			}
			r := &horizon.Horizon{Inlines: 1, Crosslines: nx}
			r.TimeMS, r.Quality, r.State = h.TimeMS[il*nx:(il+1)*nx], h.Quality[il*nx:(il+1)*nx], h.State[il*nx:(il+1)*nx]
			return r
		}
		rowTop := row(top)
		if rowTop.Picked() == 0 {
			nan := float32(math.NaN())
			for xl := range nx {
				out.Values[il*nx+xl] = nan
			}
			continue
		}
		for xl := range nx {
			tr, err := src.Trace(il, xl, back[xl*g.Samples:(xl+1)*g.Samples])
			if err != nil {
				return nil, fmt.Errorf("map: %w", err)
			}
			sec.Traces[xl] = tr
		}
		attr, err := a.Compute(ctx, sec, p, nil)
		if err != nil {
			return nil, fmt.Errorf("map: inline index %d: %s: %w", il, a.ID, err)
		}
		rowSrc, err := horizon.NewTraces(attr.Traces, 1, nx, g.DT, g.T0)
		if err != nil {
			return nil, fmt.Errorf("map: %w", err)
		}
		rowSpec := spec
		rowSpec.Base = row(spec.Base)
		m, err := horizon.Map(ctx, rowSrc, rowTop, rowSpec, nil)
		if err != nil {
			return nil, err
		}
		copy(out.Values[il*nx:], m.Values)
		if progress != nil {
			progress(il+1, g.Inlines)
		}
	}
	return out, nil
}
