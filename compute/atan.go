package compute

import "math"

// Coefficients of an odd polynomial p(t) = t·Σ c_i t^(2i) approximating
// atan(t) on [0, 1], fitted by iteratively reweighted least squares on
// Chebyshev nodes (numpy.linalg.lstsq); its largest error on [0, 1] is
// 5.8e-9 rad (TestFastAtan2 checks 1e-8 against math.Atan2).
const (
	atanC0 = 0.9999998864002476
	atanC1 = -0.33332597062776337
	atanC2 = 0.19985906898953018
	atanC3 = -0.14161228574093698
	atanC4 = 0.10498940435713522
	atanC5 = -0.07234841340631744
	atanC6 = 0.03978100294214533
	atanC7 = -0.014401208208164165
	atanC8 = 0.002456684442660159
)

// atan2s stores in dst[j] math.Atan2(y[j], x[j]) for finite arguments to
// within 1e-8 rad, with the same quadrant and signed-zero rules. The phase
// of every sample goes through it, and math.Atan2 (two divisions, a
// rational function and special-case checks) was a fifth of the
// instantaneous set's time; this takes one division and a polynomial. It
// works on whole traces so that its body sits in the loop: as a function
// called per sample it was too large for Go to inline.
func atan2s(dst, y, x []float64) {
	y = y[:len(dst)]
	x = x[:len(dst)]
	for j := range dst {
		xj, yj := x[j], y[j]
		ax, ay := math.Abs(xj), math.Abs(yj)
		if ax == 0 && ay == 0 { // keep math.Atan2's signed-zero results
			dst[j] = math.Atan2(yj, xj)
			continue
		}
		// Octant from sign bits, not branches: whether |y| > |x| is a
		// coin toss on seismic data, and a mispredicted branch costs more
		// than this.
		swap := math.Float64bits(ax-ay) >> 63 // 1 when ay > ax
		v := [2]float64{ay, ax}
		t := v[swap] / v[swap^1]
		// The polynomial in t² by Estrin's scheme (pairs, then pairs of
		// pairs): the same terms as Horner's rule with a dependency chain
		// half as long, so successive samples overlap in the processor.
		t2 := t * t
		t4 := t2 * t2
		t8 := t4 * t4
		q01 := atanC0 + atanC1*t2
		q23 := atanC2 + atanC3*t2
		q45 := atanC4 + atanC5*t2
		q67 := atanC6 + atanC7*t2
		q03 := q01 + q23*t4
		q47 := q45 + q67*t4
		p := t * (q03 + (q47+atanC8*t8)*t8)
		// swap: π/2 - p; then x < 0 (sign bit, -0 included): π - p.
		off := [2]float64{0, math.Pi / 2}
		sgn := [2]float64{1, -1}
		p = off[swap] + sgn[swap]*p
		neg := math.Float64bits(xj) >> 63
		p = 2*off[neg] + sgn[neg]*p
		dst[j] = math.Copysign(p, yj)
	}
}

// fastAtan2 is atan2s for one pair of arguments.
func fastAtan2(y, x float64) float64 {
	var out [1]float64
	atan2s(out[:], []float64{y}, []float64{x})
	return out[0]
}
