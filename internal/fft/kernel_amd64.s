#include "textflag.h"

// Radix-4 butterflies on two complex128 values per 256-bit register, with
// the same operations in the same order as the Go loops of fft.go (complex
// products as two products and one add/subtract per component, no fused
// multiply-add), so both paths give identical bits.
//
// Twiddle layout per pair of butterflies (j, j+1), 24 float64 at tw:
// w1r w1r' w1r w1r' ... precisely [w1r(j) w1r(j) w1r(j+1) w1r(j+1)],
// [w1i(j) w1i(j) w1i(j+1) w1i(j+1)], then the same for w2 and w3.

DATA negOdd<>+0(SB)/8, $0x0000000000000000
DATA negOdd<>+8(SB)/8, $0x8000000000000000
DATA negOdd<>+16(SB)/8, $0x0000000000000000
DATA negOdd<>+24(SB)/8, $0x8000000000000000
GLOBL negOdd<>(SB), RODATA|NOPTR, $32

DATA negEven<>+0(SB)/8, $0x8000000000000000
DATA negEven<>+8(SB)/8, $0x0000000000000000
DATA negEven<>+16(SB)/8, $0x8000000000000000
DATA negEven<>+24(SB)/8, $0x0000000000000000
GLOBL negEven<>(SB), RODATA|NOPTR, $32

DATA negAll<>+0(SB)/8, $0x8000000000000000
DATA negAll<>+8(SB)/8, $0x8000000000000000
DATA negAll<>+16(SB)/8, $0x8000000000000000
DATA negAll<>+24(SB)/8, $0x8000000000000000
GLOBL negAll<>(SB), RODATA|NOPTR, $32

// MULW multiplies Y by the twiddle at off(SI) (re dup) and off+32(SI)
// (im dup) into D, using T as scratch: D = Y⊙Wr ∓ swap(Y)⊙Wi.
#define MULW(Y, off, D, T) \
	VMULPD off(SI), Y, D \
	VPERMILPD $5, Y, T \
	VMULPD off+32(SI), T, T \
	VADDSUBPD T, D, D

// MULWC multiplies Y by the conjugate twiddle: D = Y⊙Wr ± swap(Y)⊙Wi,
// as Y⊙Wr ∓ (−swap(Y)⊙Wi) (exact negation, Y13 = negAll).
#define MULWC(Y, off, D, T) \
	VMULPD off(SI), Y, D \
	VPERMILPD $5, Y, T \
	VMULPD off+32(SI), T, T \
	VXORPD Y13, T, T \
	VADDSUBPD T, D, D

// func dif4AVX(x0, x1, x2, x3 *complex128, tw *float64, pairs int)
TEXT ·dif4AVX(SB), NOSPLIT, $0-48
	MOVQ x0+0(FP), AX
	MOVQ x1+8(FP), BX
	MOVQ x2+16(FP), CX
	MOVQ x3+24(FP), DX
	MOVQ tw+32(FP), SI
	MOVQ pairs+40(FP), DI
	VMOVUPD negOdd<>(SB), Y15
dif4loop:
	VMOVUPD (AX), Y0
	VMOVUPD (BX), Y1
	VMOVUPD (CX), Y2
	VMOVUPD (DX), Y3
	VADDPD Y2, Y0, Y4 // t0 = a0 + a2
	VSUBPD Y2, Y0, Y5 // t1 = a0 − a2
	VADDPD Y3, Y1, Y6 // t2 = a1 + a3
	VSUBPD Y3, Y1, Y7 // a1 − a3
	VPERMILPD $5, Y7, Y7
	VXORPD Y15, Y7, Y7 // t3 = −i(a1 − a3)
	VADDPD Y6, Y4, Y8  // t0 + t2
	VMOVUPD Y8, (AX)
	VSUBPD Y6, Y4, Y9  // t0 − t2 (× w2 → x1)
	VADDPD Y7, Y5, Y10 // t1 + t3 (× w1 → x2)
	VSUBPD Y7, Y5, Y11 // t1 − t3 (× w3 → x3)
	MULW(Y9, 64, Y12, Y14)
	VMOVUPD Y12, (BX)
	MULW(Y10, 0, Y12, Y14)
	VMOVUPD Y12, (CX)
	MULW(Y11, 128, Y12, Y14)
	VMOVUPD Y12, (DX)
	ADDQ $32, AX
	ADDQ $32, BX
	ADDQ $32, CX
	ADDQ $32, DX
	ADDQ $192, SI
	DECQ DI
	JNZ dif4loop
	VZEROUPPER
	RET

// func dif4HalfZeroAVX(x0, x1, x2, x3 *complex128, tw *float64, pairs int)
// The same with a2 = a3 = 0, which are not read.
TEXT ·dif4HalfZeroAVX(SB), NOSPLIT, $0-48
	MOVQ x0+0(FP), AX
	MOVQ x1+8(FP), BX
	MOVQ x2+16(FP), CX
	MOVQ x3+24(FP), DX
	MOVQ tw+32(FP), SI
	MOVQ pairs+40(FP), DI
	VMOVUPD negOdd<>(SB), Y15
dif4hzloop:
	VMOVUPD (AX), Y0
	VMOVUPD (BX), Y1
	VPERMILPD $5, Y1, Y7
	VXORPD Y15, Y7, Y7 // −i·a1
	VADDPD Y1, Y0, Y8  // a0 + a1
	VMOVUPD Y8, (AX)
	VSUBPD Y1, Y0, Y9  // (a0 − a1) × w2 → x1
	VADDPD Y7, Y0, Y10 // (a0 − i a1) × w1 → x2
	VSUBPD Y7, Y0, Y11 // (a0 + i a1) × w3 → x3
	MULW(Y9, 64, Y12, Y14)
	VMOVUPD Y12, (BX)
	MULW(Y10, 0, Y12, Y14)
	VMOVUPD Y12, (CX)
	MULW(Y11, 128, Y12, Y14)
	VMOVUPD Y12, (DX)
	ADDQ $32, AX
	ADDQ $32, BX
	ADDQ $32, CX
	ADDQ $32, DX
	ADDQ $192, SI
	DECQ DI
	JNZ dif4hzloop
	VZEROUPPER
	RET

// func dit4AVX(x0, x1, x2, x3 *complex128, tw *float64, pairs int, full bool)
// Inverse butterflies with the conjugate twiddles; without full only x0
// and x1 are written.
TEXT ·dit4AVX(SB), NOSPLIT, $0-49
	MOVQ x0+0(FP), AX
	MOVQ x1+8(FP), BX
	MOVQ x2+16(FP), CX
	MOVQ x3+24(FP), DX
	MOVQ tw+32(FP), SI
	MOVQ pairs+40(FP), DI
	MOVBLZX full+48(FP), R8
	VMOVUPD negEven<>(SB), Y15
	VMOVUPD negAll<>(SB), Y13
dit4loop:
	VMOVUPD (AX), Y0 // c0
	VMOVUPD (CX), Y1
	MULWC(Y1, 0, Y4, Y14) // c1 = x2·conj(w1)
	VMOVUPD (BX), Y2
	MULWC(Y2, 64, Y5, Y14) // c2 = x1·conj(w2)
	VMOVUPD (DX), Y3
	MULWC(Y3, 128, Y6, Y14) // c3 = x3·conj(w3)
	VADDPD Y5, Y0, Y7 // t0 = c0 + c2
	VSUBPD Y5, Y0, Y8 // t1 = c0 − c2
	VADDPD Y6, Y4, Y9 // t2 = c1 + c3
	VSUBPD Y6, Y4, Y10 // c1 − c3
	VPERMILPD $5, Y10, Y10
	VXORPD Y15, Y10, Y10 // t3 = i(c1 − c3)
	VADDPD Y9, Y7, Y11
	VMOVUPD Y11, (AX) // t0 + t2
	VADDPD Y10, Y8, Y12
	VMOVUPD Y12, (BX) // t1 + t3
	TESTQ R8, R8
	JZ dit4next
	VSUBPD Y9, Y7, Y11
	VMOVUPD Y11, (CX) // t0 − t2
	VSUBPD Y10, Y8, Y12
	VMOVUPD Y12, (DX) // t1 − t3
dit4next:
	ADDQ $32, AX
	ADDQ $32, BX
	ADDQ $32, CX
	ADDQ $32, DX
	ADDQ $192, SI
	DECQ DI
	JNZ dit4loop
	VZEROUPPER
	RET

// func twGenAVX(tv, fine, base *float64, pairs int, inverse bool)
// Twiddles of a large stage in the vector layout: for each pair block of
// fine (the layout above, holding f_r = e^(−2πirt/s)) and base b_r =
// (base[2r−2], base[2r−1]), r = 1, 2, 3: forward w = b·f, i.e. re =
// br·fr − bi·fi, im = br·fi + bi·fr (Go's complex product); inverse the
// conjugate of b·conj(f): re = br·fr + bi·fi, im = br·fi − bi·fr.
TEXT ·twGenAVX(SB), NOSPLIT, $0-33
	MOVQ tv+0(FP), DI
	MOVQ fine+8(FP), SI
	MOVQ base+16(FP), AX
	MOVQ pairs+24(FP), CX
	MOVBLZX inverse+32(FP), DX
	VBROADCASTSD 0(AX), Y8
	VBROADCASTSD 8(AX), Y9
	VBROADCASTSD 16(AX), Y10
	VBROADCASTSD 24(AX), Y11
	VBROADCASTSD 32(AX), Y12
	VBROADCASTSD 40(AX), Y13
	TESTQ DX, DX
	JNZ twinv
twfwd:
	VMOVUPD 0(SI), Y0
	VMOVUPD 32(SI), Y1
	VMULPD Y8, Y0, Y6
	VMULPD Y9, Y1, Y7
	VSUBPD Y7, Y6, Y6 // br·fr − bi·fi
	VMOVUPD Y6, 0(DI)
	VMULPD Y8, Y1, Y6
	VMULPD Y9, Y0, Y7
	VADDPD Y7, Y6, Y6 // br·fi + bi·fr
	VMOVUPD Y6, 32(DI)
	VMOVUPD 64(SI), Y0
	VMOVUPD 96(SI), Y1
	VMULPD Y10, Y0, Y6
	VMULPD Y11, Y1, Y7
	VSUBPD Y7, Y6, Y6
	VMOVUPD Y6, 64(DI)
	VMULPD Y10, Y1, Y6
	VMULPD Y11, Y0, Y7
	VADDPD Y7, Y6, Y6
	VMOVUPD Y6, 96(DI)
	VMOVUPD 128(SI), Y0
	VMOVUPD 160(SI), Y1
	VMULPD Y12, Y0, Y6
	VMULPD Y13, Y1, Y7
	VSUBPD Y7, Y6, Y6
	VMOVUPD Y6, 128(DI)
	VMULPD Y12, Y1, Y6
	VMULPD Y13, Y0, Y7
	VADDPD Y7, Y6, Y6
	VMOVUPD Y6, 160(DI)
	ADDQ $192, SI
	ADDQ $192, DI
	DECQ CX
	JNZ twfwd
	VZEROUPPER
	RET
twinv:
	VMOVUPD 0(SI), Y0
	VMOVUPD 32(SI), Y1
	VMULPD Y8, Y0, Y6
	VMULPD Y9, Y1, Y7
	VADDPD Y7, Y6, Y6 // br·fr + bi·fi
	VMOVUPD Y6, 0(DI)
	VMULPD Y8, Y1, Y6
	VMULPD Y9, Y0, Y7
	VSUBPD Y7, Y6, Y6 // br·fi − bi·fr
	VMOVUPD Y6, 32(DI)
	VMOVUPD 64(SI), Y0
	VMOVUPD 96(SI), Y1
	VMULPD Y10, Y0, Y6
	VMULPD Y11, Y1, Y7
	VADDPD Y7, Y6, Y6
	VMOVUPD Y6, 64(DI)
	VMULPD Y10, Y1, Y6
	VMULPD Y11, Y0, Y7
	VSUBPD Y7, Y6, Y6
	VMOVUPD Y6, 96(DI)
	VMOVUPD 128(SI), Y0
	VMOVUPD 160(SI), Y1
	VMULPD Y12, Y0, Y6
	VMULPD Y13, Y1, Y7
	VADDPD Y7, Y6, Y6
	VMOVUPD Y6, 128(DI)
	VMULPD Y12, Y1, Y6
	VMULPD Y13, Y0, Y7
	VSUBPD Y7, Y6, Y6
	VMOVUPD Y6, 160(DI)
	ADDQ $192, SI
	ADDQ $192, DI
	DECQ CX
	JNZ twinv
	VZEROUPPER
	RET

DATA negHighOdd<>+0(SB)/8, $0x0000000000000000
DATA negHighOdd<>+8(SB)/8, $0x0000000000000000
DATA negHighOdd<>+16(SB)/8, $0x0000000000000000
DATA negHighOdd<>+24(SB)/8, $0x8000000000000000
GLOBL negHighOdd<>(SB), RODATA|NOPTR, $32

DATA negHighEven<>+0(SB)/8, $0x0000000000000000
DATA negHighEven<>+8(SB)/8, $0x0000000000000000
DATA negHighEven<>+16(SB)/8, $0x8000000000000000
DATA negHighEven<>+24(SB)/8, $0x0000000000000000
GLOBL negHighEven<>(SB), RODATA|NOPTR, $32

// func dif4ptAVX(x *complex128, blocks int)
// The last DIF stage (size 4, no twiddles) on consecutive 4-point blocks,
// as the Go loop: t0 = a0+a2, t1 = a0−a2, t2 = a1+a3, t3 = −i(a1−a3);
// out t0+t2, t0−t2, t1+t3, t1−t3.
TEXT ·dif4ptAVX(SB), NOSPLIT, $0-16
	MOVQ x+0(FP), AX
	MOVQ blocks+8(FP), CX
	VMOVUPD negHighOdd<>(SB), Y15
dif4ptloop:
	VMOVUPD (AX), Y0   // a0 | a1
	VMOVUPD 32(AX), Y1 // a2 | a3
	VADDPD Y1, Y0, Y2  // t0 | t2
	VSUBPD Y1, Y0, Y3  // t1 | a1−a3
	VPERMILPD $6, Y3, Y3
	VXORPD Y15, Y3, Y3 // t1 | t3
	VPERM2F128 $0x20, Y3, Y2, Y4 // t0 | t1
	VPERM2F128 $0x31, Y3, Y2, Y5 // t2 | t3
	VADDPD Y5, Y4, Y6  // t0+t2 | t1+t3
	VSUBPD Y5, Y4, Y7  // t0−t2 | t1−t3
	VPERM2F128 $0x20, Y7, Y6, Y8
	VPERM2F128 $0x31, Y7, Y6, Y9
	VMOVUPD Y8, (AX)
	VMOVUPD Y9, 32(AX)
	ADDQ $64, AX
	DECQ CX
	JNZ dif4ptloop
	VZEROUPPER
	RET

// func dit4ptAVX(x *complex128, blocks int)
// The first DIT stage (size 4) on consecutive blocks, as the Go loop:
// c0, c1, c2, c3 = v0, v2, v1, v3; t0 = c0+c2, t1 = c0−c2, t2 = c1+c3,
// t3 = i(c1−c3); out t0+t2, t1+t3, t0−t2, t1−t3.
TEXT ·dit4ptAVX(SB), NOSPLIT, $0-16
	MOVQ x+0(FP), AX
	MOVQ blocks+8(FP), CX
	VMOVUPD negHighEven<>(SB), Y15
dit4ptloop:
	VMOVUPD (AX), Y0   // v0 | v1
	VMOVUPD 32(AX), Y1 // v2 | v3
	VPERM2F128 $0x20, Y1, Y0, Y2 // c0 | c1
	VPERM2F128 $0x31, Y1, Y0, Y3 // c2 | c3
	VADDPD Y3, Y2, Y4  // t0 | t2
	VSUBPD Y3, Y2, Y5  // t1 | c1−c3
	VPERMILPD $6, Y5, Y5
	VXORPD Y15, Y5, Y5 // t1 | t3
	VPERM2F128 $0x20, Y5, Y4, Y6 // t0 | t1
	VPERM2F128 $0x31, Y5, Y4, Y7 // t2 | t3
	VADDPD Y7, Y6, Y8  // t0+t2 | t1+t3
	VSUBPD Y7, Y6, Y9  // t0−t2 | t1−t3
	VMOVUPD Y8, (AX)
	VMOVUPD Y9, 32(AX)
	ADDQ $64, AX
	DECQ CX
	JNZ dit4ptloop
	VZEROUPPER
	RET
