package viewer

import (
	"context"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"quadtrace/app/volume"
	"quadtrace/compute"
	"quadtrace/segy"
	"quadtrace/segy/segytest"

	"fyne.io/fyne/v2/test"
)

// guardedSurvey counts the reads in progress and records a Close that
// comes while one is: the viewer must never close a survey a job still
// reads (issue 12.1). Its time-slice attribute waits for cancellation and
// then lingers, so a close that does not wait would land inside it.
type guardedSurvey struct {
	survey
	active       atomic.Int64
	closedInRead atomic.Bool
	closed       atomic.Bool
	started      chan struct{}
}

func (g *guardedSurvey) enter() func() {
	g.active.Add(1)
	return func() { g.active.Add(-1) }
}

func (g *guardedSurvey) Read(ctx context.Context, s volume.Slice) (volume.Section, error) {
	defer g.enter()()
	return g.survey.Read(ctx, s)
}

func (g *guardedSurvey) Trace(il, xl, off int) ([]float32, error) {
	defer g.enter()()
	time.Sleep(5 * time.Millisecond)
	return g.survey.Trace(il, xl, off)
}

func (g *guardedSurvey) Attribute(ctx context.Context, sl volume.Slice, a *compute.Attribute, p compute.Params, c compute.Conditioning, progress func(done, total int)) (volume.Section, error) {
	defer g.enter()()
	if sl.Orientation != volume.TimeSlice {
		return g.survey.Attribute(ctx, sl, a, p, c, progress)
	}
	close(g.started)
	<-ctx.Done()
	time.Sleep(50 * time.Millisecond) // still reading after the cancel
	return volume.Section{}, ctx.Err()
}

func (g *guardedSurvey) Close() error {
	if g.active.Load() > 0 {
		g.closedInRead.Store(true)
	}
	g.closed.Store(true)
	return g.survey.Close()
}

// TestSurveyClosedOnlyAfterItsJobs opens another file while a whole-volume
// computation on the first one runs: the first survey is closed, but only
// after the job reading it returned.
func TestSurveyClosedOnlyAfterItsJobs(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	g := &guardedSurvey{survey: v.vol, started: make(chan struct{})}
	v.vol = g
	v.ui.orientation.SetSelected("Time slice")
	<-g.started
	v.openFile(segytest.CorpusFile(t, "tiny.sgy"))
	v.jobs.wait()
	if !g.closed.Load() {
		t.Fatal("the first survey was never closed")
	}
	if g.closedInRead.Load() {
		t.Error("the first survey was closed while a job still read it")
	}
	if v.vol == survey(g) || v.info.Traces != 6 {
		t.Errorf("tiny.sgy not shown after the switch (%d traces)", v.info.Traces)
	}
}

// TestCancelOpenKeepsSurvey starts an open that runs until cancelled (a
// header scan of a huge file), presses Cancel: the open stops, whatever it
// had built is closed (its memory freed with it), and the survey shown
// before stays, picture and controls.
func TestCancelOpenKeepsSurvey(t *testing.T) {
	v := openViewer(t, segytest.CorpusFile(t, "small.sgy"))
	before, shownVol := v.lastSection, v.vol
	started := make(chan struct{})
	var half *guardedSurvey
	v.startOpen("a huge file", func(ctx context.Context, progress func(int, int)) (survey, error) {
		vol, err := volume.OpenContext(ctx, segytest.CorpusFile(t, "tiny.sgy"), segy.Options{})
		if err != nil {
			return nil, err
		}
		half = &guardedSurvey{survey: vol}
		progress(1, 1000)
		close(started)
		<-ctx.Done()
		return half, ctx.Err()
	}, "")
	<-started
	v.jobs.drain()
	if v.ui.work.box.Hidden || v.ui.section.message == "" {
		t.Fatal("no progress or message while opening")
	}
	test.Tap(v.ui.work.cancel)
	v.jobs.wait()
	if !half.closed.Load() {
		t.Error("the cancelled open's survey was not closed")
	}
	if v.vol != shownVol || v.ui.section.message != "" || !samePixels(v.lastSection, before) || !v.ui.work.box.Hidden {
		t.Errorf("after cancelling the open: survey kept %v, section message %q, same picture %v", v.vol == shownVol, v.ui.section.message, samePixels(v.lastSection, before))
	}
	if !strings.HasPrefix(v.ui.title.Text, "Inline 3") {
		t.Errorf("title %q after the cancelled open", v.ui.title.Text)
	}
}
