package wavelet

// Multi-row passes: the SIMD kernels of simd_amd64.s run the pipelined db4
// sweep on two (AVX2) or four (AVX-512F) adjacent rows at once. Because
// every pass writes its output transposed (row r of the input becomes
// column r of the output, lift2d.go), the outputs of rows r, r+1, … are
// adjacent complex slots, so one 256-bit (512-bit) register holds one
// complex value of each row, one store writes them all, and the lifting
// steps are FMAs with broadcast coefficients and no dependence between the
// lanes. A leftover row, and every row where the CPU lacks the
// instructions (or off amd64), takes the pure-Go kernel of pipelined.go.

// useSIMD selects the assembly kernels (the multi-row db4 passes, the
// complex soft threshold and the subband scaling). It starts as simdAvailable; tests switch it off to run
// the pure-Go path and compare.
var useSIMD = simdAvailable

// use512 selects, while useSIMD is on, the four-row AVX-512F lifting
// kernels for groups of four adjacent rows (the two-row AVX2 kernels take
// the rest). Tests switch it to run both widths.
var use512 = avx512Available

// forwardRows analyses the rows x[r·xs : r·xs+2n] (floats), r < rows, of n
// complex samples each, writing row r's output at out[2r:] with output
// stride os as forward does.
func (k *pipelined) forwardRows(out []float64, os int, x []float64, xs, rows, n int) {
	r := 0
	if useSIMD && rows >= 2 {
		r = k.forwardPairs(out, os, x, xs, rows, n)
	}
	for ; r < rows; r++ {
		k.forward(out[2*r:], os, x[r*xs:r*xs+2*n], n)
	}
}

// inverseRows synthesises the rows src[r·ss : r·ss+2n], r < rows, each
// holding n/2 low-pass then n/2 high-pass complex values, writing row r's
// n samples at out[2r:] with output stride os as inverse does.
func (k *pipelined) inverseRows(out []float64, os int, src []float64, ss, rows, n int) {
	r := 0
	if useSIMD && rows >= 2 {
		r = k.inversePairs(out, os, src, ss, rows, n)
	}
	for ; r < rows; r++ {
		row := src[r*ss : r*ss+2*n]
		k.inverse(out[2*r:], os, row[:n], row[n:], n)
	}
}

// softThreshold is SoftThreshold on the SIMD path when it is on.
func softThreshold(x []complex128, thr float64) {
	done := 0
	if useSIMD {
		done = softThresholdSIMD(x, thr)
	}
	SoftThreshold(x[done:], thr)
}
