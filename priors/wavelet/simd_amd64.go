//go:build amd64

package wavelet

import "golang.org/x/sys/cpu"

// simdAvailable reports whether the CPU runs the AVX2+FMA kernels of
// simd_amd64.s.
var simdAvailable = cpu.X86.HasAVX2 && cpu.X86.HasFMA

// avx512Available reports whether the CPU also runs the four-row AVX-512F
// kernels.
var avx512Available = simdAvailable && cpu.X86.HasAVX512F

// sweepStateN is the state of the multi-row sweeps: the five (analysis) or
// four (synthesis) complex values of sweepState, each as one vector of
// 2·w floats holding the value of rows 0 … w−1 (w = 2 or 4 rows).
type sweepStateN [40]float64

// forwardRun2AVX2 is forwardRun on two rows at once (AVX2+FMA): it runs
// count analysis sweeps on the sample pairs at x (row 0) and x + xs bytes
// (row 1), 32 bytes per sweep, and writes sweep j's low-pass outputs of
// rows 0 and 1 as one 32-byte store at out + j·os bytes, the high-pass ones
// at out + hi + j·os. The state at s (sweepStateN, w = 2) is read at entry
// and written back at exit. The lifting steps are those of pipelined
// (Daubechies I, Sweldens W, "Factoring wavelet transforms into lifting
// steps", J Fourier Anal Appl 1998), one fused multiply-add per tap.
//
//go:noescape
func forwardRun2AVX2(k *pipelined, s *float64, x *float64, xs, count int, out *float64, os, hi int)

// inverseRun2AVX2 is inverseRun on two rows at once (AVX2+FMA): it runs
// count synthesis sweeps on the complex values at lo and hi (row 0) and
// lo + ls, hi + ls bytes (row 1), 16 bytes per sweep, and writes the two
// samples of sweep j at out + 2j·os and out + (2j+1)·os bytes, rows 0 and 1
// in one 32-byte store each.
//
//go:noescape
func inverseRun2AVX2(k *pipelined, s *float64, lo, hi *float64, ls, count int, out *float64, os int)

// forwardRun4AVX512 is forwardRun2AVX2 on four rows (x + r·xs bytes, r < 4)
// with 512-bit registers (AVX-512F): one 64-byte store per output.
//
//go:noescape
func forwardRun4AVX512(k *pipelined, s *float64, x *float64, xs, count int, out *float64, os, hi int)

// inverseRun4AVX512 is inverseRun2AVX2 on four rows (lo + r·ls, hi + r·ls
// bytes, r < 4) with 512-bit registers (AVX-512F).
//
//go:noescape
func inverseRun4AVX512(k *pipelined, s *float64, lo, hi *float64, ls, count int, out *float64, os int)

// forwardRun4ShrinkAVX512 is forwardRun4AVX512 that soft-thresholds the
// low-pass outputs at thr[0] and the high-pass ones at thr[1] before it
// stores them (Donoho 1995), with a reciprocal square root and Newton steps
// instead of the divider. It returns non-zero when a kept value had a
// factor that is not finite; the outputs are then not to be used.
//
//go:noescape
func forwardRun4ShrinkAVX512(k *pipelined, s *float64, x *float64, xs, count int, out *float64, os, hi int, thr *[2]float64) int

// softThresholdAVX2 applies the complex soft threshold of SoftThreshold to
// the first 4·(n/4) complex values at x, four at a time: |c| by VSQRTPD,
// the factor 1 − thr/|c| by VDIVPD, the values with |c| ≤ thr cleared
// (Donoho DL, "De-noising by soft-thresholding", IEEE Trans Inf Theory
// 1995), with the rounding of SoftThreshold.
//
//go:noescape
func softThresholdAVX2(x *complex128, n int, thr float64)

// scaleAVX2 sets d[i] = f·s[i] for the first 4·(n/4) complex values
// (AVX2): the subband scaling of copyOut and copyIn.
//
//go:noescape
func scaleAVX2(d, s *complex128, n int, f float64)

// scaleSIMD scales the longest prefix of s that scaleAVX2 takes into d and
// returns its length.
func scaleSIMD(d, s []complex128, f float64) int {
	m := len(d) &^ 3
	if m == 0 {
		return 0
	}
	_ = s[m-1]
	scaleAVX2(&d[0], &s[0], m, f)
	return m
}

// forwardRunN runs the w-row analysis kernel.
func forwardRunN(w int, k *pipelined, s *sweepStateN, x *float64, xs, count int, out *float64, os, hi int) {
	if w == 4 {
		forwardRun4AVX512(k, &s[0], x, xs, count, out, os, hi)
	} else {
		forwardRun2AVX2(k, &s[0], x, xs, count, out, os, hi)
	}
}

// inverseRunN runs the w-row synthesis kernel.
func inverseRunN(w int, k *pipelined, s *sweepStateN, lo, hi *float64, ls, count int, out *float64, os int) {
	if w == 4 {
		inverseRun4AVX512(k, &s[0], lo, hi, ls, count, out, os)
	} else {
		inverseRun2AVX2(k, &s[0], lo, hi, ls, count, out, os)
	}
}

// forwardPairs runs forward on the leading rows that forwardRows describes
// in groups of four (AVX-512F, when use512) and two (AVX2) adjacent rows,
// and returns the number of rows done (rows rounded down to even).
func (k *pipelined) forwardPairs(out []float64, os int, x []float64, xs, rows, n int) int {
	if rows < 2 || n < 8 {
		return 0
	}
	done := 0
	for _, w := range [2]int{4, 2} {
		if w == 4 && !use512 {
			continue
		}
		groups := (rows - done) / w
		if groups > 0 {
			k.forwardGroups(out[2*done:], os, x[done*xs:], xs, w, groups, n)
			done += w * groups
		}
	}
	return done
}

// forwardGroups runs the w-row analysis on groups·w rows.
func (k *pipelined) forwardGroups(out []float64, os int, x []float64, xs, w, groups, n int) {
	n2 := n / 2
	hi := n2 * os
	// Every row read and every output slot written is in range.
	_ = x[(w*groups-1)*xs+2*n-1]
	_ = out[2*w*(groups-1)+hi+(n2-1)*os+2*w-1]
	var s sweepStateN
	var junk [8]float64 // receives the outputs of the priming sweeps
	b, bo, bh := 8*xs, 8*os, 8*hi
	for g := range groups {
		y := x[g*w*xs:]
		o := out[2*w*g:]
		// State before sweep −1: e[−2], o[−2] = x[n−4], x[n−3] of each row.
		s = sweepStateN{}
		for r := range w {
			copy(s[2*r:2*r+2], y[r*xs+2*n-8:r*xs+2*n-6])
			copy(s[2*w+2*r:2*w+2*r+2], y[r*xs+2*n-6:r*xs+2*n-4])
		}
		forwardRunN(w, k, &s, &y[2*n-4], b, 1, &junk[0], 0, 0)
		forwardRunN(w, k, &s, &y[0], b, 2, &junk[0], 0, 0)
		forwardRunN(w, k, &s, &y[8], b, n2-2, &o[0], bo, bh)
		forwardRunN(w, k, &s, &y[0], b, 2, &o[(n2-2)*os], bo, bh)
	}
}

// inversePairs runs inverse on the leading rows that inverseRows describes
// in groups of four and two adjacent rows, as forwardPairs does, and
// returns the number of rows done.
func (k *pipelined) inversePairs(out []float64, os int, src []float64, ss, rows, n int) int {
	if rows < 2 || n < 8 {
		return 0
	}
	done := 0
	for _, w := range [2]int{4, 2} {
		if w == 4 && !use512 {
			continue
		}
		groups := (rows - done) / w
		if groups > 0 {
			k.inverseGroups(out[2*done:], os, src[done*ss:], ss, w, groups, n)
			done += w * groups
		}
	}
	return done
}

// inverseGroups runs the w-row synthesis on groups·w rows.
func (k *pipelined) inverseGroups(out []float64, os int, src []float64, ss, w, groups, n int) {
	n2 := n / 2
	_ = src[(w*groups-1)*ss+2*n-1]
	_ = out[2*w*(groups-1)+(n-1)*os+2*w-1]
	var s sweepStateN
	var junk [8]float64
	b, bo := 8*ss, 8*os
	for g := range groups {
		y := src[g*w*ss:]
		o := out[2*w*g:]
		s = sweepStateN{}
		inverseRunN(w, k, &s, &y[n-4], &y[2*n-4], b, 2, &junk[0], 0)
		inverseRunN(w, k, &s, &y[0], &y[n], b, 2, &junk[0], 0)
		inverseRunN(w, k, &s, &y[4], &y[n+4], b, n2-2, &o[0], bo)
		inverseRunN(w, k, &s, &y[0], &y[n], b, 2, &o[2*(n2-2)*os], bo)
	}
}

// softThresholdSIMD thresholds the longest prefix of x that the AVX2
// kernel takes and returns its length. (An AVX-512F kernel with a
// reciprocal square root and Newton steps instead of the divider measured
// no faster here: the pass is bound by memory.)
func softThresholdSIMD(x []complex128, thr float64) int {
	m := len(x) &^ 3
	if m == 0 {
		return 0
	}
	softThresholdAVX2(&x[0], m, thr)
	return m
}

// fusedShrink reports whether forwardShrinkRows can run a column pass of
// w rows of n samples: the four-row kernel on every row, with the groups
// of four falling on one side of w/2.
func (k *pipelined) fusedShrink(w, n int) bool {
	return useSIMD && use512 && n >= 8 && w%8 == 0
}

// forwardShrinkRows is forwardRows on the w rows of a column pass
// (fusedShrink must hold) that soft-thresholds the outputs as it writes
// them: rows r < w/2 at thr[0] (low-pass) and thr[1] (high-pass), rows
// r ≥ w/2 at thr[2] and thr[3]. It reports false when the kernel met a
// value it does not threshold exactly (see forwardRun4ShrinkAVX512); the
// outputs are then to be computed again on the exact path.
func (k *pipelined) forwardShrinkRows(out []float64, os int, x []float64, xs, w, n int, thr *[4]float64) bool {
	n2 := n / 2
	hi := n2 * os
	groups := w / 4
	_ = x[(w-1)*xs+2*n-1]
	_ = out[2*w-1+hi+(n2-1)*os]
	var s sweepStateN
	var junk [8]float64
	b, bo, bh := 8*xs, 8*os, 8*hi
	bad := 0
	for g := range groups {
		y := x[g*4*xs:]
		o := out[8*g:]
		t := (*[2]float64)(thr[0:2])
		if 4*g >= w/2 {
			t = (*[2]float64)(thr[2:4])
		}
		s = sweepStateN{}
		for r := range 4 {
			copy(s[2*r:2*r+2], y[r*xs+2*n-8:r*xs+2*n-6])
			copy(s[8+2*r:8+2*r+2], y[r*xs+2*n-6:r*xs+2*n-4])
		}
		forwardRun4AVX512(k, &s[0], &y[2*n-4], b, 1, &junk[0], 0, 0)
		forwardRun4AVX512(k, &s[0], &y[0], b, 2, &junk[0], 0, 0)
		bad |= forwardRun4ShrinkAVX512(k, &s[0], &y[8], b, n2-2, &o[0], bo, bh, t)
		bad |= forwardRun4ShrinkAVX512(k, &s[0], &y[0], b, 2, &o[(n2-2)*os], bo, bh, t)
	}
	return bad == 0
}
