//go:build !amd64

package fft

// haveSIMD is false off amd64: only the pure-Go kernels exist there.
const haveSIMD = false

// r4PassSIMD is never called off amd64 (useSIMD stays false); it runs the
// pure-Go kernels so that the package builds on every GOARCH.
func r4PassSIMD(y, x []complex128, tw []float64, g *geom) {
	r4notw(y, x, g, 1)
	r4(y, x, tw, g)
}

// r4LastSIMD is never called off amd64; see r4PassSIMD.
func r4LastSIMD(y, x []complex128, g *geom, scale float64) { r4last(y, x, g, scale) }

// r8PassSIMD is never called off amd64; see r4PassSIMD.
func r8PassSIMD(y, x []complex128, tw []float64, g *geom) {
	r8notw(y, x, g, 1)
	r8(y, x, tw, g)
}

// r8LastSIMD is never called off amd64; see r4PassSIMD.
func r8LastSIMD(y, x []complex128, g *geom, scale float64) { r8last(y, x, g, scale) }
