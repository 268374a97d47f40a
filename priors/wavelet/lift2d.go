package wavelet

// The 2D transform by lifting (see lifting.go for the factorisation).
//
// Every pass is a 1D kernel applied to contiguous complex rows that writes
// its output transposed: the analysis of a row of the block becomes a
// column of the scratch t.tb, and the analysis of a row of t.tb (a column of
// the block) becomes a column of the work array t.ub, which thereby ends in
// the Mallat layout. Rows and columns thus share one kernel, reads are
// always unit-stride, and the strided writes land in arrays whose row
// strides are padded by one cache line, so that a column does not fall into
// one cache set (image sides are often powers of two). The synthesis does the
// same in reverse.
//
// The passes compute the unscaled transform (lifting.go): subband b comes
// out divided by a constant D_b, a product of the α's. Forward multiplies by
// D_b when it copies t.ub to dst, Inverse divides when it copies src in, and
// Shrink never scales at all: soft-thresholding D_b·c at τ equals D_b times
// soft-thresholding c at τ/|D_b|.

// kernel1D is a periodic 1D lifting analysis and synthesis of complex rows.
type kernel1D interface {
	// forward reads the n complex samples of x (2n floats) and writes
	// the unscaled low-pass output k < n/2 at out[k·os], out[k·os+1] and the
	// high-pass output k at out[(n/2+k)·os], out[(n/2+k)·os+1].
	forward(out []float64, os int, x []float64, n int)
	// inverse reads n/2 low-pass and n/2 high-pass values (contiguous
	// complex) and writes sample j at out[j·os], out[j·os+1]. out must not
	// overlap lo or hi.
	inverse(out []float64, os int, lo, hi []float64, n int)
	// forwardRows runs forward on the rows x[r·xs : r·xs+2n], r < rows,
	// writing row r's output at out[2r:] (stride os): the transposed pass.
	forwardRows(out []float64, os int, x []float64, xs, rows, n int)
	// inverseRows runs inverse on the rows src[r·ss : r·ss+2n], r < rows
	// (low-pass half then high-pass half), writing row r's samples at
	// out[2r:] (stride os).
	inverseRows(out []float64, os int, src []float64, ss, rows, n int)
	// clone returns a kernel with scratch of its own.
	clone() kernel1D
}

// padComplex is the row padding of the scratch arrays: one 64-byte line.
const padComplex = 4

// liftAnalyse computes the unscaled multi-level analysis of the ny×nx image
// in (row stride inStride floats) into t.ub.
func (t *Transform) liftAnalyse(in []float64, inStride int) {
	tb, ub := floats(t.tb), floats(t.ub)
	ts, us := 2*t.ts, 2*t.us
	rows, stride := in, inStride
	for l := range t.levels {
		h, w := t.ny>>l, t.nx>>l
		t.kern.forwardRows(tb, ts, rows, stride, h, w)
		t.kern.forwardRows(ub, us, tb, ts, w, h)
		rows, stride = ub, us
	}
}

// liftAnalyseShrink is liftAnalyse followed by shrinkLevel(thr, l) on every
// level l (the soft threshold of the detail bands at thr/|D_b|). Where the
// four-row kernel can run a column pass (pipelined.fusedShrink), it
// soft-thresholds the detail bands that the pass completes as it writes
// them, which saves a pass over t.ub; the other levels, and a pass whose
// kernel reports a value it does not threshold exactly (infinite, NaN or
// subnormal moduli), take the separate pass.
func (t *Transform) liftAnalyseShrink(in []float64, inStride int, thr float64) {
	tb, ub := floats(t.tb), floats(t.ub)
	ts, us := 2*t.ts, 2*t.us
	pk, _ := t.kern.(*pipelined)
	rows, stride := in, inStride
	for l := range t.levels {
		h, w := t.ny>>l, t.nx>>l
		t.kern.forwardRows(tb, ts, rows, stride, h, w)
		rows, stride = ub, us
		if pk != nil && pk.fusedShrink(w, h) {
			// Columns j < w/2: low-pass is the approximation (kept,
			// threshold 0), high-pass DetailY; j ≥ w/2: DetailX, DetailXY.
			thrs := [4]float64{0, thr / t.bandScale(l+1, DetailY), thr / t.bandScale(l+1, DetailX), thr / t.bandScale(l+1, DetailXY)}
			if pk.forwardShrinkRows(ub, us, tb, ts, w, h, &thrs) {
				continue
			}
		}
		t.kern.forwardRows(ub, us, tb, ts, w, h)
		t.shrinkLevel(thr, l+1)
	}
}

// bandScale returns |D_b| of the band of the given level and kind.
func (t *Transform) bandScale(level int, kind BandKind) float64 {
	for i, b := range t.bands {
		if b.Level == level && b.Kind == kind {
			return abs(t.scale[i])
		}
	}
	panic("wavelet: no such band")
}

// liftSynthesise inverts liftAnalyse in place in t.ub.
func (t *Transform) liftSynthesise() {
	tb, ub := floats(t.tb), floats(t.ub)
	ts, us := 2*t.ts, 2*t.us
	for l := t.levels - 1; l >= 0; l-- {
		h, w := t.ny>>l, t.nx>>l
		t.kern.inverseRows(tb, ts, ub, us, h, w)
		t.kern.inverseRows(ub, us, tb, ts, w, h)
	}
}

// bandScales returns D_b for the bands in the order of Subbands.
func bandScales(lf *lifting, bands []Subband, levels int) []float64 {
	a0, a1 := lf.alpha[0], lf.alpha[1]
	out := make([]float64, len(bands))
	for i, b := range bands {
		pre := 1.0
		for range 2 * (b.Level - 1) {
			pre *= a0
		}
		switch b.Kind {
		case Approx:
			out[i] = pre * a0 * a0
		case DetailX, DetailY:
			out[i] = pre * a0 * a1
		case DetailXY:
			out[i] = pre * a1 * a1
		}
	}
	return out
}

// copyOut writes f_b·t.ub into dst, band by band, f = t.scale.
func (t *Transform) copyOut(dst []complex128) {
	for i, b := range t.bands {
		f := t.scale[i]
		for r := b.Row0; r < b.Row0+b.Rows; r++ {
			d := dst[r*t.nx+b.Col0 : r*t.nx+b.Col0+b.Cols]
			s := t.ub[r*t.us+b.Col0 : r*t.us+b.Col0+b.Cols]
			scaleInto(d, s, f)
		}
	}
}

// copyIn writes src/f_b into t.ub, band by band.
func (t *Transform) copyIn(src []complex128) {
	for i, b := range t.bands {
		f := 1 / t.scale[i]
		for r := b.Row0; r < b.Row0+b.Rows; r++ {
			s := src[r*t.nx+b.Col0 : r*t.nx+b.Col0+b.Cols]
			d := t.ub[r*t.us+b.Col0 : r*t.us+b.Col0+b.Cols]
			scaleInto(d, s, f)
		}
	}
}

// copyImage copies the image in t.ub to dst.
func (t *Transform) copyImage(dst []complex128) {
	for r := range t.ny {
		copy(dst[r*t.nx:(r+1)*t.nx], t.ub[r*t.us:r*t.us+t.nx])
	}
}

// scaleInto sets d[i] = f·s[i] for i < len(d), on the SIMD path when it
// is on.
func scaleInto(d, s []complex128, f float64) {
	s = s[:len(d)]
	if useSIMD {
		m := scaleSIMD(d, s, f)
		d, s = d[m:], s[m:]
	}
	for i, v := range s {
		d[i] = complex(f*real(v), f*imag(v))
	}
}

// shrinkLevel soft-thresholds the detail bands of the given level of t.ub
// at thr/|D_b|.
func (t *Transform) shrinkLevel(thr float64, level int) {
	for i, b := range t.bands {
		if b.Kind == Approx || b.Level != level {
			continue
		}
		tb := thr / abs(t.scale[i])
		for r := b.Row0; r < b.Row0+b.Rows; r++ {
			softThreshold(t.ub[r*t.us+b.Col0:r*t.us+b.Col0+b.Cols], tb)
		}
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// stepKernel runs the lifting steps one after the other on a row split into
// its two channels, in buffers with periodic margins. It serves every
// factorisation.
type stepKernel struct {
	lf  *lifting
	neg [][]float64 // −c of each step
	u   [2][]float64
}

func newStepKernel(lf *lifting, maxLen int) *stepKernel {
	k := &stepKernel{lf: lf}
	for _, s := range lf.steps {
		n := make([]float64, len(s.c))
		for i, v := range s.c {
			n[i] = -v
		}
		k.neg = append(k.neg, n)
	}
	size := 2 * (lf.margin[0] + maxLen/2 + lf.margin[1])
	k.u = [2][]float64{make([]float64, size), make([]float64, size)}
	return k
}

func (k *stepKernel) clone() kernel1D {
	c := *k
	c.u = [2][]float64{make([]float64, len(k.u[0])), make([]float64, len(k.u[1]))}
	return &c
}

func (k *stepKernel) forwardRows(out []float64, os int, x []float64, xs, rows, n int) {
	for r := range rows {
		k.forward(out[2*r:], os, x[r*xs:r*xs+2*n], n)
	}
}

func (k *stepKernel) inverseRows(out []float64, os int, src []float64, ss, rows, n int) {
	for r := range rows {
		row := src[r*ss : r*ss+2*n]
		k.inverse(out[2*r:], os, row[:n], row[n:], n)
	}
}

func (k *stepKernel) channels(n2 int) (u [2][]float64, in [2][]float64) {
	m0, m1 := k.lf.margin[0], k.lf.margin[1]
	for c := range 2 {
		u[c] = k.u[c][:2*(m0+n2+m1)]
		in[c] = u[c][2*m0 : 2*(m0+n2)]
	}
	return u, in
}

func (k *stepKernel) forward(out []float64, os int, x []float64, n int) {
	lf := k.lf
	n2 := n / 2
	u, in := k.channels(n2)
	gather(in[0], x, 2*lf.a[0]+lf.p, n)
	gather(in[1], x, 2*lf.a[1]+1-lf.p, n)
	for i := range lf.steps {
		st := &lf.steps[i]
		rowStep(in[st.target], in[st.target], u[1-st.target], st.c, st.off, n2, lf.margin[0], lf.margin[1])
	}
	for c := range 2 {
		v := in[c]
		base := c * n2 * os
		for j := range n2 {
			o := out[base+j*os : base+j*os+2 : base+j*os+2]
			o[0], o[1] = v[2*j], v[2*j+1]
		}
	}
}

func (k *stepKernel) inverse(out []float64, os int, lo, hi []float64, n int) {
	lf := k.lf
	n2 := n / 2
	u, in := k.channels(n2)
	copy(in[0], lo[:2*n2])
	copy(in[1], hi[:2*n2])
	for i := len(lf.steps) - 1; i >= 0; i-- {
		st := &lf.steps[i]
		rowStep(in[st.target], in[st.target], u[1-st.target], k.neg[i], st.off, n2, lf.margin[0], lf.margin[1])
	}
	scatter(out, os, in[0], 2*lf.a[0]+lf.p, n)
	scatter(out, os, in[1], 2*lf.a[1]+1-lf.p, n)
}

// rowStep sets dst = tgt + Σ_j c[j]·o[k+off+j] for the n complex values of
// the channel buffer o (interior at complex offset m0, margins of m0 and m1
// complex values, filled here by periodic extension). dst and tgt may be
// the same slice.
func rowStep(dst, tgt, o []float64, c []float64, off, n, m0, m1 int) {
	for i := 1; i <= m0; i++ {
		o[2*(m0-i)], o[2*(m0-i)+1] = o[2*(m0+n-i)], o[2*(m0+n-i)+1]
	}
	for i := range m1 {
		o[2*(m0+n+i)], o[2*(m0+n+i)+1] = o[2*(m0+i)], o[2*(m0+i)+1]
	}
	a := o[2*(m0+off):]
	switch len(c) {
	case 1:
		axpy1(dst, tgt, a, c[0])
	case 2:
		axpy2(dst, tgt, a, o[2*(m0+off+1):], c[0], c[1])
	default:
		axpy1(dst, tgt, a, c[0])
		for j := 1; j < len(c); j++ {
			axpy1(dst, dst, o[2*(m0+off+j):], c[j])
		}
	}
}

// gather sets dst[k] = x[(j0 + 2k) mod n], k < len(dst)/2, for the complex
// row x of n samples (interleaved floats).
func gather(dst, x []float64, j0, n int) {
	j := wrap(j0, n)
	for k := range len(dst) / 2 {
		e := x[2*j : 2*j+2 : 2*j+2]
		o := dst[2*k : 2*k+2 : 2*k+2]
		o[0], o[1] = e[0], e[1]
		if j += 2; j >= n {
			j -= n
		}
	}
}

// scatter sets sample (j0 + 2k) mod n of the strided output to src[k].
func scatter(out []float64, os int, src []float64, j0, n int) {
	j := wrap(j0, n)
	for k := range len(src) / 2 {
		o := out[j*os : j*os+2 : j*os+2]
		s := src[2*k : 2*k+2 : 2*k+2]
		o[0], o[1] = s[0], s[1]
		if j += 2; j >= n {
			j -= n
		}
	}
}

// axpy1 sets d[i] = t[i] + c·a[i] for i < len(d); d and t may be the same.
func axpy1(d, t, a []float64, c float64) {
	n := len(d)
	t = t[:n]
	a = a[:n]
	for i := range d {
		d[i] = t[i] + c*a[i]
	}
}

// axpy2 sets d[i] = t[i] + (c0·a[i] + c1·b[i]) for i < len(d); d and t may
// be the same.
func axpy2(d, t, a, b []float64, c0, c1 float64) {
	n := len(d)
	t = t[:n]
	a = a[:n]
	b = b[:n]
	for i := range d {
		d[i] = t[i] + (c0*a[i] + c1*b[i])
	}
}
