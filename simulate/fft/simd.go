package fft

// useSIMD selects the AVX2+FMA pass kernels (simd_amd64.s) where the CPU has
// them; it starts as haveSIMD and exists as a variable so that tests can run
// the pure-Go kernels on the same machine. Set it only while no transform
// runs.
var useSIMD = haveSIMD

// r4Pass runs a twiddled radix-4 pass (see run): group 0 through the
// twiddle-free kernel, groups 1..m-1 through the twiddled one.
func r4Pass(y, x []complex128, tw []float64, g *geom) {
	if useSIMD && g.s%2 == 0 {
		r4PassSIMD(y, x, tw, g)
		return
	}
	r4notw(y, x, g, 1)
	r4(y, x, tw, g)
}

// r4LastPass runs the last radix-4 pass (see runLast) with the given scale.
func r4LastPass(y, x []complex128, g *geom, scale float64) {
	if useSIMD && g.s%2 == 0 {
		r4LastSIMD(y, x, g, scale)
		return
	}
	if scale == 1 {
		r4notw(y, x, g, g.m)
		return
	}
	r4last(y, x, g, scale)
}

// r8Pass runs a twiddled radix-8 pass, like r4Pass.
func r8Pass(y, x []complex128, tw []float64, g *geom) {
	if useSIMD && g.s%2 == 0 {
		r8PassSIMD(y, x, tw, g)
		return
	}
	r8notw(y, x, g, 1)
	r8(y, x, tw, g)
}

// r8LastPass runs the last radix-8 pass with the given scale, like
// r4LastPass.
func r8LastPass(y, x []complex128, g *geom, scale float64) {
	if useSIMD && g.s%2 == 0 {
		r8LastSIMD(y, x, g, scale)
		return
	}
	if scale == 1 {
		r8notw(y, x, g, g.m)
		return
	}
	r8last(y, x, g, scale)
}
