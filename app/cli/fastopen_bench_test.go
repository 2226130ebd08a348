//go:build linux

package cli

import (
	"context"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"testing"
	"time"

	"golang.org/x/sys/unix"

	"quadtrace/app/figure"
	"quadtrace/app/indexcache"
	"quadtrace/app/volume"
	"quadtrace/segy"
	"quadtrace/segy/segytest"
)

// bigSegyEnv names the environment variable with the path of a large SEG-Y
// file for BenchmarkOpenLarge (e.g. 2 GB written by `quadtrace synth`
// outside the repository); the benchmark skips without it.
const bigSegyEnv = "QUADTRACE_BIG_SEGY"

// evict drops the file's pages from the page cache
// (posix_fadvise(POSIX_FADV_DONTNEED): no root needed for a file we can
// read), so the next read comes from the disk.
func evict(b *testing.B, path string) {
	b.Helper()
	fh, err := os.Open(path)
	if err != nil {
		b.Fatal(err)
	}
	defer fh.Close()
	if err := unix.Fadvise(int(fh.Fd()), 0, 0, unix.FADV_DONTNEED); err != nil {
		b.Fatal(err)
	}
}

// cpuTime is the user and system CPU time of this process and of its
// waited-for children (getrusage(2)).
func cpuTime() time.Duration {
	var self, kids unix.Rusage
	unix.Getrusage(unix.RUSAGE_SELF, &self)
	unix.Getrusage(unix.RUSAGE_CHILDREN, &kids)
	tv := func(t unix.Timeval) time.Duration { return time.Duration(t.Nano()) }
	return tv(self.Utime) + tv(self.Stime) + tv(kids.Utime) + tv(kids.Stime)
}

// BenchmarkOpenLarge times, side by side in one run on the file named by
// QUADTRACE_BIG_SEGY, with the page cache emptied of the file before each
// "cold" iteration:
//
//   - open: volume.OpenFast alone (sampled cold; cached index warm);
//   - open-inline: volume.OpenFast and figure.Draw of the middle inline's
//     amplitude (1200x800), with no geometry cache (the sampled open), or
//     with the file's index in the cache;
//   - figure: the figure command (its own process) of the middle inline,
//     cold and warm, with no index cached and with the file's index in
//     the cache;
//   - segyio-open: /usr/bin/python3 opening the file with segyio (Debian
//     python3-segyio; the interpreter's start and import included, and
//     timed alone as python-import-segyio);
//   - cat: `cat FILE > TEMP`, every byte read once.
//
// Run: QUADTRACE_BIG_SEGY=/work/big/two-gb.sgy go test -run '^$' -bench OpenLarge -benchtime 3x ./app/cli/
func BenchmarkOpenLarge(b *testing.B) {
	path := os.Getenv(bigSegyEnv)
	if path == "" {
		b.Skipf("set %s to the path of a large SEG-Y file (e.g. one of 2 GB from quadtrace synth)", bigSegyEnv)
	}
	st, err := os.Stat(path)
	if err != nil {
		b.Fatal(err)
	}
	b.Logf("%s: %.2f GB", path, float64(st.Size())/1e9)
	ctx := context.Background()
	// the exact geometry, kept in a cache for the cached runs
	cached := indexcache.New(filepath.Join(b.TempDir(), "cache"))
	v, err := volume.OpenFast(ctx, path, segy.Options{}, cached)
	if err != nil {
		b.Fatal(err)
	}
	info := v.Info()
	if nv, ch, err := v.Check(ctx, nil); err != nil {
		b.Fatal(err)
	} else if nv != nil {
		info = ch.Info
		nv.Close()
	}
	v.Close()
	inline := info.Inline.Min + (info.Inline.Count-1)/2*info.Inline.Step
	req := figure.Request{Orientation: volume.Inline, Inline: inline, Attribute: "amplitude", Width: 1200, Height: 800, DPI: 100, Clip: 99}
	openDraw := func(b *testing.B, c *indexcache.Cache, want segy.IndexSource) {
		v, err := volume.OpenFast(ctx, path, segy.Options{}, c)
		if err != nil {
			b.Fatal(err)
		}
		defer v.Close()
		if v.IndexSource() != want {
			b.Fatalf("index from %v, want %v", v.IndexSource(), want)
		}
		if _, err := figure.Draw(ctx, v, req); err != nil {
			b.Fatal(err)
		}
	}
	run := func(name string, cold bool, f func(b *testing.B)) {
		b.Run(name, func(b *testing.B) {
			var cpu time.Duration
			for i := 0; i < b.N; i++ {
				if cold {
					b.StopTimer()
					evict(b, path)
					b.StartTimer()
				}
				c0 := cpuTime()
				f(b)
				cpu += cpuTime() - c0
			}
			// the machine is shared: CPU time (this process and the
			// commands it ran) beside the wall time
			b.ReportMetric(float64(cpu.Nanoseconds())/float64(b.N), "cpu-ns/op")
		})
	}
	openOnly := func(b *testing.B, c *indexcache.Cache, want segy.IndexSource) {
		v, err := volume.OpenFast(ctx, path, segy.Options{}, c)
		if err != nil {
			b.Fatal(err)
		}
		if v.IndexSource() != want {
			b.Fatalf("index from %v, want %v", v.IndexSource(), want)
		}
		v.Close()
	}
	run("cold/open/sampled", true, func(b *testing.B) { openOnly(b, nil, segy.IndexSampled) })
	run("warm/open/sampled", false, func(b *testing.B) { openOnly(b, nil, segy.IndexSampled) })
	run("warm/open/cached-index", false, func(b *testing.B) { openOnly(b, cached, segy.IndexSaved) })
	run("cold/open-inline/sampled", true, func(b *testing.B) { openDraw(b, nil, segy.IndexSampled) })
	run("cold/open-inline/cached-index", true, func(b *testing.B) { openDraw(b, cached, segy.IndexSaved) })
	run("warm/open-inline/cached-index", false, func(b *testing.B) { openDraw(b, cached, segy.IndexSaved) })

	// The figure command as its own process (the test binary as the
	// command, see TestMain), so that what a process does once (runtime
	// start, palette generation, font parsing) is counted in every run.
	png := filepath.Join(b.TempDir(), "f.png")
	fig := func(cacheDir string) func(b *testing.B) {
		return func(b *testing.B) {
			cmd := exec.Command(os.Args[0], path, "--inline", strconv.Itoa(inline), "--size", "1200x800", "--out", png)
			cmd.Env = append(os.Environ(), childEnv+"=figure", indexcache.EnvDir+"="+cacheDir)
			if out, err := cmd.CombinedOutput(); err != nil {
				b.Fatalf("figure: %v: %s", err, out)
			}
		}
	}
	// A figure of a regular file confirms its line and stores no index:
	// the cache of the "cached-index" runs is filled by a check.
	figCache := b.TempDir()
	b.Setenv(indexcache.EnvDir, figCache)
	if v, err := volume.OpenFast(ctx, path, segy.Options{}, indexcache.Default()); err != nil {
		b.Fatal(err)
	} else {
		if nv, _, err := v.Check(ctx, nil); err != nil {
			b.Fatal(err)
		} else if nv != nil {
			nv.Close()
		}
		v.Close()
	}
	if v, err := volume.OpenFast(ctx, path, segy.Options{}, indexcache.Default()); err != nil || v.IndexSource() != segy.IndexSaved {
		b.Fatalf("the figure's cache holds no index of %s (%v)", path, err)
	} else {
		v.Close()
	}
	run("cold/figure-inline/no-index-cached", true, func(b *testing.B) { fig(b.TempDir())(b) })
	run("cold/figure-inline/cached-index", true, fig(figCache))
	run("warm/figure-inline/no-index-cached", false, func(b *testing.B) { fig(b.TempDir())(b) })
	run("warm/figure-inline/cached-index", false, fig(figCache))

	segytest.NeedPython(b, "segyio")
	py := func(code string) func(b *testing.B) {
		return func(b *testing.B) {
			if out, err := exec.Command("/usr/bin/python3", "-c", code, path).CombinedOutput(); err != nil {
				b.Fatalf("%v: %s", err, out)
			}
		}
	}
	open := "import sys, segyio\nf = segyio.open(sys.argv[1], 'r')\nprint(len(f.ilines), len(f.xlines))\nf.close()"
	run("cold/segyio-open", true, py(open))
	run("warm/segyio-open", false, py(open))
	run("warm/python-import-segyio", false, py("import sys, segyio"))
	tmp := filepath.Join(b.TempDir(), "copy")
	run("cold/cat", true, func(b *testing.B) {
		if out, err := exec.Command("sh", "-c", fmt.Sprintf("cat '%s' > '%s'", path, tmp)).CombinedOutput(); err != nil {
			b.Fatalf("%v: %s", err, out)
		}
	})
}
