package segy

import (
	"math"
	"math/bits"
)

// IBMToFloat32 converts a 4-byte IBM System/360 hexadecimal floating-point
// number (SEG-Y sample format 1) to IEEE 754 single precision.
//
// Layout (IBM System/370 Principles of Operation, "Floating-Point
// Instructions"): bit 31 sign, bits 24-30 a base-16 exponent in excess-64,
// bits 0-23 a 24-bit fraction; value = (-1)^s * 0.f * 16^(e-64).
//
// The conversion is exact whenever the result is a normal float32. Values
// beyond the float32 range become ±Inf; values below it are rounded to the
// nearest float32 subnormal or to a signed zero. Unnormalised fractions are
// accepted. A zero fraction gives a signed zero whatever the exponent.
func IBMToFloat32(w uint32) float32 {
	// The 24-bit fraction is exact in float64 and the scale is a power of
	// two, so the product is exact; the single rounding happens in the
	// conversion to float32, which also yields Inf, subnormals and signed
	// zeros as IEEE 754 prescribes.
	return float32(float64(w&0x00ffffff) * ibmScale[w>>24])
}

// ibmScale[b] is the value of the top byte b (sign and excess-64 base-16
// exponent) applied to a 24-bit integer fraction: ±16^(e-64) / 2^24.
// Read-only after initialisation.
var ibmScale = func() (t [256]float64) {
	for b := range t {
		v := math.Ldexp(1, 4*(b&0x7f-64)-24)
		if b&0x80 != 0 {
			v = -v
		}
		t[b] = v
	}
	return t
}()

// Float32ToIBM converts an IEEE 754 single-precision number to the 4-byte IBM
// hexadecimal floating-point format (SEG-Y sample format 1), rounding the
// fraction to nearest, ties to even.
//
// Every finite float32, subnormals included, lies inside the IBM range
// (16^-65 .. (1-16^-6)*16^63), so only precision is lost: an IBM fraction
// keeps 21 to 24 significant bits depending on its leading hex digit.
// IBM has no infinities or NaNs: ±Inf becomes the largest IBM magnitude
// with its sign (0x7FFFFFFF / 0xFFFFFFFF) and NaN becomes 0.
func Float32ToIBM(f float32) uint32 {
	b := math.Float32bits(f)
	sign := b & 0x80000000
	e := int((b >> 23) & 0xff)
	mant := b & 0x7fffff
	switch {
	case e == 0xff && mant != 0: // NaN
		return 0
	case e == 0xff: // ±Inf
		return sign | 0x7fffffff
	case e == 0 && mant == 0: // ±0
		return sign
	}
	var p int // exponent of the least significant bit of mant
	if e == 0 {
		// subnormal: normalise so that bit 23 is set
		p = -149
		s := bits.LeadingZeros32(mant) - 8
		mant <<= uint(s)
		p -= s
	} else {
		mant |= 0x800000
		p = e - 127 - 23
	}
	// value = mant * 2^p, mant in [2^23, 2^24).
	// IBM: value = frac * 2^(4*(E-64)-24). Choose shift s in 0..3 with
	// (p + s + 24) divisible by 4; then frac = mant >> s keeps a non-zero
	// leading hex digit.
	s := ((-(p + 24))%4 + 4) % 4
	frac := mant >> uint(s)
	if s > 0 {
		rem := mant & (1<<uint(s) - 1)
		half := uint32(1) << uint(s-1)
		if rem > half || (rem == half && frac&1 == 1) {
			frac++
		}
	}
	E := (p+s+24)/4 + 64
	if frac >= 1<<24 { // rounding carried into a new hex digit
		frac >>= 4
		E++
	}
	if E > 127 {
		return sign | 0x7fffffff
	}
	if E < 0 {
		return sign
	}
	return sign | uint32(E)<<24 | frac
}
