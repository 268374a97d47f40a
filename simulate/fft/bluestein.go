package fft

import "fmt"

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
	if m > maxLen {
		return nil, fmt.Errorf("fft: length %d needs a chirp-z transform of length %d, above the supported maximum %d", n, m, maxLen)
	}
	inner, err := newTables(m, false)
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
	inner.exec(b.filt, h, tmp, h, contiguous(1), false, false, sc, &wk)
	inner.exec(b.filtInv, hInv, tmp, hInv, contiguous(1), false, false, sc, &wk)
	return b, nil
}

func conj(v complex128) complex128 { return complex(real(v), -imag(v)) }

// exec transforms the s0 sequences of in, laid out as l says (see
// tables.exec), into out, multiplying by scale. out may be in. wk.blue has
// length 3·m, wk.gen serves the inner transform.
func (b *bluestein) exec(out, in []complex128, l layout, inv bool, scale float64, wk *work) {
	n, m := b.n, b.m
	u := wk.blue[:m]
	v := wk.blue[m : 2*m]
	w := wk.blue[2*m : 3*m]
	filt := b.filt
	if inv {
		filt = b.filtInv
	}
	inner := work{gen: wk.gen}
	sc := complex(scale, 0)
	for c := range l.s0 {
		// forward: u[j] = x[j]·conj(b[j]); inverse: x[j]·b[j].
		for j, bj := range b.chirp {
			if !inv {
				bj = conj(bj)
			}
			u[j] = in[j*l.ldIn+c] * bj
		}
		clear(u[n:])
		b.inner.exec(v, u, w, u, contiguous(1), false, false, 1, &inner)
		for k := range v {
			v[k] *= filt[k]
		}
		b.inner.exec(u, v, w, v, contiguous(1), true, false, 1, &inner)
		for k, bk := range b.chirp {
			if !inv {
				bk = conj(bk)
			}
			out[k*l.ldOut+c] = u[k] * bk * sc
		}
	}
}
