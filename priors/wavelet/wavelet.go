// Package wavelet owns the orthonormal discrete wavelet transforms used as
// sparsifying transforms by the priors: the Daubechies filter banks (Haar =
// db1 up to db10) and a multi-level 2D periodic ("periodization") transform of
// row-major ny×nx complex images whose coefficients are stored in place in the
// Mallat layout.
//
// Method: Mallat SG, "A theory for multiresolution signal decomposition: the
// wavelet representation", IEEE Trans Pattern Anal Mach Intell
// 1989;11:674-693 (the pyramid algorithm and the layout); Daubechies I, Ten
// Lectures on Wavelets, SIAM 1992, §6.1 and Table 6.1 (the filters).
//
// Because the filters are orthonormal and the signal is extended periodically,
// the transform W is an orthogonal matrix: W^H W = I, ‖Wx‖ = ‖x‖, and the
// inverse is the adjoint. The real and imaginary parts are transformed alike.
package wavelet

import (
	"fmt"
	"unsafe"
)

// Transform is a plan for the 2D multi-level periodic DWT of one image size
// and wavelet. It holds its own scratch space, so it is not safe for
// concurrent use: make one per goroutine with Clone. Forward and Inverse
// allocate nothing.
//
// Layout (Mallat 1989): after Forward with L levels, the top-left block of
// (ny>>L)×(nx>>L) coefficients is the coarse approximation. At level l
// (1 = finest) with h = ny>>(l−1), w = nx>>(l−1), the three detail bands are
// rows [0,h/2)×cols [w/2,w) (high-pass along x, columns), rows [h/2,h)×cols
// [0,w/2) (high-pass along y, rows) and rows [h/2,h)×cols [w/2,w) (high-pass
// along both). This is the array that PyWavelets' coeffs_to_array makes of
// wavedec2(..., mode='periodization').
type Transform struct {
	ny, nx, levels int
	fb             FilterBank
	// Reversed analysis taps: rlo[m] = DecLo[L−1−m], the form in which the
	// inner loops read them.
	rlo, rhi []float64
	scratch  []complex128 // ny×nx
	ext      []float64    // one extended row: 2·(max(nx, ny)+L) floats
	ext2     []float64    // second extended row for the synthesis
}

// Subband describes one block of the coefficient array.
type Subband struct {
	// Level is 1 for the finest details and Levels() for the coarsest; the
	// approximation band carries Level = Levels().
	Level int
	// Kind is one of Approx, DetailX, DetailY, DetailXY.
	Kind BandKind
	// Row0, Col0, Rows, Cols locate the block in the ny×nx array.
	Row0, Col0, Rows, Cols int
}

// BandKind names the orientation of a subband.
type BandKind int

const (
	// Approx is the coarse approximation (low-pass along both axes).
	Approx BandKind = iota
	// DetailX is high-pass along x (columns), low-pass along y: it responds
	// to vertical edges.
	DetailX
	// DetailY is high-pass along y (rows), low-pass along x: it responds to
	// horizontal edges.
	DetailY
	// DetailXY is high-pass along both axes.
	DetailXY
)

// String returns a short name of the band kind.
func (k BandKind) String() string {
	switch k {
	case Approx:
		return "approx"
	case DetailX:
		return "detail-x"
	case DetailY:
		return "detail-y"
	case DetailXY:
		return "detail-xy"
	}
	return fmt.Sprintf("BandKind(%d)", int(k))
}

// MaxLevels returns the deepest decomposition New accepts for a signal of n
// samples and a filter of filterLen taps: the largest L with
// n ≥ 2^L·(filterLen−1), the rule PyWavelets' dwt_max_level uses, so that the
// filter never wraps more than once around the coarsest signal. It returns 0
// when not even one level fits.
func MaxLevels(n, filterLen int) int {
	if n <= 0 || filterLen < 2 {
		return 0
	}
	L := 0
	for L < 30 && (filterLen-1)<<(L+1) <= n {
		L++
	}
	return L
}

// New builds a plan for the levels-deep 2D periodic DWT of ny×nx images with
// the named wavelet (see Filters). It returns an error when the name is
// unknown, levels < 1, ny or nx is not divisible by 2^levels, or levels
// exceeds MaxLevels for either side.
func New(ny, nx, levels int, name string) (*Transform, error) {
	fb, err := Filters(name)
	if err != nil {
		return nil, err
	}
	if ny < 1 || nx < 1 {
		return nil, fmt.Errorf("wavelet: image size %d×%d must be positive", ny, nx)
	}
	if levels < 1 {
		return nil, fmt.Errorf("wavelet: levels = %d, want at least 1", levels)
	}
	if levels > 30 || ny%(1<<levels) != 0 || nx%(1<<levels) != 0 {
		return nil, fmt.Errorf("wavelet: image size %d×%d is not divisible by 2^%d", ny, nx, levels)
	}
	L := fb.Len()
	if m := min(MaxLevels(ny, L), MaxLevels(nx, L)); levels > m {
		return nil, fmt.Errorf("wavelet: %d levels too deep for %s (%d taps) on %d×%d: at most %d (each side must be ≥ 2^levels·%d)",
			levels, fb.Name, L, ny, nx, m, L-1)
	}
	t := &Transform{ny: ny, nx: nx, levels: levels, fb: fb}
	t.rlo = make([]float64, L)
	t.rhi = make([]float64, L)
	for m := range L {
		t.rlo[m] = fb.DecLo[L-1-m]
		t.rhi[m] = fb.DecHi[L-1-m]
	}
	t.alloc()
	return t, nil
}

func (t *Transform) alloc() {
	n := max(t.nx, t.ny) + t.fb.Len()
	t.scratch = make([]complex128, t.ny*t.nx)
	t.ext = make([]float64, 2*n)
	t.ext2 = make([]float64, 2*n)
}

// Clone returns an independent plan for the same transform, with its own
// scratch space, for use in another goroutine.
func (t *Transform) Clone() *Transform {
	c := *t
	c.alloc()
	return &c
}

// Ny returns the number of image rows.
func (t *Transform) Ny() int { return t.ny }

// Nx returns the number of image columns.
func (t *Transform) Nx() int { return t.nx }

// Len returns ny·nx, the length of images and coefficient arrays.
func (t *Transform) Len() int { return t.ny * t.nx }

// Levels returns the number of decomposition levels.
func (t *Transform) Levels() int { return t.levels }

// Filters returns the filter bank in use. Its slices must not be modified.
func (t *Transform) Filters() FilterBank { return t.fb }

// ApproxSize returns the rows and columns of the coarse approximation block,
// which occupies the top-left corner of the coefficient array.
func (t *Transform) ApproxSize() (rows, cols int) {
	return t.ny >> t.levels, t.nx >> t.levels
}

// IsApprox reports whether index i of the coefficient array (row-major) lies
// in the coarse approximation block, which sparsity priors leave
// unthresholded.
func (t *Transform) IsApprox(i int) bool {
	r, c := i/t.nx, i%t.nx
	ar, ac := t.ApproxSize()
	return r < ar && c < ac
}

// Subbands lists the blocks of the coefficient array: the approximation first,
// then for each level from coarsest to finest the bands DetailX, DetailY and
// DetailXY.
func (t *Transform) Subbands() []Subband {
	ar, ac := t.ApproxSize()
	out := []Subband{{Level: t.levels, Kind: Approx, Rows: ar, Cols: ac}}
	for l := t.levels; l >= 1; l-- {
		h, w := t.ny>>l, t.nx>>l // half sizes at this level
		out = append(out,
			Subband{Level: l, Kind: DetailX, Row0: 0, Col0: w, Rows: h, Cols: w},
			Subband{Level: l, Kind: DetailY, Row0: h, Col0: 0, Rows: h, Cols: w},
			Subband{Level: l, Kind: DetailXY, Row0: h, Col0: w, Rows: h, Cols: w},
		)
	}
	return out
}

func (t *Transform) check(dst, src []complex128) {
	n := t.ny * t.nx
	if len(dst) != n || len(src) != n {
		panic(fmt.Sprintf("wavelet: buffers of length %d and %d, want %d (%d×%d)", len(dst), len(src), n, t.ny, t.nx))
	}
}

// floats views a complex slice as interleaved real and imaginary parts.
func floats(x []complex128) []float64 {
	if len(x) == 0 {
		return nil
	}
	return unsafe.Slice((*float64)(unsafe.Pointer(&x[0])), 2*len(x))
}

// Forward writes the wavelet coefficients of the image src into dst (Mallat
// layout). dst and src may be the same slice; both must have length Len().
func (t *Transform) Forward(dst, src []complex128) {
	t.check(dst, src)
	if &dst[0] != &src[0] {
		copy(dst, src)
	}
	d := floats(dst)
	s := floats(t.scratch)
	for l := range t.levels {
		h, w := t.ny>>l, t.nx>>l
		t.analyseColumns(s, d, h, w)
		t.analyseRows(d, s, h, w)
	}
}

// Inverse writes the image whose coefficients are src into dst. It is the
// adjoint, and the inverse, of Forward. dst and src may be the same slice.
func (t *Transform) Inverse(dst, src []complex128) {
	t.check(dst, src)
	if &dst[0] != &src[0] {
		copy(dst, src)
	}
	d := floats(dst)
	s := floats(t.scratch)
	for l := t.levels - 1; l >= 0; l-- {
		h, w := t.ny>>l, t.nx>>l
		t.synthesiseRows(s, d, h, w)
		t.synthesiseColumns(d, s, h, w)
	}
}

// analyseColumns filters along y (down each column) the top-left h×w block
// of src into dst: low-pass rows to [0,h/2), high-pass rows to [h/2,h).
// Row r of the block is floats [2·r·nx, 2·(r·nx+w)).
func (t *Transform) analyseColumns(dst, src []float64, h, w int) {
	L := len(t.rlo)
	stride := 2 * t.nx
	ww := 2 * w
	half := h / 2
	// a[k] = Σ_m rlo[m]·x[(2k + 1 − L/2 + m) mod h]
	base := 1 - L/2
	for k := range half {
		lo := dst[k*stride : k*stride+ww]
		hi := dst[(k+half)*stride : (k+half)*stride+ww]
		m := 0
		for ; m+1 < L; m += 2 {
			r0 := mod(2*k+base+m, h)
			r1 := mod(2*k+base+m+1, h)
			s0 := src[r0*stride : r0*stride+ww]
			s1 := src[r1*stride : r1*stride+ww]
			a0, a1 := t.rlo[m], t.rlo[m+1]
			b0, b1 := t.rhi[m], t.rhi[m+1]
			if m == 0 {
				axpy2Set(lo, hi, s0, s1, a0, a1, b0, b1)
			} else {
				axpy2(lo, hi, s0, s1, a0, a1, b0, b1)
			}
		}
	}
}

// axpy2Set sets lo = a0·s0 + a1·s1 and hi = b0·s0 + b1·s1.
func axpy2Set(lo, hi, s0, s1 []float64, a0, a1, b0, b1 float64) {
	hi = hi[:len(lo)]
	s0 = s0[:len(lo)]
	s1 = s1[:len(lo)]
	for c := range lo {
		v0, v1 := s0[c], s1[c]
		lo[c] = a0*v0 + a1*v1
		hi[c] = b0*v0 + b1*v1
	}
}

// axpy2 adds a0·s0 + a1·s1 to lo and b0·s0 + b1·s1 to hi.
func axpy2(lo, hi, s0, s1 []float64, a0, a1, b0, b1 float64) {
	hi = hi[:len(lo)]
	s0 = s0[:len(lo)]
	s1 = s1[:len(lo)]
	for c := range lo {
		v0, v1 := s0[c], s1[c]
		lo[c] += a0*v0 + a1*v1
		hi[c] += b0*v0 + b1*v1
	}
}

// analyseRows filters along x each of the first h rows (first w columns) of
// src into dst: low-pass to columns [0,w/2), high-pass to [w/2,w).
func (t *Transform) analyseRows(dst, src []float64, h, w int) {
	L := len(t.rlo)
	stride := 2 * t.nx
	half := w / 2
	base := 1 - L/2
	ext := t.ext[:2*(w+L)]
	rlo, rhi := t.rlo, t.rhi
	for r := range h {
		row := src[r*stride : r*stride+2*w]
		// ext[i] = x[(base + i) mod w], i = 0 … w+L−2
		for i := 0; i < w+L-1; i++ {
			j := 2 * mod(base+i, w)
			ext[2*i] = row[j]
			ext[2*i+1] = row[j+1]
		}
		out := dst[r*stride : r*stride+2*w]
		for k := range half {
			e := ext[4*k : 4*k+2*L]
			var lr, li, hr, hi float64
			for m := range L {
				er, ei := e[2*m], e[2*m+1]
				a, b := rlo[m], rhi[m]
				lr += a * er
				li += a * ei
				hr += b * er
				hi += b * ei
			}
			out[2*k] = lr
			out[2*k+1] = li
			out[2*(k+half)] = hr
			out[2*(k+half)+1] = hi
		}
	}
}

// synthesiseRows inverts analyseRows on the first h rows of src into dst.
//
// The analysis is a[k] = Σ_m rlo[m]·x[(2k + base + m) mod w]; its adjoint is
// x[n] = Σ_{m ≡ n−base (mod 2)} rlo[m]·a[(n − base − m)/2] + rhi[m]·d[…].
func (t *Transform) synthesiseRows(dst, src []float64, h, w int) {
	L := len(t.rlo)
	stride := 2 * t.nx
	half := w / 2
	base := 1 - L/2
	P := L/2 - 1 // how far the taps reach back in a and d
	ea := t.ext[:2*(half+L)]
	ed := t.ext2[:2*(half+L)]
	rlo, rhi := t.rlo, t.rhi
	for r := range h {
		row := src[r*stride : r*stride+2*w]
		// ea[q+P] = a[q mod half] for q = −P … half+P
		for q := -P; q <= half+P; q++ {
			j := 2 * mod(q, half)
			ea[2*(q+P)] = row[j]
			ea[2*(q+P)+1] = row[j+1]
			ed[2*(q+P)] = row[2*half+j]
			ed[2*(q+P)+1] = row[2*half+j+1]
		}
		out := dst[r*stride : r*stride+2*w]
		for n := range w {
			np := n - base // ≥ 0 since base ≤ 0
			par := np & 1
			Q := np >> 1 // q of the first tap (m = par)
			var xr, xi float64
			for i := 0; i < L/2; i++ {
				m := par + 2*i
				q := Q - i + P // index into ea/ed, ≥ 0
				a, b := rlo[m], rhi[m]
				xr += a*ea[2*q] + b*ed[2*q]
				xi += a*ea[2*q+1] + b*ed[2*q+1]
			}
			out[2*n] = xr
			out[2*n+1] = xi
		}
	}
}

// synthesiseColumns inverts analyseColumns on the top-left h×w block of src
// into dst.
func (t *Transform) synthesiseColumns(dst, src []float64, h, w int) {
	L := len(t.rlo)
	stride := 2 * t.nx
	ww := 2 * w
	half := h / 2
	base := 1 - L/2
	for n := range h {
		np := n - base
		par := np & 1
		Q := np >> 1
		out := dst[n*stride : n*stride+ww]
		for i := 0; i < L/2; i++ {
			m := par + 2*i
			q := mod(Q-i, half)
			sa := src[q*stride : q*stride+ww]
			sd := src[(q+half)*stride : (q+half)*stride+ww]
			a, b := t.rlo[m], t.rhi[m]
			if i == 0 {
				axpy2Set1(out, sa, sd, a, b)
			} else {
				axpy2Add1(out, sa, sd, a, b)
			}
		}
	}
}

// axpy2Set1 sets out = a·sa + b·sd.
func axpy2Set1(out, sa, sd []float64, a, b float64) {
	sa = sa[:len(out)]
	sd = sd[:len(out)]
	for c := range out {
		out[c] = a*sa[c] + b*sd[c]
	}
}

// axpy2Add1 adds a·sa + b·sd to out.
func axpy2Add1(out, sa, sd []float64, a, b float64) {
	sa = sa[:len(out)]
	sd = sd[:len(out)]
	for c := range out {
		out[c] += a*sa[c] + b*sd[c]
	}
}

func mod(a, n int) int {
	a %= n
	if a < 0 {
		a += n
	}
	return a
}
