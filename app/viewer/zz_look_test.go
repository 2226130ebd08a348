package viewer

import (
	"context"
	"image/png"
	"os"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"

	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
)

func TestZZLook(t *testing.T) {
	surf := os.Getenv("LOOK_SURFACE")
	if surf == "" {
		t.Skip()
	}
	cfg := synth.DefaultConfig()
	s, err := synth.Generate(context.Background(), cfg, nil)
	if err != nil {
		t.Fatal(err)
	}
	a := test.NewTempApp(t)
	v := newViewer(a, Options{Demo: &cfg}, newQueuedJobs())
	v.win.Resize(fyne.NewSize(1600, 950))
	v.start()
	v.jobs.wait()
	sf, _ := s.Surface(surf)
	h := horizon.New(cfg.Inlines, cfg.Crosslines)
	for k, x := range sf.PeakMS {
		if x == x {
			h.TimeMS[k], h.State[k], h.Quality[k] = float64(x), horizon.Tracked, 1
		}
	}
	nh := v.horizons.add()
	nh.Name, nh.H = surf, h
	v.showMap(nh)
	v.jobs.wait()
	p := v.ui.mapPanel
	if os.Getenv("LOOK_ATTR") != "" {
		p.showPick.SetSelected(mapShowAttribute)
		p.attrPick.SetSelected(lookup(os.Getenv("LOOK_ATTR")).Name)
		v.jobs.wait()
	}
	p.view.Tapped(&fyne.PointEvent{Position: p.view.toWidget(60.5, 40.5)})
	v.jobs.wait()
	f, _ := os.Create("/tmp/hzmap/window.png")
	png.Encode(f, v.win.Canvas().Capture())
	f.Close()
	p.saveFigure("/tmp/hzmap/figure.png")
	v.jobs.wait()
	t.Log(v.ui.message.Text)
}
