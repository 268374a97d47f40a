package fft

import "fmt"

// CentredColumnFilter filters every column of the ny×nx image src along y in
// the centred frequency domain and writes the result into dst: column j of
// dst is CI(h ⊙ CF(src[:, j])), with CF the centred orthonormal 1D DFT of
// length ny (fftshift ∘ DFT ∘ ifftshift, as in CentredForward), CI its
// inverse and h[k] the real weight of centred frequency row k (ky = k − ny/2).
//
// It equals CentredInverse(H ⊙ CentredForward(src)) for the 2D weight
// H[k, l] = h[k] that is constant along kx, because the orthonormal row
// transforms of the 2D pair then cancel (F_x^H F_x = I): half the work of
// the 2D pair. With h the indicator of acquired phase-encode rows it is the
// normal operator EᴴE of a masked Cartesian encoding whose every acquired
// row is read out in full, the case of most Cartesian undersampling schemes.
//
// dst may be src itself but must not overlap it otherwise; both must have
// length ny·nx and h length ny, or CentredColumnFilter panics, as that is a
// programming error. The first call allocates one column block of scratch
// that the plan keeps; later calls allocate nothing.
func (p *Plan2D) CentredColumnFilter(dst, src []complex128, h []float64) {
	p.check(dst, src)
	ny, nx := p.ny, p.nx
	if len(h) != ny {
		panic(fmt.Sprintf("fft: Plan2D of %d×%d given a column filter of length %d", ny, nx, len(h)))
	}
	if p.blkC == nil {
		p.blkC = make([]complex128, ny*p.block)
	}
	// The two 1D transforms are computed unscaled; 1/ny goes with h.
	inv := 1 / float64(ny)
	half := ny / 2
	for c0 := 0; c0 < nx; c0 += p.block {
		w := min(p.block, nx-c0)
		a := p.blkA[:ny*w]
		b := p.blkB[:ny*w]
		c := p.blkC[:ny*w]
		if p.cols.rotatable {
			// Slot rotation makes the transforms centred at no cost: read
			// the columns straight from src, write them straight to dst.
			p.cols.exec(c, src[c0:], a, b, layout{s0: w, ldIn: nx, ldOut: w}, false, true, 1, &p.colWk)
			weightRows(c, h, w, 0, inv)
			p.cols.exec(dst[c0:], c, a, b, layout{s0: w, ldIn: w, ldOut: nx}, true, true, 1, &p.colWk)
			continue
		}
		// Otherwise shift explicitly while copying (numpy's conventions,
		// which Shift and IShift follow for odd lengths too): block row i
		// holds source row (i + ⌊ny/2⌋) mod ny (ifftshift), uncentred
		// frequency i is centred row (i + ⌊ny/2⌋) mod ny, and block row i
		// goes to row (i + ⌊ny/2⌋) mod ny of dst (fftshift).
		for i := range ny {
			r := (i + half) % ny
			copy(c[i*w:(i+1)*w], src[r*nx+c0:r*nx+c0+w])
		}
		p.cols.exec(c, c, a, b, contiguous(w), false, false, 1, &p.colWk)
		weightRows(c, h, w, half, inv)
		p.cols.exec(c, c, a, b, contiguous(w), true, false, 1, &p.colWk)
		for i := range ny {
			r := (i + half) % ny
			copy(dst[r*nx+c0:r*nx+c0+w], c[i*w:(i+1)*w])
		}
	}
}

// weightRows multiplies row i of the ny×w block c by scale·h[(i + off) mod ny].
func weightRows(c []complex128, h []float64, w, off int, scale float64) {
	ny := len(h)
	for i := range ny {
		row := c[i*w : (i+1)*w]
		k := i + off
		if k >= ny {
			k -= ny
		}
		hk := h[k] * scale
		if hk == 0 {
			clear(row)
			continue
		}
		for q := range row {
			row[q] = complex(real(row[q])*hk, imag(row[q])*hk)
		}
	}
}
