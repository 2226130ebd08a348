//go:build amd64 && !purego

package compute

import "golang.org/x/sys/cpu"

// haveSIMD says whether the vector passes of fft_amd64.s and the kernels of
// fill_amd64.s can run: they use AVX2, FMA3 and POPCNT (x86-64 since
// 2013/2015). Read once, never changed.
var haveSIMD = cpu.X86.HasAVX && cpu.X86.HasAVX2 && cpu.X86.HasFMA && cpu.X86.HasPOPCNT

// radix4SIMD is fftStage.radix4 for a pass with an even stride s, two
// butterflies at a time in 256-bit registers; tw holds W_l^{jp} at
// [3p + j-1] for every p < m, p = 0 included.
//
//go:noescape
func radix4SIMD(y, x, tw []complex128, m, s int)

// radix2SIMD is fftStage.radix2 for a pass with an even stride s; tw
// holds W_l^p at [p] for every p < m.
//
//go:noescape
func radix2SIMD(y, x, tw []complex128, m, s int)

// radix3SIMD is fftStage.radix3 for a pass with an even stride s; tw
// holds W_l^{jp} at [2p + j-1] for every p < m.
//
//go:noescape
func radix3SIMD(y, x, tw []complex128, m, s int)

// radix4FirstSIMD is fftStage.radix4 for the first pass (s = 1) with an
// even m; tw is the stage's twPair.
//
//go:noescape
func radix4FirstSIMD(y, x, tw []complex128, m int)

// applySIMD runs pass g from x into y with a vector pass when there is one
// for its radix and layout, and reports whether it did.
func (g *fftStage) applySIMD(y, x []complex128) bool {
	switch {
	case g.r == 4 && g.s == 1 && g.twPair != nil:
		radix4FirstSIMD(y, x, g.twPair, g.m)
	case g.r == 4 && g.s%2 == 0:
		radix4SIMD(y, x, g.tw, g.m, g.s)
	case g.r == 2 && g.s%2 == 0:
		radix2SIMD(y, x, g.tw, g.m, g.s)
	case g.r == 3 && g.s%2 == 0:
		radix3SIMD(y, x, g.tw, g.m, g.s)
	default:
		return false
	}
	return true
}
