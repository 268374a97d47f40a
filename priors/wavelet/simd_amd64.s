//go:build amd64

#include "textflag.h"

// Register use of the two-row lifting kernels: Y0 … Y7 hold the broadcast
// coefficients c1, a2, b2, a3, b3, a4, b4, c5 of pipelined (field order);
// each state register holds one complex value of row 0 (low 128 bits) and
// the same value of row 1 (high 128 bits). Method: Daubechies I, Sweldens W,
// "Factoring wavelet transforms into lifting steps", J Fourier Anal Appl
// 1998; the five steps and their lags are documented in pipelined.go.

// func forwardRun2AVX2(k *pipelined, s *float64, x *float64, xs, count int, out *float64, os, hi int)
//
// The analysis sweep of pipelined.forwardRun on two rows. State: Y8 e[i−1],
// Y9 o[i−1], Y10 o1[i−2], Y11 e2[i−2], Y12 o3[i−3]; per sweep Y13 = e[i],
// Y14 = o[i] are loaded (row 0 in the low half, row 1 from x + xs in the
// high half), then
//
//	o1[i−1] = o[i−1]  + c1·e[i]
//	e2[i−1] = e[i−1]  + a2·o1[i−2] + b2·o1[i−1]
//	o3[i−2] = o1[i−2] + a3·e2[i−2] + b3·e2[i−1]
//	e4[i−2] = e2[i−2] + a4·o3[i−3] + b4·o3[i−2]   → out
//	o5[i−2] = o3[i−2] + c5·e4[i−2]                → out + hi
TEXT ·forwardRun2AVX2(SB), NOSPLIT, $0-64
	MOVQ k+0(FP), AX
	MOVQ s+8(FP), BX
	MOVQ x+16(FP), SI
	MOVQ xs+24(FP), DX
	MOVQ count+32(FP), CX
	MOVQ out+40(FP), DI
	MOVQ os+48(FP), R8
	MOVQ hi+56(FP), R9
	VBROADCASTSD 0(AX), Y0
	VBROADCASTSD 8(AX), Y1
	VBROADCASTSD 16(AX), Y2
	VBROADCASTSD 24(AX), Y3
	VBROADCASTSD 32(AX), Y4
	VBROADCASTSD 40(AX), Y5
	VBROADCASTSD 48(AX), Y6
	VBROADCASTSD 56(AX), Y7
	VMOVUPD 0(BX), Y8
	VMOVUPD 32(BX), Y9
	VMOVUPD 64(BX), Y10
	VMOVUPD 96(BX), Y11
	VMOVUPD 128(BX), Y12
	LEAQ (SI)(DX*1), R10
	TESTQ CX, CX
	JLE  fdone

floop:
	VMOVUPD     0(SI), X13
	VINSERTF128 $1, 0(R10), Y13, Y13
	VMOVUPD     16(SI), X14
	VINSERTF128 $1, 16(R10), Y14, Y14
	VFMADD231PD Y0, Y13, Y9   // Y9 = o1[i−1]
	VFMADD231PD Y1, Y10, Y8
	VFMADD231PD Y2, Y9, Y8    // Y8 = e2[i−1]
	VFMADD231PD Y3, Y11, Y10
	VFMADD231PD Y4, Y8, Y10   // Y10 = o3[i−2]
	VFMADD231PD Y5, Y12, Y11
	VFMADD231PD Y6, Y10, Y11  // Y11 = e4[i−2]
	VMOVUPD     Y11, (DI)
	VMOVAPD     Y10, Y15
	VFMADD231PD Y7, Y11, Y15  // Y15 = o5[i−2]
	VMOVUPD     Y15, (DI)(R9*1)
	VMOVAPD     Y10, Y12
	VMOVAPD     Y8, Y11
	VMOVAPD     Y9, Y10
	VMOVAPD     Y13, Y8
	VMOVAPD     Y14, Y9
	ADDQ        $32, SI
	ADDQ        $32, R10
	ADDQ        R8, DI
	DECQ        CX
	JNZ         floop

fdone:
	VMOVUPD Y8, 0(BX)
	VMOVUPD Y9, 32(BX)
	VMOVUPD Y10, 64(BX)
	VMOVUPD Y11, 96(BX)
	VMOVUPD Y12, 128(BX)
	VZEROUPPER
	RET

// func inverseRun2AVX2(k *pipelined, s *float64, lo, hi *float64, ls, count int, out *float64, os int)
//
// The synthesis sweep of pipelined.inverseRun on two rows. State: Y8
// o3[i−1], Y9 e2[i−1], Y10 o1[i−2], Y11 e[i−2]; per sweep Y12 = e4[i] and
// Y13 = o5[i] are loaded, then
//
//	o3[i]   = o5[i]   − c5·e4[i]
//	e2[i]   = e4[i]   − a4·o3[i−1] − b4·o3[i]
//	o1[i−1] = o3[i−1] − a3·e2[i−1] − b3·e2[i]
//	e[i−1]  = e2[i−1] − a2·o1[i−2] − b2·o1[i−1]
//	e[i−2]                          → out
//	o[i−2]  = o1[i−2] − c1·e[i−1]   → out + os
TEXT ·inverseRun2AVX2(SB), NOSPLIT, $0-64
	MOVQ k+0(FP), AX
	MOVQ s+8(FP), BX
	MOVQ lo+16(FP), SI
	MOVQ hi+24(FP), R11
	MOVQ ls+32(FP), DX
	MOVQ count+40(FP), CX
	MOVQ out+48(FP), DI
	MOVQ os+56(FP), R8
	VBROADCASTSD 0(AX), Y0
	VBROADCASTSD 8(AX), Y1
	VBROADCASTSD 16(AX), Y2
	VBROADCASTSD 24(AX), Y3
	VBROADCASTSD 32(AX), Y4
	VBROADCASTSD 40(AX), Y5
	VBROADCASTSD 48(AX), Y6
	VBROADCASTSD 56(AX), Y7
	VMOVUPD 0(BX), Y8
	VMOVUPD 32(BX), Y9
	VMOVUPD 64(BX), Y10
	VMOVUPD 96(BX), Y11
	TESTQ CX, CX
	JLE  idone

iloop:
	VMOVUPD      (SI), X12
	VINSERTF128  $1, (SI)(DX*1), Y12, Y12
	VMOVUPD      (R11), X13
	VINSERTF128  $1, (R11)(DX*1), Y13, Y13
	VFNMADD231PD Y7, Y12, Y13 // Y13 = o3[i]
	VFNMADD231PD Y5, Y8, Y12
	VFNMADD231PD Y6, Y13, Y12 // Y12 = e2[i]
	VFNMADD231PD Y3, Y9, Y8
	VFNMADD231PD Y4, Y12, Y8  // Y8 = o1[i−1]
	VFNMADD231PD Y1, Y10, Y9
	VFNMADD231PD Y2, Y8, Y9   // Y9 = e[i−1]
	VMOVUPD      Y11, (DI)
	VFNMADD231PD Y0, Y9, Y10  // Y10 = o[i−2]
	VMOVUPD      Y10, (DI)(R8*1)
	VMOVAPD      Y9, Y11
	VMOVAPD      Y8, Y10
	VMOVAPD      Y12, Y9
	VMOVAPD      Y13, Y8
	ADDQ         $16, SI
	ADDQ         $16, R11
	LEAQ         (DI)(R8*2), DI
	DECQ         CX
	JNZ          iloop

idone:
	VMOVUPD Y8, 0(BX)
	VMOVUPD Y9, 32(BX)
	VMOVUPD Y10, 64(BX)
	VMOVUPD Y11, 96(BX)
	VZEROUPPER
	RET

// func softThresholdAVX2(x *complex128, n int, thr float64)
//
// The complex soft threshold (Donoho 1995) of n complex values, n a
// multiple of 4, in place: per four values, the squared moduli m2 by VMULPD
// and VHADDPD (lanes m0, m2, m1, m3), |c| by VSQRTPD, s = 1 − thr/|c| by
// VDIVPD and VSUBPD, and the products c·s after VUNPCKLPD / VUNPCKHPD spread
// s back over the pairs, cleared (VANDPD) where m2 ≤ thr², SoftThreshold's
// test. The operations, their rounding and the results on zeros,
// infinities and NaN are those of SoftThreshold.
TEXT ·softThresholdAVX2(SB), NOSPLIT, $0-24
	MOVQ         x+0(FP), SI
	MOVQ         n+8(FP), CX
	VBROADCASTSD thr+16(FP), Y15
	MOVQ         $0x3ff0000000000000, AX
	MOVQ         AX, X14
	VBROADCASTSD X14, Y14
	VMULPD       Y15, Y15, Y13
	SHRQ         $2, CX
	JZ           tdone

tloop:
	VMOVUPD   (SI), Y0
	VMOVUPD   32(SI), Y1
	VMULPD    Y0, Y0, Y2
	VMULPD    Y1, Y1, Y3
	VHADDPD   Y3, Y2, Y2
	VCMPPD    $0x16, Y13, Y2, Y5 // keep: m2 > thr² or unordered (NLE_UQ)
	VSQRTPD   Y2, Y2
	VDIVPD    Y2, Y15, Y2
	VSUBPD    Y2, Y14, Y2
	VUNPCKLPD Y2, Y2, Y3
	VUNPCKHPD Y2, Y2, Y4
	VUNPCKLPD Y5, Y5, Y6
	VUNPCKHPD Y5, Y5, Y7
	VMULPD    Y3, Y0, Y0
	VMULPD    Y4, Y1, Y1
	VANDPD    Y6, Y0, Y0
	VANDPD    Y7, Y1, Y1
	VMOVUPD   Y0, (SI)
	VMOVUPD   Y1, 32(SI)
	ADDQ      $64, SI
	DECQ      CX
	JNZ       tloop

tdone:
	VZEROUPPER
	RET

// Register use of the four-row lifting kernels (AVX-512F): Z0 … Z7 hold the
// broadcast coefficients as in the two-row kernels; each state register
// holds one complex value of rows 0, 1, 2, 3 in its four 128-bit lanes, so
// that one 64-byte store writes a whole cache line of the transposed output.

// func forwardRun4AVX512(k *pipelined, s *float64, x *float64, xs, count int, out *float64, os, hi int)
//
// The analysis sweep of forwardRun2AVX2 on four rows at x + r·xs bytes,
// r < 4, e[i] and o[i] each gathered from the four rows by one 128-bit load
// and three VINSERTF32X4 (measured a little faster here than two 256-bit
// loads split by VSHUFF64X2).
TEXT ·forwardRun4AVX512(SB), NOSPLIT, $0-64
	MOVQ k+0(FP), AX
	MOVQ s+8(FP), BX
	MOVQ x+16(FP), SI
	MOVQ xs+24(FP), DX
	MOVQ count+32(FP), CX
	MOVQ out+40(FP), DI
	MOVQ os+48(FP), R8
	MOVQ hi+56(FP), R9
	VBROADCASTSD 0(AX), Z0
	VBROADCASTSD 8(AX), Z1
	VBROADCASTSD 16(AX), Z2
	VBROADCASTSD 24(AX), Z3
	VBROADCASTSD 32(AX), Z4
	VBROADCASTSD 40(AX), Z5
	VBROADCASTSD 48(AX), Z6
	VBROADCASTSD 56(AX), Z7
	VMOVUPD 0(BX), Z8
	VMOVUPD 64(BX), Z9
	VMOVUPD 128(BX), Z10
	VMOVUPD 192(BX), Z11
	VMOVUPD 256(BX), Z12
	LEAQ (SI)(DX*1), R10
	LEAQ (SI)(DX*2), R11
	LEAQ (R11)(DX*1), R12
	TESTQ CX, CX
	JLE  f4done

f4loop:
	VMOVUPD      (SI), X13
	VINSERTF32X4 $1, (R10), Z13, Z13
	VINSERTF32X4 $2, (R11), Z13, Z13
	VINSERTF32X4 $3, (R12), Z13, Z13 // e[i]
	VMOVUPD      16(SI), X14
	VINSERTF32X4 $1, 16(R10), Z14, Z14
	VINSERTF32X4 $2, 16(R11), Z14, Z14
	VINSERTF32X4 $3, 16(R12), Z14, Z14 // o[i]
	VFMADD231PD  Z0, Z13, Z9          // Z9 = o1[i−1]
	VFMADD231PD  Z1, Z10, Z8
	VFMADD231PD  Z2, Z9, Z8           // Z8 = e2[i−1]
	VFMADD231PD  Z3, Z11, Z10
	VFMADD231PD  Z4, Z8, Z10          // Z10 = o3[i−2]
	VFMADD231PD  Z5, Z12, Z11
	VFMADD231PD  Z6, Z10, Z11         // Z11 = e4[i−2]
	VMOVUPD      Z11, (DI)
	VMOVAPD      Z10, Z15
	VFMADD231PD  Z7, Z11, Z15         // Z15 = o5[i−2]
	VMOVUPD      Z15, (DI)(R9*1)
	VMOVAPD      Z10, Z12
	VMOVAPD      Z8, Z11
	VMOVAPD      Z9, Z10
	VMOVAPD      Z13, Z8
	VMOVAPD      Z14, Z9
	ADDQ         $32, SI
	ADDQ         $32, R10
	ADDQ         $32, R11
	ADDQ         $32, R12
	ADDQ         R8, DI
	DECQ         CX
	JNZ          f4loop

f4done:
	VMOVUPD Z8, 0(BX)
	VMOVUPD Z9, 64(BX)
	VMOVUPD Z10, 128(BX)
	VMOVUPD Z11, 192(BX)
	VMOVUPD Z12, 256(BX)
	VZEROUPPER
	RET

// func inverseRun4AVX512(k *pipelined, s *float64, lo, hi *float64, ls, count int, out *float64, os int)
//
// The synthesis sweep of inverseRun2AVX2 on four rows at lo + r·ls and
// hi + r·ls bytes, r < 4, each input gathered from the four rows by one
// 128-bit load and three VINSERTF32X4.
TEXT ·inverseRun4AVX512(SB), NOSPLIT, $0-64
	MOVQ k+0(FP), AX
	MOVQ s+8(FP), BX
	MOVQ lo+16(FP), SI
	MOVQ hi+24(FP), R11
	MOVQ ls+32(FP), DX
	MOVQ count+40(FP), CX
	MOVQ out+48(FP), DI
	MOVQ os+56(FP), R8
	VBROADCASTSD 0(AX), Z0
	VBROADCASTSD 8(AX), Z1
	VBROADCASTSD 16(AX), Z2
	VBROADCASTSD 24(AX), Z3
	VBROADCASTSD 32(AX), Z4
	VBROADCASTSD 40(AX), Z5
	VBROADCASTSD 48(AX), Z6
	VBROADCASTSD 56(AX), Z7
	VMOVUPD 0(BX), Z8
	VMOVUPD 64(BX), Z9
	VMOVUPD 128(BX), Z10
	VMOVUPD 192(BX), Z11
	LEAQ (DX)(DX*2), R12
	TESTQ CX, CX
	JLE  i4done

i4loop:
	VMOVUPD      (SI), X12
	VINSERTF32X4 $1, (SI)(DX*1), Z12, Z12
	VINSERTF32X4 $2, (SI)(DX*2), Z12, Z12
	VINSERTF32X4 $3, (SI)(R12*1), Z12, Z12
	VMOVUPD      (R11), X13
	VINSERTF32X4 $1, (R11)(DX*1), Z13, Z13
	VINSERTF32X4 $2, (R11)(DX*2), Z13, Z13
	VINSERTF32X4 $3, (R11)(R12*1), Z13, Z13
	VFNMADD231PD Z7, Z12, Z13 // Z13 = o3[i]
	VFNMADD231PD Z5, Z8, Z12
	VFNMADD231PD Z6, Z13, Z12 // Z12 = e2[i]
	VFNMADD231PD Z3, Z9, Z8
	VFNMADD231PD Z4, Z12, Z8  // Z8 = o1[i−1]
	VFNMADD231PD Z1, Z10, Z9
	VFNMADD231PD Z2, Z8, Z9   // Z9 = e[i−1]
	VMOVUPD      Z11, (DI)
	VFNMADD231PD Z0, Z9, Z10  // Z10 = o[i−2]
	VMOVUPD      Z10, (DI)(R8*1)
	VMOVAPD      Z9, Z11
	VMOVAPD      Z8, Z10
	VMOVAPD      Z12, Z9
	VMOVAPD      Z13, Z8
	ADDQ         $16, SI
	ADDQ         $16, R11
	LEAQ         (DI)(R8*2), DI
	DECQ         CX
	JNZ          i4loop

i4done:
	VMOVUPD Z8, 0(BX)
	VMOVUPD Z9, 64(BX)
	VMOVUPD Z10, 128(BX)
	VMOVUPD Z11, 192(BX)
	VZEROUPPER
	RET

// func scaleAVX2(d, s *complex128, n int, f float64)
//
// d[i] = f·s[i] for n complex values, n a multiple of 4: the subband
// scaling of copyOut and copyIn, four values (two 256-bit registers) per
// iteration, each product rounded once as in scaleInto.
TEXT ·scaleAVX2(SB), NOSPLIT, $0-32
	MOVQ         d+0(FP), DI
	MOVQ         s+8(FP), SI
	MOVQ         n+16(FP), CX
	VBROADCASTSD f+24(FP), Y15
	SHRQ         $2, CX
	JZ           sdone

sloop:
	VMULPD  (SI), Y15, Y0
	VMULPD  32(SI), Y15, Y1
	VMOVUPD Y0, (DI)
	VMOVUPD Y1, 32(DI)
	ADDQ    $64, SI
	ADDQ    $64, DI
	DECQ    CX
	JNZ     sloop

sdone:
	VZEROUPPER
	RET

// func forwardRun4ShrinkAVX512(k *pipelined, s *float64, x *float64, xs, count int, out *float64, os, hi int, thr *[2]float64) int
//
// forwardRun4AVX512 that soft-thresholds its outputs before it stores them
// (Donoho 1995): the low-pass ones at thr[0], the high-pass ones at thr[1]
// (a threshold 0 keeps a value as it is). The eight squared moduli of a
// sweep are packed into one register by VUNPCKLPD / VUNPCKHPD (low-pass and
// high-pass alternating), 1/|c| comes from VRSQRT14PD (relative error
// ≤ 2⁻¹⁴) and two Newton-Raphson steps y ← y·(3/2 − (m2/2)·y²), the factor
// is s = 1 − thr·y, and a value is cleared where m2 ≤ thr², the test of
// SoftThreshold. It returns non-zero when some kept value had a factor
// that is not finite (an infinite, NaN or subnormal m2), for which the
// caller redoes the pass on the exact path.
TEXT ·forwardRun4ShrinkAVX512(SB), NOSPLIT, $0-80
	MOVQ k+0(FP), AX
	MOVQ s+8(FP), BX
	MOVQ x+16(FP), SI
	MOVQ xs+24(FP), DX
	MOVQ count+32(FP), CX
	MOVQ out+40(FP), DI
	MOVQ os+48(FP), R8
	MOVQ hi+56(FP), R9
	MOVQ thr+64(FP), R13
	VBROADCASTSD 0(AX), Z0
	VBROADCASTSD 8(AX), Z1
	VBROADCASTSD 16(AX), Z2
	VBROADCASTSD 24(AX), Z3
	VBROADCASTSD 32(AX), Z4
	VBROADCASTSD 40(AX), Z5
	VBROADCASTSD 48(AX), Z6
	VBROADCASTSD 56(AX), Z7
	VBROADCASTSD 0(R13), Z20
	VBROADCASTSD 8(R13), Z21
	VUNPCKLPD    Z21, Z20, Z20 // thresholds, low and high alternating
	VMULPD       Z20, Z20, Z21 // their squares
	MOVQ         $0x3ff0000000000000, AX
	VPBROADCASTQ AX, Z22       // 1
	MOVQ         $0x3ff8000000000000, AX
	VPBROADCASTQ AX, Z23       // 3/2
	MOVQ         $0x3fe0000000000000, AX
	VPBROADCASTQ AX, Z24       // 1/2
	VPTERNLOGQ   $0xff, Z25, Z25, Z25 // all bits set
	KXORW        K4, K4, K4
	VMOVUPD 0(BX), Z8
	VMOVUPD 64(BX), Z9
	VMOVUPD 128(BX), Z10
	VMOVUPD 192(BX), Z11
	VMOVUPD 256(BX), Z12
	LEAQ (SI)(DX*1), R10
	LEAQ (SI)(DX*2), R11
	LEAQ (R11)(DX*1), R12
	TESTQ CX, CX
	JLE  f4sdone

f4sloop:
	VMOVUPD      (SI), X13
	VINSERTF32X4 $1, (R10), Z13, Z13
	VINSERTF32X4 $2, (R11), Z13, Z13
	VINSERTF32X4 $3, (R12), Z13, Z13 // e[i]
	VMOVUPD      16(SI), X14
	VINSERTF32X4 $1, 16(R10), Z14, Z14
	VINSERTF32X4 $2, 16(R11), Z14, Z14
	VINSERTF32X4 $3, 16(R12), Z14, Z14 // o[i]
	VFMADD231PD  Z0, Z13, Z9           // Z9 = o1[i−1]
	VFMADD231PD  Z1, Z10, Z8
	VFMADD231PD  Z2, Z9, Z8            // Z8 = e2[i−1]
	VFMADD231PD  Z3, Z11, Z10
	VFMADD231PD  Z4, Z8, Z10           // Z10 = o3[i−2]
	VFMADD231PD  Z5, Z12, Z11
	VFMADD231PD  Z6, Z10, Z11          // Z11 = e4[i−2]
	VMOVAPD      Z10, Z15
	VFMADD231PD  Z7, Z11, Z15          // Z15 = o5[i−2]

	// Soft threshold of Z11 (low) and Z15 (high).
	VMULPD       Z11, Z11, Z16
	VMULPD       Z15, Z15, Z17
	VUNPCKLPD    Z17, Z16, Z18
	VUNPCKHPD    Z17, Z16, Z19
	VADDPD       Z19, Z18, Z18        // m2: low 0, high 0, low 1, …
	VCMPPD       $0x16, Z21, Z18, K1  // keep: m2 > thr² or unordered (NLE_UQ)
	VRSQRT14PD   Z18, Z16
	VMULPD       Z24, Z18, Z17        // m2/2
	VMULPD       Z16, Z16, Z19
	VFNMADD213PD Z23, Z17, Z19
	VMULPD       Z19, Z16, Z16        // first Newton step
	VMULPD       Z16, Z16, Z19
	VFNMADD213PD Z23, Z17, Z19
	VMULPD       Z19, Z16, Z16        // second Newton step
	VFNMADD213PD Z22, Z20, Z16        // s = 1 − thr·y
	VSUBPD       Z16, Z16, Z17        // NaN where s is not finite
	VCMPPD       $3, Z17, Z17, K1, K3
	KORW         K3, K4, K4
	VMOVDQA64.Z  Z25, K1, Z17         // keep mask as a vector
	VUNPCKLPD    Z16, Z16, Z18        // s of the low outputs
	VUNPCKHPD    Z16, Z16, Z19        // s of the high outputs
	VMULPD       Z18, Z11, Z26
	VMULPD       Z19, Z15, Z27
	VUNPCKLPD    Z17, Z17, Z18
	VUNPCKHPD    Z17, Z17, Z19
	VPANDQ       Z18, Z26, Z26
	VPANDQ       Z19, Z27, Z27
	VMOVUPD      Z26, (DI)
	VMOVUPD      Z27, (DI)(R9*1)

	VMOVAPD      Z10, Z12
	VMOVAPD      Z8, Z11
	VMOVAPD      Z9, Z10
	VMOVAPD      Z13, Z8
	VMOVAPD      Z14, Z9
	ADDQ         $32, SI
	ADDQ         $32, R10
	ADDQ         $32, R11
	ADDQ         $32, R12
	ADDQ         R8, DI
	DECQ         CX
	JNZ          f4sloop

f4sdone:
	VMOVUPD Z8, 0(BX)
	VMOVUPD Z9, 64(BX)
	VMOVUPD Z10, 128(BX)
	VMOVUPD Z11, 192(BX)
	VMOVUPD Z12, 256(BX)
	KMOVW   K4, AX
	MOVQ    AX, ret+72(FP)
	VZEROUPPER
	RET
