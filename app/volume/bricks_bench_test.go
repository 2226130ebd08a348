//go:build linux

package volume

import "testing"

// evictStores drops the volume's brick stores from the page cache and
// memory (large_bench_test.go).
func evictStores(b *testing.B, v *Volume) {
	v.attrs.mu.Lock()
	defer v.attrs.mu.Unlock()
	for _, e := range v.attrs.stores {
		if err := e.st.Evict(); err != nil {
			b.Fatal(err)
		}
	}
}
