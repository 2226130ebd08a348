package render

import "math"

// percentileSampleCap bounds the values PercentileRange looks at; larger
// inputs are read with an even stride (a deterministic subsample).
const percentileSampleCap = 1 << 20

// percentileKeyBits is how many leading bits of a value's order key
// (sortKey) choose its histogram bin in PercentileRange: the sign, the
// eight exponent bits and five bits of the fraction, so a bin spans at most
// 1/32 of its values' magnitude.
const percentileKeyBits = 14

// PercentileRange returns a display range that clips the tails of data,
// ignoring NaN and infinite values. Without symmetric, lo is the
// (100-pct)th percentile and hi the pct-th, so pct=99 clips 1% of the
// values at each end; with symmetric, m is the pct-th percentile of |v|
// and the range is -m..m, so pct=99 clips the 1% largest magnitudes.
// Percentiles interpolate linearly between order statistics (definition 7
// of Hyndman and Fan, 1996, "Sample quantiles in statistical packages",
// The American Statistician 50(4)). pct is clamped to [50, 100]. Data with
// no finite value give 0, 0. Inputs of more than 2^20 values are
// subsampled with an even stride (every stride-th value in reading order).
//
// The order statistics are exact on that subsample (the values a full
// sort gives). They are found in two passes over data, without copying it:
// a histogram of the values' leading key bits finds the bins that hold the
// wanted ranks, and only the values of those bins are copied out and
// selected among.
func PercentileRange(data [][]float32, pct float64, symmetric bool) (lo, hi float32) {
	if math.IsNaN(pct) {
		pct = 100
	}
	pct = math.Min(math.Max(pct, 50), 100)
	total := 0
	for _, tr := range data {
		total += len(tr)
	}
	s := strided{data: data, stride: max(1, (total+percentileSampleCap-1)/percentileSampleCap), abs: symmetric}
	count := s.histogram()
	n := 0
	for _, c := range count {
		n += int(c)
	}
	if n == 0 {
		return 0, 0
	}
	ps := []float64{pct / 100}
	if !symmetric {
		ps = append(ps, 1-pct/100)
	}
	qs := make([]rankQuery, len(ps))
	for i, p := range ps {
		qs[i] = newRankQuery(count, n, p)
	}
	s.gather(qs)
	if symmetric {
		m := qs[0].value()
		return -m, m
	}
	return qs[1].value(), qs[0].value()
}

// strided reads every stride-th value of data in reading order (counting
// across traces), skipping NaN and Inf, as |v| when abs is set.
type strided struct {
	data   [][]float32
	stride int
	abs    bool
}

// each calls f with every trace and the index of its first value in the
// subsample (then every stride-th value).
func (s strided) each(f func(tr []float32, start int)) {
	k := 0 // index of the trace's first value in reading order
	for _, tr := range s.data {
		f(tr, (s.stride-k%s.stride)%s.stride)
		k += len(tr)
	}
}

// sortKey maps the bits of a finite float32 to an unsigned key in the
// values' order (negative values reversed below the positive ones; -0 just
// below +0), and reports false for NaN and ±Inf. With abs the sign is
// dropped first.
func sortKey(v float32, abs bool) (uint32, bool) {
	u := math.Float32bits(v)
	if abs {
		u &^= 1 << 31
	}
	return u ^ (uint32(int32(u)>>31) | 1<<31), u>>23&0xff != 0xff
}

// histogram counts the values by the leading percentileKeyBits of their key.
func (s strided) histogram() []int32 {
	count := make([]int32, 1<<percentileKeyBits)
	stride, abs := s.stride, s.abs
	s.each(func(tr []float32, start int) {
		for j := start; j < len(tr); j += stride {
			if key, ok := sortKey(tr[j], abs); ok {
				count[key>>(32-percentileKeyBits)]++
			}
		}
	})
	return count
}

// rankQuery is one p-quantile (Hyndman and Fan definition 7: the k-th
// order statistic, 0-based, plus frac of the step to the next) to find
// among the values whose key bins lie in first..last, of which below
// values lie in lower bins.
type rankQuery struct {
	k, below    int
	frac        float64
	first, last uint32
	vals        []float32
}

func newRankQuery(count []int32, n int, p float64) rankQuery {
	pos := p * float64(n-1)
	q := rankQuery{k: int(math.Floor(pos))}
	q.frac = pos - float64(q.k)
	for q.below+int(count[q.first]) <= q.k {
		q.below += int(count[q.first])
		q.first++
	}
	// The next order statistic is in the same bin or the next non-empty one.
	q.last = q.first
	if q.k+1 < n && q.k+1 >= q.below+int(count[q.first]) {
		for q.last++; count[q.last] == 0; q.last++ {
		}
	}
	return q
}

// gather copies out the values of every query's bins, in one pass.
func (s strided) gather(qs []rankQuery) {
	stride, abs := s.stride, s.abs
	s.each(func(tr []float32, start int) {
		for j := start; j < len(tr); j += stride {
			key, ok := sortKey(tr[j], abs)
			if !ok {
				continue
			}
			b := key >> (32 - percentileKeyBits)
			for i := range qs {
				if q := &qs[i]; b >= q.first && b <= q.last {
					v := tr[j]
					if abs && v < 0 {
						v = -v
					}
					q.vals = append(q.vals, v)
				}
			}
		}
	})
}

// value selects the query's order statistics among its gathered values
// and interpolates between them.
func (q *rankQuery) value() float32 {
	r := q.k - q.below
	a := selectKth(q.vals, r)
	if q.frac == 0 || r+1 >= len(q.vals) {
		return a
	}
	b := q.vals[r+1]
	for _, x := range q.vals[r+1:] {
		b = min(b, x)
	}
	return a + float32(q.frac)*(b-a)
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
