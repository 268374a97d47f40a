//go:build amd64

package wavelet

import "golang.org/x/sys/cpu"

// simdAvailable reports whether the CPU runs the AVX2+FMA kernels of
// simd_amd64.s.
var simdAvailable = cpu.X86.HasAVX2 && cpu.X86.HasFMA

// sweepState2 is the state of the two-row sweeps: the five (analysis) or
// four (synthesis) complex values of sweepState, each stored as the value of
// row 0 followed by that of row 1 (one 256-bit register).
type sweepState2 [20]float64

// forwardRun2AVX2 is forwardRun on two rows at once (AVX2+FMA): it runs
// count analysis sweeps on the sample pairs at x (row 0) and x + xs bytes
// (row 1), 32 bytes per sweep, and writes sweep j's low-pass outputs of
// rows 0 and 1 as one 32-byte store at out + j·os bytes, the high-pass ones
// at out + hi + j·os. The state s is read at entry and written back at exit.
// The lifting steps are those of pipelined (Daubechies I, Sweldens W,
// "Factoring wavelet transforms into lifting steps", J Fourier Anal Appl
// 1998), each a fused multiply-add per row pair.
//
//go:noescape
func forwardRun2AVX2(k *pipelined, s *sweepState2, x *float64, xs, count int, out *float64, os, hi int)

// inverseRun2AVX2 is inverseRun on two rows at once (AVX2+FMA): it runs
// count synthesis sweeps on the complex values at lo and hi (row 0) and
// lo + ls, hi + ls bytes (row 1), 16 bytes per sweep, and writes the two
// samples of sweep j at out + 2j·os and out + (2j+1)·os bytes, rows 0 and 1
// in one 32-byte store each.
//
//go:noescape
func inverseRun2AVX2(k *pipelined, s *sweepState2, lo, hi *float64, ls, count int, out *float64, os int)

// softThresholdAVX2 applies the complex soft threshold of SoftThreshold to
// the first 4·(n/4) complex values at x, four at a time: |c| by VSQRTPD,
// the factor max(1 − thr/|c|, 0) by VDIVPD and VMAXPD (Donoho DL,
// "De-noising by soft-thresholding", IEEE Trans Inf Theory 1995).
//
//go:noescape
func softThresholdAVX2(x *complex128, n int, thr float64)

// forwardPairs runs forward on the row pairs (0,1), (2,3), … of the rows
// that forwardRows describes, two rows per SIMD sweep, and returns the
// number of rows done.
func (k *pipelined) forwardPairs(out []float64, os int, x []float64, xs, rows, n int) int {
	pairs := rows / 2
	if pairs == 0 || n < 8 {
		return 0
	}
	n2 := n / 2
	hi := n2 * os
	// Every row read and every output slot written is in range.
	_ = x[(2*pairs-1)*xs+2*n-1]
	_ = out[4*(pairs-1)+hi+(n2-1)*os+3]
	var s sweepState2
	var junk [4]float64 // receives the outputs of the priming sweeps
	b, bo, bh := 8*xs, 8*os, 8*hi
	for p := range pairs {
		y := x[2*p*xs:]
		o := out[4*p:]
		// State before sweep −1: e[−2], o[−2] = x[n−4], x[n−3] of each row.
		s = sweepState2{}
		copy(s[0:2], y[2*n-8:2*n-6])
		copy(s[2:4], y[xs+2*n-8:xs+2*n-6])
		copy(s[4:6], y[2*n-6:2*n-4])
		copy(s[6:8], y[xs+2*n-6:xs+2*n-4])
		forwardRun2AVX2(k, &s, &y[2*n-4], b, 1, &junk[0], 0, 0)
		forwardRun2AVX2(k, &s, &y[0], b, 2, &junk[0], 0, 0)
		forwardRun2AVX2(k, &s, &y[8], b, n2-2, &o[0], bo, bh)
		forwardRun2AVX2(k, &s, &y[0], b, 2, &o[(n2-2)*os], bo, bh)
	}
	return 2 * pairs
}

// inversePairs runs inverse on the row pairs of the rows that inverseRows
// describes, two rows per SIMD sweep, and returns the number of rows done.
func (k *pipelined) inversePairs(out []float64, os int, src []float64, ss, rows, n int) int {
	pairs := rows / 2
	if pairs == 0 || n < 8 {
		return 0
	}
	n2 := n / 2
	_ = src[(2*pairs-1)*ss+2*n-1]
	_ = out[4*(pairs-1)+(n-1)*os+3]
	var s sweepState2
	var junk [4]float64
	b, bo := 8*ss, 8*os
	for p := range pairs {
		y := src[2*p*ss:]
		o := out[4*p:]
		s = sweepState2{}
		inverseRun2AVX2(k, &s, &y[n-4], &y[2*n-4], b, 2, &junk[0], 0)
		inverseRun2AVX2(k, &s, &y[0], &y[n], b, 2, &junk[0], 0)
		inverseRun2AVX2(k, &s, &y[4], &y[n+4], b, n2-2, &o[0], bo)
		inverseRun2AVX2(k, &s, &y[0], &y[n], b, 2, &o[2*(n2-2)*os], bo)
	}
	return 2 * pairs
}

// softThresholdSIMD thresholds the longest prefix of x that the AVX2
// kernel takes and returns its length.
func softThresholdSIMD(x []complex128, thr float64) int {
	m := len(x) &^ 3
	if m == 0 {
		return 0
	}
	softThresholdAVX2(&x[0], m, thr)
	return m
}
