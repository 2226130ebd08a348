package bricks

import (
	"container/list"
	"sync"
)

// Cache holds resident bricks of any number of stores within a byte bound,
// dropping the least recently used first. Its methods are safe for
// concurrent use. Bricks are never changed once filled, so a brick handed
// out stays valid after it leaves the cache (its memory is then the
// holder's until it lets go of it).
type Cache struct {
	mu     sync.Mutex
	budget int64
	used   int64
	order  *list.List // of *entry, most recently used at the front
	items  map[brickKey]*list.Element
}

type brickKey struct {
	store *Store
	brick int
}

type entry struct {
	key  brickKey
	data []float32
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

func (c *Cache) get(s *Store, b int) []float32 {
	c.mu.Lock()
	defer c.mu.Unlock()
	el := c.items[brickKey{s, b}]
	if el == nil {
		return nil
	}
	c.order.MoveToFront(el)
	return el.Value.(*entry).data
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
}
