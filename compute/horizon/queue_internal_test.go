package horizon

import (
	"math/rand/v2"
	"sort"
	"testing"
)

// The queue pops candidates in the order of better (sort.Slice as the
// reference), keeps only the best offer per trace, and its positions
// stay consistent.
func TestQueueOrder(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	q := newQueue(500)
	best := map[int32]candidate{}
	for range 3000 {
		c := candidate{k: int32(rng.IntN(500)), from: int32(rng.IntN(500)), corr: float32(rng.IntN(50)) / 50}
		q.offer(c)
		if b, ok := best[c.k]; !ok || better(&c, &b) {
			best[c.k] = c
		}
	}
	var want []candidate
	for _, c := range best {
		want = append(want, c)
	}
	sort.Slice(want, func(i, j int) bool { return better(&want[i], &want[j]) })
	for i, w := range want {
		for k, p := range q.pos {
			if p >= 0 && q.items[p].k != int32(k) {
				t.Fatalf("position of trace %d is wrong", k)
			}
		}
		if got := q.pop(); got != w {
			t.Fatalf("pop %d: %+v, want %+v", i, got, w)
		}
	}
	if q.Len() != 0 {
		t.Errorf("%d left", q.Len())
	}
}
