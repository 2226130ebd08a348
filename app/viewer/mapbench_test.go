package viewer

import (
	"context"
	"testing"
	"time"

	"fyne.io/fyne/v2"

	"quadtrace/app/horizonjob"
	"quadtrace/compute/horizon"
	"quadtrace/compute/synth"
	"quadtrace/segy/segytest"
)

// mapBenchViewer opens the full demo survey (150 x 200 traces of 751
// samples) in a window on the test driver and shows the map of the
// seafloor tracked from one seed, RMS of the envelope over -10..10 ms.
func mapBenchViewer(b *testing.B) (*viewer, *mapPanel) {
	b.Helper()
	cfg := synth.DefaultConfig()
	s, err := synth.Generate(context.Background(), cfg, nil)
	if err != nil {
		b.Fatal(err)
	}
	src, _, err := horizonjob.SurveySource(s)
	if err != nil {
		b.Fatal(err)
	}
	sf, _ := s.Surface(synth.SurfaceSeafloor)
	k := 75*cfg.Crosslines + 100
	h, err := horizon.Track(context.Background(), src, []horizon.Seed{{Inline: 75, Crossline: 100, TimeMS: float64(sf.PeakMS[k])}}, horizon.Options{Event: horizon.Peak, WindowMS: 4}, nil)
	if err != nil {
		b.Fatal(err)
	}
	v := openDemoViewer(b, cfg, fyne.NewSize(1500, 900))
	if v.vol == nil {
		b.Fatal("demo survey not open")
	}
	v.showMap(v.horizons.addSurface("Seafloor", h, h.Picked()))
	p := v.ui.mapPanel
	p.showPick.SetSelected(mapShowAttribute)
	p.attrPick.SetSelected(lookup("envelope").Name)
	p.statPick.SetSelected(statLabels[horizon.RMS-1])
	v.jobs.wait()
	if p.attrSlab == nil || p.drawn == 0 {
		b.Fatalf("no attribute map (message %q)", p.view.message)
	}
	return v, p
}

// reportCPU reports the process's CPU time per iteration since cpu (all
// goroutines: the jobs' workers too) beside the wall time: on the shared
// machine wall time is an upper bound, CPU time the work done.
func reportCPU(b *testing.B, cpu time.Duration) {
	if d := segytest.ProcessCPU() - cpu; d > 0 {
		b.ReportMetric(float64(d)/1e6/float64(b.N), "cpu-ms/op")
	}
}

// alternateMapAttribute is the timed loop of the attribute-change
// benchmarks: the map's attribute alternates between instantaneous
// frequency and envelope, each change waited for, CPU time reported.
func alternateMapAttribute(b *testing.B, v *viewer, p *mapPanel) {
	ids := []string{"instantaneous-frequency", "envelope"}
	i := 0
	cpu := segytest.ProcessCPU()
	for b.Loop() {
		p.attrPick.SetSelected(lookup(ids[i%len(ids)]).Name)
		v.jobs.wait()
		i++
	}
	reportCPU(b, cpu)
}

// BenchmarkMapStatisticChange is the time from a change of statistic to
// the redrawn attribute map in the window (map from the kept strips,
// figure drawn at the view's size, handed to the view), for the envelope
// along the demo's tracked seafloor. Compare with
// BenchmarkMapAttributeChange, which computes the attribute again.
func BenchmarkMapStatisticChange(b *testing.B) {
	v, p := mapBenchViewer(b)
	kept := p.attrSlab
	stats := []horizon.Stat{horizon.Mean, horizon.MaxAbs, horizon.RMS, horizon.MinAbs, horizon.MeanAbs, horizon.Value}
	i := 0
	cpu := segytest.ProcessCPU()
	for b.Loop() {
		p.statPick.SetSelected(statLabels[stats[i%len(stats)]-1])
		v.jobs.wait()
		i++
	}
	reportCPU(b, cpu)
	if p.attrSlab != kept {
		b.Fatal("a change of statistic computed the attribute again")
	}
}

// BenchmarkMapPaletteChange is the time from a change of palette to the
// redrawn map (the figure alone).
func BenchmarkMapPaletteChange(b *testing.B) {
	v, p := mapBenchViewer(b)
	names := []string{"lumbry", "pyrrel", "lumbry-r", "slatine"}
	i := 0
	cpu := segytest.ProcessCPU()
	for b.Loop() {
		p.palettePick.SetSelected(names[i%len(names)])
		v.jobs.wait()
		i++
	}
	reportCPU(b, cpu)
}

// BenchmarkMapAttributeChange is the time from a change of attribute to
// the redrawn map: the attribute computed on the slab's stretches around
// the horizon (the amplitude is not read again), then the map.
func BenchmarkMapAttributeChange(b *testing.B) {
	v, p := mapBenchViewer(b)
	slab := p.slab
	alternateMapAttribute(b, v, p)
	if p.slab != slab {
		b.Fatal("a change of attribute read the traces again")
	}
}

// BenchmarkMapConditionedAttributeChange is BenchmarkMapAttributeChange
// with conditioning (AGC) on: the attribute of whole traces through the
// survey's attribute path, inline by inline, as the sections show it.
func BenchmarkMapConditionedAttributeChange(b *testing.B) {
	v, p := mapBenchViewer(b)
	v.state.Cond.AGCWindowMS = 200
	p.request()
	v.jobs.wait()
	alternateMapAttribute(b, v, p)
	if p.strips == nil {
		b.Fatal("no whole-trace strips")
	}
}
