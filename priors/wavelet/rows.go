package wavelet

// Row passes without a periodic copy of the row: the bulk of the outputs
// reads the row in place (complex samples at stride 2 for the analysis,
// interleaved outputs for the synthesis) and only the few outputs whose
// taps wrap around the ends take the modular path.

// analyseRows filters along x each of the first h rows (first w columns) of
// src into dst: low-pass to columns [0,w/2), high-pass to [w/2,w).
func (t *Transform) analyseRows(dst, src []float64, h, w int) {
	L := len(t.anaLo)
	stride := 2 * t.nx
	half := w / 2
	base := 1 - L/2
	kLo := (1 - base) / 2          // first k with 2k + base ≥ 0
	kHi := (w - L - base) / 2      // last k with 2k + base + L − 1 ≤ w − 1
	if w-L-base < 0 || kHi < kLo { // no wrap-free output (tiny rows)
		kLo, kHi = 0, -1
	}
	for r := range h {
		row := src[r*stride : r*stride+2*w]
		out := dst[r*stride : r*stride+2*w]
		lo, hi := out[:w], out[w:2*w]
		if kHi >= kLo {
			loD, hiD := lo[2*kLo:2*(kHi+1)], hi[2*kLo:2*(kHi+1)]
			m := 0
			for ; m+3 < L; m += 4 {
				stridedSweep4(loD, hiD, row[2*(2*kLo+base+m):], t.anaLo[m:m+4], t.anaHi[m:m+4], m == 0)
			}
			for ; m+1 < L; m += 2 {
				stridedSweep2(loD, hiD, row[2*(2*kLo+base+m):], t.anaLo[m:m+2], t.anaHi[m:m+2], m == 0)
			}
		}
		for k := 0; k < half; k++ {
			if k == kLo && kHi >= kLo {
				k = kHi // the loop moves on to kHi + 1
				continue
			}
			var lr, li, hr, hm float64
			for m := range L {
				j := 2 * wrap(2*k+base+m, w)
				a, b := t.anaLo[m], t.anaHi[m]
				lr += a * row[j]
				li += a * row[j+1]
				hr += b * row[j]
				hm += b * row[j+1]
			}
			lo[2*k], lo[2*k+1] = lr, li
			hi[2*k], hi[2*k+1] = hr, hm
		}
	}
}

// stridedSweep4 adds (or, when set, writes) to the complex outputs lo[k],
// hi[k] the sums Σ_{i<4} a[i]·x[2k+i] and Σ_i b[i]·x[2k+i], where x is the
// complex sequence stored in s.
func stridedSweep4(lo, hi, s, a, b []float64, set bool) {
	n := len(lo) / 2
	hi = hi[:2*n]
	s = s[:4*n+4]
	a0, a1, a2, a3 := a[0], a[1], a[2], a[3]
	b0, b1, b2, b3 := b[0], b[1], b[2], b[3]
	for k := range n {
		i := 4 * k
		e := s[i : i+8 : i+8]
		r0, r1, r2, r3 := e[0], e[2], e[4], e[6]
		lr := (a0*r0 + a1*r1) + (a2*r2 + a3*r3)
		hr := (b0*r0 + b1*r1) + (b2*r2 + b3*r3)
		i0, i1, i2, i3 := e[1], e[3], e[5], e[7]
		li := (a0*i0 + a1*i1) + (a2*i2 + a3*i3)
		hm := (b0*i0 + b1*i1) + (b2*i2 + b3*i3)
		o := lo[2*k : 2*k+2 : 2*k+2]
		p := hi[2*k : 2*k+2 : 2*k+2]
		if set {
			o[0], o[1], p[0], p[1] = lr, li, hr, hm
		} else {
			o[0] += lr
			o[1] += li
			p[0] += hr
			p[1] += hm
		}
	}
}

// stridedSweep2 is stridedSweep4 for two taps.
func stridedSweep2(lo, hi, s, a, b []float64, set bool) {
	n := len(lo) / 2
	hi = hi[:2*n]
	s = s[:4*n]
	a0, a1 := a[0], a[1]
	b0, b1 := b[0], b[1]
	for k := range n {
		i := 4 * k
		e := s[i : i+4 : i+4]
		r0, i0, r1, i1 := e[0], e[1], e[2], e[3]
		o := lo[2*k : 2*k+2 : 2*k+2]
		p := hi[2*k : 2*k+2 : 2*k+2]
		if set {
			o[0], o[1] = a0*r0+a1*r1, a0*i0+a1*i1
			p[0], p[1] = b0*r0+b1*r1, b0*i0+b1*i1
		} else {
			o[0] += a0*r0 + a1*r1
			o[1] += a0*i0 + a1*i1
			p[0] += b0*r0 + b1*r1
			p[1] += b0*i0 + b1*i1
		}
	}
}

// synthesiseRows inverts analyseRows on the first h rows of src into dst.
// For Q ≥ P the outputs x[2Q+base], x[2Q+base+1] are consecutive and
// read a[Q−P+j], d[Q−P+j] without wrapping.
func (t *Transform) synthesiseRows(dst, src []float64, h, w int) {
	L := len(t.anaLo)
	stride := 2 * t.nx
	half := w / 2
	base := 1 - L/2
	P := L/2 - 1
	nQ := half - P // outputs pairs Q = P … half−1
	for r := range h {
		row := src[r*stride : r*stride+2*w]
		a, d := row[:w], row[w:2*w]
		out := dst[r*stride : r*stride+2*w]
		if nQ > 0 {
			o := out[2*(2*P+base) : 2*(2*P+base)+4*nQ]
			j := 0
			for ; j+1 < L/2; j += 2 {
				interleavedSweep4(o, a[2*j:], d[2*j:], a[2*j+2:], d[2*j+2:], t.synLo[2*j:2*j+4], t.synHi[2*j:2*j+4], j == 0)
			}
			for ; j < L/2; j++ {
				interleavedSweep2(o, a[2*j:], d[2*j:], t.synLo[2*j:2*j+2], t.synHi[2*j:2*j+2], j == 0)
			}
		}
		for Q := range min(P, half) {
			var er, ei, or, oi float64
			for j := range L / 2 {
				q := 2 * wrap(Q-P+j, half)
				ar, ai, dr, di := a[q], a[q+1], d[q], d[q+1]
				p0, p1 := t.synLo[2*j], t.synLo[2*j+1]
				q0, q1 := t.synHi[2*j], t.synHi[2*j+1]
				er += p0*ar + p1*dr
				ei += p0*ai + p1*di
				or += q0*ar + q1*dr
				oi += q0*ai + q1*di
			}
			n0 := 2 * wrap(2*Q+base, w)
			n1 := 2 * wrap(2*Q+base+1, w)
			out[n0], out[n0+1] = er, ei
			out[n1], out[n1+1] = or, oi
		}
	}
}

// interleavedSweep4 adds (or, when set, writes) to out[4q … 4q+3] the
// complex values Σ_i a[i]·s_i[q] and Σ_i b[i]·s_i[q], for the four complex
// sequences s0 … s3.
func interleavedSweep4(out, s0, s1, s2, s3, a, b []float64, set bool) {
	n := len(out) / 4
	s0 = s0[:2*n]
	s1 = s1[:2*n]
	s2 = s2[:2*n]
	s3 = s3[:2*n]
	a0, a1, a2, a3 := a[0], a[1], a[2], a[3]
	b0, b1, b2, b3 := b[0], b[1], b[2], b[3]
	for q := range n {
		i := 2 * q
		r0, r1, r2, r3 := s0[i], s1[i], s2[i], s3[i]
		xr := (a0*r0 + a1*r1) + (a2*r2 + a3*r3)
		yr := (b0*r0 + b1*r1) + (b2*r2 + b3*r3)
		i0, i1, i2, i3 := s0[i+1], s1[i+1], s2[i+1], s3[i+1]
		xi := (a0*i0 + a1*i1) + (a2*i2 + a3*i3)
		yi := (b0*i0 + b1*i1) + (b2*i2 + b3*i3)
		o := out[4*q : 4*q+4 : 4*q+4]
		if set {
			o[0], o[1], o[2], o[3] = xr, xi, yr, yi
		} else {
			o[0] += xr
			o[1] += xi
			o[2] += yr
			o[3] += yi
		}
	}
}

// interleavedSweep2 is interleavedSweep4 for two sequences.
func interleavedSweep2(out, s0, s1, a, b []float64, set bool) {
	n := len(out) / 4
	s0 = s0[:2*n]
	s1 = s1[:2*n]
	a0, a1 := a[0], a[1]
	b0, b1 := b[0], b[1]
	for q := range n {
		i := 2 * q
		r0, i0, r1, i1 := s0[i], s0[i+1], s1[i], s1[i+1]
		o := out[4*q : 4*q+4 : 4*q+4]
		if set {
			o[0], o[1], o[2], o[3] = a0*r0+a1*r1, a0*i0+a1*i1, b0*r0+b1*r1, b0*i0+b1*i1
		} else {
			o[0] += a0*r0 + a1*r1
			o[1] += a0*i0 + a1*i1
			o[2] += b0*r0 + b1*r1
			o[3] += b0*i0 + b1*i1
		}
	}
}
