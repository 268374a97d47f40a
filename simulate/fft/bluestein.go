package fft

// bluestein computes a DFT of any length n as a circular convolution of
// length m (a power of two ≥ 2n-1) with a chirp, using the identity
// 2jk = j² + k² - (k-j)²:
//
//	X[k] = conj(b[k]) Σ_j (x[j]·conj(b[j]))·b[k-j],   b[j] = exp(iπ j²/n).
//
// Source: Bluestein LI, IEEE Trans Audio Electroacoust 1970;18:451-455.
type bluestein struct {
	n, m  int
	chirp []complex128 // b[j] = exp(iπ j²/n), j < n
	// filt and filtInv are the unnormalised length-m DFTs of the chirp
	// filter (b for the forward transform, conj(b) for the inverse), divided by
	// m so that the inner unnormalised inverse transform needs no scaling.
	filt, filtInv []complex128
	inner         *tables // power-of-two transform of length m
}

func newBluestein(n int) (*bluestein, error) {
	m := 1
	for m < 2*n-1 {
		m *= 2
	}
	inner, err := newTables(m)
	if err != nil {
		return nil, err
	}
	b := &bluestein{n: n, m: m, inner: inner}
	b.chirp = make([]complex128, n)
	twoN := 2 * n
	for j := range n {
		// j² mod 2n, computed exactly in integers, keeps the angle small.
		jj := (j % twoN) * (j % twoN) % twoN
		b.chirp[j] = unitRoot(jj, twoN)
	}
	h := make([]complex128, m)
	hInv := make([]complex128, m)
	for j := range n {
		h[j] = b.chirp[j]
		hInv[j] = conj(b.chirp[j])
		if j > 0 {
			h[m-j] = h[j]
			hInv[m-j] = hInv[j]
		}
	}
	wk := inner.newWork()
	tmp := make([]complex128, m)
	b.filt = make([]complex128, m)
	b.filtInv = make([]complex128, m)
	sc := 1 / float64(m)
	copy(b.filt, inner.exec(h, tmp, h, 1, false, sc, &wk))
	copy(b.filtInv, inner.exec(hInv, tmp, hInv, 1, false, sc, &wk))
	return b, nil
}

func conj(v complex128) complex128 { return complex(real(v), -imag(v)) }

// exec transforms the s0 sequences interleaved in in (see tables.exec) into
// out, multiplying by scale. buf has length 2·m.
func (b *bluestein) exec(out, in []complex128, s0 int, inv bool, scale float64, buf []complex128) {
	n, m := b.n, b.m
	u := buf[:m]
	v := buf[m : 2*m]
	filt := b.filt
	if inv {
		filt = b.filtInv
	}
	wk := work{}
	sc := complex(scale, 0)
	for c := range s0 {
		// forward: a[j] = x[j]·conj(b[j]); inverse: x[j]·b[j].
		for j, w := range b.chirp {
			if !inv {
				w = conj(w)
			}
			u[j] = in[j*s0+c] * w
		}
		clear(u[n:])
		r := b.inner.exec(u, v, u, 1, false, 1, &wk)
		for k := range r {
			r[k] *= filt[k]
		}
		other := u
		if &r[0] == &u[0] {
			other = v
		}
		r = b.inner.exec(r, other, r, 1, true, 1, &wk)
		for k, w := range b.chirp {
			if !inv {
				w = conj(w)
			}
			out[k*s0+c] = r[k] * w * sc
		}
	}
}
