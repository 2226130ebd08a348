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

// TestPercentileRangeMatchesSelection checks the histogram selection of
// PercentileRange against the way it was computed before (every subsampled
// value copied out, Hoare selection of each order statistic; kept below as
// percentileRangeBySelection) and against a full sort of the same subsample,
// on data with ties, gaps, signed zeros, subnormals and one value repeated
// throughout, below and above the 2^20 cap (odd trace lengths, so the
// stride crosses trace ends). The order statistics must be the same values
// exactly.
func TestPercentileRangeMatchesSelection(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 7))
	kinds := map[string]func(i int) float32{
		"normal": func(int) float32 { return float32(rng.NormFloat64()) },
		"mostly-zero": func(i int) float32 {
			if i%97 == 0 {
				return float32(rng.NormFloat64())
			}
			return 0
		},
		"signed-zeros": func(i int) float32 {
			if i%2 == 0 {
				return float32(math.Copysign(0, -1))
			}
			return float32(rng.IntN(3))
		},
		"constant":   func(int) float32 { return 2.5 },
		"subnormal":  func(i int) float32 { return math.Float32frombits(uint32(rng.IntN(1<<20))) * float32(1-2*(i%2)) },
		"heavy-tail": func(int) float32 { return float32(math.Exp(4 * rng.NormFloat64())) },
		"gaps": func(i int) float32 {
			switch i % 5 {
			case 0:
				return float32(math.NaN())
			case 1:
				return float32(math.Inf(1 - 2*(i%2)))
			}
			return float32(rng.IntN(1000) - 500)
		},
	}
	for name, gen := range kinds {
		for _, shape := range [][2]int{{1, 1}, {3, 7}, {101, 1501}, {1000, 1500}, {777, 3001}} {
			data := make([][]float32, shape[0])
			i := 0
			for t := range data {
				data[t] = make([]float32, shape[1])
				for j := range data[t] {
					data[t][j] = gen(i)
					i++
				}
			}
			for _, pct := range []float64{50, 97.5, 99.9, 100} {
				for _, sym := range []bool{false, true} {
					lo, hi := PercentileRange(data, pct, sym)
					wlo, whi := percentileRangeBySelection(data, pct, sym)
					if lo != wlo || hi != whi {
						t.Errorf("%s %v pct %v sym %v: %v..%v, selection gives %v..%v", name, shape, pct, sym, lo, hi, wlo, whi)
					}
					if slo, shi := percentileRangeBySort(data, pct, sym); lo != slo || hi != shi {
						t.Errorf("%s %v pct %v sym %v: %v..%v, sort gives %v..%v", name, shape, pct, sym, lo, hi, slo, shi)
					}
				}
			}
		}
	}
}

// percentileRangeBySort is definition 7 of Hyndman and Fan (1996) by the
// book: sort the subsample, interpolate between neighbours.
func percentileRangeBySort(data [][]float32, pct float64, symmetric bool) (lo, hi float32) {
	total := 0
	for _, tr := range data {
		total += len(tr)
	}
	stride := max(1, (total+percentileSampleCap-1)/percentileSampleCap)
	vals := subsampleByModulo(data, stride, symmetric)
	if len(vals) == 0 {
		return 0, 0
	}
	slices.Sort(vals)
	q := func(p float64) float32 {
		h := p * float64(len(vals)-1)
		k := int(math.Floor(h))
		if k+1 >= len(vals) || h == float64(k) {
			return vals[k]
		}
		return vals[k] + float32(h-float64(k))*(vals[k+1]-vals[k])
	}
	if symmetric {
		m := q(pct / 100)
		return -m, m
	}
	return q(1 - pct/100), q(pct / 100)
}

// BenchmarkPercentileRange: the colour range of an inline-sized section
// (800 traces of 751 samples, every value) and of a larger one
// (3000 x 1751, every fifth value), each beside the selection the histogram
// passes replaced (by-selection: every chosen value copied out, Hoare
// selection).
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
		b.Run(c.name+"/by-selection", func(b *testing.B) {
			for b.Loop() {
				percentileRangeBySelection(data, 99, true)
			}
		})
	}
}

// percentileRangeBySelection is PercentileRange as it was before the
// histogram passes (every subsampled value copied out, Hoare selection).
func percentileRangeBySelection(data [][]float32, pct float64, symmetric bool) (lo, hi float32) {
	if math.IsNaN(pct) {
		pct = 100
	}
	pct = math.Min(math.Max(pct, 50), 100)
	total := 0
	for _, tr := range data {
		total += len(tr)
	}
	vals := subsampleByModulo(data, max(1, (total+percentileSampleCap-1)/percentileSampleCap), symmetric)
	if len(vals) == 0 {
		return 0, 0
	}
	if symmetric {
		m := quantileBySelection(vals, pct/100)
		return -m, m
	}
	hi = quantileBySelection(vals, pct/100)
	lo = quantileBySelection(vals, 1-pct/100)
	return lo, hi
}
func quantileBySelection(v []float32, p float64) float32 {
	h := p * float64(len(v)-1)
	k := int(math.Floor(h))
	a := selectKth(v, k)
	if k+1 >= len(v) || h == float64(k) {
		return a
	}
	// The (k+1)th order statistic is the least value right of position k.
	b := v[k+1]
	for _, x := range v[k+1:] {
		b = min(b, x)
	}
	return a + float32(h-float64(k))*(b-a)
}
