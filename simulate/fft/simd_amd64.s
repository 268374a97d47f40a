//go:build amd64

#include "textflag.h"

// AVX2+FMA kernels of the radix-4 passes; see simd_amd64.go for the
// contract and the published method. Registers: AX, BX, CX, DX hold y0..y3,
// R8..R11 hold x0..x3, SI is the byte offset of the current pair of complex
// values and DI its end (16·n). Y15 holds the sign mask (+0, -0, +0, -0).

// oddsign flips the sign of the imaginary parts (odd lanes) by XOR.
DATA oddsign<>+0(SB)/8, $0x0000000000000000
DATA oddsign<>+8(SB)/8, $0x8000000000000000
DATA oddsign<>+16(SB)/8, $0x0000000000000000
DATA oddsign<>+24(SB)/8, $0x8000000000000000
GLOBL oddsign<>(SB), RODATA|NOPTR, $32

// LOADARGS loads the eight run pointers and the end offset.
#define LOADARGS \
	MOVQ y0+0(FP), AX \
	MOVQ y1+8(FP), BX \
	MOVQ y2+16(FP), CX \
	MOVQ y3+24(FP), DX \
	MOVQ x0+32(FP), R8 \
	MOVQ x1+40(FP), R9 \
	MOVQ x2+48(FP), R10 \
	MOVQ x3+56(FP), R11 \
	MOVQ n+64(FP), DI \
	SHLQ $4, DI \
	XORQ SI, SI \
	VMOVUPD oddsign<>(SB), Y15

// BFLY4 computes the radix-4 butterfly of two positions: on exit Y0 = out 0,
// Y2 = out 1, Y1 = out 2, Y3 = out 3 (before twiddles).
//   t0 = x0+x2, t1 = x0-x2, t2 = x1+x3, t3 = x1-x3
//   out0 = t0+t2, out2 = t0-t2, out1 = t1 - i·t3, out3 = t1 + i·t3
// with -i·t3 = (Im t3, -Re t3), the swapped t3 with its odd lane negated.
#define BFLY4 \
	VMOVUPD (R8)(SI*1), Y0 \
	VMOVUPD (R10)(SI*1), Y1 \
	VMOVUPD (R9)(SI*1), Y2 \
	VMOVUPD (R11)(SI*1), Y3 \
	VADDPD Y1, Y0, Y4 \
	VSUBPD Y1, Y0, Y5 \
	VADDPD Y3, Y2, Y6 \
	VSUBPD Y3, Y2, Y7 \
	VADDPD Y6, Y4, Y0 \
	VSUBPD Y6, Y4, Y1 \
	VPERMILPD $5, Y7, Y7 \
	VXORPD Y15, Y7, Y7 \
	VADDPD Y7, Y5, Y2 \
	VSUBPD Y7, Y5, Y3

// CMUL multiplies the two complex values in V by the broadcast twiddle
// (WR, WI), into T: T = V·WR ∓ swap(V)·WI (subtract in the real lanes,
// add in the imaginary ones, VFMADDSUB231PD). V is left unchanged.
#define CMUL(V, WR, WI, T) \
	VPERMILPD $5, V, T \
	VMULPD WI, T, T \
	VFMADDSUB231PD WR, V, T

// func r4notwAVX2(y0, y1, y2, y3, x0, x1, x2, x3 *complex128, n int)
TEXT ·r4notwAVX2(SB), NOSPLIT, $0-72
	LOADARGS

notwloop:
	BFLY4
	VMOVUPD Y0, (AX)(SI*1)
	VMOVUPD Y2, (BX)(SI*1)
	VMOVUPD Y1, (CX)(SI*1)
	VMOVUPD Y3, (DX)(SI*1)
	ADDQ $32, SI
	CMPQ SI, DI
	JB   notwloop
	VZEROUPPER
	RET

// func r4scaleAVX2(y0, y1, y2, y3, x0, x1, x2, x3 *complex128, n int, scale float64)
TEXT ·r4scaleAVX2(SB), NOSPLIT, $0-80
	LOADARGS
	VBROADCASTSD scale+72(FP), Y14

scaleloop:
	BFLY4
	VMULPD Y14, Y0, Y0
	VMULPD Y14, Y2, Y2
	VMULPD Y14, Y1, Y1
	VMULPD Y14, Y3, Y3
	VMOVUPD Y0, (AX)(SI*1)
	VMOVUPD Y2, (BX)(SI*1)
	VMOVUPD Y1, (CX)(SI*1)
	VMOVUPD Y3, (DX)(SI*1)
	ADDQ $32, SI
	CMPQ SI, DI
	JB   scaleloop
	VZEROUPPER
	RET

// func r4twAVX2(y0, y1, y2, y3, x0, x1, x2, x3 *complex128, n int, w *[6]float64)
TEXT ·r4twAVX2(SB), NOSPLIT, $0-80
	LOADARGS
	MOVQ w+72(FP), R12
	VBROADCASTSD 0(R12), Y8
	VBROADCASTSD 8(R12), Y9
	VBROADCASTSD 16(R12), Y10
	VBROADCASTSD 24(R12), Y11
	VBROADCASTSD 32(R12), Y12
	VBROADCASTSD 40(R12), Y13

twloop:
	BFLY4
	VMOVUPD Y0, (AX)(SI*1)
	CMUL(Y2, Y8, Y9, Y4)
	VMOVUPD Y4, (BX)(SI*1)
	CMUL(Y1, Y10, Y11, Y5)
	VMOVUPD Y5, (CX)(SI*1)
	CMUL(Y3, Y12, Y13, Y6)
	VMOVUPD Y6, (DX)(SI*1)
	ADDQ $32, SI
	CMPQ SI, DI
	JB   twloop
	VZEROUPPER
	RET

// ---- radix 8 ----
//
// The radix-8 kernels take p, eight output run pointers followed by eight
// input run pointers. The inputs stay in R8..R14 and AX (R14 is free in an
// ABI0 function: its wrapper restores it), indexed by SI; the output pointers
// are reloaded from p (BX) for each store. Y14 holds √½.

DATA sqrthalf<>+0(SB)/8, $0x3fe6a09e667f3bcd
GLOBL sqrthalf<>(SB), RODATA|NOPTR, $8

// LOAD8 loads the input pointers, the end offset and the constants.
#define LOAD8 \
	MOVQ p+0(FP), BX \
	MOVQ 64(BX), R8 \
	MOVQ 72(BX), R9 \
	MOVQ 80(BX), R10 \
	MOVQ 88(BX), R11 \
	MOVQ 96(BX), R12 \
	MOVQ 104(BX), R13 \
	MOVQ 112(BX), R14 \
	MOVQ 120(BX), AX \
	MOVQ n+8(FP), DI \
	SHLQ $4, DI \
	XORQ SI, SI \
	VMOVUPD oddsign<>(SB), Y15 \
	VBROADCASTSD sqrthalf<>(SB), Y14

// BFLY8 computes the radix-8 butterfly of two positions (the same
// operations as the Go body of gen_kernels.py), reading all eight inputs
// first. On exit out0..out7 are in Y10, Y1, Y11, Y3, Y9, Y4, Y8, Y0; Y2, Y5,
// Y6, Y7, Y12 and Y13 are free.
#define BFLY8 \
	VMOVUPD (R8)(SI*1), Y0 \
	VMOVUPD (R9)(SI*1), Y1 \
	VMOVUPD (R10)(SI*1), Y2 \
	VMOVUPD (R11)(SI*1), Y3 \
	VMOVUPD (R12)(SI*1), Y4 \
	VMOVUPD (R13)(SI*1), Y5 \
	VMOVUPD (R14)(SI*1), Y6 \
	VMOVUPD (AX)(SI*1), Y7 \
	VADDPD Y4, Y0, Y8 \
	VSUBPD Y4, Y0, Y0 \
	VADDPD Y6, Y2, Y4 \
	VSUBPD Y6, Y2, Y2 \
	VADDPD Y5, Y1, Y6 \
	VSUBPD Y5, Y1, Y1 \
	VADDPD Y7, Y3, Y5 \
	VSUBPD Y7, Y3, Y3 \
	VADDPD Y4, Y8, Y9 \
	VSUBPD Y4, Y8, Y8 \
	VADDPD Y5, Y6, Y4 \
	VSUBPD Y5, Y6, Y6 \
	VPERMILPD $5, Y6, Y6 \
	VXORPD Y15, Y6, Y6 \
	VADDPD Y4, Y9, Y10 \
	VSUBPD Y4, Y9, Y9 \
	VADDPD Y6, Y8, Y11 \
	VSUBPD Y6, Y8, Y8 \
	VSUBPD Y3, Y1, Y4 \
	VADDPD Y3, Y1, Y1 \
	VPERMILPD $5, Y1, Y5 \
	VXORPD Y15, Y5, Y5 \
	VADDPD Y5, Y4, Y6 \
	VMULPD Y14, Y6, Y6 \
	VSUBPD Y4, Y5, Y5 \
	VMULPD Y14, Y5, Y5 \
	VPERMILPD $5, Y2, Y2 \
	VXORPD Y15, Y2, Y2 \
	VADDPD Y2, Y0, Y4 \
	VSUBPD Y2, Y0, Y0 \
	VADDPD Y6, Y4, Y1 \
	VSUBPD Y6, Y4, Y4 \
	VADDPD Y5, Y0, Y3 \
	VSUBPD Y5, Y0, Y0

// ST8 stores V to output run i.
#define ST8(i, V) \
	MOVQ (8*i)(BX), CX \
	VMOVUPD V, (CX)(SI*1)

// TWST8 multiplies V by twiddle i ≥ 1, (w[2i-2], w[2i-1]) at DX, and stores
// it to output run i.
#define TWST8(i, V) \
	VBROADCASTSD (16*i-16)(DX), Y12 \
	VBROADCASTSD (16*i-8)(DX), Y13 \
	VPERMILPD $5, V, Y2 \
	VMULPD Y13, Y2, Y2 \
	VFMADDSUB231PD Y12, V, Y2 \
	ST8(i, Y2)

// func r8notwAVX2(p *[16]*complex128, n int)
TEXT ·r8notwAVX2(SB), NOSPLIT, $0-16
	LOAD8

notw8loop:
	BFLY8
	ST8(0, Y10)
	ST8(1, Y1)
	ST8(2, Y11)
	ST8(3, Y3)
	ST8(4, Y9)
	ST8(5, Y4)
	ST8(6, Y8)
	ST8(7, Y0)
	ADDQ $32, SI
	CMPQ SI, DI
	JB   notw8loop
	VZEROUPPER
	RET

// func r8scaleAVX2(p *[16]*complex128, n int, scale float64)
TEXT ·r8scaleAVX2(SB), NOSPLIT, $0-24
	LOAD8
	VBROADCASTSD scale+16(FP), Y12

scale8loop:
	BFLY8
	VMULPD Y12, Y10, Y10
	VMULPD Y12, Y1, Y1
	VMULPD Y12, Y11, Y11
	VMULPD Y12, Y3, Y3
	VMULPD Y12, Y9, Y9
	VMULPD Y12, Y4, Y4
	VMULPD Y12, Y8, Y8
	VMULPD Y12, Y0, Y0
	ST8(0, Y10)
	ST8(1, Y1)
	ST8(2, Y11)
	ST8(3, Y3)
	ST8(4, Y9)
	ST8(5, Y4)
	ST8(6, Y8)
	ST8(7, Y0)
	ADDQ $32, SI
	CMPQ SI, DI
	JB   scale8loop
	VZEROUPPER
	RET

// func r8twAVX2(p *[16]*complex128, n int, w *[14]float64)
TEXT ·r8twAVX2(SB), NOSPLIT, $0-24
	LOAD8
	MOVQ w+16(FP), DX

tw8loop:
	BFLY8
	ST8(0, Y10)
	TWST8(1, Y1)
	TWST8(2, Y11)
	TWST8(3, Y3)
	TWST8(4, Y9)
	TWST8(5, Y4)
	TWST8(6, Y8)
	TWST8(7, Y0)
	ADDQ $32, SI
	CMPQ SI, DI
	JB   tw8loop
	VZEROUPPER
	RET
