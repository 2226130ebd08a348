package viewer

import (
	"os"
	"runtime/debug"
)

// The window's own memory (issue 16): its anonymous resident memory
// (RssAnon in /proc/self/status; the pages of a mapped SEG-Y file and of
// the brick files belong to the page cache, not to it) stays under
// windowMemoryBound whatever the size of the file, by bounding what holds
// memory:
//
//   - resident bricks of every whole-volume store: brickMemoryBound
//     (volume.LimitBrickMemory, of which the bricks take half; the stores'
//     default, a quarter of RAM, is for batch work), time slices read only
//     their planes from the files;
//   - recently shown sections: sectionCacheBytes (cache.go);
//   - the shown and rendered data: a few sections and images of the
//     window's size;
//   - Go's heap overhead: a soft limit of goMemoryLimit
//     (runtime/debug.SetMemoryLimit), near which the collector runs more
//     often instead of letting the heap grow to twice what is live.
//
// BenchmarkLargeSessionMemory measures the peak on a large file.
const (
	windowMemoryBound = 1536 << 20
	brickMemoryBound  = 384 << 20
	goMemoryLimit     = 1 << 30
)

// limitWindowMemory sets Go's soft memory limit for the window, unless the
// user set one with GOMEMLIMIT.
func limitWindowMemory() {
	if os.Getenv("GOMEMLIMIT") == "" {
		debug.SetMemoryLimit(goMemoryLimit)
	}
}

// brickLimiter is a survey whose resident bricks can be bounded
// (*volume.Volume).
type brickLimiter interface{ LimitBrickMemory(n int64) }

// limitSurveyMemory bounds vol's resident bricks to the window's share,
// unless the user chose a bound with QUADTRACE_BRICK_MEMORY.
func limitSurveyMemory(vol survey) {
	if os.Getenv("QUADTRACE_BRICK_MEMORY") != "" {
		return
	}
	if l, ok := vol.(brickLimiter); ok {
		l.LimitBrickMemory(brickMemoryBound)
	}
}
