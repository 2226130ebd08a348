package render

import (
	"math"
	"strconv"
)

// niceNum returns a "nice" number (1, 2 or 5 times a power of ten) near x:
// the nearest one when round is set, otherwise the least one not below x.
// Heckbert (1990), "Nice numbers for graph labels", Graphics Gems, 61-63.
func niceNum(x float64, round bool) float64 {
	exp := math.Floor(math.Log10(x))
	f := x / math.Pow(10, exp)
	var nf float64
	if round {
		switch {
		case f < 1.5:
			nf = 1
		case f < 3:
			nf = 2
		case f < 7:
			nf = 5
		default:
			nf = 10
		}
	} else {
		switch {
		case f <= 1:
			nf = 1
		case f <= 2:
			nf = 2
		case f <= 5:
			nf = 5
		default:
			nf = 10
		}
	}
	return nf * math.Pow(10, exp)
}

// HeckbertLoose is the loose labelling of Heckbert (1990): for data from lo
// to hi and about nTicks labels it returns the labelled range graphMin ..
// graphMax, which encloses [lo, hi], and the tick spacing. ok is false
// when lo or hi is not finite, lo >= hi or nTicks < 2.
func HeckbertLoose(lo, hi float64, nTicks int) (graphMin, graphMax, spacing float64, ok bool) {
	if !(hi > lo) || math.IsInf(lo, 0) || math.IsInf(hi, 0) || nTicks < 2 {
		return 0, 0, 0, false
	}
	r := niceNum(hi-lo, false)
	d := niceNum(r/float64(nTicks-1), true)
	return math.Floor(lo/d) * d, math.Ceil(hi/d) * d, d, true
}

// NiceTicks returns tick values at nice numbers inside [lo, hi] (either
// order), at most maxTicks of them: the spacing is Heckbert's (1990) loose
// labelling spacing for n labels, with n counted down from 2*maxTicks+1
// until no more than maxTicks ticks fall inside the range (asking for more
// labels than wanted first matters when the range is tight: a request for
// 4 labels over -1.4..1.4 gives spacing 2 and a single tick). Values are multiples of the spacing,
// rounded to its decimal places so they print cleanly. A zero-width range
// gives that one value; non-finite input or maxTicks < 1 gives none.
func NiceTicks(lo, hi float64, maxTicks int) []float64 {
	if math.IsNaN(lo) || math.IsNaN(hi) || math.IsInf(lo, 0) || math.IsInf(hi, 0) || maxTicks < 1 {
		return nil
	}
	if lo > hi {
		lo, hi = hi, lo
	}
	if lo == hi {
		return []float64{lo}
	}
	for n := 2*maxTicks + 1; n >= 2; n-- {
		_, _, d, _ := HeckbertLoose(lo, hi, n)
		ticks := ticksInside(lo, hi, d)
		if len(ticks) <= maxTicks {
			return ticks
		}
	}
	// Two labels' spacing still gives too many (maxTicks 1): take one.
	_, _, d, _ := HeckbertLoose(lo, hi, 2)
	if t := ticksInside(lo, hi, d); len(t) > 0 {
		return t[:1]
	}
	return nil
}

// ticksInside returns the multiples of d within [lo, hi], allowing for
// rounding at the ends.
func ticksInside(lo, hi, d float64) []float64 {
	eps := d * 1e-9
	first := math.Ceil((lo - eps) / d)
	last := math.Floor((hi + eps) / d)
	decimals := TickDecimals(d)
	var out []float64
	for k := first; k <= last; k++ {
		v, _ := strconv.ParseFloat(strconv.FormatFloat(k*d, 'f', decimals, 64), 64)
		if v == 0 {
			v = 0 // no negative zero
		}
		out = append(out, v)
	}
	return out
}

// TickDecimals is the number of decimals that shows ticks spaced d apart
// exactly (Heckbert's nfrac).
func TickDecimals(d float64) int {
	if !(d > 0) || math.IsInf(d, 0) {
		return 0
	}
	return max(0, int(-math.Floor(math.Log10(d)+1e-9)))
}

// FormatTick prints a tick value with the given decimals, without "-0".
func FormatTick(v float64, decimals int) string {
	s := strconv.FormatFloat(v, 'f', decimals, 64)
	if f, err := strconv.ParseFloat(s, 64); err == nil && f == 0 {
		s = strconv.FormatFloat(0, 'f', decimals, 64)
	}
	return s
}
