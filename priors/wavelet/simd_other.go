//go:build !amd64

package wavelet

// simdAvailable is false off amd64: every pass takes the pure-Go kernels.
const simdAvailable = false

// avx512Available is false off amd64.
const avx512Available = false

// forwardPairs has no SIMD kernel on this architecture: it does no row.
func (k *pipelined) forwardPairs(out []float64, os int, x []float64, xs, rows, n int) int { return 0 }

// inversePairs has no SIMD kernel on this architecture: it does no row.
func (k *pipelined) inversePairs(out []float64, os int, src []float64, ss, rows, n int) int {
	return 0
}

// softThresholdSIMD has no SIMD kernel on this architecture: it does no
// element.
func softThresholdSIMD(x []complex128, thr float64) int { return 0 }

// scaleSIMD has no SIMD kernel on this architecture: it does no element.
func scaleSIMD(d, s []complex128, f float64) int { return 0 }

// fusedShrink is false off amd64: Shrink thresholds in a pass of its own.
func (k *pipelined) fusedShrink(w, n int) bool { return false }

// forwardShrinkRows is never called off amd64 (fusedShrink is false).
func (k *pipelined) forwardShrinkRows(out []float64, os int, x []float64, xs, w, n int, thr *[4]float64) bool {
	return false
}
