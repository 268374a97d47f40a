package fft

// Butterflies of the self-sorting decimation-in-frequency passes.
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

const (
	sin60  = 0.86602540378443864676372317075293618  // sin(π/3)
	cos72  = 0.30901699437494742410229341718281906  // cos(2π/5)
	cos144 = -0.80901699437494742410229341718281906 // cos(4π/5)
	sin72  = 0.95105651629515357211643933337938214  // sin(2π/5)
	sin144 = 0.58778525229247312916870595463907277  // sin(4π/5)
	sqrtH  = 0.70710678118654752440084436210484903  // √½
)

// r2 is the radix-2 pass: v0 = x0 + x1, v1 = x0 - x1.
func r2(y, x []complex128, tw []float64, g *geom) {
	s := g.s
	for p := 1; p < g.m; p++ { // group 0 has unit twiddles: see r2notw
		w := [2]float64(tw[2*p : 2*p+2])
		xb, yb := p*g.xstep, p*g.ystep
		x0 := x[xb+g.xo[0] : xb+g.xo[0]+s]
		x1 := x[xb+g.xo[1] : xb+g.xo[1]+s][:len(x0)]
		y0 := y[yb+g.yo[0] : yb+g.yo[0]+s][:len(x0)]
		y1 := y[yb+g.yo[1] : yb+g.yo[1]+s][:len(x0)]
		for q := range x0 {
			u, v := x0[q], x1[q]
			vr, vi := real(u)+real(v), imag(u)+imag(v)
			y0[q] = complex(vr, vi)
			vr, vi = real(u)-real(v), imag(u)-imag(v)
			y1[q] = complex(vr*w[0]-vi*w[1], vr*w[1]+vi*w[0])
		}
	}
}

// r2last is the last radix-2 pass: no twiddles, outputs times scale.
func r2last(y, x []complex128, g *geom, scale float64) {
	s := g.s
	for p := range g.m {
		xb, yb := p*g.xstep, p*g.ystep
		x0 := x[xb+g.xo[0] : xb+g.xo[0]+s]
		x1 := x[xb+g.xo[1] : xb+g.xo[1]+s][:len(x0)]
		y0 := y[yb+g.yo[0] : yb+g.yo[0]+s][:len(x0)]
		y1 := y[yb+g.yo[1] : yb+g.yo[1]+s][:len(x0)]
		for q := range x0 {
			u, v := x0[q], x1[q]
			vr, vi := real(u)+real(v), imag(u)+imag(v)
			y0[q] = complex(vr*scale, vi*scale)
			vr, vi = real(u)-real(v), imag(u)-imag(v)
			y1[q] = complex(vr*scale, vi*scale)
		}
	}
}

// r2notw is a radix-2 pass over the first groups groups without twiddles
// or scaling: group 0 of every pass, and a last pass with scale 1.
func r2notw(y, x []complex128, g *geom, groups int) {
	s := g.s
	for p := range groups {
		xb, yb := p*g.xstep, p*g.ystep
		x0 := x[xb+g.xo[0] : xb+g.xo[0]+s]
		x1 := x[xb+g.xo[1] : xb+g.xo[1]+s][:len(x0)]
		y0 := y[yb+g.yo[0] : yb+g.yo[0]+s][:len(x0)]
		y1 := y[yb+g.yo[1] : yb+g.yo[1]+s][:len(x0)]
		for q := range x0 {
			u, v := x0[q], x1[q]
			vr, vi := real(u)+real(v), imag(u)+imag(v)
			y0[q] = complex(vr, vi)
			vr, vi = real(u)-real(v), imag(u)-imag(v)
			y1[q] = complex(vr, vi)
		}
	}
}

// r3 is the radix-3 pass: with t = x1 + x2, v0 = x0 + t and
// v1, v2 = x0 - t/2 ∓ i·sin(π/3)·(x1 - x2).
func r3(y, x []complex128, tw []float64, g *geom) {
	s := g.s
	for p := 1; p < g.m; p++ { // group 0 has unit twiddles: see r3notw
		w := [4]float64(tw[4*p : 4*p+4])
		xb, yb := p*g.xstep, p*g.ystep
		x0 := x[xb+g.xo[0] : xb+g.xo[0]+s]
		x1 := x[xb+g.xo[1] : xb+g.xo[1]+s][:len(x0)]
		x2 := x[xb+g.xo[2] : xb+g.xo[2]+s][:len(x0)]
		y0 := y[yb+g.yo[0] : yb+g.yo[0]+s][:len(x0)]
		y1 := y[yb+g.yo[1] : yb+g.yo[1]+s][:len(x0)]
		y2 := y[yb+g.yo[2] : yb+g.yo[2]+s][:len(x0)]
		for q := range x0 {
			a := x0[q]
			u, v := x1[q], x2[q]
			t1r, t1i := real(u)+real(v), imag(u)+imag(v)
			t3r, t3i := sin60*(imag(u)-imag(v)), sin60*(real(v)-real(u))
			vr, vi := real(a)+t1r, imag(a)+t1i
			y0[q] = complex(vr, vi)
			t2r, t2i := real(a)-0.5*t1r, imag(a)-0.5*t1i
			vr, vi = t2r+t3r, t2i+t3i
			y1[q] = complex(vr*w[0]-vi*w[1], vr*w[1]+vi*w[0])
			vr, vi = t2r-t3r, t2i-t3i
			y2[q] = complex(vr*w[2]-vi*w[3], vr*w[3]+vi*w[2])
		}
	}
}

// r3last is the last radix-3 pass: no twiddles, outputs times scale.
func r3last(y, x []complex128, g *geom, scale float64) {
	s := g.s
	for p := range g.m {
		xb, yb := p*g.xstep, p*g.ystep
		x0 := x[xb+g.xo[0] : xb+g.xo[0]+s]
		x1 := x[xb+g.xo[1] : xb+g.xo[1]+s][:len(x0)]
		x2 := x[xb+g.xo[2] : xb+g.xo[2]+s][:len(x0)]
		y0 := y[yb+g.yo[0] : yb+g.yo[0]+s][:len(x0)]
		y1 := y[yb+g.yo[1] : yb+g.yo[1]+s][:len(x0)]
		y2 := y[yb+g.yo[2] : yb+g.yo[2]+s][:len(x0)]
		for q := range x0 {
			a := x0[q]
			u, v := x1[q], x2[q]
			t1r, t1i := real(u)+real(v), imag(u)+imag(v)
			t3r, t3i := sin60*(imag(u)-imag(v)), sin60*(real(v)-real(u))
			vr, vi := real(a)+t1r, imag(a)+t1i
			y0[q] = complex(vr*scale, vi*scale)
			t2r, t2i := real(a)-0.5*t1r, imag(a)-0.5*t1i
			vr, vi = t2r+t3r, t2i+t3i
			y1[q] = complex(vr*scale, vi*scale)
			vr, vi = t2r-t3r, t2i-t3i
			y2[q] = complex(vr*scale, vi*scale)
		}
	}
}

// r3notw is a radix-3 pass over the first groups groups without twiddles
// or scaling: group 0 of every pass, and a last pass with scale 1.
func r3notw(y, x []complex128, g *geom, groups int) {
	s := g.s
	for p := range groups {
		xb, yb := p*g.xstep, p*g.ystep
		x0 := x[xb+g.xo[0] : xb+g.xo[0]+s]
		x1 := x[xb+g.xo[1] : xb+g.xo[1]+s][:len(x0)]
		x2 := x[xb+g.xo[2] : xb+g.xo[2]+s][:len(x0)]
		y0 := y[yb+g.yo[0] : yb+g.yo[0]+s][:len(x0)]
		y1 := y[yb+g.yo[1] : yb+g.yo[1]+s][:len(x0)]
		y2 := y[yb+g.yo[2] : yb+g.yo[2]+s][:len(x0)]
		for q := range x0 {
			a := x0[q]
			u, v := x1[q], x2[q]
			t1r, t1i := real(u)+real(v), imag(u)+imag(v)
			t3r, t3i := sin60*(imag(u)-imag(v)), sin60*(real(v)-real(u))
			vr, vi := real(a)+t1r, imag(a)+t1i
			y0[q] = complex(vr, vi)
			t2r, t2i := real(a)-0.5*t1r, imag(a)-0.5*t1i
			vr, vi = t2r+t3r, t2i+t3i
			y1[q] = complex(vr, vi)
			vr, vi = t2r-t3r, t2i-t3i
			y2[q] = complex(vr, vi)
		}
	}
}

// r4 is the radix-4 pass: two radix-2 layers, the odd difference rotated by -i.
func r4(y, x []complex128, tw []float64, g *geom) {
	s := g.s
	for p := 1; p < g.m; p++ { // group 0 has unit twiddles: see r4notw
		w := [6]float64(tw[6*p : 6*p+6])
		xb, yb := p*g.xstep, p*g.ystep
		x0 := x[xb+g.xo[0] : xb+g.xo[0]+s]
		x1 := x[xb+g.xo[1] : xb+g.xo[1]+s][:len(x0)]
		x2 := x[xb+g.xo[2] : xb+g.xo[2]+s][:len(x0)]
		x3 := x[xb+g.xo[3] : xb+g.xo[3]+s][:len(x0)]
		y0 := y[yb+g.yo[0] : yb+g.yo[0]+s][:len(x0)]
		y1 := y[yb+g.yo[1] : yb+g.yo[1]+s][:len(x0)]
		y2 := y[yb+g.yo[2] : yb+g.yo[2]+s][:len(x0)]
		y3 := y[yb+g.yo[3] : yb+g.yo[3]+s][:len(x0)]
		for q := range x0 {
			u, v := x0[q], x2[q]
			t0r, t0i := real(u)+real(v), imag(u)+imag(v)
			t1r, t1i := real(u)-real(v), imag(u)-imag(v)
			u, v = x1[q], x3[q]
			t2r, t2i := real(u)+real(v), imag(u)+imag(v)
			t3r, t3i := real(u)-real(v), imag(u)-imag(v)
			vr, vi := t0r+t2r, t0i+t2i
			y0[q] = complex(vr, vi)
			vr, vi = t0r-t2r, t0i-t2i
			y2[q] = complex(vr*w[2]-vi*w[3], vr*w[3]+vi*w[2])
			vr, vi = t1r+t3i, t1i-t3r
			y1[q] = complex(vr*w[0]-vi*w[1], vr*w[1]+vi*w[0])
			vr, vi = t1r-t3i, t1i+t3r
			y3[q] = complex(vr*w[4]-vi*w[5], vr*w[5]+vi*w[4])
		}
	}
}

// r4last is the last radix-4 pass: no twiddles, outputs times scale.
func r4last(y, x []complex128, g *geom, scale float64) {
	s := g.s
	for p := range g.m {
		xb, yb := p*g.xstep, p*g.ystep
		x0 := x[xb+g.xo[0] : xb+g.xo[0]+s]
		x1 := x[xb+g.xo[1] : xb+g.xo[1]+s][:len(x0)]
		x2 := x[xb+g.xo[2] : xb+g.xo[2]+s][:len(x0)]
		x3 := x[xb+g.xo[3] : xb+g.xo[3]+s][:len(x0)]
		y0 := y[yb+g.yo[0] : yb+g.yo[0]+s][:len(x0)]
		y1 := y[yb+g.yo[1] : yb+g.yo[1]+s][:len(x0)]
		y2 := y[yb+g.yo[2] : yb+g.yo[2]+s][:len(x0)]
		y3 := y[yb+g.yo[3] : yb+g.yo[3]+s][:len(x0)]
		for q := range x0 {
			u, v := x0[q], x2[q]
			t0r, t0i := real(u)+real(v), imag(u)+imag(v)
			t1r, t1i := real(u)-real(v), imag(u)-imag(v)
			u, v = x1[q], x3[q]
			t2r, t2i := real(u)+real(v), imag(u)+imag(v)
			t3r, t3i := real(u)-real(v), imag(u)-imag(v)
			vr, vi := t0r+t2r, t0i+t2i
			y0[q] = complex(vr*scale, vi*scale)
			vr, vi = t0r-t2r, t0i-t2i
			y2[q] = complex(vr*scale, vi*scale)
			vr, vi = t1r+t3i, t1i-t3r
			y1[q] = complex(vr*scale, vi*scale)
			vr, vi = t1r-t3i, t1i+t3r
			y3[q] = complex(vr*scale, vi*scale)
		}
	}
}

// r4notw is a radix-4 pass over the first groups groups without twiddles
// or scaling: group 0 of every pass, and a last pass with scale 1.
func r4notw(y, x []complex128, g *geom, groups int) {
	s := g.s
	for p := range groups {
		xb, yb := p*g.xstep, p*g.ystep
		x0 := x[xb+g.xo[0] : xb+g.xo[0]+s]
		x1 := x[xb+g.xo[1] : xb+g.xo[1]+s][:len(x0)]
		x2 := x[xb+g.xo[2] : xb+g.xo[2]+s][:len(x0)]
		x3 := x[xb+g.xo[3] : xb+g.xo[3]+s][:len(x0)]
		y0 := y[yb+g.yo[0] : yb+g.yo[0]+s][:len(x0)]
		y1 := y[yb+g.yo[1] : yb+g.yo[1]+s][:len(x0)]
		y2 := y[yb+g.yo[2] : yb+g.yo[2]+s][:len(x0)]
		y3 := y[yb+g.yo[3] : yb+g.yo[3]+s][:len(x0)]
		for q := range x0 {
			u, v := x0[q], x2[q]
			t0r, t0i := real(u)+real(v), imag(u)+imag(v)
			t1r, t1i := real(u)-real(v), imag(u)-imag(v)
			u, v = x1[q], x3[q]
			t2r, t2i := real(u)+real(v), imag(u)+imag(v)
			t3r, t3i := real(u)-real(v), imag(u)-imag(v)
			vr, vi := t0r+t2r, t0i+t2i
			y0[q] = complex(vr, vi)
			vr, vi = t0r-t2r, t0i-t2i
			y2[q] = complex(vr, vi)
			vr, vi = t1r+t3i, t1i-t3r
			y1[q] = complex(vr, vi)
			vr, vi = t1r-t3i, t1i+t3r
			y3[q] = complex(vr, vi)
		}
	}
}

// r4s1 is r4 for s = 1, the first pass of a single sequence (never the
// last, so its output slots are in natural order): every butterfly has its
// own twiddles and writes 4 adjacent outputs.
func r4s1(y, x []complex128, tw []float64, g *geom) {
	m := g.m
	x0 := x[g.xo[0] : g.xo[0]+m]
	x1 := x[g.xo[1] : g.xo[1]+m][:len(x0)]
	x2 := x[g.xo[2] : g.xo[2]+m][:len(x0)]
	x3 := x[g.xo[3] : g.xo[3]+m][:len(x0)]
	for p := 1; p < len(x0); p++ { // group 0: r4notw
		w := tw[6*p : 6*p+6 : 6*p+6]
		o := y[4*p : 4*p+4 : 4*p+4]
		u, v := x0[p], x2[p]
		t0r, t0i := real(u)+real(v), imag(u)+imag(v)
		t1r, t1i := real(u)-real(v), imag(u)-imag(v)
		u, v = x1[p], x3[p]
		t2r, t2i := real(u)+real(v), imag(u)+imag(v)
		t3r, t3i := real(u)-real(v), imag(u)-imag(v)
		vr, vi := t0r+t2r, t0i+t2i
		o[0] = complex(vr, vi)
		vr, vi = t0r-t2r, t0i-t2i
		o[2] = complex(vr*w[2]-vi*w[3], vr*w[3]+vi*w[2])
		vr, vi = t1r+t3i, t1i-t3r
		o[1] = complex(vr*w[0]-vi*w[1], vr*w[1]+vi*w[0])
		vr, vi = t1r-t3i, t1i+t3r
		o[3] = complex(vr*w[4]-vi*w[5], vr*w[5]+vi*w[4])
	}
}

// r5 is the radix-5 pass in the symmetric form: with a_k = x_k + x_(5-k) and
// b_k = x_k - x_(5-k), v_j = x0 + Σ a_k cos(2πjk/5) - i Σ b_k sin(2πjk/5).
func r5(y, x []complex128, tw []float64, g *geom) {
	s := g.s
	for p := 1; p < g.m; p++ { // group 0 has unit twiddles: see r5notw
		w := [8]float64(tw[8*p : 8*p+8])
		xb, yb := p*g.xstep, p*g.ystep
		x0 := x[xb+g.xo[0] : xb+g.xo[0]+s]
		x1 := x[xb+g.xo[1] : xb+g.xo[1]+s][:len(x0)]
		x2 := x[xb+g.xo[2] : xb+g.xo[2]+s][:len(x0)]
		x3 := x[xb+g.xo[3] : xb+g.xo[3]+s][:len(x0)]
		x4 := x[xb+g.xo[4] : xb+g.xo[4]+s][:len(x0)]
		y0 := y[yb+g.yo[0] : yb+g.yo[0]+s][:len(x0)]
		y1 := y[yb+g.yo[1] : yb+g.yo[1]+s][:len(x0)]
		y2 := y[yb+g.yo[2] : yb+g.yo[2]+s][:len(x0)]
		y3 := y[yb+g.yo[3] : yb+g.yo[3]+s][:len(x0)]
		y4 := y[yb+g.yo[4] : yb+g.yo[4]+s][:len(x0)]
		for q := range x0 {
			a := x0[q]
			x0r, x0i := real(a), imag(a)
			u, v := x1[q], x4[q]
			a1r, a1i := real(u)+real(v), imag(u)+imag(v)
			b1r, b1i := real(u)-real(v), imag(u)-imag(v)
			u, v = x2[q], x3[q]
			a2r, a2i := real(u)+real(v), imag(u)+imag(v)
			b2r, b2i := real(u)-real(v), imag(u)-imag(v)
			vr, vi := x0r+a1r+a2r, x0i+a1i+a2i
			y0[q] = complex(vr, vi)
			r1r, r1i := x0r+cos72*a1r+cos144*a2r, x0i+cos72*a1i+cos144*a2i
			i1r, i1i := sin72*b1i+sin144*b2i, -(sin72*b1r + sin144*b2r)
			vr, vi = r1r+i1r, r1i+i1i
			y1[q] = complex(vr*w[0]-vi*w[1], vr*w[1]+vi*w[0])
			vr, vi = r1r-i1r, r1i-i1i
			y4[q] = complex(vr*w[6]-vi*w[7], vr*w[7]+vi*w[6])
			r2r, r2i := x0r+cos144*a1r+cos72*a2r, x0i+cos144*a1i+cos72*a2i
			i2r, i2i := sin144*b1i-sin72*b2i, sin72*b2r-sin144*b1r
			vr, vi = r2r+i2r, r2i+i2i
			y2[q] = complex(vr*w[2]-vi*w[3], vr*w[3]+vi*w[2])
			vr, vi = r2r-i2r, r2i-i2i
			y3[q] = complex(vr*w[4]-vi*w[5], vr*w[5]+vi*w[4])
		}
	}
}

// r5last is the last radix-5 pass: no twiddles, outputs times scale.
func r5last(y, x []complex128, g *geom, scale float64) {
	s := g.s
	for p := range g.m {
		xb, yb := p*g.xstep, p*g.ystep
		x0 := x[xb+g.xo[0] : xb+g.xo[0]+s]
		x1 := x[xb+g.xo[1] : xb+g.xo[1]+s][:len(x0)]
		x2 := x[xb+g.xo[2] : xb+g.xo[2]+s][:len(x0)]
		x3 := x[xb+g.xo[3] : xb+g.xo[3]+s][:len(x0)]
		x4 := x[xb+g.xo[4] : xb+g.xo[4]+s][:len(x0)]
		y0 := y[yb+g.yo[0] : yb+g.yo[0]+s][:len(x0)]
		y1 := y[yb+g.yo[1] : yb+g.yo[1]+s][:len(x0)]
		y2 := y[yb+g.yo[2] : yb+g.yo[2]+s][:len(x0)]
		y3 := y[yb+g.yo[3] : yb+g.yo[3]+s][:len(x0)]
		y4 := y[yb+g.yo[4] : yb+g.yo[4]+s][:len(x0)]
		for q := range x0 {
			a := x0[q]
			x0r, x0i := real(a), imag(a)
			u, v := x1[q], x4[q]
			a1r, a1i := real(u)+real(v), imag(u)+imag(v)
			b1r, b1i := real(u)-real(v), imag(u)-imag(v)
			u, v = x2[q], x3[q]
			a2r, a2i := real(u)+real(v), imag(u)+imag(v)
			b2r, b2i := real(u)-real(v), imag(u)-imag(v)
			vr, vi := x0r+a1r+a2r, x0i+a1i+a2i
			y0[q] = complex(vr*scale, vi*scale)
			r1r, r1i := x0r+cos72*a1r+cos144*a2r, x0i+cos72*a1i+cos144*a2i
			i1r, i1i := sin72*b1i+sin144*b2i, -(sin72*b1r + sin144*b2r)
			vr, vi = r1r+i1r, r1i+i1i
			y1[q] = complex(vr*scale, vi*scale)
			vr, vi = r1r-i1r, r1i-i1i
			y4[q] = complex(vr*scale, vi*scale)
			r2r, r2i := x0r+cos144*a1r+cos72*a2r, x0i+cos144*a1i+cos72*a2i
			i2r, i2i := sin144*b1i-sin72*b2i, sin72*b2r-sin144*b1r
			vr, vi = r2r+i2r, r2i+i2i
			y2[q] = complex(vr*scale, vi*scale)
			vr, vi = r2r-i2r, r2i-i2i
			y3[q] = complex(vr*scale, vi*scale)
		}
	}
}

// r5notw is a radix-5 pass over the first groups groups without twiddles
// or scaling: group 0 of every pass, and a last pass with scale 1.
func r5notw(y, x []complex128, g *geom, groups int) {
	s := g.s
	for p := range groups {
		xb, yb := p*g.xstep, p*g.ystep
		x0 := x[xb+g.xo[0] : xb+g.xo[0]+s]
		x1 := x[xb+g.xo[1] : xb+g.xo[1]+s][:len(x0)]
		x2 := x[xb+g.xo[2] : xb+g.xo[2]+s][:len(x0)]
		x3 := x[xb+g.xo[3] : xb+g.xo[3]+s][:len(x0)]
		x4 := x[xb+g.xo[4] : xb+g.xo[4]+s][:len(x0)]
		y0 := y[yb+g.yo[0] : yb+g.yo[0]+s][:len(x0)]
		y1 := y[yb+g.yo[1] : yb+g.yo[1]+s][:len(x0)]
		y2 := y[yb+g.yo[2] : yb+g.yo[2]+s][:len(x0)]
		y3 := y[yb+g.yo[3] : yb+g.yo[3]+s][:len(x0)]
		y4 := y[yb+g.yo[4] : yb+g.yo[4]+s][:len(x0)]
		for q := range x0 {
			a := x0[q]
			x0r, x0i := real(a), imag(a)
			u, v := x1[q], x4[q]
			a1r, a1i := real(u)+real(v), imag(u)+imag(v)
			b1r, b1i := real(u)-real(v), imag(u)-imag(v)
			u, v = x2[q], x3[q]
			a2r, a2i := real(u)+real(v), imag(u)+imag(v)
			b2r, b2i := real(u)-real(v), imag(u)-imag(v)
			vr, vi := x0r+a1r+a2r, x0i+a1i+a2i
			y0[q] = complex(vr, vi)
			r1r, r1i := x0r+cos72*a1r+cos144*a2r, x0i+cos72*a1i+cos144*a2i
			i1r, i1i := sin72*b1i+sin144*b2i, -(sin72*b1r + sin144*b2r)
			vr, vi = r1r+i1r, r1i+i1i
			y1[q] = complex(vr, vi)
			vr, vi = r1r-i1r, r1i-i1i
			y4[q] = complex(vr, vi)
			r2r, r2i := x0r+cos144*a1r+cos72*a2r, x0i+cos144*a1i+cos72*a2i
			i2r, i2i := sin144*b1i-sin72*b2i, sin72*b2r-sin144*b1r
			vr, vi = r2r+i2r, r2i+i2i
			y2[q] = complex(vr, vi)
			vr, vi = r2r-i2r, r2i-i2i
			y3[q] = complex(vr, vi)
		}
	}
}

// r8 is the radix-8 pass: two 4-point DFTs, of the sums x_k + x_(k+4) (even
// outputs) and of the differences x_k - x_(k+4) rotated by exp(-iπk/4)
// (odd outputs). The inputs are read again for the second half, which is
// cheaper than keeping all sixteen values in registers.
func r8(y, x []complex128, tw []float64, g *geom) {
	s := g.s
	for p := 1; p < g.m; p++ { // group 0 has unit twiddles: see r8notw
		w := [14]float64(tw[14*p : 14*p+14])
		xb, yb := p*g.xstep, p*g.ystep
		x0 := x[xb+g.xo[0] : xb+g.xo[0]+s]
		x1 := x[xb+g.xo[1] : xb+g.xo[1]+s][:len(x0)]
		x2 := x[xb+g.xo[2] : xb+g.xo[2]+s][:len(x0)]
		x3 := x[xb+g.xo[3] : xb+g.xo[3]+s][:len(x0)]
		x4 := x[xb+g.xo[4] : xb+g.xo[4]+s][:len(x0)]
		x5 := x[xb+g.xo[5] : xb+g.xo[5]+s][:len(x0)]
		x6 := x[xb+g.xo[6] : xb+g.xo[6]+s][:len(x0)]
		x7 := x[xb+g.xo[7] : xb+g.xo[7]+s][:len(x0)]
		y0 := y[yb+g.yo[0] : yb+g.yo[0]+s][:len(x0)]
		y1 := y[yb+g.yo[1] : yb+g.yo[1]+s][:len(x0)]
		y2 := y[yb+g.yo[2] : yb+g.yo[2]+s][:len(x0)]
		y3 := y[yb+g.yo[3] : yb+g.yo[3]+s][:len(x0)]
		y4 := y[yb+g.yo[4] : yb+g.yo[4]+s][:len(x0)]
		y5 := y[yb+g.yo[5] : yb+g.yo[5]+s][:len(x0)]
		y6 := y[yb+g.yo[6] : yb+g.yo[6]+s][:len(x0)]
		y7 := y[yb+g.yo[7] : yb+g.yo[7]+s][:len(x0)]
		for q := range x0 {
			u, v := x0[q], x4[q]
			a0r, a0i := real(u)+real(v), imag(u)+imag(v)
			u, v = x2[q], x6[q]
			a2r, a2i := real(u)+real(v), imag(u)+imag(v)
			b0r, b0i := a0r+a2r, a0i+a2i
			b2r, b2i := a0r-a2r, a0i-a2i
			u, v = x1[q], x5[q]
			a1r, a1i := real(u)+real(v), imag(u)+imag(v)
			u, v = x3[q], x7[q]
			a3r, a3i := real(u)+real(v), imag(u)+imag(v)
			b1r, b1i := a1r+a3r, a1i+a3i
			b3r, b3i := a1i-a3i, a3r-a1r
			vr, vi := b0r+b1r, b0i+b1i
			y0[q] = complex(vr, vi)
			vr, vi = b0r-b1r, b0i-b1i
			y4[q] = complex(vr*w[6]-vi*w[7], vr*w[7]+vi*w[6])
			vr, vi = b2r+b3r, b2i+b3i
			y2[q] = complex(vr*w[2]-vi*w[3], vr*w[3]+vi*w[2])
			vr, vi = b2r-b3r, b2i-b3i
			y6[q] = complex(vr*w[10]-vi*w[11], vr*w[11]+vi*w[10])
			u, v = x1[q], x5[q]
			a5r, a5i := real(u)-real(v), imag(u)-imag(v)
			u, v = x3[q], x7[q]
			a7r, a7i := real(u)-real(v), imag(u)-imag(v)
			er, ei := a5r-a7r, a5i-a7i
			fr, fi := a5r+a7r, a5i+a7i
			d1r, d1i := (er+fi)*sqrtH, (ei-fr)*sqrtH
			d3r, d3i := (fi-er)*sqrtH, -(ei+fr)*sqrtH
			u, v = x0[q], x4[q]
			a4r, a4i := real(u)-real(v), imag(u)-imag(v)
			u, v = x2[q], x6[q]
			a6r, a6i := real(u)-real(v), imag(u)-imag(v)
			d0r, d0i := a4r+a6i, a4i-a6r
			d2r, d2i := a4r-a6i, a4i+a6r
			vr, vi = d0r+d1r, d0i+d1i
			y1[q] = complex(vr*w[0]-vi*w[1], vr*w[1]+vi*w[0])
			vr, vi = d0r-d1r, d0i-d1i
			y5[q] = complex(vr*w[8]-vi*w[9], vr*w[9]+vi*w[8])
			vr, vi = d2r+d3r, d2i+d3i
			y3[q] = complex(vr*w[4]-vi*w[5], vr*w[5]+vi*w[4])
			vr, vi = d2r-d3r, d2i-d3i
			y7[q] = complex(vr*w[12]-vi*w[13], vr*w[13]+vi*w[12])
		}
	}
}

// r8last is the last radix-8 pass: no twiddles, outputs times scale.
func r8last(y, x []complex128, g *geom, scale float64) {
	s := g.s
	for p := range g.m {
		xb, yb := p*g.xstep, p*g.ystep
		x0 := x[xb+g.xo[0] : xb+g.xo[0]+s]
		x1 := x[xb+g.xo[1] : xb+g.xo[1]+s][:len(x0)]
		x2 := x[xb+g.xo[2] : xb+g.xo[2]+s][:len(x0)]
		x3 := x[xb+g.xo[3] : xb+g.xo[3]+s][:len(x0)]
		x4 := x[xb+g.xo[4] : xb+g.xo[4]+s][:len(x0)]
		x5 := x[xb+g.xo[5] : xb+g.xo[5]+s][:len(x0)]
		x6 := x[xb+g.xo[6] : xb+g.xo[6]+s][:len(x0)]
		x7 := x[xb+g.xo[7] : xb+g.xo[7]+s][:len(x0)]
		y0 := y[yb+g.yo[0] : yb+g.yo[0]+s][:len(x0)]
		y1 := y[yb+g.yo[1] : yb+g.yo[1]+s][:len(x0)]
		y2 := y[yb+g.yo[2] : yb+g.yo[2]+s][:len(x0)]
		y3 := y[yb+g.yo[3] : yb+g.yo[3]+s][:len(x0)]
		y4 := y[yb+g.yo[4] : yb+g.yo[4]+s][:len(x0)]
		y5 := y[yb+g.yo[5] : yb+g.yo[5]+s][:len(x0)]
		y6 := y[yb+g.yo[6] : yb+g.yo[6]+s][:len(x0)]
		y7 := y[yb+g.yo[7] : yb+g.yo[7]+s][:len(x0)]
		for q := range x0 {
			u, v := x0[q], x4[q]
			a0r, a0i := real(u)+real(v), imag(u)+imag(v)
			a4r, a4i := real(u)-real(v), imag(u)-imag(v)
			u, v = x2[q], x6[q]
			a2r, a2i := real(u)+real(v), imag(u)+imag(v)
			a6r, a6i := real(u)-real(v), imag(u)-imag(v)
			u, v = x1[q], x5[q]
			a1r, a1i := real(u)+real(v), imag(u)+imag(v)
			a5r, a5i := real(u)-real(v), imag(u)-imag(v)
			u, v = x3[q], x7[q]
			a3r, a3i := real(u)+real(v), imag(u)+imag(v)
			a7r, a7i := real(u)-real(v), imag(u)-imag(v)
			b0r, b0i := a0r+a2r, a0i+a2i
			b2r, b2i := a0r-a2r, a0i-a2i
			b1r, b1i := a1r+a3r, a1i+a3i
			b3r, b3i := a1i-a3i, a3r-a1r
			vr, vi := b0r+b1r, b0i+b1i
			y0[q] = complex(vr*scale, vi*scale)
			vr, vi = b0r-b1r, b0i-b1i
			y4[q] = complex(vr*scale, vi*scale)
			vr, vi = b2r+b3r, b2i+b3i
			y2[q] = complex(vr*scale, vi*scale)
			vr, vi = b2r-b3r, b2i-b3i
			y6[q] = complex(vr*scale, vi*scale)
			er, ei := a5r-a7r, a5i-a7i
			fr, fi := a5r+a7r, a5i+a7i
			d1r, d1i := (er+fi)*sqrtH, (ei-fr)*sqrtH
			d3r, d3i := (fi-er)*sqrtH, -(ei+fr)*sqrtH
			d0r, d0i := a4r+a6i, a4i-a6r
			d2r, d2i := a4r-a6i, a4i+a6r
			vr, vi = d0r+d1r, d0i+d1i
			y1[q] = complex(vr*scale, vi*scale)
			vr, vi = d0r-d1r, d0i-d1i
			y5[q] = complex(vr*scale, vi*scale)
			vr, vi = d2r+d3r, d2i+d3i
			y3[q] = complex(vr*scale, vi*scale)
			vr, vi = d2r-d3r, d2i-d3i
			y7[q] = complex(vr*scale, vi*scale)
		}
	}
}

// r8notw is a radix-8 pass over the first groups groups without twiddles
// or scaling: group 0 of every pass, and a last pass with scale 1.
func r8notw(y, x []complex128, g *geom, groups int) {
	s := g.s
	for p := range groups {
		xb, yb := p*g.xstep, p*g.ystep
		x0 := x[xb+g.xo[0] : xb+g.xo[0]+s]
		x1 := x[xb+g.xo[1] : xb+g.xo[1]+s][:len(x0)]
		x2 := x[xb+g.xo[2] : xb+g.xo[2]+s][:len(x0)]
		x3 := x[xb+g.xo[3] : xb+g.xo[3]+s][:len(x0)]
		x4 := x[xb+g.xo[4] : xb+g.xo[4]+s][:len(x0)]
		x5 := x[xb+g.xo[5] : xb+g.xo[5]+s][:len(x0)]
		x6 := x[xb+g.xo[6] : xb+g.xo[6]+s][:len(x0)]
		x7 := x[xb+g.xo[7] : xb+g.xo[7]+s][:len(x0)]
		y0 := y[yb+g.yo[0] : yb+g.yo[0]+s][:len(x0)]
		y1 := y[yb+g.yo[1] : yb+g.yo[1]+s][:len(x0)]
		y2 := y[yb+g.yo[2] : yb+g.yo[2]+s][:len(x0)]
		y3 := y[yb+g.yo[3] : yb+g.yo[3]+s][:len(x0)]
		y4 := y[yb+g.yo[4] : yb+g.yo[4]+s][:len(x0)]
		y5 := y[yb+g.yo[5] : yb+g.yo[5]+s][:len(x0)]
		y6 := y[yb+g.yo[6] : yb+g.yo[6]+s][:len(x0)]
		y7 := y[yb+g.yo[7] : yb+g.yo[7]+s][:len(x0)]
		for q := range x0 {
			u, v := x0[q], x4[q]
			a0r, a0i := real(u)+real(v), imag(u)+imag(v)
			a4r, a4i := real(u)-real(v), imag(u)-imag(v)
			u, v = x2[q], x6[q]
			a2r, a2i := real(u)+real(v), imag(u)+imag(v)
			a6r, a6i := real(u)-real(v), imag(u)-imag(v)
			u, v = x1[q], x5[q]
			a1r, a1i := real(u)+real(v), imag(u)+imag(v)
			a5r, a5i := real(u)-real(v), imag(u)-imag(v)
			u, v = x3[q], x7[q]
			a3r, a3i := real(u)+real(v), imag(u)+imag(v)
			a7r, a7i := real(u)-real(v), imag(u)-imag(v)
			b0r, b0i := a0r+a2r, a0i+a2i
			b2r, b2i := a0r-a2r, a0i-a2i
			b1r, b1i := a1r+a3r, a1i+a3i
			b3r, b3i := a1i-a3i, a3r-a1r
			vr, vi := b0r+b1r, b0i+b1i
			y0[q] = complex(vr, vi)
			vr, vi = b0r-b1r, b0i-b1i
			y4[q] = complex(vr, vi)
			vr, vi = b2r+b3r, b2i+b3i
			y2[q] = complex(vr, vi)
			vr, vi = b2r-b3r, b2i-b3i
			y6[q] = complex(vr, vi)
			er, ei := a5r-a7r, a5i-a7i
			fr, fi := a5r+a7r, a5i+a7i
			d1r, d1i := (er+fi)*sqrtH, (ei-fr)*sqrtH
			d3r, d3i := (fi-er)*sqrtH, -(ei+fr)*sqrtH
			d0r, d0i := a4r+a6i, a4i-a6r
			d2r, d2i := a4r-a6i, a4i+a6r
			vr, vi = d0r+d1r, d0i+d1i
			y1[q] = complex(vr, vi)
			vr, vi = d0r-d1r, d0i-d1i
			y5[q] = complex(vr, vi)
			vr, vi = d2r+d3r, d2i+d3i
			y3[q] = complex(vr, vi)
			vr, vi = d2r-d3r, d2i-d3i
			y7[q] = complex(vr, vi)
		}
	}
}

// r8s1 is r8 for s = 1, the first pass of a single sequence (never the
// last, so its output slots are in natural order): every butterfly has its
// own twiddles and writes 8 adjacent outputs.
func r8s1(y, x []complex128, tw []float64, g *geom) {
	m := g.m
	x0 := x[g.xo[0] : g.xo[0]+m]
	x1 := x[g.xo[1] : g.xo[1]+m][:len(x0)]
	x2 := x[g.xo[2] : g.xo[2]+m][:len(x0)]
	x3 := x[g.xo[3] : g.xo[3]+m][:len(x0)]
	x4 := x[g.xo[4] : g.xo[4]+m][:len(x0)]
	x5 := x[g.xo[5] : g.xo[5]+m][:len(x0)]
	x6 := x[g.xo[6] : g.xo[6]+m][:len(x0)]
	x7 := x[g.xo[7] : g.xo[7]+m][:len(x0)]
	for p := 1; p < len(x0); p++ { // group 0: r8notw
		w := tw[14*p : 14*p+14 : 14*p+14]
		o := y[8*p : 8*p+8 : 8*p+8]
		u, v := x0[p], x4[p]
		a0r, a0i := real(u)+real(v), imag(u)+imag(v)
		u, v = x2[p], x6[p]
		a2r, a2i := real(u)+real(v), imag(u)+imag(v)
		b0r, b0i := a0r+a2r, a0i+a2i
		b2r, b2i := a0r-a2r, a0i-a2i
		u, v = x1[p], x5[p]
		a1r, a1i := real(u)+real(v), imag(u)+imag(v)
		u, v = x3[p], x7[p]
		a3r, a3i := real(u)+real(v), imag(u)+imag(v)
		b1r, b1i := a1r+a3r, a1i+a3i
		b3r, b3i := a1i-a3i, a3r-a1r
		vr, vi := b0r+b1r, b0i+b1i
		o[0] = complex(vr, vi)
		vr, vi = b0r-b1r, b0i-b1i
		o[4] = complex(vr*w[6]-vi*w[7], vr*w[7]+vi*w[6])
		vr, vi = b2r+b3r, b2i+b3i
		o[2] = complex(vr*w[2]-vi*w[3], vr*w[3]+vi*w[2])
		vr, vi = b2r-b3r, b2i-b3i
		o[6] = complex(vr*w[10]-vi*w[11], vr*w[11]+vi*w[10])
		u, v = x1[p], x5[p]
		a5r, a5i := real(u)-real(v), imag(u)-imag(v)
		u, v = x3[p], x7[p]
		a7r, a7i := real(u)-real(v), imag(u)-imag(v)
		er, ei := a5r-a7r, a5i-a7i
		fr, fi := a5r+a7r, a5i+a7i
		d1r, d1i := (er+fi)*sqrtH, (ei-fr)*sqrtH
		d3r, d3i := (fi-er)*sqrtH, -(ei+fr)*sqrtH
		u, v = x0[p], x4[p]
		a4r, a4i := real(u)-real(v), imag(u)-imag(v)
		u, v = x2[p], x6[p]
		a6r, a6i := real(u)-real(v), imag(u)-imag(v)
		d0r, d0i := a4r+a6i, a4i-a6r
		d2r, d2i := a4r-a6i, a4i+a6r
		vr, vi = d0r+d1r, d0i+d1i
		o[1] = complex(vr*w[0]-vi*w[1], vr*w[1]+vi*w[0])
		vr, vi = d0r-d1r, d0i-d1i
		o[5] = complex(vr*w[8]-vi*w[9], vr*w[9]+vi*w[8])
		vr, vi = d2r+d3r, d2i+d3i
		o[3] = complex(vr*w[4]-vi*w[5], vr*w[5]+vi*w[4])
		vr, vi = d2r-d3r, d2i-d3i
		o[7] = complex(vr*w[12]-vi*w[13], vr*w[13]+vi*w[12])
	}
}

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
