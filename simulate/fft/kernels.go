package fft

// Butterflies of the self-sorting decimation-in-frequency passes.
//
// A pass of radix r over data x of length r·m·s reads, for each p < m and
// q < s, the r inputs x[q + s·(p + k·m)], k < r, forms their length-r DFT v_i
// and writes y[q + s·(r·p + i)] = v_i · w^(i·p), w = exp(-2πi/(r·m)). The
// inverse pass uses the conjugate roots: since its butterfly output i equals
// the forward output (r-i) mod r, the same code writes v_i to position
// (r-i) mod r, and the inverse twiddle table is stored in that output order.
// The last pass has m = 1, needs no twiddles and applies the overall scale.

const (
	sin60  = 0.86602540378443864676372317075293618 // sin(π/3)
	cos72  = 0.30901699437494742410229341718281906 // cos(2π/5)
	cos144 = -0.80901699437494742410229341718281906
	sin72  = 0.95105651629515357211643933337938214 // sin(2π/5)
	sin144 = 0.58778525229247312916870595463907277 // sin(4π/5)
)

// mulNegI returns -i·v.
func mulNegI(v complex128) complex128 { return complex(imag(v), -real(v)) }

// ---- radix 2 ----

func r2(y, x, tw []complex128, m, s int) {
	ms := m * s
	x0, x1 := x[:ms], x[ms:2*ms]
	tw = tw[:m]
	for p, w := range tw {
		ps := p * s
		a := x0[ps : ps+s]
		b := x1[ps : ps+s]
		o := y[2*ps : 2*ps+2*s]
		y0 := o[:s]
		y1 := o[s : 2*s]
		b = b[:len(a)]
		y0 = y0[:len(a)]
		y1 = y1[:len(a)]
		for q, u := range a {
			v := b[q]
			y0[q] = u + v
			y1[q] = (u - v) * w
		}
	}
}

func r2last(y, x []complex128, s int, scale float64) {
	a := x[:s]
	b := x[s : 2*s]
	y0 := y[:s]
	y1 := y[s : 2*s]
	sc := complex(scale, 0)
	for q, u := range a {
		v := b[q]
		y0[q] = (u + v) * sc
		y1[q] = (u - v) * sc
	}
}

// ---- radix 4 ----

// bfly4 is the forward 4-point DFT.
func bfly4(a, b, c, d complex128) (v0, v1, v2, v3 complex128) {
	t0, t1 := a+c, a-c
	t2, t3 := b+d, mulNegI(b-d)
	return t0 + t2, t1 + t3, t0 - t2, t1 - t3
}

func r4(y, x, tw []complex128, m, s int, inv bool) {
	ms := m * s
	x0, x1, x2, x3 := x[:ms], x[ms:2*ms], x[2*ms:3*ms], x[3*ms:4*ms]
	o1, o3 := s, 3*s
	if inv {
		o1, o3 = o3, o1
	}
	for p := range m {
		w := tw[3*p : 3*p+3 : 3*p+3]
		w1, w2, w3 := w[0], w[1], w[2]
		ps := p * s
		a := x0[ps : ps+s]
		b := x1[ps : ps+s]
		c := x2[ps : ps+s]
		d := x3[ps : ps+s]
		base := 4 * ps
		y0 := y[base : base+s]
		y1 := y[base+o1 : base+o1+s]
		y2 := y[base+2*s : base+3*s]
		y3 := y[base+o3 : base+o3+s]
		b, c, d = b[:len(a)], c[:len(a)], d[:len(a)]
		y0, y1, y2, y3 = y0[:len(a)], y1[:len(a)], y2[:len(a)], y3[:len(a)]
		for q := range a {
			v0, v1, v2, v3 := bfly4(a[q], b[q], c[q], d[q])
			y0[q] = v0
			y1[q] = v1 * w1
			y2[q] = v2 * w2
			y3[q] = v3 * w3
		}
	}
}

// r4s1 is r4 for stride 1, where each butterfly has its own twiddles.
func r4s1(y, x, tw []complex128, m int, inv bool) {
	x0, x1, x2, x3 := x[:m], x[m:2*m], x[2*m:3*m], x[3*m:4*m]
	x1, x2, x3 = x1[:len(x0)], x2[:len(x0)], x3[:len(x0)]
	i1, i3 := 1, 3
	if inv {
		i1, i3 = 3, 1
	}
	for p := range x0 {
		v0, v1, v2, v3 := bfly4(x0[p], x1[p], x2[p], x3[p])
		w := tw[3*p : 3*p+3 : 3*p+3]
		o := y[4*p : 4*p+4 : 4*p+4]
		o[0] = v0
		o[i1&3] = v1 * w[0]
		o[2] = v2 * w[1]
		o[i3&3] = v3 * w[2]
	}
}

func r4last(y, x []complex128, s int, inv bool, scale float64) {
	a, b, c, d := x[:s], x[s:2*s], x[2*s:3*s], x[3*s:4*s]
	y0, y1, y2, y3 := y[:s], y[s:2*s], y[2*s:3*s], y[3*s:4*s]
	if inv {
		y1, y3 = y3, y1
	}
	b, c, d = b[:len(a)], c[:len(a)], d[:len(a)]
	y0, y1, y2, y3 = y0[:len(a)], y1[:len(a)], y2[:len(a)], y3[:len(a)]
	sc := complex(scale, 0)
	for q := range a {
		v0, v1, v2, v3 := bfly4(a[q], b[q], c[q], d[q])
		y0[q] = v0 * sc
		y1[q] = v1 * sc
		y2[q] = v2 * sc
		y3[q] = v3 * sc
	}
}

// ---- radix 3 ----

// bfly3 is the forward 3-point DFT.
func bfly3(a, b, c complex128) (v0, v1, v2 complex128) {
	t1 := b + c
	t2 := a - t1*0.5
	t3 := mulNegI(b-c) * sin60
	return a + t1, t2 + t3, t2 - t3
}

func r3(y, x, tw []complex128, m, s int, inv bool) {
	ms := m * s
	x0, x1, x2 := x[:ms], x[ms:2*ms], x[2*ms:3*ms]
	o1, o2 := s, 2*s
	if inv {
		o1, o2 = o2, o1
	}
	for p := range m {
		w := tw[2*p : 2*p+2 : 2*p+2]
		w1, w2 := w[0], w[1]
		ps := p * s
		a := x0[ps : ps+s]
		b := x1[ps : ps+s]
		c := x2[ps : ps+s]
		base := 3 * ps
		y0 := y[base : base+s]
		y1 := y[base+o1 : base+o1+s]
		y2 := y[base+o2 : base+o2+s]
		b, c = b[:len(a)], c[:len(a)]
		y0, y1, y2 = y0[:len(a)], y1[:len(a)], y2[:len(a)]
		for q := range a {
			v0, v1, v2 := bfly3(a[q], b[q], c[q])
			y0[q] = v0
			y1[q] = v1 * w1
			y2[q] = v2 * w2
		}
	}
}

func r3last(y, x []complex128, s int, inv bool, scale float64) {
	a, b, c := x[:s], x[s:2*s], x[2*s:3*s]
	y0, y1, y2 := y[:s], y[s:2*s], y[2*s:3*s]
	if inv {
		y1, y2 = y2, y1
	}
	b, c = b[:len(a)], c[:len(a)]
	y0, y1, y2 = y0[:len(a)], y1[:len(a)], y2[:len(a)]
	sc := complex(scale, 0)
	for q := range a {
		v0, v1, v2 := bfly3(a[q], b[q], c[q])
		y0[q] = v0 * sc
		y1[q] = v1 * sc
		y2[q] = v2 * sc
	}
}

// ---- radix 5 ----

// bfly5 is the forward 5-point DFT.
func bfly5(x0, x1, x2, x3, x4 complex128) (v0, v1, v2, v3, v4 complex128) {
	a1, a2 := x1+x4, x2+x3
	b1, b2 := x1-x4, x2-x3
	r1 := x0 + a1*cos72 + a2*cos144
	r2 := x0 + a1*cos144 + a2*cos72
	i1 := mulNegI(b1*sin72 + b2*sin144)
	i2 := mulNegI(b1*sin144 - b2*sin72)
	return x0 + a1 + a2, r1 + i1, r2 + i2, r2 - i2, r1 - i1
}

func r5(y, x, tw []complex128, m, s int, inv bool) {
	ms := m * s
	x0, x1, x2, x3, x4 := x[:ms], x[ms:2*ms], x[2*ms:3*ms], x[3*ms:4*ms], x[4*ms:5*ms]
	o1, o2, o3, o4 := s, 2*s, 3*s, 4*s
	if inv {
		o1, o2, o3, o4 = o4, o3, o2, o1
	}
	for p := range m {
		w := tw[4*p : 4*p+4 : 4*p+4]
		w1, w2, w3, w4 := w[0], w[1], w[2], w[3]
		ps := p * s
		a := x0[ps : ps+s]
		b := x1[ps : ps+s]
		c := x2[ps : ps+s]
		d := x3[ps : ps+s]
		e := x4[ps : ps+s]
		base := 5 * ps
		y0 := y[base : base+s]
		y1 := y[base+o1 : base+o1+s]
		y2 := y[base+o2 : base+o2+s]
		y3 := y[base+o3 : base+o3+s]
		y4 := y[base+o4 : base+o4+s]
		b, c, d, e = b[:len(a)], c[:len(a)], d[:len(a)], e[:len(a)]
		y0, y1, y2, y3, y4 = y0[:len(a)], y1[:len(a)], y2[:len(a)], y3[:len(a)], y4[:len(a)]
		for q := range a {
			v0, v1, v2, v3, v4 := bfly5(a[q], b[q], c[q], d[q], e[q])
			y0[q] = v0
			y1[q] = v1 * w1
			y2[q] = v2 * w2
			y3[q] = v3 * w3
			y4[q] = v4 * w4
		}
	}
}

func r5last(y, x []complex128, s int, inv bool, scale float64) {
	a, b, c, d, e := x[:s], x[s:2*s], x[2*s:3*s], x[3*s:4*s], x[4*s:5*s]
	y0, y1, y2, y3, y4 := y[:s], y[s:2*s], y[2*s:3*s], y[3*s:4*s], y[4*s:5*s]
	if inv {
		y1, y2, y3, y4 = y4, y3, y2, y1
	}
	b, c, d, e = b[:len(a)], c[:len(a)], d[:len(a)], e[:len(a)]
	y0, y1, y2, y3, y4 = y0[:len(a)], y1[:len(a)], y2[:len(a)], y3[:len(a)], y4[:len(a)]
	sc := complex(scale, 0)
	for q := range a {
		v0, v1, v2, v3, v4 := bfly5(a[q], b[q], c[q], d[q], e[q])
		y0[q] = v0 * sc
		y1[q] = v1 * sc
		y2[q] = v2 * sc
		y3[q] = v3 * sc
		y4[q] = v4 * sc
	}
}

// ---- direct butterfly of odd prime radix ----

// bflyGen writes the forward r-point DFT of in (read through get) into
// out[0..r), using the symmetric-pair form: for 0 < i ≤ h = (r-1)/2,
// out[i] and out[r-i] share the sums x_k + x_(r-k) and x_k - x_(r-k).
// tmp has length ≥ r+1.
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
		re := x0
		var im complex128
		idx := 0
		for k := 1; k <= h; k++ {
			idx += i
			if idx >= r {
				idx -= r
			}
			re += sp[k] * complex(d.cos[idx], 0)
			im += sm[k] * complex(d.sin[idx], 0)
		}
		// forward: out[i] = re - i·im, out[r-i] = re + i·im
		t := mulNegI(im)
		out[i] = re + t
		out[r-i] = re - t
	}
}

func rgen(y, x, tw []complex128, m, s, r int, d *direct, inv bool, tmp []complex128) {
	ms := m * s
	in := tmp[:r]
	out := tmp[r : 2*r]
	work := tmp[2*r:]
	for p := range m {
		w := tw[(r-1)*p : (r-1)*(p+1)]
		for q := range s {
			for k := range r {
				in[k] = x[q+s*p+k*ms]
			}
			bflyGen(out, in, r, d, work)
			base := q + s*r*p
			y[base] = out[0]
			for i := 1; i < r; i++ {
				j := i
				if inv {
					j = r - i
				}
				y[base+s*j] = out[i] * w[i-1]
			}
		}
	}
}

func rgenlast(y, x []complex128, s, r int, d *direct, inv bool, scale float64, tmp []complex128) {
	in := tmp[:r]
	out := tmp[r : 2*r]
	work := tmp[2*r:]
	sc := complex(scale, 0)
	for q := range s {
		for k := range r {
			in[k] = x[q+k*s]
		}
		bflyGen(out, in, r, d, work)
		y[q] = out[0] * sc
		for i := 1; i < r; i++ {
			j := i
			if inv {
				j = r - i
			}
			y[q+s*j] = out[i] * sc
		}
	}
}
