package fft

import (
	"math/rand/v2"
	"testing"

	"accelplan/internal/benchcpu"
)

// benchPaths runs f as sub-benchmarks "simd" (the AVX2 kernels, where the
// CPU has them) and "purego", reporting wall and thread CPU time per call.
func benchPaths(b *testing.B, f func()) {
	for _, c := range []struct {
		name string
		on   bool
	}{{"simd", true}, {"purego", false}} {
		b.Run(c.name, func(b *testing.B) {
			if c.on && !haveSIMD {
				b.Skip("CPU without AVX2+FMA")
			}
			withSIMD(c.on, func() {
				done := benchcpu.Timer(b)
				for b.Loop() {
					f()
				}
				done()
			})
		})
	}
}

// BenchmarkColumnFilter256 is the column-only forward+inverse pair of a
// 256² row mask (CentredColumnFilter, the FFT cost of EᴴE in the solver),
// with a mask of about a third of the rows.
func BenchmarkColumnFilter256(b *testing.B) {
	p, _ := NewPlan2D(256, 256)
	x := rand2D(256, 256)
	y := make([]complex128, len(x))
	h := make([]float64, 256)
	r := rand.New(rand.NewPCG(3, 3))
	for i := range h {
		if r.IntN(3) == 0 || (i >= 116 && i < 140) {
			h[i] = 1
		}
	}
	p.CentredColumnFilter(y, x, h) // allocates its block once
	benchPaths(b, func() { p.CentredColumnFilter(y, x, h) })
}

// BenchmarkPlan2D256 times the 2D forward transform at 256² on both paths.
func BenchmarkPlan2D256(b *testing.B) {
	p, _ := NewPlan2D(256, 256)
	x := rand2D(256, 256)
	y := make([]complex128, len(x))
	benchPaths(b, func() { p.Forward(y, x) })
}

// BenchmarkColumnFilter128 and 512: sides with an odd power of two, whose
// column passes take one radix-8 stage among the radix-4 ones.
func BenchmarkColumnFilter128(b *testing.B) { benchColumnFilter(b, 128) }
func BenchmarkColumnFilter512(b *testing.B) { benchColumnFilter(b, 512) }

func benchColumnFilter(b *testing.B, n int) {
	p, _ := NewPlan2D(n, n)
	x := rand2D(n, n)
	y := make([]complex128, len(x))
	h := make([]float64, n)
	for i := range h {
		if i%3 == 0 {
			h[i] = 1
		}
	}
	p.CentredColumnFilter(y, x, h)
	benchPaths(b, func() { p.CentredColumnFilter(y, x, h) })
}
