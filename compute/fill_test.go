package compute

import (
	"fmt"
	"math"
	"testing"
)

// The instantaneous set's per-sample formulas, four at a time
// (fill_amd64.s) and in Go (fillScalar), against Go's standard library
// (math.Atan2, math.Hypot) and each other, on every pair of a list of
// awkward values (signed zeros, |x| = |h|, subnormal, huge, both signs)
// and on random ones: phase within 1e-8 rad of math.Atan2 plus float32
// rounding, envelope within float32 rounding of math.Hypot, frequency and
// cosine of phase within 2e-7 relative of each other. Where the processor
// lacks AVX2 and FMA (or under -tags purego) only the Go path is checked.
func TestFillVectorMatchesScalar(t *testing.T) {
	vals := []float64{0, math.Copysign(0, -1), 1, -1, 0.5, -0.5, 1e-310, -1e-310, 3e38, -3e38, 1e-20, 7, -7, 2.5, -1e5}
	x, h := everyPair(vals)
	var dx, dh []float64
	next := uniformNoise(12345)
	for range 1002 { // 1227 samples: a tail of 3 for the Go path
		x, h = append(x, next()*3), append(h, next()*3)
	}
	for range x {
		dx, dh = append(dx, next()*100), append(dh, next()*100)
	}
	n := len(x)
	eps := 1e-8
	type out struct{ a, ph, f, c []float32 }
	mk := func() out {
		return out{make([]float32, n), make([]float32, n), make([]float32, n), make([]float32, n)}
	}
	goPath, vec := mk(), mk()
	fillScalar(goPath.a, goPath.ph, goPath.f, goPath.c, x, h, dx, dh, eps, make([]float64, n))
	done := instFillVector(vec.a, vec.ph, vec.f, vec.c, x, h, dx, dh, eps)
	if haveSIMD && done != n&^3 {
		t.Fatalf("vector fill wrote %d of %d samples", done, n)
	}
	fillScalar(vec.a[done:], vec.ph[done:], vec.f[done:], vec.c[done:], x[done:], h[done:], dx[done:], dh[done:], eps, make([]float64, n))
	t.Logf("%d of %d samples by the vector path", done, n)
	ulp := func(v float32) float64 {
		return float64(math.Nextafter32(float32(math.Abs(float64(v))), math.MaxFloat32) - float32(math.Abs(float64(v))))
	}
	for name, o := range map[string]out{"Go": goPath, "vector": vec} {
		for j := range n {
			wantPh := math.Atan2(h[j], x[j]) * 180 / math.Pi
			d := math.Abs(float64(o.ph[j]) - wantPh)
			if d > 360-1e-4 { // -180 and 180 are the same angle
				d = 360 - d
			}
			if d > 1e-8*180/math.Pi+ulp(o.ph[j]) {
				t.Errorf("%s: sample %d: phase(h=%v, x=%v) = %v°, math.Atan2 gives %v°", name, j, h[j], x[j], o.ph[j], wantPh)
			}
			// float32(...): beyond the float32 range both are +Inf.
			wantA := math.Hypot(x[j], h[j])
			if w := float32(wantA); o.a[j] != w && math.Abs(float64(o.a[j])-wantA) > ulp(w) {
				t.Errorf("%s: sample %d: envelope(%v, %v) = %v, math.Hypot gives %v", name, j, x[j], h[j], o.a[j], wantA)
			}
		}
	}
	for j := range n {
		for _, p := range [][2]float32{{goPath.f[j], vec.f[j]}, {goPath.c[j], vec.c[j]}, {goPath.a[j], vec.a[j]}} {
			if d := math.Abs(float64(p[0] - p[1])); d > 2e-7*math.Abs(float64(p[0]))+1e-30 {
				t.Errorf("sample %d (x=%v, h=%v): Go %v, vector %v", j, x[j], h[j], p[0], p[1])
			}
		}
		if c := vec.c[j]; c < -1 || c > 1 {
			t.Errorf("sample %d: cosine of phase %v outside -1..1", j, c)
		}
	}
}

// The envelope's fill, eight samples at a time (fill_amd64.s) and in Go
// (envelopeScalar), against Go's standard library math.Hypot on every pair
// of awkward values (signed zeros, subnormal, the float32 extremes, both
// signs) and on random ones, at every length from 0 to 40 (the vector
// path's tails): each sample within one float32 rounding of
// float32(math.Hypot(x, h)), and the vector path never writes past its
// slice. Where the processor lacks AVX2 and FMA (or under -tags purego)
// only the Go path is checked.
func TestEnvelopeFillMatchesHypot(t *testing.T) {
	vals := []float64{0, math.Copysign(0, -1), 1, -1, 0.5, -1e-45, 1e-38, 3.4e38, -3.4e38, 1e-20, 7, -7, 2.5, -1e5}
	x, h := everyPair(vals)
	next := uniformNoise(777)
	for range 1000 {
		x, h = append(x, next()*1e3), append(h, next()*1e-3)
	}
	ulp := func(v float32) float64 {
		return float64(math.Nextafter32(v, math.MaxFloat32) - v)
	}
	check := func(name string, a []float32, x, h []float64) {
		for j := range a {
			want := float32(math.Hypot(x[j], h[j]))
			if a[j] != want && math.Abs(float64(a[j]-want)) > ulp(want) {
				t.Errorf("%s: sample %d: envelope(%v, %v) = %v, math.Hypot gives %v", name, j, x[j], h[j], a[j], want)
			}
		}
	}
	goPath := make([]float32, len(x))
	envelopeScalar(goPath, x, h)
	check("Go", goPath, x, h)
	vec := make([]float32, len(x))
	done := envFillVector(vec, x, h)
	if haveSIMD && done != len(x)&^7 {
		t.Fatalf("vector fill wrote %d of %d samples", done, len(x))
	}
	envelopeScalar(vec[done:], x[done:], h[done:])
	check("vector", vec, x, h)
	const guard = float32(-12345)
	for n := 0; n <= 40; n++ {
		a := make([]float32, n+8)
		for j := range a {
			a[j] = guard
		}
		d := envFillVector(a[:n], x[:n], h[:n])
		if haveSIMD && d != n&^7 {
			t.Fatalf("length %d: vector fill wrote %d samples, want %d", n, d, n&^7)
		}
		check(fmt.Sprintf("vector, length %d", n), a[:d], x, h)
		for j := d; j < len(a); j++ {
			if a[j] != guard {
				t.Fatalf("length %d: sample %d written beyond the %d the fill reported", n, j, d)
			}
		}
	}
}

// awkwardFloat32s are samples every per-sample kernel must handle: signed
// zeros, the float32 extremes, subnormals, NaN and both infinities.
func awkwardFloat32s() []float32 {
	return []float32{0, float32(math.Copysign(0, -1)), 1, -1, math.MaxFloat32, -math.MaxFloat32,
		math.SmallestNonzeroFloat32, -math.SmallestNonzeroFloat32, 1.1754944e-38,
		float32(math.NaN()), float32(math.Inf(1)), float32(math.Inf(-1)), 3.5, -1e30}
}

// saturateTrace's vector path (fill_amd64.s) against the Go loop and the
// rule itself: ±Inf become ±math.MaxFloat32, NaN stays NaN, every other
// sample keeps its bits; at every length from 0 to 40 nothing beyond the
// samples handled is written. Under -tags purego, or without AVX2, only
// the Go loop is checked.
func TestSaturateVectorMatchesRule(t *testing.T) {
	vals := awkwardFloat32s()
	var tr []float32
	for range 9 {
		tr = append(tr, vals...)
	}
	want := func(v float32) float32 {
		switch {
		case math.IsInf(float64(v), 1):
			return math.MaxFloat32
		case math.IsInf(float64(v), -1):
			return -math.MaxFloat32
		}
		return v
	}
	for n := 0; n <= len(tr); n++ {
		if n > 40 && n != len(tr) {
			continue
		}
		got := append([]float32(nil), tr...)
		saturateTrace(got[:n])
		for j, v := range got {
			w := tr[j]
			if j < n {
				w = want(tr[j])
			}
			if math.Float32bits(v) != math.Float32bits(w) && !(math.IsNaN(float64(v)) && math.IsNaN(float64(w))) {
				t.Fatalf("length %d: sample %d (%v): %v, want %v", n, j, tr[j], v, w)
			}
		}
	}
}

// analyticTrace.load's vector path against the rule: x = float64(v), 0 at
// NaN and ±Inf, gap flags and count exact, taper applied, at every length
// from 1 to 40 and with a clean trace loaded after a gapped one.
func TestLoadVectorMatchesRule(t *testing.T) {
	vals := awkwardFloat32s()
	var tr []float32
	for range 7 {
		tr = append(tr, vals...)
	}
	for n := 1; n <= len(tr); n++ {
		if n > 40 && n != len(tr) {
			continue
		}
		var a analyticTrace
		a.resize(n, 0.004)
		for _, in := range [][]float32{tr[:n], make([]float32, n)} { // gapped, then clean
			a.load(in, nil)
			gaps := 0
			for j, v := range in {
				f := float64(v)
				isGap := math.IsNaN(f) || math.IsInf(f, 0)
				want := f
				if isGap {
					gaps++
					want = 0
				}
				if math.Float64bits(a.x[j]) != math.Float64bits(want) || a.gap[j] != isGap {
					t.Fatalf("length %d: sample %d (%v): x %v gap %v, want %v %v", n, j, v, a.x[j], a.gap[j], want, isGap)
				}
			}
			if a.gaps != gaps {
				t.Fatalf("length %d: %d gaps counted, want %d", n, a.gaps, gaps)
			}
		}
	}
}

// The spectral operator's vector path (specOpVector, fill_amd64.s) against
// analyticPair.apply's Go formulas, bit for bit, for imaginary and real
// responses at every transform length from 1 to 70 and at 1501, 2048 and
// 3001: bins 1..done and their mirrors m-done..m-1 as the formulas give,
// every other bin untouched. Under -tags purego, or without AVX2, the
// vector path writes nothing and that is checked.
func TestSpecOpVectorMatchesApply(t *testing.T) {
	next := uniformNoise(99)
	lengths := []int{1501, 2048, 3001}
	for m := 1; m <= 70; m++ {
		lengths = append(lengths, m)
	}
	guard := complex(-7.25, 3.5)
	for _, m := range lengths {
		pos := (m - 1) / 2
		s := make([]complex128, m)
		g := make([]float64, m/2+1)
		for k := range s {
			s[k] = complex(next()*100, next()*1e-3)
		}
		for k := range g {
			g[k] = next()
		}
		for _, imaginary := range []bool{true, false} {
			z := make([]complex128, m)
			for k := range z {
				z[k] = guard
			}
			done := specOpVector(z, s, g, m, pos, imaginary)
			if want := pos &^ 1; haveSIMD && done != want {
				t.Fatalf("m=%d: vector path wrote %d bins, want %d", m, done, want)
			}
			for k := 0; k < m; k++ {
				mirror := m - k
				switch {
				case k >= 1 && k <= done:
					c, u := g[k], s[k]
					want := complex(c*real(u), -c*imag(u))
					if imaginary {
						want = complex(-c*imag(u), -c*real(u))
					}
					if z[k] != want {
						t.Fatalf("m=%d imaginary=%v: bin %d = %v, apply's formula %v", m, imaginary, k, z[k], want)
					}
				case mirror >= 1 && mirror <= done:
					c, v := g[mirror], s[k]
					want := complex(c*real(v), -c*imag(v))
					if imaginary {
						want = complex(c*imag(v), c*real(v))
					}
					if z[k] != want {
						t.Fatalf("m=%d imaginary=%v: mirrored bin %d = %v, apply's formula %v", m, imaginary, k, z[k], want)
					}
				default:
					if z[k] != guard {
						t.Fatalf("m=%d imaginary=%v: bin %d written (%v) outside the %d bins reported", m, imaginary, k, z[k], done)
					}
				}
			}
		}
	}
}

// The pair packing and unpacking of analyticPair (interleaveVector,
// deinterleaveVector, fill_amd64.s) against their definitions, bit for bit,
// at every length from 0 to 40 (signed zeros and NaN included): z[j] =
// complex(a[j], b[j]); ra[j] = real(z[j]), rb[j] = -imag(z[j]); nothing
// written beyond the samples reported. Under -tags purego, or without
// AVX2, the vector paths write nothing and that is checked.
func TestPairPackingVectorMatchesDefinition(t *testing.T) {
	next := uniformNoise(5)
	same := func(x, y float64) bool { return math.Float64bits(x) == math.Float64bits(y) }
	for n := 0; n <= 40; n++ {
		a, b := make([]float64, n), make([]float64, n)
		for j := range a {
			a[j], b[j] = next(), next()
		}
		if n > 3 {
			a[1], b[2], a[3] = math.Copysign(0, -1), math.NaN(), math.Inf(-1)
		}
		guard := complex(-1.5, 2.5)
		z := make([]complex128, n+4)
		for j := range z {
			z[j] = guard
		}
		done := interleaveVector(z, a, b)
		if haveSIMD && done != n&^3 {
			t.Fatalf("n=%d: packed %d, want %d", n, done, n&^3)
		}
		for j := range z {
			if j < done {
				if !same(real(z[j]), a[j]) || !same(imag(z[j]), b[j]) {
					t.Fatalf("n=%d: z[%d] = %v, want (%v, %v)", n, j, z[j], a[j], b[j])
				}
			} else if z[j] != guard {
				t.Fatalf("n=%d: z[%d] written beyond the %d reported", n, j, done)
			}
		}
		for j := range z[:n] {
			z[j] = complex(a[j], b[j])
		}
		ra, rb := make([]float64, n+4), make([]float64, n+4)
		for j := range ra {
			ra[j], rb[j] = 99, 99
		}
		done = deinterleaveVector(ra[:n], rb[:n], z)
		if haveSIMD && done != n&^3 {
			t.Fatalf("n=%d: unpacked %d, want %d", n, done, n&^3)
		}
		for j := range ra {
			if j < done {
				if !same(ra[j], real(z[j])) || !same(rb[j], -imag(z[j])) {
					t.Fatalf("n=%d: sample %d: %v, %v from %v", n, j, ra[j], rb[j], z[j])
				}
			} else if ra[j] != 99 || rb[j] != 99 {
				t.Fatalf("n=%d: sample %d written beyond the %d reported", n, j, done)
			}
		}
	}
}

// uniformNoise returns a generator of reproducible numbers in [-1, 1)
// (a 64-bit linear congruential generator, Knuth's MMIX constants): the
// kernels' tests need the same samples on every run and machine.
func uniformNoise(seed uint64) func() float64 {
	rnd := seed
	return func() float64 {
		rnd = rnd*6364136223846793005 + 1442695040888963407
		return float64(int64(rnd>>11)-1<<52) / (1 << 52)
	}
}

// everyPair returns x and h holding every ordered pair of vals.
func everyPair(vals []float64) (x, h []float64) {
	for _, a := range vals {
		for _, b := range vals {
			x, h = append(x, a), append(h, b)
		}
	}
	return x, h
}
