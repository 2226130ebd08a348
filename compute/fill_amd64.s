//go:build amd64 && !purego

#include "textflag.h"

// Per-sample kernels in 256-bit registers (AVX2, FMA): the instantaneous
// set's formulas (InstantaneousSet.fill) four samples at a time, and the
// envelope, the float32 clamp (saturateTrace) and the trace load
// (analyticTrace.load) eight at a time. Each function's contract is in
// fill_amd64.go beside its declaration.

#define C4X(name, bits) \
	DATA name<>+0(SB)/8, bits; \
	DATA name<>+8(SB)/8, bits; \
	DATA name<>+16(SB)/8, bits; \
	DATA name<>+24(SB)/8, bits; \
	GLOBL name<>(SB), RODATA|NOPTR, $32

C4X(absmask, $0x7fffffffffffffff)
C4X(signmask, $0x8000000000000000)
C4X(tiny, $0x0000000000000001)      // smallest subnormal: 0/tiny = 0
C4X(one, $1.0)
C4X(minusone, $-1.0)
C4X(halfpi, $1.5707963267948966)
C4X(pi, $3.141592653589793)
C4X(todeg, $57.29577951308232)
C4X(inv2pi, $0.15915494309189535)
C4X(atc0, $0.9999998864002476)      // atanC0..atanC8 of atan.go
C4X(atc1, $-0.33332597062776337)
C4X(atc2, $0.19985906898953018)
C4X(atc3, $-0.14161228574093698)
C4X(atc4, $0.10498940435713522)
C4X(atc5, $-0.07234841340631744)
C4X(atc6, $0.03978100294214533)
C4X(atc7, $-0.014401208208164165)
C4X(atc8, $0.002456684442660159)

// func instFillSIMD(a, ph, f, c *float32, x, h, dx, dh *float64, n int, eps float64)
TEXT ·instFillSIMD(SB), NOSPLIT, $0-80
	MOVQ a+0(FP), R8
	MOVQ ph+8(FP), R9
	MOVQ f+16(FP), R10
	MOVQ c+24(FP), R11
	MOVQ x+32(FP), SI
	MOVQ h+40(FP), DI
	MOVQ dx+48(FP), AX
	MOVQ dh+56(FP), BX
	MOVQ n+64(FP), CX
	VBROADCASTSD eps+72(FP), Y9
	SHRQ $2, CX
	JEQ  done
	XORQ DX, DX               // byte offset into the float64 inputs

loop:
	VMOVUPD (SI)(DX*1), Y10   // x
	VMOVUPD (DI)(DX*1), Y11   // h
	// Phase: atan of t = min(|x|,|h|) / max(|x|,|h|) by the polynomial of
	// atan.go (Estrin's scheme), then the octant from |h| > |x| and the
	// signs of x and h, as atan2s.
	VANDPD absmask<>(SB), Y10, Y12
	VANDPD absmask<>(SB), Y11, Y13
	VCMPPD $0x11, Y13, Y12, Y8 // |x| < |h|: swap
	VMAXPD Y13, Y12, Y14
	VMAXPD tiny<>(SB), Y14, Y14
	VMINPD Y13, Y12, Y15
	VDIVPD Y14, Y15, Y0       // t
	VMULPD Y0, Y0, Y1         // t²
	VMULPD Y1, Y1, Y2         // t⁴
	VMULPD Y2, Y2, Y3         // t⁸
	VMOVUPD atc1<>(SB), Y4
	VFMADD213PD atc0<>(SB), Y1, Y4 // q01
	VMOVUPD atc3<>(SB), Y5
	VFMADD213PD atc2<>(SB), Y1, Y5 // q23
	VMOVUPD atc5<>(SB), Y6
	VFMADD213PD atc4<>(SB), Y1, Y6 // q45
	VMOVUPD atc7<>(SB), Y7
	VFMADD213PD atc6<>(SB), Y1, Y7 // q67
	VFMADD231PD Y5, Y2, Y4    // q03 = q01 + q23 t⁴
	VFMADD231PD Y7, Y2, Y6    // q47 = q45 + q67 t⁴
	VMOVUPD atc8<>(SB), Y5
	VFMADD213PD Y6, Y3, Y5    // q47 + c8 t⁸
	VFMADD213PD Y4, Y3, Y5    // q03 + (...) t⁸
	VMULPD Y5, Y0, Y0         // p
	VMOVUPD halfpi<>(SB), Y1
	VSUBPD Y0, Y1, Y1
	VBLENDVPD Y8, Y1, Y0, Y0  // swap: π/2 - p
	VMOVUPD pi<>(SB), Y1
	VSUBPD Y0, Y1, Y1
	VBLENDVPD Y10, Y1, Y0, Y0 // x's sign bit set: π - p
	VANDPD signmask<>(SB), Y11, Y1
	VORPD Y1, Y0, Y0          // the sign of h
	VMULPD todeg<>(SB), Y0, Y0
	VCVTPD2PSY Y0, X0
	VMOVUPS X0, (R9)
	// Envelope r = sqrt(x² + h²), inv = 1/(x² + h² + eps).
	VMULPD Y10, Y10, Y0
	VFMADD231PD Y11, Y11, Y0  // a²
	VSQRTPD Y0, Y1            // r
	VADDPD Y9, Y0, Y2
	VMOVUPD one<>(SB), Y3
	VDIVPD Y2, Y3, Y3         // inv
	VCVTPD2PSY Y1, X4
	VMOVUPS X4, (R8)
	// Frequency (x h' - h x') / 2π · inv.
	VMOVUPD (AX)(DX*1), Y4
	VMOVUPD (BX)(DX*1), Y5
	VMULPD Y5, Y10, Y6
	VFNMADD231PD Y4, Y11, Y6
	VMULPD inv2pi<>(SB), Y6, Y6
	VMULPD Y3, Y6, Y6
	VCVTPD2PSY Y6, X6
	VMOVUPS X6, (R10)
	// Cosine of phase x r inv, clamped to -1..1.
	VMULPD Y1, Y10, Y7
	VMULPD Y3, Y7, Y7
	VMAXPD minusone<>(SB), Y7, Y7
	VMINPD one<>(SB), Y7, Y7
	VCVTPD2PSY Y7, X7
	VMOVUPS X7, (R11)
	ADDQ $32, DX
	ADDQ $16, R8
	ADDQ $16, R9
	ADDQ $16, R10
	ADDQ $16, R11
	DECQ CX
	JNE  loop

done:
	VZEROUPPER
	RET

// func envFillSIMD(a *float32, x, h *float64, n int)
TEXT ·envFillSIMD(SB), NOSPLIT, $0-32
	MOVQ a+0(FP), R8
	MOVQ x+8(FP), SI
	MOVQ h+16(FP), DI
	MOVQ n+24(FP), CX
	SHRQ $3, CX
	JEQ  envdone
	XORQ DX, DX               // byte offset into the float64 inputs
	XORQ BX, BX               // byte offset into the float32 output

envloop:
	// Eight samples per step in two independent chains of four:
	// a = sqrt(x*x + h*h), rounded to float32.
	VMOVUPD (SI)(DX*1), Y0
	VMOVUPD 32(SI)(DX*1), Y1
	VMULPD  Y0, Y0, Y0
	VMULPD  Y1, Y1, Y1
	VMOVUPD (DI)(DX*1), Y2
	VMOVUPD 32(DI)(DX*1), Y3
	VFMADD231PD Y2, Y2, Y0
	VFMADD231PD Y3, Y3, Y1
	VSQRTPD Y0, Y0
	VSQRTPD Y1, Y1
	VCVTPD2PSY Y0, X0
	VCVTPD2PSY Y1, X1
	VMOVUPS X0, (R8)(BX*1)
	VMOVUPS X1, 16(R8)(BX*1)
	ADDQ $64, DX
	ADDQ $32, BX
	DECQ CX
	JNE  envloop

envdone:
	VZEROUPPER
	RET

#define C8S(name, bits) \
	DATA name<>+0(SB)/4, bits; \
	DATA name<>+4(SB)/4, bits; \
	DATA name<>+8(SB)/4, bits; \
	DATA name<>+12(SB)/4, bits; \
	DATA name<>+16(SB)/4, bits; \
	DATA name<>+20(SB)/4, bits; \
	DATA name<>+24(SB)/4, bits; \
	DATA name<>+28(SB)/4, bits; \
	GLOBL name<>(SB), RODATA|NOPTR, $32

C8S(absmask32, $0x7fffffff)
C8S(max32, $0x7f7fffff)             // math.MaxFloat32
C8S(negmax32, $0xff7fffff)          // -math.MaxFloat32

// func saturateSIMD(tr *float32, n int)
TEXT ·saturateSIMD(SB), NOSPLIT, $0-16
	MOVQ tr+0(FP), SI
	MOVQ n+8(FP), CX
	SHRQ $3, CX
	JEQ  satdone
	VMOVUPS max32<>(SB), Y1
	VMOVUPS negmax32<>(SB), Y2

satloop:
	// min then max, each with the sample as the second source operand:
	// a NaN sample compares false and comes through unchanged.
	VMOVUPS (SI), Y0
	VMINPS  Y0, Y1, Y0
	VMAXPS  Y0, Y2, Y0
	VMOVUPS Y0, (SI)
	ADDQ $32, SI
	DECQ CX
	JNE  satloop

satdone:
	VZEROUPPER
	RET

// func loadSIMD(x *float64, tr *float32, n int) (gaps int)
TEXT ·loadSIMD(SB), NOSPLIT, $0-32
	MOVQ x+0(FP), DI
	MOVQ tr+8(FP), SI
	MOVQ n+16(FP), CX
	XORQ AX, AX               // gaps
	SHRQ $3, CX
	JEQ  loaddone
	VMOVUPS absmask32<>(SB), Y4
	VMOVUPS max32<>(SB), Y5

loadloop:
	VMOVUPS (SI), Y0
	VANDPS  Y4, Y0, Y1
	VCMPPS  $0x12, Y5, Y1, Y1 // |v| <= MaxFloat32, ordered: finite
	VANDPS  Y1, Y0, Y0        // gaps (NaN, ±Inf) to zero
	VMOVMSKPS Y1, BX
	XORQ    $0xff, BX
	POPCNTQ BX, BX
	ADDQ    BX, AX
	VCVTPS2PD X0, Y2
	VEXTRACTF128 $1, Y0, X3
	VCVTPS2PD X3, Y3
	VMOVUPD Y2, (DI)
	VMOVUPD Y3, 32(DI)
	ADDQ $32, SI
	ADDQ $64, DI
	DECQ CX
	JNE  loadloop

loaddone:
	VZEROUPPER
	MOVQ AX, gaps+24(FP)
	RET

DATA oddsign<>+0(SB)/8, $0
DATA oddsign<>+8(SB)/8, $0x8000000000000000
DATA oddsign<>+16(SB)/8, $0
DATA oddsign<>+24(SB)/8, $0x8000000000000000
GLOBL oddsign<>(SB), RODATA|NOPTR, $32

// SPEC_NEXT moves specOpSIMD's pointers to the next pair of bins (up from
// bin k, down from bin m-k) and counts the pair.
#define SPEC_NEXT \
	ADDQ $32, DI; \
	ADDQ $32, SI; \
	ADDQ $16, R10; \
	SUBQ $32, R8; \
	SUBQ $32, R9; \
	DECQ CX

// func specOpSIMD(zk, zr, sk, sr *complex128, gain *float64, pairs, imaginary int)
TEXT ·specOpSIMD(SB), NOSPLIT, $0-56
	MOVQ zk+0(FP), DI
	MOVQ zr+8(FP), R8
	MOVQ sk+16(FP), SI
	MOVQ sr+24(FP), R9
	MOVQ gain+32(FP), R10
	MOVQ pairs+40(FP), CX
	MOVQ imaginary+48(FP), AX
	TESTQ CX, CX
	JEQ  specdone
	VMOVUPD signmask<>(SB), Y6
	VMOVUPD oddsign<>(SB), Y7
	TESTQ AX, AX
	JEQ  specreal

specimag:
	// z_k = -g_k swap(s_k), z_{m-k} = g_k swap(s_{m-k}), bins k and k+1
	// at once (swap: real and imaginary parts exchanged).
	VBROADCASTF128 (R10), Y2  // g_k g_k+1 g_k g_k+1
	VPERMPD $0x50, Y2, Y3     // g_k g_k g_k+1 g_k+1
	VPERMPD $0x05, Y2, Y4     // g_k+1 g_k+1 g_k g_k
	VXORPD  Y6, Y3, Y3        // negated
	VMOVUPD (SI), Y0          // s_k, s_k+1
	VMOVUPD (R9), Y1          // s_m-k-1, s_m-k
	VPERMILPD $5, Y0, Y0
	VPERMILPD $5, Y1, Y1
	VMULPD  Y3, Y0, Y0
	VMULPD  Y4, Y1, Y1
	VMOVUPD Y0, (DI)
	VMOVUPD Y1, (R8)
	SPEC_NEXT
	JNE  specimag
	JMP  specdone

specreal:
	// z_k = g_k conj(s_k), z_{m-k} = g_k conj(s_{m-k}).
	VBROADCASTF128 (R10), Y2
	VPERMPD $0x50, Y2, Y3
	VPERMPD $0x05, Y2, Y4
	VXORPD  Y7, Y3, Y3        // g, -g
	VXORPD  Y7, Y4, Y4
	VMOVUPD (SI), Y0
	VMOVUPD (R9), Y1
	VMULPD  Y3, Y0, Y0
	VMULPD  Y4, Y1, Y1
	VMOVUPD Y0, (DI)
	VMOVUPD Y1, (R8)
	SPEC_NEXT
	JNE  specreal

specdone:
	VZEROUPPER
	RET

// func interleaveSIMD(z *complex128, a, b *float64, n int)
TEXT ·interleaveSIMD(SB), NOSPLIT, $0-32
	MOVQ z+0(FP), DI
	MOVQ a+8(FP), SI
	MOVQ b+16(FP), R8
	MOVQ n+24(FP), CX
	SHRQ $2, CX
	JEQ  ildone

illoop:
	VMOVUPD (SI), Y0          // a0 a1 a2 a3
	VMOVUPD (R8), Y1          // b0 b1 b2 b3
	VUNPCKLPD Y1, Y0, Y2      // a0 b0 a2 b2
	VUNPCKHPD Y1, Y0, Y3      // a1 b1 a3 b3
	VPERM2F128 $0x20, Y3, Y2, Y4 // a0 b0 a1 b1
	VPERM2F128 $0x31, Y3, Y2, Y5 // a2 b2 a3 b3
	VMOVUPD Y4, (DI)
	VMOVUPD Y5, 32(DI)
	ADDQ $32, SI
	ADDQ $32, R8
	ADDQ $64, DI
	DECQ CX
	JNE  illoop

ildone:
	VZEROUPPER
	RET

// func deinterleaveSIMD(ra, rb *float64, z *complex128, n int)
TEXT ·deinterleaveSIMD(SB), NOSPLIT, $0-32
	MOVQ ra+0(FP), DI
	MOVQ rb+8(FP), R8
	MOVQ z+16(FP), SI
	MOVQ n+24(FP), CX
	SHRQ $2, CX
	JEQ  dedone
	VMOVUPD signmask<>(SB), Y6

deloop:
	VMOVUPD (SI), Y0          // r0 i0 r1 i1
	VMOVUPD 32(SI), Y1        // r2 i2 r3 i3
	VPERM2F128 $0x20, Y1, Y0, Y2 // r0 i0 r2 i2
	VPERM2F128 $0x31, Y1, Y0, Y3 // r1 i1 r3 i3
	VUNPCKLPD Y3, Y2, Y4      // r0 r1 r2 r3
	VUNPCKHPD Y3, Y2, Y5      // i0 i1 i2 i3
	VXORPD  Y6, Y5, Y5        // negated
	VMOVUPD Y4, (DI)
	VMOVUPD Y5, (R8)
	ADDQ $64, SI
	ADDQ $32, DI
	ADDQ $32, R8
	DECQ CX
	JNE  deloop

dedone:
	VZEROUPPER
	RET
