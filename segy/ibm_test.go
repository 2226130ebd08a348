package segy

import (
	"encoding/binary"
	"math"
	"math/rand/v2"
	"testing"
)

// IBM System/370 Principles of Operation (SA22-7000), "Floating-Point
// Instructions": the worked example -118.625 = 0xC276A000. The other
// encodings follow from the same definition (0.f * 16^(e-64)); 1.0 =
// 0x41100000 and 0.5 = 0x40800000 are also quoted widely (from memory).
func TestIBMKnownValues(t *testing.T) {
	cases := []struct {
		ibm uint32
		f   float32
	}{
		{0xC276A000, -118.625},
		{0x41100000, 1},
		{0xC1100000, -1},
		{0x40800000, 0.5},
		{0x42640000, 100},
		{0x00000000, 0},
		{0x80000000, float32(math.Copysign(0, -1))},
	}
	for _, c := range cases {
		if got := IBMToFloat32(c.ibm); math.Float32bits(got) != math.Float32bits(c.f) {
			t.Errorf("IBMToFloat32(%#08x) = %v, want %v", c.ibm, got, c.f)
		}
		if got := Float32ToIBM(c.f); got != c.ibm {
			t.Errorf("Float32ToIBM(%v) = %#08x, want %#08x", c.f, got, c.ibm)
		}
	}
}

func TestIBMLimits(t *testing.T) {
	// Zero fraction with any exponent is zero.
	if v := IBMToFloat32(0x7F000000); v != 0 {
		t.Errorf("zero fraction: %v", v)
	}
	// Largest IBM number (1-16^-6)*16^63 ~ 7.237e75 exceeds float32: +Inf.
	if v := IBMToFloat32(0x7FFFFFFF); !math.IsInf(float64(v), 1) {
		t.Errorf("largest IBM: %v, want +Inf", v)
	}
	if v := IBMToFloat32(0xFFFFFFFF); !math.IsInf(float64(v), -1) {
		t.Errorf("most negative IBM: %v, want -Inf", v)
	}
	// Smallest normalised IBM number 16^-65 ~ 5.4e-79 is below float32: 0.
	if v := IBMToFloat32(0x00100000); v != 0 {
		t.Errorf("smallest IBM: %v, want 0", v)
	}
	// Largest finite float32 fits in IBM and comes back exactly
	// (24-bit mantissa times 2^104, exponent divisible by 4).
	if v := IBMToFloat32(Float32ToIBM(math.MaxFloat32)); v != math.MaxFloat32 {
		t.Errorf("MaxFloat32 round trip: %v", v)
	}
	// Float32 denormal range 2^-149 .. 2^-126 lies inside the IBM range
	// (down to 16^-65): denormals with at most 21 significant bits
	// round-trip exactly; wider ones lose at most 2^-21 relative.
	for _, v := range []float32{math.SmallestNonzeroFloat32, 1e-40, -math.Float32frombits(0x00100001), math.Float32frombits(0x007fffff)} {
		w := Float32ToIBM(v)
		back := IBMToFloat32(w)
		exact := math.Float32bits(v)&0x7fffff < 1<<21
		if exact && back != v || math.Abs(float64(back-v)) > math.Abs(float64(v))*math.Ldexp(1, -21) {
			t.Errorf("denormal %g -> %#08x -> %g", v, w, back)
		}
		if ref := ibmReference(w); float32(ref) != back {
			t.Errorf("denormal %g: reference decode of %#08x = %g, ours %g", v, w, ref, back)
		}
	}
	// IBM values whose magnitude falls in the float32 denormal range decode
	// to the nearest denormal: 16^-32 * 0.1 (hex) = 2^-132.
	if v := IBMToFloat32(0x20100000); v != float32(math.Ldexp(1, -132)) {
		t.Errorf("IBM 2^-132 = %g", v)
	}
	if Float32ToIBM(float32(math.NaN())) != 0 || Float32ToIBM(float32(math.Inf(1))) != 0x7fffffff || Float32ToIBM(float32(math.Inf(-1))) != 0xffffffff {
		t.Error("NaN/Inf mapping")
	}
}

// Random IBM words against the textbook formula evaluated in float64
// (ibmReference), and float32 -> IBM -> float32 within IBM precision.
func TestIBMRandomRoundTrip(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for i := 0; i < 200000; i++ {
		w := rng.Uint32()
		got := IBMToFloat32(w)
		want := ibmReference(w)
		if math.Float32bits(got) != math.Float32bits(float32(want)) && !(got == 0 && want == 0) {
			t.Fatalf("IBMToFloat32(%#08x) = %g, want %g", w, got, want)
		}
	}
	for i := 0; i < 200000; i++ {
		f := math.Float32frombits(rng.Uint32())
		if math.IsNaN(float64(f)) || math.IsInf(float64(f), 0) {
			continue
		}
		w := Float32ToIBM(f)
		back := float64(IBMToFloat32(w))
		// IBM keeps at least 21 significant bits; rounding to nearest
		// gives an error of at most half a unit: 2^-21 relative.
		if d := math.Abs(back - float64(f)); d > math.Abs(float64(f))*math.Ldexp(1, -21) {
			t.Fatalf("%g -> %#08x -> %g (error %g)", f, w, back, d)
		}
		// Encoding must be normalised: leading hex digit non-zero.
		if w&0x00f00000 == 0 && w&0x00ffffff != 0 {
			t.Fatalf("%g -> %#08x not normalised", f, w)
		}
		// IBM -> float32 -> IBM is the identity for normalised words.
		if w2 := Float32ToIBM(IBMToFloat32(w)); w2 != w {
			t.Fatalf("%#08x -> %g -> %#08x", w, IBMToFloat32(w), w2)
		}
	}
}

func BenchmarkIBMToFloat32(b *testing.B) {
	src := make([]byte, 4*4096)
	for i := range src {
		src[i] = byte(i*7 + 0x41)
	}
	dst := make([]float32, 4096)
	b.SetBytes(int64(len(src)))
	for b.Loop() {
		decodeIBM(dst, src, binary.BigEndian)
	}
}
