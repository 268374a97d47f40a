package nufft

import (
	"fmt"
	"math"

	"accelplan/simulate/fft"
)

// Toeplitz applies the normal operator AᴴWA of a non-Cartesian acquisition
// (A the exact NDFT of the package doc, W a diagonal of real sample weights)
// as one circular convolution on a grid of twice the image size in each
// direction, without touching the samples again:
//
//	(AᴴWA x)[p] = Σ_q T(p − q) x[q],   T(d) = (nx·ny)^(−1) Σ_j w_j exp(2πi(kx_j·d_x/nx + ky_j·d_y/ny)),
//
// a 2D Toeplitz matrix that is embedded in a 2ny×2nx circulant and
// diagonalised by the DFT. Source: Fessler JA et al., IEEE TSP
// 2005;53:3393-3402.
//
// The kernel T is computed once, by a type-1 NUFFT of the weights on the
// doubled grid; the circulant's eigenvalues are kept real (their imaginary
// parts vanish for real weights, and dropping the rounding residue makes
// Apply exactly Hermitian). Apply costs two FFTs of the doubled grid whatever
// the number of samples. A Toeplitz holds scratch space and is not safe for
// concurrent use; use Clone for another goroutine.
type Toeplitz struct {
	ny, nx int
	eig    []float64 // eigenvalues of the circulant, 2ny×2nx, times √(4·nx·ny)
	fft    *fft.Plan2D
	buf    []complex128
}

// NewToeplitz builds the Toeplitz embedding of AᴴWA for an ny×nx image and
// the k-space points (kx[j], ky[j]) in cycles per FOV (inside the band, as
// for New) with real sample weights (for example density compensation); nil
// weights mean all ones, giving AᴴA. opts tune the one-time NUFFT that
// computes the kernel; a zero Width there means MaxWidth, the most accurate
// (relative error about 1e-7 with the default oversampling of 2).
func NewToeplitz(ny, nx int, kx, ky, weights []float64, opts Options) (*Toeplitz, error) {
	if weights != nil && len(weights) != len(kx) {
		return nil, fmt.Errorf("nufft: %d weights for %d samples", len(weights), len(kx))
	}
	for j, w := range weights {
		if math.IsNaN(w) || math.IsInf(w, 0) {
			return nil, fmt.Errorf("nufft: weight %d is %g, want a finite number", j, w)
		}
	}
	if ny < 2 || nx < 2 {
		return nil, fmt.Errorf("nufft: image %d×%d must be at least 2×2", ny, nx)
	}
	if len(kx) != len(ky) {
		return nil, fmt.Errorf("nufft: %d kx coordinates but %d ky coordinates", len(kx), len(ky))
	}
	// The kernel is the adjoint NUFFT of the weights on the 2ny×2nx grid,
	// whose pixel (i', l') sits at ((l'−nx)/(2nx), (i'−ny)/(2ny)): with the
	// points doubled, exp(2πi·2kx·(l'−nx)/(2nx)) = exp(2πi·kx·d_x/nx) for
	// d_x = l' − nx.
	hx, hy := float64(nx)/2, float64(ny)/2
	kx2, ky2 := make([]float64, len(kx)), make([]float64, len(ky))
	for j := range kx {
		if !(math.Abs(kx[j]) <= hx) {
			return nil, fmt.Errorf("nufft: sample %d has kx = %g cycles/FOV, outside the band |kx| ≤ %g of a %d-column image", j, kx[j], hx, nx)
		}
		if !(math.Abs(ky[j]) <= hy) {
			return nil, fmt.Errorf("nufft: sample %d has ky = %g cycles/FOV, outside the band |ky| ≤ %g of a %d-row image", j, ky[j], hy, ny)
		}
		kx2[j], ky2[j] = 2*kx[j], 2*ky[j]
	}
	if opts.Width == 0 {
		opts.Width = MaxWidth
	}
	my, mx := 2*ny, 2*nx
	p, err := New(my, mx, kx2, ky2, opts)
	if err != nil {
		return nil, err
	}
	wc := make([]complex128, len(kx))
	for j := range wc {
		wc[j] = 1
		if weights != nil {
			wc[j] = complex(weights[j], 0)
		}
	}
	z := make([]complex128, my*mx)
	p.Adjoint(z, wc)
	// The adjoint carries (4·nx·ny)^(−1/2); T needs (nx·ny)^(−1).
	s := complex(2/math.Sqrt(float64(nx*ny)), 0)
	c := make([]complex128, my*mx)
	for i := 1; i < my; i++ {
		r := wrapIndex(i-ny, my) * mx
		for l := 1; l < mx; l++ {
			c[r+wrapIndex(l-nx, mx)] = s * z[i*mx+l]
		}
	}
	t := &Toeplitz{ny: ny, nx: nx, eig: make([]float64, my*mx), buf: make([]complex128, my*mx)}
	if t.fft, err = fft.NewPlan2D(my, mx); err != nil {
		return nil, fmt.Errorf("nufft: doubled grid %d×%d: %w", my, mx, err)
	}
	t.fft.Forward(c, c)
	// Orthonormal DFTs: F(c ⊛ x) = √M·F(c)·F(x) for M = 4·nx·ny cells.
	m := math.Sqrt(float64(my * mx))
	for i, v := range c {
		t.eig[i] = m * real(v)
	}
	return t, nil
}

// Clone returns a Toeplitz for the same operator that shares the
// eigenvalues and has scratch of its own, for use in another goroutine.
func (t *Toeplitz) Clone() *Toeplitz {
	return &Toeplitz{ny: t.ny, nx: t.nx, eig: t.eig, fft: t.fft.Clone(), buf: make([]complex128, len(t.buf))}
}

// ImageLen returns ny·nx, the length of the images Apply takes.
func (t *Toeplitz) ImageLen() int { return t.ny * t.nx }

// Apply writes dst = AᴴWA·src for an ny×nx image src (row-major). dst and src
// may alias. It panics if either length is not ImageLen.
func (t *Toeplitz) Apply(dst, src []complex128) {
	n := t.ny * t.nx
	if len(dst) != n || len(src) != n {
		panic(fmt.Sprintf("nufft: Toeplitz.Apply with images of %d and %d pixels, want %d", len(dst), len(src), n))
	}
	mx := 2 * t.nx
	clear(t.buf)
	for i := range t.ny {
		copy(t.buf[i*mx:i*mx+t.nx], src[i*t.nx:(i+1)*t.nx])
	}
	t.fft.Forward(t.buf, t.buf)
	for i, e := range t.eig {
		v := t.buf[i]
		t.buf[i] = complex(real(v)*e, imag(v)*e)
	}
	t.fft.Inverse(t.buf, t.buf)
	for i := range t.ny {
		copy(dst[i*t.nx:(i+1)*t.nx], t.buf[i*mx:i*mx+t.nx])
	}
}
