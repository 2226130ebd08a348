package viewer

import (
	"image/color"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"

	"quadtrace/app/volume"
	"quadtrace/compute/horizon"
)

// sectionMark is one horizon as drawn over the view: line segments and
// seed points in the view's cell coordinates (trace i, or a time slice's
// crossline i, covers [i, i+1) across; sample j, or inline j, covers
// [j, j+1) down).
type sectionMark struct {
	colour color.NRGBA
	segs   [][4]float64 // x0, y0, x1, y1
	seeds  [][2]float64 // seeds: tracked (on the surface) and waiting
}

// markInput is what the marks job reads of a horizon: its shown surface and
// seeds (never changed once handed over, see namedHorizon).
type markInput struct {
	colour color.NRGBA
	h      *horizon.Horizon
	seeds  []horizon.Seed
}

// horizonMarks draws the horizons on the view at p:
//   - on an inline or crossline, the picked time of each trace of the line,
//     joined from trace centre to trace centre where neighbours are both
//     picked (a lone pick is a short stroke across its trace);
//   - on a time slice, the line where the horizon crosses the slice's time:
//     the contour at that time of the picked times between bin centres
//     (marching squares over each square of four picked bins), which is
//     what a slice through the surface shows.
//
// Seeds on the line (or, on a time slice, within half a sample of its
// time) are marked too.
func horizonMarks(in []markInput, p sectionPlace) []sectionMark {
	out := make([]sectionMark, 0, len(in))
	for _, m := range in {
		sm := sectionMark{colour: m.colour}
		if m.h != nil {
			if p.orientation == volume.TimeSlice {
				sm.segs = sliceContour(m.h, p.sliceMS)
			} else if p.line >= 0 {
				sm.segs = lineTrace(m.h, p)
			}
			for k, s := range m.h.State {
				if s == horizon.Seeded {
					if x, y, ok := p.point(k/m.h.Crosslines, k%m.h.Crosslines, m.h.TimeMS[k]); ok {
						sm.seeds = append(sm.seeds, [2]float64{x, y})
					}
				}
			}
		}
		for _, s := range m.seeds {
			if x, y, ok := p.point(s.Inline, s.Crossline, s.TimeMS); ok {
				sm.seeds = append(sm.seeds, [2]float64{x, y})
			}
		}
		out = append(out, sm)
	}
	return out
}

// point places a pick at grid index (il, xl), time ms, on the view at p;
// ok is false when the view does not show it.
func (p sectionPlace) point(il, xl int, ms float64) (x, y float64, ok bool) {
	switch p.orientation {
	case volume.Inline:
		return float64(xl) + 0.5, p.sampleY(ms), il == p.line
	case volume.Crossline:
		return float64(il) + 0.5, p.sampleY(ms), xl == p.line
	}
	return float64(xl) + 0.5, float64(il) + 0.5, math.Abs(ms-p.sliceMS) <= p.dtMS/2
}

// lineTrace is the horizon along the inline or crossline of p.
func lineTrace(h *horizon.Horizon, p sectionPlace) [][4]float64 {
	var n int
	at := func(i int) (float64, bool) {
		il, xl := p.line, i
		if p.orientation == volume.Crossline {
			il, xl = i, p.line
		}
		t, s := h.At(il, xl)
		return t, s != horizon.Empty
	}
	if p.orientation == volume.Inline {
		if p.line >= h.Inlines {
			return nil
		}
		n = h.Crosslines
	} else {
		if p.line >= h.Crosslines {
			return nil
		}
		n = h.Inlines
	}
	var segs [][4]float64
	for i := 0; i < n; i++ {
		t, ok := at(i)
		if !ok {
			continue
		}
		y := p.sampleY(t)
		tn, okN := at(i + 1)
		_, okP := at(i - 1)
		switch {
		case okN:
			segs = append(segs, [4]float64{float64(i) + 0.5, y, float64(i) + 1.5, p.sampleY(tn)})
		case !okP:
			segs = append(segs, [4]float64{float64(i) + 0.2, y, float64(i) + 0.8, y})
		}
	}
	return segs
}

// sliceContour is the contour of h's times at ms between bin centres.
func sliceContour(h *horizon.Horizon, ms float64) [][4]float64 {
	var segs [][4]float64
	for il := 0; il+1 < h.Inlines; il++ {
		for xl := 0; xl+1 < h.Crosslines; xl++ {
			// Corners in order round the square: (il,xl), (il,xl+1),
			// (il+1,xl+1), (il+1,xl); x across (crossline), y down (inline).
			ci := [4][2]int{{il, xl}, {il, xl + 1}, {il + 1, xl + 1}, {il + 1, xl}}
			var f [4]float64
			ok := true
			for c, g := range ci {
				t, s := h.At(g[0], g[1])
				if s == horizon.Empty {
					ok = false
					break
				}
				f[c] = t - ms
			}
			if !ok {
				continue
			}
			var pts [][2]float64
			for e := 0; e < 4; e++ {
				a, b := e, (e+1)%4
				if (f[a] >= 0) == (f[b] >= 0) {
					continue
				}
				w := f[a] / (f[a] - f[b])
				x := float64(ci[a][1]) + w*float64(ci[b][1]-ci[a][1]) + 0.5
				y := float64(ci[a][0]) + w*float64(ci[b][0]-ci[a][0]) + 0.5
				pts = append(pts, [2]float64{x, y})
			}
			for k := 0; k+1 < len(pts); k += 2 {
				segs = append(segs, [4]float64{pts[k][0], pts[k][1], pts[k+1][0], pts[k+1][1]})
			}
		}
	}
	return segs
}

// requestHorizonMarks recomputes, in the background, the horizons drawn
// over the shown view, when the view's place or the horizons changed since
// the last time (zooming and panning only move the marks, in the section's
// layout).
func (v *viewer) requestHorizonMarks() {
	p, ok := v.place()
	if ok && p == v.hzEdit.marksPlace && v.horizons.version == v.hzEdit.marksVersion {
		return
	}
	v.hzEdit.marksPlace, v.hzEdit.marksVersion = p, v.horizons.version
	var in []markInput
	for _, h := range v.horizons.items {
		if ok && !h.Hidden {
			in = append(in, markInput{colour: h.Colour, h: h.H, seeds: h.seeds})
		}
	}
	if len(in) == 0 {
		// Nothing to draw: clear at once, and cancel a marks job still
		// running for an earlier request, which would otherwise land after
		// this and draw horizons no longer shown (or on another place).
		v.jobs.cancel(laneMarks)
		v.ui.section.setMarks(nil)
		return
	}
	v.jobs.start(laneMarks, func(j *job) {
		marks := horizonMarks(in, p)
		v.onUI(j, func() { v.ui.section.setMarks(marks) })
	})
}

// --- on the section view ---

// setMarks shows the horizons' marks over the section.
func (v *sectionView) setMarks(m []sectionMark) {
	if len(m) == 0 && len(v.marks) == 0 {
		return
	}
	v.marks = m
	v.Refresh()
}

// toolTapped handles a click in the seed tool and reports whether it did.
func (v *sectionView) toolTapped(e *fyne.PointEvent) bool {
	if v.tool != toolSeed {
		return false
	}
	t, s, in := v.toData(e.Position)
	if in && v.onSeed != nil {
		v.onSeed(t, s)
	}
	return true
}

// toolDragged follows a drag in the erase tool (the box grows from where
// the drag began) and reports whether it did.
func (v *sectionView) toolDragged(e *fyne.DragEvent) bool {
	if v.tool != toolErase {
		return false
	}
	if !v.boxing {
		v.boxing = true
		v.boxFrom = e.Position.Subtract(e.Dragged)
	}
	v.boxTo = e.Position
	v.Refresh()
	return true
}

// toolDragEnd erases inside the box a drag in the erase tool drew.
func (v *sectionView) toolDragEnd() {
	if !v.boxing {
		return
	}
	v.boxing = false
	v.Refresh()
	t0, s0, _ := v.toData(v.boxFrom)
	t1, s1, _ := v.toData(v.boxTo)
	if v.onErase != nil && v.img != nil {
		v.onErase(t0, s0, t1, s1)
	}
}

// markObjects are the canvas objects of the horizons over the section: the
// lines, the seed crosses and the erase box.
type markObjects struct {
	lines linePool
	box   *canvas.Rectangle
}

func (m *markObjects) objects() []fyne.CanvasObject {
	if m.box == nil {
		m.box = canvas.NewRectangle(color.Transparent)
		m.box.StrokeColor = color.NRGBA{R: 255, G: 255, B: 255, A: 220}
		m.box.StrokeWidth = 1.5
		m.box.FillColor = color.NRGBA{R: 255, G: 255, B: 255, A: 40}
		m.box.Hide()
	}
	return append([]fyne.CanvasObject{m.box}, m.lines.objects()...)
}

// layout places the marks of v over the plot at pos, size ps.
func (m *markObjects) layout(v *sectionView, pos fyne.Position, ps fyne.Size, shown bool) {
	m.lines.reset()
	defer m.lines.finish()
	m.objects()
	m.box.Hidden = !(shown && v.boxing)
	if !m.box.Hidden {
		a, b := v.boxFrom, v.boxTo
		m.box.Move(fyne.NewPos(min(a.X, b.X), min(a.Y, b.Y)))
		m.box.Resize(fyne.NewSize(float32(math.Abs(float64(a.X-b.X))), float32(math.Abs(float64(a.Y-b.Y)))))
	}
	vp := v.vp
	tw, sw := vp.Trace1-vp.Trace0, vp.Sample1-vp.Sample0
	if !shown || tw <= 0 || sw <= 0 {
		return
	}
	at := func(x, y float64) fyne.Position {
		return fyne.NewPos(pos.X+float32((x-vp.Trace0)/tw)*ps.Width, pos.Y+float32((y-vp.Sample0)/sw)*ps.Height)
	}
	for _, mk := range v.marks {
		for _, s := range mk.segs {
			if x0, y0, x1, y1, ok := clipSegment(s, vp.Trace0, vp.Trace1, vp.Sample0, vp.Sample1); ok {
				l := m.lines.next(at(x0, y0), at(x1, y1), mk.colour)
				l.StrokeWidth = 2
			}
		}
		for _, p := range mk.seeds {
			if p[0] < vp.Trace0 || p[0] > vp.Trace1 || p[1] < vp.Sample0 || p[1] > vp.Sample1 {
				continue
			}
			c := at(p[0], p[1])
			const r = 5
			for _, d := range [2][2]float32{{r, r}, {r, -r}} {
				l := m.lines.next(fyne.NewPos(c.X-d[0], c.Y-d[1]), fyne.NewPos(c.X+d[0], c.Y+d[1]), mk.colour)
				l.StrokeWidth = 2
			}
		}
	}
}

// clipSegment clips the segment s to the box [x0, x1] x [y0, y1]
// (Liang and Barsky, 1984, "A new concept and method for line clipping",
// ACM Transactions on Graphics 3(1)); ok is false when nothing is left.
func clipSegment(s [4]float64, x0, x1, y0, y1 float64) (ax, ay, bx, by float64, ok bool) {
	dx, dy := s[2]-s[0], s[3]-s[1]
	lo, hi := 0.0, 1.0
	for _, c := range [4][2]float64{{-dx, s[0] - x0}, {dx, x1 - s[0]}, {-dy, s[1] - y0}, {dy, y1 - s[1]}} {
		p, q := c[0], c[1]
		if p == 0 {
			if q < 0 {
				return 0, 0, 0, 0, false
			}
			continue
		}
		r := q / p
		if p < 0 {
			lo = math.Max(lo, r)
		} else {
			hi = math.Min(hi, r)
		}
	}
	if lo > hi || math.IsNaN(lo+hi) {
		return 0, 0, 0, 0, false
	}
	return s[0] + lo*dx, s[1] + lo*dy, s[0] + hi*dx, s[1] + hi*dy, true
}
