package viewer

import (
	"bufio"
	"os"
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
	stop := make(chan struct{})
	sampled := make(chan struct{})
	go func() {
		defer close(sampled)
		tick := time.NewTicker(20 * time.Millisecond)
		defer tick.Stop()
		for {
			if kb := rssAnonKB(); kb > peak.Load() {
				peak.Store(kb)
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
		step := func(f func()) {
			f()
			v.jobs.wait()
			if strings.Contains(v.ui.section.message, "rror") {
				b.Fatalf("session step failed: %s", v.ui.section.message)
			}
		}
		for range 10 {
			step(func() { v.stepLine(1) })
		}
		step(func() { v.setOrientation(volume.Crossline) })
		for range 5 {
			step(func() { v.stepLine(7) })
		}
		step(func() { v.setAttribute("envelope") })
		step(func() { v.setAttribute(amplitudeID) })
		step(func() { v.setOrientation(volume.TimeSlice) })
		for range 8 {
			step(func() { v.stepLine(9) })
		}
		step(func() { v.setAttribute("envelope") })
		for range 8 {
			step(func() { v.stepLine(9) })
		}
		step(func() { v.setOrientation(volume.Inline) })
		for range 5 {
			step(func() { v.stepLine(3) })
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
