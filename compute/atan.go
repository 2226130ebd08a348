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

// fastAtan2 is math.Atan2 for finite arguments to within 1e-8 rad, with the
// same quadrant and signed-zero rules. The phase of every sample goes
// through it, and math.Atan2 (two divisions, a rational function and
// special-case checks) was a fifth of the instantaneous set's time; this
// takes one division and a polynomial.
func fastAtan2(y, x float64) float64 {
	ax, ay := math.Abs(x), math.Abs(y)
	var t float64
	swap := ay > ax
	switch {
	case swap:
		t = ax / ay
	case ax > 0:
		t = ay / ax
	default: // both zero: keep math.Atan2's signed-zero results
		return math.Atan2(y, x)
	}
	t2 := t * t
	p := t * (atanC0 + t2*(atanC1+t2*(atanC2+t2*(atanC3+t2*(atanC4+t2*(atanC5+t2*(atanC6+t2*(atanC7+t2*atanC8))))))))
	if swap {
		p = math.Pi/2 - p
	}
	if x < 0 {
		p = math.Pi - p
	}
	return math.Copysign(p, y)
}
