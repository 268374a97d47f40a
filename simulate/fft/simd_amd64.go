//go:build amd64

package fft

import "golang.org/x/sys/cpu"

// haveSIMD reports whether the CPU runs the AVX2+FMA kernels of
// simd_amd64.s.
var haveSIMD = cpu.X86.HasAVX2 && cpu.X86.HasFMA

// The assembly kernels below each run the inner q-loop of one radix-4
// butterfly group (see kernels.go) over n contiguous complex128 values, two
// per 256-bit register; n must be even and at least 2. y0..y3 are the output
// runs, x0..x3 the input runs. The butterfly is the textbook radix-4
// decimation-in-frequency one (Cooley & Tukey, Math. Comp. 19, 1965, in the
// self-sorting order of Stockham, as in Van Loan, Computational Frameworks
// for the Fast Fourier Transform, SIAM 1992, §1.7). Like the Go last-pass
// kernels, each kernel reads all four inputs of a position before storing
// its outputs, so the output runs may coincide with the input runs.

// r4notwAVX2 writes the twiddle-free butterfly of x0..x3 to y0..y3.
//
//go:noescape
func r4notwAVX2(y0, y1, y2, y3, x0, x1, x2, x3 *complex128, n int)

// r4twAVX2 writes the butterfly of x0..x3 to y0..y3, output i ≥ 1 times the
// twiddle (w[2i-2], w[2i-1]), multiplied with VFMADDSUB231PD.
//
//go:noescape
func r4twAVX2(y0, y1, y2, y3, x0, x1, x2, x3 *complex128, n int, w *[6]float64)

// r4scaleAVX2 writes the twiddle-free butterfly of x0..x3 times scale to
// y0..y3.
//
//go:noescape
func r4scaleAVX2(y0, y1, y2, y3, x0, x1, x2, x3 *complex128, n int, scale float64)

// runs4 returns the four output runs and then the four input runs of group
// p of g (bounds-checked here, so the kernels need not).
func runs4(y, x []complex128, g *geom, p int) (r [8]*complex128) {
	s := g.s
	xb, yb := p*g.xstep, p*g.ystep
	for k := range 4 {
		r[k] = &y[yb+g.yo[k] : yb+g.yo[k]+s][0]
		r[4+k] = &x[xb+g.xo[k] : xb+g.xo[k]+s][0]
	}
	return r
}

// r4PassSIMD is r4notw for group 0 and r4 for the others with the AVX2
// kernels; g.s must be even.
func r4PassSIMD(y, x []complex128, tw []float64, g *geom) {
	s := g.s
	for p := range g.m {
		r := runs4(y, x, g, p)
		if p == 0 {
			r4notwAVX2(r[0], r[1], r[2], r[3], r[4], r[5], r[6], r[7], s)
			continue
		}
		w := (*[6]float64)(tw[6*p : 6*p+6])
		r4twAVX2(r[0], r[1], r[2], r[3], r[4], r[5], r[6], r[7], s, w)
	}
}

// r4LastSIMD is r4last (r4notw when scale is 1) with the AVX2 kernels; g.s
// must be even.
func r4LastSIMD(y, x []complex128, g *geom, scale float64) {
	s := g.s
	for p := range g.m {
		r := runs4(y, x, g, p)
		if scale == 1 {
			r4notwAVX2(r[0], r[1], r[2], r[3], r[4], r[5], r[6], r[7], s)
		} else {
			r4scaleAVX2(r[0], r[1], r[2], r[3], r[4], r[5], r[6], r[7], s, scale)
		}
	}
}

// The radix-8 kernels run the q-loop of one radix-8 group the same way; p
// holds the eight output run pointers, then the eight input run pointers.
// The butterfly is split radix 2·4 as in gen_kernels.py. They read all eight
// inputs of a position before storing, so they may run in place.

// r8notwAVX2 writes the twiddle-free radix-8 butterfly.
//
//go:noescape
func r8notwAVX2(p *[16]*complex128, n int)

// r8twAVX2 writes the radix-8 butterfly, output i ≥ 1 times the twiddle
// (w[2i-2], w[2i-1]).
//
//go:noescape
func r8twAVX2(p *[16]*complex128, n int, w *[14]float64)

// r8scaleAVX2 writes the twiddle-free radix-8 butterfly times scale.
//
//go:noescape
func r8scaleAVX2(p *[16]*complex128, n int, scale float64)

// runs8 fills ptr with the output and input runs of group p of g.
func runs8(ptr *[16]*complex128, y, x []complex128, g *geom, p int) {
	s := g.s
	xb, yb := p*g.xstep, p*g.ystep
	for k := range 8 {
		ptr[k] = &y[yb+g.yo[k] : yb+g.yo[k]+s][0]
		ptr[8+k] = &x[xb+g.xo[k] : xb+g.xo[k]+s][0]
	}
}

// r8PassSIMD is r8notw for group 0 and r8 for the others with the AVX2
// kernels; g.s must be even.
func r8PassSIMD(y, x []complex128, tw []float64, g *geom) {
	var ptr [16]*complex128
	for p := range g.m {
		runs8(&ptr, y, x, g, p)
		if p == 0 {
			r8notwAVX2(&ptr, g.s)
			continue
		}
		r8twAVX2(&ptr, g.s, (*[14]float64)(tw[14*p:14*p+14]))
	}
}

// r8LastSIMD is r8last (r8notw when scale is 1) with the AVX2 kernels; g.s
// must be even.
func r8LastSIMD(y, x []complex128, g *geom, scale float64) {
	var ptr [16]*complex128
	for p := range g.m {
		runs8(&ptr, y, x, g, p)
		if scale == 1 {
			r8notwAVX2(&ptr, g.s)
		} else {
			r8scaleAVX2(&ptr, g.s, scale)
		}
	}
}
