package fft

//go:generate /usr/bin/python3 gen_kernels.py

// Butterflies of the self-sorting decimation-in-frequency passes. The
// radix-2, 3, 4, 5 and 8 kernels are in kernels_gen.go, written by
// gen_kernels.py from one body per radix; the direct butterfly of other odd
// primes is below.
//
// A pass of radix r over a span of r·m values reads, for each group p and
// each q < s, the r inputs with stride m, forms their length-r DFT v_i and
// writes v_i · w^(i·p), w = exp(-2πi/(r·m)), to output slot i of the group
// (Stockham's self-sorting order, so no bit-reversal pass is needed). Where
// the runs lie is given by a geom (see tables.go), which also carries the
// slot permutations: the inverse pass uses the conjugate twiddles and feeds
// the forward butterfly its inputs in the order k → (r-k) mod r, which turns
// it into the inverse butterfly; the centred transform rotates slots by r/2.
// The last pass has m = 1, needs no twiddles and applies the overall scale.
// Group 0 of every pass has unit twiddles and runs through the twiddle-free
// kernel (rRnotw), which also serves a last pass with scale 1.
//
// Twiddles are stored as interleaved float64 pairs, tw[2·((r-1)·p+i-1)] =
// Re w_i, tw[2·((r-1)·p+i-1)+1] = Im w_i, read by constant offsets from one
// base. The arithmetic is written on real and imaginary parts and ordered so
// that each output is stored as soon as it is ready, which keeps register
// pressure low. The last-pass butterflies read all their inputs before their
// first store, so a last pass may write over its own input (exec relies on
// this when a single pass runs in place); the radix-8 twiddled passes read
// their inputs twice instead and never run in place.
//
// On amd64 CPUs with AVX2 and FMA, the radix-4 and radix-8 passes whose runs
// s are even go through the assembly kernels of simd_amd64.s instead (two
// complex values per 256-bit register, the same twiddle broadcast over the
// run); simd.go chooses, and useSIMD switches them off for tests.

const (
	sin60  = 0.86602540378443864676372317075293618  // sin(π/3)
	cos72  = 0.30901699437494742410229341718281906  // cos(2π/5)
	cos144 = -0.80901699437494742410229341718281906 // cos(4π/5)
	sin72  = 0.95105651629515357211643933337938214  // sin(2π/5)
	sin144 = 0.58778525229247312916870595463907277  // sin(4π/5)
	sqrtH  = 0.70710678118654752440084436210484903  // √½
)

// ---- direct butterfly of odd prime radix ----

// bflyGen writes the forward r-point DFT of in into out[0..r), using the
// symmetric-pair form: for 0 < i ≤ h = (r-1)/2, out[i] and out[r-i] share
// the sums x_k + x_(r-k) and differences x_k - x_(r-k). tmp has length ≥ r+1.
func bflyGen(out, in []complex128, r int, d *direct, tmp []complex128) {
	h := (r - 1) / 2
	sp := tmp[:h+1]
	sm := tmp[h+1 : 2*h+2]
	x0 := in[0]
	sum := x0
	for k := 1; k <= h; k++ {
		a, b := in[k], in[r-k]
		sp[k] = a + b
		sm[k] = a - b
		sum += sp[k]
	}
	out[0] = sum
	for i := 1; i <= h; i++ {
		reR, reI := real(x0), imag(x0)
		var imR, imI float64
		idx := 0
		for k := 1; k <= h; k++ {
			idx += i
			if idx >= r {
				idx -= r
			}
			c, s := d.cos[idx], d.sin[idx]
			reR += real(sp[k]) * c
			reI += imag(sp[k]) * c
			imR += real(sm[k]) * s
			imI += imag(sm[k]) * s
		}
		// forward: out[i] = re - i·im, out[r-i] = re + i·im
		out[i] = complex(reR+imI, reI-imR)
		out[r-i] = complex(reR-imI, reI+imR)
	}
}

// rgen is the pass of a direct butterfly of odd prime radix r; tmp has
// length ≥ 3r+1.
func rgen(y, x []complex128, tw []float64, g *geom, r int, d *direct, tmp []complex128) {
	in := tmp[:r]
	out := tmp[r : 2*r]
	work := tmp[2*r:]
	for p := range g.m {
		w := tw[2*(r-1)*p : 2*(r-1)*(p+1)]
		xb, yb := p*g.xstep, p*g.ystep
		for q := range g.s {
			for k := range in {
				in[k] = x[xb+g.xo[k]+q]
			}
			bflyGen(out, in, r, d, work)
			y[yb+g.yo[0]+q] = out[0]
			for i := 1; i < r; i++ {
				y[yb+g.yo[i]+q] = out[i] * complex(w[2*i-2], w[2*i-1])
			}
		}
	}
}

// rgenlast is the last pass of a direct butterfly: no twiddles, outputs
// times scale.
func rgenlast(y, x []complex128, g *geom, r int, d *direct, scale float64, tmp []complex128) {
	in := tmp[:r]
	out := tmp[r : 2*r]
	work := tmp[2*r:]
	sc := complex(scale, 0)
	for p := range g.m {
		xb, yb := p*g.xstep, p*g.ystep
		for q := range g.s {
			for k := range in {
				in[k] = x[xb+g.xo[k]+q]
			}
			bflyGen(out, in, r, d, work)
			for i := range out {
				y[yb+g.yo[i]+q] = out[i] * sc
			}
		}
	}
}
