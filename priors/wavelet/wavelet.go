// Package wavelet owns the orthonormal discrete wavelet transforms used as
// sparsifying transforms by the priors: the Daubechies filter banks (Haar =
// db1 up to db10) and a multi-level 2D periodic ("periodization") transform of
// row-major ny×nx complex images whose coefficients are stored in place in the
// Mallat layout.
//
// Method: Mallat SG, "A theory for multiresolution signal decomposition: the
// wavelet representation", IEEE Trans Pattern Anal Mach Intell
// 1989;11:674-693 (the pyramid algorithm and the layout); Daubechies I, Ten
// Lectures on Wavelets, SIAM 1992, §6.1 and Table 6.1 (the filters);
// Daubechies I, Sweldens W, "Factoring wavelet transforms into lifting
// steps", J Fourier Anal Appl 1998;4:247-269, volume and pages from memory
// (the lifting form that db1 … db6 are computed in, lifting.go; db7 … db10
// use the filters directly).
//
// Shrink fuses the transform, the complex soft threshold of the detail
// coefficients and the inverse: the proximal map of the wavelet-sparsity
// prior, the hot path of FISTA and ADMM.
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
// concurrent use: make one per goroutine with Clone. Forward, Inverse and
// Shrink allocate nothing.
//
// For db1 … db6 the plan computes in lifting form (lifting.go, lift2d.go;
// db4 with a kernel that runs all its lifting steps in one sweep,
// pipelined.go), which needs its scratch arrays padded by one cache line per
// row (about 2·ny·nx complex values); the first plan of each of these
// orders in a process searches for its factorisation, once (≈ 10 ms for
// db4, 0.1 s for db6). db7 … db10 use the filters directly. On amd64 CPUs
// with AVX2 and FMA the db4 passes run on two or four rows at once, and the
// soft threshold and subband scaling four values at once, in assembly
// (simd.go); elsewhere the same passes run in pure Go.
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
	// Taps in the order the kernels read them (see analyse and
	// synthesise): anaLo[m] = DecLo[L−1−m], anaHi likewise;
	// synLo[2j], synLo[2j+1] = anaLo[2(P−j)], anaHi[2(P−j)] and
	// synHi[2j], synHi[2j+1] = anaLo[2(P−j)+1], anaHi[2(P−j)+1], P = L/2 − 1.
	anaLo, anaHi, synLo, synHi []float64
	scratch                    []complex128 // ny×nx
	srcs                       [][]float64  // the L source vectors of one output pair

	// Lifting path (lift2d.go), used when lift is not nil: the 1D kernel,
	// the transposed scratch tb (nx rows of stride ts ≥ ny) and the work
	// array ub (ny rows of stride us ≥ nx), the subbands and their scales.
	lift   *lifting
	kern   kernel1D
	tb, ub []complex128
	ts, us int
	bands  []Subband
	scale  []float64
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
	t.anaLo = make([]float64, L)
	t.anaHi = make([]float64, L)
	for m := range L {
		t.anaLo[m] = fb.DecLo[L-1-m]
		t.anaHi[m] = fb.DecHi[L-1-m]
	}
	P := L/2 - 1
	t.synLo = make([]float64, L)
	t.synHi = make([]float64, L)
	for j := range L / 2 {
		t.synLo[2*j], t.synLo[2*j+1] = t.anaLo[2*(P-j)], t.anaHi[2*(P-j)]
		t.synHi[2*j], t.synHi[2*j+1] = t.anaLo[2*(P-j)+1], t.anaHi[2*(P-j)+1]
	}
	t.bands = t.Subbands()
	if lf := liftingFor(fb); lf != nil && liftFits(lf, ny, nx, levels) {
		t.lift = lf
		t.scale = bandScales(lf, t.bands, levels)
		if k := pipelinedFor(lf); k != nil {
			t.kern = k
		} else {
			t.kern = newStepKernel(lf, max(ny, nx))
		}
	}
	t.alloc()
	return t, nil
}

// liftFits reports whether the periodic margins of the lifting steps fit in
// the shortest channel (half the coarsest block side) of the transform.
func liftFits(lf *lifting, ny, nx, levels int) bool {
	n := min(ny, nx) >> levels
	return lf.margin[0] <= n && lf.margin[1] <= n
}

func (t *Transform) alloc() {
	if t.lift == nil {
		t.scratch = make([]complex128, t.ny*t.nx)
		t.srcs = make([][]float64, t.fb.Len())
		return
	}
	t.ts, t.us = t.ny+padComplex, t.nx+padComplex
	t.tb = make([]complex128, t.nx*t.ts)
	t.ub = make([]complex128, t.ny*t.us)
}

// Clone returns an independent plan for the same transform, with its own
// scratch space, for use in another goroutine.
func (t *Transform) Clone() *Transform {
	c := *t
	if t.kern != nil {
		c.kern = t.kern.clone()
	}
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
	if t.lift != nil {
		t.liftAnalyse(floats(src), 2*t.nx)
		t.copyOut(dst)
		return
	}
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
	if t.lift != nil {
		t.copyIn(src)
		t.liftSynthesise()
		t.copyImage(dst)
		return
	}
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

// The four passes share one structure. Every output pair (lo, hi) is a
// combination Σ_i a[i]·s_i, Σ_i b[i]·s_i of L source vectors s_i taken from
// the input at shifts that depend on the pass. In the column passes (here) a
// vector is a whole image row and combine sweeps along it; the row passes
// (rows.go) sweep along one row, reading complex samples at stride 2 or
// writing interleaved outputs. Inner loops run over the outputs, not over
// the taps, so that no loop-carried sum limits the floating-point rate.
//
// Analysis (Mallat 1989): a[k] = Σ_m anaLo[m]·x[(2k + base + m) mod n],
// d[k] likewise with anaHi, base = 1 − L/2 (the offset of the periodization
// mode, checked against PyWavelets).
//
// Synthesis is the adjoint: with n = 2Q + base, the outputs x[n] and x[n+1]
// both read a[Q−P+j] and d[Q−P+j], j = 0 … P, with the even taps and the odd
// taps respectively, which is what synLo and synHi hold.

// analyseColumns filters along y (down each column) the top-left h×w block
// of src into dst: low-pass rows to [0,h/2), high-pass rows to [h/2,h).
// Row r of the block is floats [2·r·nx, 2·(r·nx+w)).
func (t *Transform) analyseColumns(dst, src []float64, h, w int) {
	L := len(t.anaLo)
	stride := 2 * t.nx
	ww := 2 * w
	half := h / 2
	base := 1 - L/2
	srcs := t.srcs
	for k := range half {
		for m := range L {
			r := wrap(2*k+base+m, h)
			srcs[m] = src[r*stride : r*stride+ww]
		}
		combine(dst[k*stride:k*stride+ww], dst[(k+half)*stride:(k+half)*stride+ww], srcs, t.anaLo, t.anaHi)
	}
}

// synthesiseColumns inverts analyseColumns on the top-left h×w block of src
// into dst.
func (t *Transform) synthesiseColumns(dst, src []float64, h, w int) {
	L := len(t.anaLo)
	stride := 2 * t.nx
	ww := 2 * w
	half := h / 2
	base := 1 - L/2
	P := L/2 - 1
	srcs := t.srcs
	for Q := range half {
		for j := range L / 2 {
			q := wrap(Q-P+j, half)
			srcs[2*j] = src[q*stride : q*stride+ww]
			srcs[2*j+1] = src[(q+half)*stride : (q+half)*stride+ww]
		}
		n0 := wrap(2*Q+base, h)
		n1 := n0 + 1
		if n1 == h {
			n1 = 0
		}
		combine(dst[n0*stride:n0*stride+ww], dst[n1*stride:n1*stride+ww], srcs, t.synLo, t.synHi)
	}
}

// combine sets lo = Σ_i a[i]·s[i] and hi = Σ_i b[i]·s[i] for an even number
// of source vectors, four (then two) at a time per sweep.
func combine(lo, hi []float64, s [][]float64, a, b []float64) {
	L := len(a)
	i := 0
	for ; i+3 < L; i += 4 {
		sweep4(lo, hi, s[i], s[i+1], s[i+2], s[i+3], a[i:i+4], b[i:i+4], i == 0)
	}
	for ; i+1 < L; i += 2 {
		sweep2(lo, hi, s[i], s[i+1], a[i], a[i+1], b[i], b[i+1], i == 0)
	}
}

// sweep4 adds (or, when set, writes) Σ_i a[i]·s_i to lo and Σ_i b[i]·s_i to
// hi for the four vectors s0 … s3.
func sweep4(lo, hi, s0, s1, s2, s3, a, b []float64, set bool) {
	hi = hi[:len(lo)]
	s0 = s0[:len(lo)]
	s1 = s1[:len(lo)]
	s2 = s2[:len(lo)]
	s3 = s3[:len(lo)]
	a0, a1, a2, a3 := a[0], a[1], a[2], a[3]
	b0, b1, b2, b3 := b[0], b[1], b[2], b[3]
	if set {
		for c := range lo {
			v0, v1, v2, v3 := s0[c], s1[c], s2[c], s3[c]
			lo[c] = (a0*v0 + a1*v1) + (a2*v2 + a3*v3)
			hi[c] = (b0*v0 + b1*v1) + (b2*v2 + b3*v3)
		}
		return
	}
	for c := range lo {
		v0, v1, v2, v3 := s0[c], s1[c], s2[c], s3[c]
		lo[c] += (a0*v0 + a1*v1) + (a2*v2 + a3*v3)
		hi[c] += (b0*v0 + b1*v1) + (b2*v2 + b3*v3)
	}
}

// sweep2 is sweep4 for two vectors.
func sweep2(lo, hi, s0, s1 []float64, a0, a1, b0, b1 float64, set bool) {
	hi = hi[:len(lo)]
	s0 = s0[:len(lo)]
	s1 = s1[:len(lo)]
	if set {
		for c := range lo {
			v0, v1 := s0[c], s1[c]
			lo[c] = a0*v0 + a1*v1
			hi[c] = b0*v0 + b1*v1
		}
		return
	}
	for c := range lo {
		v0, v1 := s0[c], s1[c]
		lo[c] += a0*v0 + a1*v1
		hi[c] += b0*v0 + b1*v1
	}
}

// wrap reduces a modulo n > 0 by repeated addition or subtraction, which
// is cheaper than a division for the small offsets that occur here (the
// level rule keeps every filter offset within one period).
func wrap(a, n int) int {
	for a < 0 {
		a += n
	}
	for a >= n {
		a -= n
	}
	return a
}
