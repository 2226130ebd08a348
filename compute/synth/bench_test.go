package synth

import (
	"context"
	"testing"
)

// BenchmarkGenerateDefault times the default-size survey (150 x 200 x 751
// at 2 ms): go test -run '^$' -bench GenerateDefault ./compute/synth/
func BenchmarkGenerateDefault(b *testing.B) {
	cfg := DefaultConfig()
	for b.Loop() {
		if _, err := Generate(context.Background(), cfg, nil); err != nil {
			b.Fatal(err)
		}
	}
}
