//go:build amd64 && !purego

#include "textflag.h"

// Vector Stockham passes of fft.go (see fftStage): each 256-bit register
// holds two complex128 values, q and q+1 of the inner loop, so a pass
// needs an even stride s. A complex product v·w with w broadcast to both
// halves is, with wr = (re w, re w, ...) and wi = (im w, im w, ...):
// VFMADDSUB(v·wr, swap(v)·wi) = (vr wr - vi wi, vi wr + vr wi).

// Sign mask that negates the real parts: i·v = swap(v) XOR negre.
DATA negre<>+0(SB)/8, $0x8000000000000000
DATA negre<>+8(SB)/8, $0
DATA negre<>+16(SB)/8, $0x8000000000000000
DATA negre<>+24(SB)/8, $0
GLOBL negre<>(SB), RODATA|NOPTR, $32

// func radix4SIMD(y, x, tw []complex128, m, s int)
// For p < m, q < s: with a_k = x[q + s(p + k m)],
// y[q + s(4p)]   = (a0+a2) + (a1+a3)
// y[q + s(4p+1)] = W1 ((a0-a2) - i(a1-a3))
// y[q + s(4p+2)] = W2 ((a0+a2) - (a1+a3))
// y[q + s(4p+3)] = W3 ((a0-a2) + i(a1-a3)),  Wj = tw[3p + j-1].
TEXT ·radix4SIMD(SB), NOSPLIT, $0-88
	MOVQ y_base+0(FP), DI
	MOVQ x_base+24(FP), SI
	MOVQ tw_base+48(FP), R8
	MOVQ m+72(FP), R9
	MOVQ s+80(FP), R10
	MOVQ R9, R11
	IMULQ R10, R11
	SHLQ $4, R11         // R11: bytes from x block k to k+1 (m s values)
	MOVQ R10, R12
	SHLQ $4, R12         // R12: bytes of s values (x row, y row)
	SHRQ $1, R10         // R10: register pairs per row
	VMOVUPD negre<>(SB), Y15
	TESTQ R9, R9
	JEQ  done4
	TESTQ R10, R10
	JEQ  done4

p4:
	VBROADCASTF128 0(R8), Y9
	VBROADCASTF128 16(R8), Y11
	VBROADCASTF128 32(R8), Y13
	VMOVDDUP Y9, Y8           // W1 real parts
	VPERMILPD $15, Y9, Y9     // W1 imaginary parts
	VMOVDDUP Y11, Y10
	VPERMILPD $15, Y11, Y11
	VMOVDDUP Y13, Y12
	VPERMILPD $15, Y13, Y13
	MOVQ SI, AX               // a0 row; a1 = AX+R11, a2 = AX+2R11, a3 = DX+2R11
	LEAQ (SI)(R11*1), DX
	MOVQ DI, BX               // y row 0; rows 1..3 from R13 = BX+R12
	LEAQ (DI)(R12*1), R13
	MOVQ R10, CX

q4:
	VMOVUPD (AX), Y0
	VMOVUPD (DX), Y1
	VMOVUPD (AX)(R11*2), Y2
	VMOVUPD (DX)(R11*2), Y3
	VADDPD Y2, Y0, Y4         // a0+a2
	VSUBPD Y2, Y0, Y5         // a0-a2
	VADDPD Y3, Y1, Y6         // a1+a3
	VSUBPD Y3, Y1, Y7         // a1-a3
	VPERMILPD $5, Y7, Y7
	VXORPD Y15, Y7, Y7        // i(a1-a3)
	VADDPD Y6, Y4, Y0         // b0
	VSUBPD Y6, Y4, Y1         // (a0+a2)-(a1+a3)
	VSUBPD Y7, Y5, Y2         // (a0-a2)-i(a1-a3)
	VADDPD Y7, Y5, Y3         // (a0-a2)+i(a1-a3)
	VMOVUPD Y0, (BX)
	VPERMILPD $5, Y2, Y4
	VMULPD Y9, Y4, Y4
	VFMADDSUB231PD Y8, Y2, Y4 // W1 · Y2
	VMOVUPD Y4, (R13)
	VPERMILPD $5, Y1, Y5
	VMULPD Y11, Y5, Y5
	VFMADDSUB231PD Y10, Y1, Y5
	VMOVUPD Y5, (R13)(R12*1)
	VPERMILPD $5, Y3, Y6
	VMULPD Y13, Y6, Y6
	VFMADDSUB231PD Y12, Y3, Y6
	VMOVUPD Y6, (R13)(R12*2)
	ADDQ $32, AX
	ADDQ $32, DX
	ADDQ $32, BX
	ADDQ $32, R13
	DECQ CX
	JNE  q4

	ADDQ $48, R8              // next three twiddles
	ADDQ R12, SI              // next x row
	LEAQ (DI)(R12*4), DI      // next four y rows
	DECQ R9
	JNE  p4

done4:
	VZEROUPPER
	RET

// func radix2SIMD(y, x, tw []complex128, m, s int)
// y[q + s(2p)] = a0 + a1, y[q + s(2p+1)] = W (a0 - a1), with
// a_k = x[q + s(p + k m)] and W = tw[p].
TEXT ·radix2SIMD(SB), NOSPLIT, $0-88
	MOVQ y_base+0(FP), DI
	MOVQ x_base+24(FP), SI
	MOVQ tw_base+48(FP), R8
	MOVQ m+72(FP), R9
	MOVQ s+80(FP), R10
	MOVQ R9, R11
	IMULQ R10, R11
	SHLQ $4, R11
	MOVQ R10, R12
	SHLQ $4, R12
	SHRQ $1, R10
	TESTQ R9, R9
	JEQ  done2
	TESTQ R10, R10
	JEQ  done2

p2:
	VBROADCASTF128 0(R8), Y9
	VMOVDDUP Y9, Y8
	VPERMILPD $15, Y9, Y9
	MOVQ SI, AX
	MOVQ DI, BX
	MOVQ R10, CX

q2:
	VMOVUPD (AX), Y0
	VMOVUPD (AX)(R11*1), Y1
	VADDPD Y1, Y0, Y2
	VSUBPD Y1, Y0, Y3
	VMOVUPD Y2, (BX)
	VPERMILPD $5, Y3, Y4
	VMULPD Y9, Y4, Y4
	VFMADDSUB231PD Y8, Y3, Y4
	VMOVUPD Y4, (BX)(R12*1)
	ADDQ $32, AX
	ADDQ $32, BX
	DECQ CX
	JNE  q2

	ADDQ $16, R8
	ADDQ R12, SI
	LEAQ (DI)(R12*2), DI
	DECQ R9
	JNE  p2

done2:
	VZEROUPPER
	RET

// func radix4FirstSIMD(y, x, tw []complex128, m int)
// The radix-4 pass with stride s = 1 (the first pass), two butterflies p,
// p+1 at a time (m even): a_k = x[p + k m] are side by side for the two,
// the outputs y[4p..4p+3] and y[4p+4..4p+7] are the register halves put
// back in order with VPERM2F128. tw holds, per pair, W1, W2, W3 of p and
// p+1 side by side: [6(p/2) + 2(j-1) + p%2].
TEXT ·radix4FirstSIMD(SB), NOSPLIT, $0-80
	MOVQ y_base+0(FP), DI
	MOVQ x_base+24(FP), SI
	MOVQ tw_base+48(FP), R8
	MOVQ m+72(FP), R9
	MOVQ R9, R11
	SHLQ $4, R11              // R11: bytes of m values
	SHRQ $1, R9               // pairs
	VMOVUPD negre<>(SB), Y15
	TESTQ R9, R9
	JEQ  done1
	LEAQ (SI)(R11*1), DX

loop1:
	VMOVUPD (SI), Y0
	VMOVUPD (DX), Y1
	VMOVUPD (SI)(R11*2), Y2
	VMOVUPD (DX)(R11*2), Y3
	VADDPD Y2, Y0, Y4
	VSUBPD Y2, Y0, Y5
	VADDPD Y3, Y1, Y6
	VSUBPD Y3, Y1, Y7
	VPERMILPD $5, Y7, Y7
	VXORPD Y15, Y7, Y7
	VADDPD Y6, Y4, Y0         // b0
	VSUBPD Y6, Y4, Y1
	VSUBPD Y7, Y5, Y2
	VADDPD Y7, Y5, Y3
	VMOVUPD 0(R8), Y9
	VMOVDDUP Y9, Y8
	VPERMILPD $15, Y9, Y9
	VPERMILPD $5, Y2, Y4
	VMULPD Y9, Y4, Y4
	VFMADDSUB231PD Y8, Y2, Y4 // b1
	VMOVUPD 32(R8), Y9
	VMOVDDUP Y9, Y8
	VPERMILPD $15, Y9, Y9
	VPERMILPD $5, Y1, Y5
	VMULPD Y9, Y5, Y5
	VFMADDSUB231PD Y8, Y1, Y5 // b2
	VMOVUPD 64(R8), Y9
	VMOVDDUP Y9, Y8
	VPERMILPD $15, Y9, Y9
	VPERMILPD $5, Y3, Y6
	VMULPD Y9, Y6, Y6
	VFMADDSUB231PD Y8, Y3, Y6 // b3
	VPERM2F128 $0x20, Y4, Y0, Y7  // b0, b1 of p
	VPERM2F128 $0x20, Y6, Y5, Y10 // b2, b3 of p
	VPERM2F128 $0x31, Y4, Y0, Y11 // b0, b1 of p+1
	VPERM2F128 $0x31, Y6, Y5, Y12 // b2, b3 of p+1
	VMOVUPD Y7, 0(DI)
	VMOVUPD Y10, 32(DI)
	VMOVUPD Y11, 64(DI)
	VMOVUPD Y12, 96(DI)
	ADDQ $32, SI
	ADDQ $32, DX
	ADDQ $96, R8
	ADDQ $128, DI
	DECQ R9
	JNE  loop1

done1:
	VZEROUPPER
	RET

// Sign mask that negates the imaginary parts: -i·v = swap(v) XOR negim.
DATA negim<>+0(SB)/8, $0
DATA negim<>+8(SB)/8, $0x8000000000000000
DATA negim<>+16(SB)/8, $0
DATA negim<>+24(SB)/8, $0x8000000000000000
GLOBL negim<>(SB), RODATA|NOPTR, $32

DATA half3<>+0(SB)/8, $0.5
DATA half3<>+8(SB)/8, $0.5
DATA half3<>+16(SB)/8, $0.5
DATA half3<>+24(SB)/8, $0.5
GLOBL half3<>(SB), RODATA|NOPTR, $32

DATA sin3<>+0(SB)/8, $0.86602540378443864676
DATA sin3<>+8(SB)/8, $0.86602540378443864676
DATA sin3<>+16(SB)/8, $0.86602540378443864676
DATA sin3<>+24(SB)/8, $0.86602540378443864676
GLOBL sin3<>(SB), RODATA|NOPTR, $32

// func radix3SIMD(y, x, tw []complex128, m, s int)
// With a_k = x[q + s(p + k m)], t1 = a1+a2, t2 = a0 - t1/2 and
// t3 = -i sin(2π/3) (a1-a2): y[q + s(3p)] = a0 + t1,
// y[q + s(3p+1)] = W1 (t2 + t3), y[q + s(3p+2)] = W2 (t2 - t3),
// Wj = tw[2p + j-1].
TEXT ·radix3SIMD(SB), NOSPLIT, $0-88
	MOVQ y_base+0(FP), DI
	MOVQ x_base+24(FP), SI
	MOVQ tw_base+48(FP), R8
	MOVQ m+72(FP), R9
	MOVQ s+80(FP), R10
	MOVQ R9, R11
	IMULQ R10, R11
	SHLQ $4, R11
	MOVQ R10, R12
	SHLQ $4, R12
	SHRQ $1, R10
	TESTQ R9, R9
	JEQ  done3
	TESTQ R10, R10
	JEQ  done3

p3:
	VBROADCASTF128 0(R8), Y9
	VBROADCASTF128 16(R8), Y11
	VMOVDDUP Y9, Y8
	VPERMILPD $15, Y9, Y9
	VMOVDDUP Y11, Y10
	VPERMILPD $15, Y11, Y11
	MOVQ SI, AX
	LEAQ (SI)(R11*1), DX
	MOVQ DI, BX
	MOVQ R10, CX

q3:
	VMOVUPD (AX), Y0
	VMOVUPD (DX), Y1
	VMOVUPD (AX)(R11*2), Y2
	VADDPD Y2, Y1, Y3         // t1
	VSUBPD Y2, Y1, Y4         // a1-a2
	VMOVAPD Y0, Y5
	VFNMADD231PD half3<>(SB), Y3, Y5 // t2 = a0 - t1/2
	VADDPD Y3, Y0, Y0         // y0
	VPERMILPD $5, Y4, Y4
	VXORPD negim<>(SB), Y4, Y4
	VMULPD sin3<>(SB), Y4, Y4 // t3
	VADDPD Y4, Y5, Y6
	VSUBPD Y4, Y5, Y7
	VMOVUPD Y0, (BX)
	VPERMILPD $5, Y6, Y1
	VMULPD Y9, Y1, Y1
	VFMADDSUB231PD Y8, Y6, Y1
	VMOVUPD Y1, (BX)(R12*1)
	VPERMILPD $5, Y7, Y2
	VMULPD Y11, Y2, Y2
	VFMADDSUB231PD Y10, Y7, Y2
	VMOVUPD Y2, (BX)(R12*2)
	ADDQ $32, AX
	ADDQ $32, DX
	ADDQ $32, BX
	DECQ CX
	JNE  q3

	ADDQ $32, R8
	ADDQ R12, SI
	LEAQ (DI)(R12*2), DI
	ADDQ R12, DI
	DECQ R9
	JNE  p3

done3:
	VZEROUPPER
	RET
