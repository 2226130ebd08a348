package viewer

import (
	"fmt"
	"math"

	"quadtrace/app/volume"
	"quadtrace/compute/horizon"
	"quadtrace/segy"
)

// surveySource is a horizon.Source over the window's survey: grid index
// (il, xl) is the il-th inline number and the xl-th crossline number of the
// survey's ranges (the same numbering the sections use, so a section's
// trace index is a grid index), at one offset. A grid position the survey
// cannot give (no trace there, or a read that fails) reads as an all-NaN
// trace, which the tracker leaves empty; missing counts them.
//
// It is safe for concurrent use as long as the survey is (volume.Volume
// is), and the job that uses it holds the survey (holds.go).
type surveySource struct {
	vol        survey
	grid       horizon.Grid
	inlines    []int // inline numbers by grid index
	crosslines []int
	offset     int
}

// newSurveySource describes vol's grid for the tracker; it fails when the
// survey cannot be tracked on (no sample interval, too few samples).
func newSurveySource(vol survey, offset int) (*surveySource, error) {
	info := vol.Info()
	s := &surveySource{
		vol: vol, inlines: volume.Numbers(info.Inline), crosslines: volume.Numbers(info.Crossline), offset: offset,
		grid: horizon.Grid{
			Inlines: info.Inline.Count, Crosslines: info.Crossline.Count, Samples: info.Samples,
			DT: float64(info.IntervalUS) * 1e-6, T0: info.StartMS * 1e-3,
		},
	}
	if info.IntervalUS <= 0 {
		return nil, fmt.Errorf("%s gives no sample interval: horizons cannot be tracked in time", vol.Name())
	}
	if len(s.inlines) == 0 || len(s.crosslines) == 0 || info.Samples < 3 {
		return nil, fmt.Errorf("%s: %d x %d traces of %d samples: too few to track a horizon", vol.Name(), len(s.inlines), len(s.crosslines), info.Samples)
	}
	return s, nil
}

// Grid implements horizon.Source.
func (s *surveySource) Grid() horizon.Grid { return s.grid }

// Trace implements horizon.Source.
func (s *surveySource) Trace(il, xl int, buf []float32) ([]float32, error) {
	if il < 0 || il >= len(s.inlines) || xl < 0 || xl >= len(s.crosslines) {
		return nil, fmt.Errorf("%s: grid index (%d, %d) outside the %d x %d grid", s.vol.Name(), il, xl, len(s.inlines), len(s.crosslines))
	}
	tr, err := s.vol.Trace(s.inlines[il], s.crosslines[xl], s.offset)
	if err != nil || len(tr) != s.grid.Samples {
		// No trace at this position (or it cannot be read): a gap.
		if cap(buf) < s.grid.Samples {
			buf = make([]float32, s.grid.Samples)
		}
		buf = buf[:s.grid.Samples]
		nan := float32(math.NaN())
		for i := range buf {
			buf[i] = nan
		}
		return buf, nil
	}
	return tr, nil
}

// layout numbers and places the grid for horizon files: the survey's
// ranges, with the coordinates of each bin when the survey has them.
func (s *surveySource) layout() horizon.Layout {
	info := s.vol.Info()
	step := func(r segy.Range) int {
		if r.Step == 0 {
			return 1
		}
		return r.Step
	}
	l := horizon.Layout{
		Inlines: len(s.inlines), Crosslines: len(s.crosslines),
		FirstInline: info.Inline.Min, InlineStep: step(info.Inline),
		FirstCrossline: info.Crossline.Min, CrosslineStep: step(info.Crossline),
	}
	if located, ok := s.vol.(interface {
		Coordinates(inline, crossline int) (x, y float64, ok bool)
	}); ok {
		l.XY = func(il, xl int) (float64, float64) {
			x, y, _ := located.Coordinates(s.inlines[il], s.crosslines[xl])
			return x, y
		}
	}
	return l
}

// gridIndex returns the grid index of line number n in range r, or -1
// when n is not on it.
func gridIndex(r segy.Range, n int) int {
	step := r.Step
	if step == 0 {
		step = 1
	}
	d := n - r.Min
	if d%step != 0 || d/step < 0 || d/step >= r.Count {
		return -1
	}
	return d / step
}
