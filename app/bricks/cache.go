package bricks

import (
	"container/list"
	"sync"
)

// Cache holds resident bricks of any number of stores within a byte bound,
// dropping the least recently used first. Its methods are safe for
// concurrent use. A brick is read only while pinned (pin ... unpin); a
// brick that leaves the cache unpinned, or is unpinned after leaving it,
// goes to a small free list and its memory is handed out again for a new
// column's bricks (newBrick): fresh memory costs a page fault per 4 KiB,
// ~19 us here, i.e. ~5 ms per MiB brick, more than filling it.
type Cache struct {
	mu        sync.Mutex
	budget    int64
	used      int64
	order     *list.List // of *entry, most recently used at the front
	items     map[brickKey]*list.Element
	free      [][]float32 // bricks out of use, for newBrick
	freeBytes int64
}

// maxFreeBytes bounds the free list (outside the budget): enough for a few
// columns of bricks, so the bricks one column evicts serve the next.
func (c *Cache) maxFreeBytes() int64 { return min(c.budget/8, 64<<20) }

type brickKey struct {
	store *Store
	brick int
}

type entry struct {
	key     brickKey
	data    []float32
	pins    int  // readers copying from data now
	evicted bool // out of the cache: data is recycled when the last pin goes
}

// NewCache returns a cache bounded to budget bytes (at least one brick is
// always kept, so a budget below one brick still works, one brick at a time).
func NewCache(budget int64) *Cache {
	return &Cache{budget: budget, order: list.New(), items: map[brickKey]*list.Element{}}
}

// Used returns the bytes held now.
func (c *Cache) Used() int64 {
	c.mu.Lock()
	defer c.mu.Unlock()
	return c.used
}

// Budget returns the cache's bound in bytes.
func (c *Cache) Budget() int64 { return c.budget }

// pin returns brick b of s when resident (nil when not) and keeps its
// memory from being recycled until unpin is called with the returned entry.
func (c *Cache) pin(s *Store, b int) ([]float32, *entry) {
	c.mu.Lock()
	defer c.mu.Unlock()
	el := c.items[brickKey{s, b}]
	if el == nil {
		return nil, nil
	}
	c.order.MoveToFront(el)
	e := el.Value.(*entry)
	e.pins++
	return e.data, e
}

// unpin ends a pin; the caller no longer reads the brick.
func (c *Cache) unpin(e *entry) {
	c.mu.Lock()
	defer c.mu.Unlock()
	e.pins--
	if e.pins == 0 && e.evicted {
		c.recycle(e.data)
	}
}

// newBrick returns a brick of n floats, from the free list when one of
// that size is there (its old values remain: the caller overwrites what it
// uses), else fresh.
func (c *Cache) newBrick(n int) []float32 {
	c.mu.Lock()
	for k := len(c.free) - 1; k >= 0; k-- {
		if b := c.free[k]; len(b) == n {
			c.free[k] = c.free[len(c.free)-1]
			c.free = c.free[:len(c.free)-1]
			c.freeBytes -= int64(n) * 4
			c.mu.Unlock()
			return b
		}
	}
	c.mu.Unlock()
	return make([]float32, n)
}

// recycle keeps data for newBrick if the free list has room. c.mu is held.
func (c *Cache) recycle(data []float32) {
	if n := int64(len(data)) * 4; c.freeBytes+n <= c.maxFreeBytes() {
		c.free = append(c.free, data)
		c.freeBytes += n
	}
}

func (c *Cache) put(s *Store, b int, data []float32) {
	k := brickKey{s, b}
	c.mu.Lock()
	defer c.mu.Unlock()
	if el := c.items[k]; el != nil {
		c.order.MoveToFront(el)
		return
	}
	c.items[k] = c.order.PushFront(&entry{key: k, data: data})
	c.used += int64(len(data)) * 4
	for c.used > c.budget && c.order.Len() > 1 {
		c.remove(c.order.Back())
	}
}

// drop forgets every brick of s.
func (c *Cache) drop(s *Store) {
	c.mu.Lock()
	defer c.mu.Unlock()
	for el := c.order.Front(); el != nil; {
		next := el.Next()
		if el.Value.(*entry).key.store == s {
			c.remove(el)
		}
		el = next
	}
}

func (c *Cache) remove(el *list.Element) {
	e := el.Value.(*entry)
	c.order.Remove(el)
	delete(c.items, e.key)
	c.used -= int64(len(e.data)) * 4
	e.evicted = true
	if e.pins == 0 {
		c.recycle(e.data)
	}
}
