package viewer

import "quadtrace/app/volume"

// sectionCache keeps the most recently shown sections (amplitude and
// attributes) by key, so flipping back to an attribute or a line seen a
// moment ago shows it without computing it again. It is bounded by a byte
// budget and belongs to the UI goroutine; the sections themselves are never
// changed, so jobs may read them from a snapshot.
type sectionCache struct {
	budget int64
	used   int64
	order  []string // least recently used first
	items  map[string]*volume.Section
}

// sectionCacheBytes is the memory the viewer spends on recent sections
// (its share of windowMemoryBound, see memory.go).
const sectionCacheBytes = 256 << 20

func newSectionCache(budget int64) *sectionCache {
	return &sectionCache{budget: budget, items: map[string]*volume.Section{}}
}

func sectionBytes(s *volume.Section) int64 {
	var n int64
	for _, t := range s.Traces {
		n += int64(len(t)) * 4
	}
	return n
}

// put stores s under key as the most recently used, dropping the least
// recently used sections beyond the budget (a single section larger than the
// budget is not kept).
func (c *sectionCache) put(key string, s *volume.Section) {
	if key == "" || s == nil {
		return
	}
	if _, ok := c.items[key]; ok {
		c.touch(key)
		return
	}
	size := sectionBytes(s)
	if size > c.budget {
		return
	}
	c.items[key] = s
	c.order = append(c.order, key)
	c.used += size
	for c.used > c.budget && len(c.order) > 0 {
		old := c.order[0]
		c.order = c.order[1:]
		c.used -= sectionBytes(c.items[old])
		delete(c.items, old)
	}
}

func (c *sectionCache) touch(key string) {
	for i, k := range c.order {
		if k == key {
			c.order = append(append(c.order[:i:i], c.order[i+1:]...), key)
			return
		}
	}
}

// snapshot is a read-only copy of the cache's index for a job.
func (c *sectionCache) snapshot() map[string]*volume.Section {
	m := make(map[string]*volume.Section, len(c.items))
	for k, s := range c.items {
		m[k] = s
	}
	return m
}

// clear forgets every section (a new survey).
func (c *sectionCache) clear() {
	c.items, c.order, c.used = map[string]*volume.Section{}, nil, 0
}
