package viewer

import (
	"bufio"
	"fmt"
	"os"
	"runtime/metrics"
	"runtime/pprof"
	"strconv"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"

	"quadtrace/app/volume"
)

// rssAnonKB reads this process's anonymous resident memory (RssAnon in
// /proc/self/status, Linux 4.5+), in kB; -1 when unknown.
func rssAnonKB() int64 {
	f, err := os.Open("/proc/self/status")
	if err != nil {
		return -1
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if rest, ok := strings.CutPrefix(sc.Text(), "RssAnon:"); ok {
			n, err := strconv.ParseInt(strings.TrimSpace(strings.TrimSuffix(strings.TrimSpace(rest), "kB")), 10, 64)
			if err == nil {
				return n
			}
		}
	}
	return -1
}

// BenchmarkLargeSessionMemory runs a scripted session of the window (fyne's
// test driver, in this process) on the large file named by
// QUADTRACE_LARGE_SEGY (see app/volume's large_bench_test.go) and reports
// the peak of the process's RssAnon, sampled every 20 ms, as peak-rss-anon-MB
// (the bound is windowMemoryBound). The session, shorter than an
// interpreter's ten minutes of work but touching everything that holds
// memory: 10 inlines paged, 5 crosslines, envelope sections, the
// amplitude and envelope time slices of the whole volume and 8 more of
// each at other times, then back to envelope inlines. Run it alone, once:
//
//	QUADTRACE_LARGE_SEGY=/work/big/corrowdeep-8g.sgy go test -run '^$' -bench LargeSessionMemory -benchtime 1x -timeout 60m ./app/viewer/
func BenchmarkLargeSessionMemory(b *testing.B) {
	path := os.Getenv("QUADTRACE_LARGE_SEGY")
	if path == "" {
		b.Skip("QUADTRACE_LARGE_SEGY is not set: it names the large SEG-Y file (at least 8 GB) this benchmark opens")
	}
	limitWindowMemory() // as Run does
	var peak atomic.Int64
	var phase, vol atomic.Value
	phase.Store("open")
	stop := make(chan struct{})
	sampled := make(chan struct{})
	profile := os.Getenv("QUADTRACE_PEAK_HEAP_PROFILE") // a heap profile at each new peak (+64 MB)
	go func() {
		defer close(sampled)
		tick := time.NewTicker(20 * time.Millisecond)
		defer tick.Stop()
		var profiled int64
		for {
			if kb := rssAnonKB(); kb > peak.Load() {
				peak.Store(kb)
				if kb > profiled+64<<10 {
					profiled = kb
					s := []metrics.Sample{{Name: "/gc/heap/live:bytes"}, {Name: "/memory/classes/total:bytes"}, {Name: "/memory/classes/heap/released:bytes"}}
					metrics.Read(s)
					var bricks int64
					if u, ok := vol.Load().(interface{ BrickMemoryUsed() int64 }); ok {
						bricks = u.BrickMemoryUsed()
					}
					fmt.Fprintf(os.Stderr, "RssAnon %d MB during %s: Go heap live %d MB, Go total %d MB (released %d MB), resident bricks %d MB\n", kb>>10, phase.Load(), s[0].Value.Uint64()>>20, s[1].Value.Uint64()>>20, s[2].Value.Uint64()>>20, bricks>>20)
					if profile != "" {
						if f, err := os.Create(profile); err == nil {
							pprof.WriteHeapProfile(f)
							f.Close()
						}
					}
				}
			}
			select {
			case <-stop:
				return
			case <-tick.C:
			}
		}
	}()
	for range b.N {
		a := test.NewTempApp(b)
		v := newViewer(a, Options{Path: path}, newQueuedJobs())
		v.win.Resize(fyne.NewSize(1400, 900))
		v.start()
		v.jobs.wait()
		if v.vol == nil {
			b.Fatalf("open %s: %s", path, v.ui.message.Text)
		}
		vol.Store(v.vol)
		step := func(name string, f func()) {
			phase.Store(name)
			f()
			v.jobs.wait()
			if strings.Contains(v.ui.section.message, "rror") {
				b.Fatalf("session step failed: %s", v.ui.section.message)
			}
		}
		for range 10 {
			step("stepLine(1)", func() { v.stepLine(1) })
		}
		step("setOrientation(Crossline)", func() { v.setOrientation(volume.Crossline) })
		for range 5 {
			step("stepLine(7)", func() { v.stepLine(7) })
		}
		step("setAttribute(envelope)", func() { v.setAttribute("envelope") })
		step("setAttribute(amplitudeID)", func() { v.setAttribute(amplitudeID) })
		step("setOrientation(TimeSlice)", func() { v.setOrientation(volume.TimeSlice) })
		for range 8 {
			step("stepLine(9)", func() { v.stepLine(9) })
		}
		step("setAttribute(envelope)", func() { v.setAttribute("envelope") })
		for range 8 {
			step("stepLine(9)", func() { v.stepLine(9) })
		}
		step("setOrientation(Inline)", func() { v.setOrientation(volume.Inline) })
		for range 5 {
			step("stepLine(3)", func() { v.stepLine(3) })
		}
		b.ReportMetric(float64(v.sectionDrawn), "sections-drawn")
		v.jobs.close()
		v.jobs.wait()
		v.vol.Close()
	}
	close(stop)
	<-sampled
	b.ReportMetric(float64(peak.Load())/1024, "peak-rss-anon-MB")
}
