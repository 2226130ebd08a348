package viewer

import (
	"context"
	"image"
	"math"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/compute/synth"
	"quadtrace/render"
	"quadtrace/segy"
	"quadtrace/segy/segytest"
)

// halfSurvey computes attribute time slices for real but holds them back
// until released; meanwhile its slice so far is the real one with the
// crosslines of the left half not computed (pending, NaN), as
// volume.AttributeSoFar gives it while the store fills.
type halfSurvey struct {
	survey
	started, release chan struct{}
	full             volume.Section
}

func (h *halfSurvey) Attribute(ctx context.Context, sl volume.Slice, a *compute.Attribute, p compute.Params, c compute.Conditioning, progress func(done, total int)) (volume.Section, error) {
	if sl.Orientation != volume.TimeSlice || a.ID == amplitudeID {
		return h.survey.Attribute(ctx, sl, a, p, c, progress)
	}
	full, err := h.survey.Attribute(ctx, sl, a, p, c, nil)
	if err != nil {
		return full, err
	}
	h.full = full
	progress(1, 2)
	close(h.started)
	select {
	case <-h.release:
		return full, nil
	case <-ctx.Done():
		return volume.Section{}, ctx.Err()
	}
}

func (h *halfSurvey) AttributeSoFar(sl volume.Slice, a *compute.Attribute, p compute.Params, c compute.Conditioning) (volume.Section, bool) {
	if h.full.Traces == nil {
		return volume.Section{}, false
	}
	s := h.full
	s.Traces, s.Pending = make([][]float32, len(h.full.Traces)), make([][]bool, len(h.full.Traces))
	for i, row := range h.full.Traces {
		s.Traces[i] = append([]float32(nil), row...)
		s.Pending[i] = make([]bool, len(row))
		for j := range len(row) / 2 {
			s.Traces[i][j], s.Pending[i][j] = float32(math.NaN()), true
		}
	}
	return s, true
}

// hatchShare is the share of hatch-coloured pixels in columns [x0, x1) of
// rectangle r of img.
func hatchShare(img *image.RGBA, r image.Rectangle, x0, x1 int) float64 {
	var n, hatched int
	for y := r.Min.Y; y < r.Max.Y; y++ {
		for x := x0; x < x1; x++ {
			c := img.RGBAAt(x, y)
			n++
			if c == pendingLight || c == pendingDark {
				hatched++
			}
		}
	}
	return float64(hatched) / float64(max(n, 1))
}

// TestProgressiveTimeSlice: while an envelope time slice is computed, the
// window draws what is computed and hatches the rest, with a legend note;
// the colour range is not taken from the partial picture; the finished
// slice replaces it without hatch or note.
func TestProgressiveTimeSlice(t *testing.T) {
	cfg := synth.DefaultConfig()
	cfg.Inlines, cfg.Crosslines, cfg.Samples = 30, 40, 200
	s, err := synth.Generate(context.Background(), cfg, nil)
	if err != nil {
		t.Fatal(err)
	}
	path := filepath.Join(t.TempDir(), "p.sgy")
	if err := volume.WriteSurvey(context.Background(), path, s, segy.WriteOptions{}); err != nil {
		t.Fatal(err)
	}
	v := openViewer(t, path)
	v.setAttribute("envelope")
	v.jobs.wait()
	h := &halfSurvey{survey: v.vol, started: make(chan struct{}), release: make(chan struct{})}
	v.vol = h
	drawn := v.sectionDrawn
	rangesBefore := len(v.ranges)
	v.ui.orientation.SetSelected("Time slice")
	<-h.started
	deadline := time.Now().Add(20 * time.Second)
	for v.sectionDrawn == drawn || !v.data.pending() {
		if time.Now().After(deadline) {
			t.Fatalf("no partial time slice drawn (drawn %d, pending %v)", v.sectionDrawn, v.data.pending())
		}
		v.jobs.drain()
		time.Sleep(time.Millisecond)
	}
	if v.ui.work.box.Hidden {
		t.Error("the progress of the time slice is hidden while it is computed")
	}
	if head := v.ui.legends.rows[0].head.Text; !strings.Contains(head, "not computed yet") {
		t.Errorf("legend %q says nothing of the hatch", head)
	}
	img := v.lastSection
	nx, ni := len(v.data.amp.Traces[0]), len(v.data.amp.Traces)
	r := render.MapRect(img.Bounds(), ni, nx, v.data.amp.MapAspect)
	mid := r.Min.X + r.Dx()/2
	margin := r.Dx() / 10
	if left := hatchShare(img, r, r.Min.X+2, mid-margin); left < 0.95 {
		t.Errorf("only %.0f %% of the pending half is hatched", left*100)
	}
	if right := hatchShare(img, r, mid+margin, r.Max.X-2); right > 0.01 {
		t.Errorf("%.1f %% of the computed half is hatched", right*100)
	}
	if len(v.ranges) != rangesBefore {
		t.Errorf("the partial picture set a colour range (%d ranges, were %d)", len(v.ranges), rangesBefore)
	}
	close(h.release)
	v.jobs.wait()
	if v.data.pending() {
		t.Fatal("still pending after the slice was finished")
	}
	if head := v.ui.legends.rows[0].head.Text; strings.Contains(head, "not computed yet") {
		t.Errorf("legend %q still notes the hatch", head)
	}
	if all := hatchShare(v.lastSection, r, r.Min.X, r.Max.X); all > 0.01 {
		t.Errorf("%.1f %% of the finished slice hatched", all*100)
	}
	// A request for the same slice is satisfied by the finished data.
	if !dataRequestFor(&v.state).satisfied(v.data) {
		t.Error("the finished slice does not satisfy its own request")
	}
}

// TestPartialOnlyWhenWanted: fetchData makes a partial slice only when
// partialWanted says the picture before is drawn (renders of partial
// slices must not pile up), and never for a request without partial.
func TestPartialOnlyWhenWanted(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	v.setAttribute("envelope")
	v.ui.orientation.SetSelected("Time slice")
	v.jobs.wait()
	st := v.state
	for _, wanted := range []bool{false, true} {
		h := &halfSurvey{survey: v.vol, started: make(chan struct{}), release: make(chan struct{})}
		close(h.release)
		req := dataRequestFor(&st)
		var made, asked int
		req.partial = func(shown) { made++ }
		req.partialWanted = func() bool { asked++; return wanted }
		d, err := fetchData(context.Background(), h, req, shown{}, nil, func(string) func(int, int) { return nil })
		if err != nil {
			t.Fatal(err)
		}
		if asked == 0 || (made > 0) != wanted {
			t.Errorf("partial wanted %v: asked %d times, %d made", wanted, asked, made)
		}
		if d.pending() {
			t.Error("fetchData returned partial data")
		}
	}
}
