package render

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// subsampleByModulo is the value selection PercentileRange made before it
// stepped through the traces (kept here as the reference): every value
// whose running index k is a multiple of stride, finite ones only, |v|
// when symmetric.
func subsampleByModulo(data [][]float32, stride int, symmetric bool) []float32 {
	var vals []float32
	k := 0
	for _, tr := range data {
		for _, v := range tr {
			if k%stride == 0 && !math.IsNaN(float64(v)) && !math.IsInf(float64(v), 0) {
				if symmetric && v < 0 {
					v = -v
				}
				vals = append(vals, v)
			}
			k++
		}
	}
	return vals
}

// TestPercentileRangeSubsample: on sections below and above the sample
// cap (stride 1, 2 and 5), with traces of uneven length, NaN and
// infinities, PercentileRange gives the same range as definition 7 of
// Hyndman and Fan (1996) applied to the reference selection
// (subsampleByModulo), computed here by sorting.
func TestPercentileRangeSubsample(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for _, c := range []struct{ traces, maxLen int }{{800, 751}, {1500, 1400}, {3000, 1751}, {7, 3}} {
		data := make([][]float32, c.traces)
		total := 0
		for i := range data {
			tr := make([]float32, 1+rng.IntN(c.maxLen))
			for j := range tr {
				switch r := rng.IntN(1000); {
				case r == 0:
					tr[j] = float32(math.NaN())
				case r == 1:
					tr[j] = float32(math.Inf(1 - 2*rng.IntN(2)))
				default:
					tr[j] = float32(rng.NormFloat64())
				}
			}
			data[i] = tr
			total += len(tr)
		}
		stride := max(1, (total+percentileSampleCap-1)/percentileSampleCap)
		for _, symmetric := range []bool{false, true} {
			ref := subsampleByModulo(data, stride, symmetric)
			slices.Sort(ref)
			q := func(p float64) float32 { // definition 7 on the sorted values
				h := p * float64(len(ref)-1)
				k := int(math.Floor(h))
				if k+1 >= len(ref) {
					return ref[k]
				}
				return ref[k] + float32(h-float64(k))*(ref[k+1]-ref[k])
			}
			for _, pct := range []float64{99, 90, 100} {
				lo, hi := PercentileRange(data, pct, symmetric)
				wlo, whi := q(1-pct/100), q(pct/100)
				if symmetric {
					wlo = -whi
				}
				if lo != wlo || hi != whi {
					t.Errorf("%d traces (%d values, stride %d) pct %g symmetric %v: %v..%v, want %v..%v", c.traces, total, stride, pct, symmetric, lo, hi, wlo, whi)
				}
			}
		}
	}
}

// BenchmarkPercentileRange: the colour range of an inline-sized section
// (800 traces of 751 samples, every value) and of a larger one
// (3000 x 1751, every fifth value).
//
// Run: go test -run '^$' -bench PercentileRange ./render/
func BenchmarkPercentileRange(b *testing.B) {
	for _, c := range []struct {
		name    string
		ntr, ns int
	}{{"inline-800x751", 800, 751}, {"large-3000x1751", 3000, 1751}} {
		data := syntheticSection(c.ntr, c.ns)
		b.Run(c.name, func(b *testing.B) {
			for b.Loop() {
				PercentileRange(data, 99, true)
			}
		})
	}
}
