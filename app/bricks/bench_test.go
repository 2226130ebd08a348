package bricks

import (
	"context"
	"testing"
)

// BenchmarkFillColumn stores one column of 64 x 64 traces of 751 samples
// (the size of the large-volume benchmarks' traces) in a store: the
// transposition into bricks and the write, without computing anything.
func BenchmarkFillColumn(b *testing.B) {
	shape := Shape{64, 64, 751}
	traces := make([][]float32, 64*64)
	for k := range traces {
		traces[k] = make([]float32, shape.Samples)
		for z := range traces[k] {
			traces[k][z] = float32(k + z)
		}
	}
	fill := func(ctx context.Context, t Tile, _ [][]float32) ([][]float32, error) { return traces, nil }
	s, err := New("bench", shape, fill, nil, Options{Dir: b.TempDir()})
	if err != nil {
		b.Fatal(err)
	}
	defer s.Close()
	b.SetBytes(int64(64 * 64 * shape.Samples * 4))
	scratch := make([]float32, 64*64*shape.Samples)
	for range b.N {
		if err := s.fillColumn(0, scratch); err != nil {
			b.Fatal(err)
		}
	}
}
