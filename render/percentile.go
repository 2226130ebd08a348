package render

import "math"

// percentileSampleCap bounds the values PercentileRange looks at; larger
// inputs are read with an even stride (a deterministic subsample).
const percentileSampleCap = 1 << 20

// PercentileRange returns a display range that clips the tails of data,
// ignoring NaN and infinite values. Without symmetric, lo is the
// (100-pct)th percentile and hi the pct-th, so pct=99 clips 1% of the
// values at each end; with symmetric, m is the pct-th percentile of |v|
// and the range is -m..m, so pct=99 clips the 1% largest magnitudes.
// Percentiles interpolate linearly between order statistics (definition 7
// of Hyndman and Fan, 1996, "Sample quantiles in statistical packages",
// The American Statistician 50(4)). pct is clamped to [50, 100]. Data with
// no finite value give 0, 0. Inputs of more than 2^20 values are
// subsampled with an even stride.
func PercentileRange(data [][]float32, pct float64, symmetric bool) (lo, hi float32) {
	if math.IsNaN(pct) {
		pct = 100
	}
	pct = math.Min(math.Max(pct, 50), 100)
	total := 0
	for _, tr := range data {
		total += len(tr)
	}
	stride := max(1, (total+percentileSampleCap-1)/percentileSampleCap)
	vals := make([]float32, 0, min(total, percentileSampleCap)+1)
	// the values at k = 0, stride, 2*stride, ... counting through the
	// traces in order; each trace starts at the first such k in it (no
	// division per value: this loop is most of a figure's range)
	start := 0 // index of the trace's first value
	for _, tr := range data {
		first := (start + stride - 1) / stride * stride
		for j := first - start; j < len(tr); j += stride {
			v := tr[j]
			if !math.IsNaN(float64(v)) && !math.IsInf(float64(v), 0) {
				if symmetric && v < 0 {
					v = -v
				}
				vals = append(vals, v)
			}
		}
		start += len(tr)
	}
	if len(vals) == 0 {
		return 0, 0
	}
	if symmetric {
		m := quantile(vals, pct/100)
		return -m, m
	}
	hi = quantile(vals, pct/100)
	lo = quantile(vals, 1-pct/100)
	return lo, hi
}

// quantile returns the p-quantile of v (Hyndman and Fan definition 7),
// reordering v in place.
func quantile(v []float32, p float64) float32 {
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

// selectKth reorders v so that v[k] is its k-th smallest value, everything
// left of k is no larger and everything right no smaller (Hoare's
// selection with a median-of-three pivot), and returns v[k].
func selectKth(v []float32, k int) float32 {
	lo, hi := 0, len(v)-1
	for lo < hi {
		mid := lo + (hi-lo)/2
		if v[mid] < v[lo] {
			v[mid], v[lo] = v[lo], v[mid]
		}
		if v[hi] < v[lo] {
			v[hi], v[lo] = v[lo], v[hi]
		}
		if v[hi] < v[mid] {
			v[hi], v[mid] = v[mid], v[hi]
		}
		pivot := v[mid]
		i, j := lo, hi
		for i <= j {
			for v[i] < pivot {
				i++
			}
			for v[j] > pivot {
				j--
			}
			if i <= j {
				v[i], v[j] = v[j], v[i]
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return v[k]
		}
	}
	return v[k]
}
