package simulate

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"image"
	"image/png"
	"io"
	"math"
	"os"
	"strings"
	"sync"

	"accelplan/simulate/fft"
	"accelplan/simulate/nifti"
	"accelplan/simulate/nufft"
)

// Limits and defaults of the user's own object.
const (
	// MaxImageSide is the largest width or height of an image file that
	// LoadImagePhantom accepts.
	MaxImageSide = 4096
	// MaxObjectSide is the largest width or height of an ImagePhantom,
	// refined ones included.
	MaxObjectSide = 8192
	// MaxObjectPixels is the largest number of pixels of an ImagePhantom
	// (2²⁵: 256 MiB of values, and as much again twice over for the cached
	// spectrum).
	MaxObjectPixels = 1 << 25
	// SupportFraction is the share of the object's largest value above which
	// a pixel counts as object rather than background in Support.
	SupportFraction = 0.05
	// FinerFactor is how many times finer than the reconstruction grid, along
	// each axis, the object's own grid should be: ForGrid refines an object
	// that is coarser than that, and says so.
	FinerFactor = 2
)

// ImagePhantom is the user's own object: a gridded magnitude image taken as
// piecewise constant over its pixels ("box pixels"), on its own FFT-centred
// grid of Ny rows and Nx columns covering the FOV. Its pixel (i, j) is the
// rectangle of width 1/Nx and height 1/Ny centred at
// x = (j − Nx/2)/Nx, y = (i − Ny/2)/Ny (FOV units, integer division, as every
// grid in this package), holding the constant value v[i, j].
//
// That model makes both halves of Phantom exact. The continuous Fourier
// transform of the box pixels is
//
//	F(kx, ky) = Σ_ij v_ij · (1/(Nx·Ny)) · sinc(kx/Nx) · sinc(ky/Ny) · exp(−2πi(kx·x_j + ky·y_i))
//
// with sinc(t) = sin(πt)/(πt), and the area average over the pixels of any
// other grid is a weighted sum of the box pixels each target pixel overlaps
// (Rasterize).
//
// The inverse crime. An image has no detail finer than its pixels. When the
// reconstruction grid is the object's own grid (or the object's pixels are
// unions of reconstruction pixels, see InverseCrime), Cartesian data drawn
// from F are the DFT of the rasterised truth times a known smooth taper, the
// reconstruction's own model: results would look better than any scanner
// allows (Guerquin-Kern M et al., IEEE TMI 2012;31:626-636). Give an image at
// least FinerFactor times finer than the reconstruction grid; ForGrid, which
// the plans use, otherwise refines the image (Refine) and returns a warning.
//
// An ImagePhantom is immutable and safe for concurrent use.
type ImagePhantom struct {
	ny, nx  int
	v       []float64
	lo, hi  float64
	pixelMM [2]float64

	// lattice[L] tabulates the pixel sum on the lattice 1/L, built on
	// first use.
	lattice [MaxLattice + 1]struct {
		once sync.Once
		dft  []complex128
	}
}

var _ Phantom = (*ImagePhantom)(nil)

// NewImagePhantom makes an object of the row-major ny×nx image img (copied).
// The values must be finite and at least one must be positive; sizes run
// from 1 to MaxObjectSide with at most MaxObjectPixels pixels.
func NewImagePhantom(img []float64, ny, nx int) (*ImagePhantom, error) {
	if ny < 1 || nx < 1 {
		return nil, fmt.Errorf("simulate: object image of %d×%d pixels; both sizes must be ≥ 1", ny, nx)
	}
	if ny > MaxObjectSide || nx > MaxObjectSide || ny*nx > MaxObjectPixels {
		return nil, fmt.Errorf("simulate: object image of %d×%d pixels is too large (at most %d per side and %d pixels)", ny, nx, MaxObjectSide, MaxObjectPixels)
	}
	if len(img) != ny*nx {
		return nil, fmt.Errorf("simulate: object image has %d values, want %d×%d = %d", len(img), ny, nx, ny*nx)
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for p, v := range img {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, fmt.Errorf("simulate: object image has %g at row %d, column %d; every value must be finite", v, p/nx, p%nx)
		}
		lo, hi = min(lo, v), max(hi, v)
	}
	if !(hi > 0) {
		return nil, fmt.Errorf("simulate: object image has no positive value (largest %g); a magnitude image must show something", hi)
	}
	return &ImagePhantom{ny: ny, nx: nx, v: append([]float64(nil), img...), lo: lo, hi: hi}, nil
}

// Size returns the object's own grid: ny rows by nx columns.
func (p *ImagePhantom) Size() (ny, nx int) { return p.ny, p.nx }

// Values returns a copy of the object's pixel values, row-major.
func (p *ImagePhantom) Values() []float64 { return append([]float64(nil), p.v...) }

// Range returns the smallest and largest pixel value.
func (p *ImagePhantom) Range() (lo, hi float64) { return p.lo, p.hi }

// PixelMM returns the pixel spacing the image file gave, in mm: [0] between
// columns (x), [1] between rows (y); zeros when the file gave none (PNG).
func (p *ImagePhantom) PixelMM() [2]float64 { return p.pixelMM }

// FOVmm returns the extent the image file implies, nx·dx by ny·dy mm (x
// then y), and whether the file gave a spacing at all. A plan whose FOV
// differs stretches the object to its own FOV.
func (p *ImagePhantom) FOVmm() (x, y float64, ok bool) {
	if p.pixelMM[0] <= 0 || p.pixelMM[1] <= 0 {
		return 0, 0, false
	}
	return float64(p.nx) * p.pixelMM[0], float64(p.ny) * p.pixelMM[1], true
}

// boxSinc returns sin(πt)/(πt).
func boxSinc(t float64) float64 {
	x := math.Pi * t
	if math.Abs(x) < 1e-4 {
		return 1 - x*x/6 // next term x⁴/120 < 1e-18
	}
	return math.Sin(x) / x
}

// Spectrum returns the exact continuous Fourier transform of the box-pixel
// object at (kx, ky) cycles per FOV (formula in the type's doc).
//
// Cost. On a lattice kx = u/L, ky = v/L with integer u, v and L from 1 to
// MaxLattice (L = 1: the points of every centred Cartesian grid; L = 2: the
// half-integer points the default receive array's spectra need), the pixel
// sum is one entry of the DFT of the object zero-padded to L·Ny × L·Nx,
// which the first such call computes for all points at once with one FFT
// and keeps (16·L² bytes per object pixel; not kept beyond
// MaxLatticeEntries entries); every call after that costs a few
// multiplications. Elsewhere the sum is evaluated directly: Nx + Ny sines
// and cosines and 2·Nx·Ny real multiply-adds per point
// (BenchmarkImagePhantomSpectrumDirect512 gives the figure for a 512×512
// object). Source of the box-pixel transform: the shift and scaling theorems
// applied to the transform of the unit box, sinc (Bracewell RN, The Fourier
// Transform and Its Applications, 3rd ed. 2000, ch. 6).
func (p *ImagePhantom) Spectrum(kx, ky float64) complex128 {
	if math.Abs(kx) < 1<<40 && math.Abs(ky) < 1<<40 {
		for L := 1; L <= MaxLattice; L++ {
			u, v := kx*float64(L), ky*float64(L)
			if u != math.Trunc(u) || v != math.Trunc(v) {
				continue
			}
			if s, ok := p.latticeSpectrum(L, int64(u), int64(v)); ok {
				return s
			}
			break
		}
	}
	return p.directSpectrum(kx, ky)
}

// Lattice caches of Spectrum.
const (
	// MaxLattice is the finest lattice 1/L whose values Spectrum tabulates.
	MaxLattice = 4
	// MaxLatticeEntries bounds the size of one tabulated lattice
	// (L²·Nx·Ny values of 16 bytes: 256 MiB).
	MaxLatticeEntries = 1 << 24
)

// taper returns the pixel area times the two sinc factors, (1/(Nx·Ny))·sinc(kx/Nx)·sinc(ky/Ny).
func (p *ImagePhantom) taper(kx, ky float64) float64 {
	return boxSinc(kx/float64(p.nx)) * boxSinc(ky/float64(p.ny)) / (float64(p.nx) * float64(p.ny))
}

// trigPool holds scratch tables for directSpectrum (2·Nx values), so that
// concurrent calls allocate nothing once warm.
var trigPool = sync.Pool{New: func() any { return new([]float64) }}

// directSpectrum evaluates the pixel sum of Spectrum directly: the phases
// exp(−2πi kx·x_j) of the columns are tabulated once per call, each from its
// own angle; each row then costs two real dot products (its values are real)
// and is rotated by its row phase exp(−2πi ky·y_i).
func (p *ImagePhantom) directSpectrum(kx, ky float64) complex128 {
	nx, ny := p.nx, p.ny
	buf := trigPool.Get().(*[]float64)
	if cap(*buf) < 2*nx {
		*buf = make([]float64, 2*nx)
	}
	c, s := (*buf)[:nx], (*buf)[nx:2*nx]
	for j := range nx {
		s[j], c[j] = math.Sincos(-2 * math.Pi * kx * float64(j-nx/2) / float64(nx))
	}
	var tr, ti float64
	for i := range ny {
		row := p.v[i*nx : (i+1)*nx]
		row = row[:len(c)]
		var a0, a1, a2, a3, b0, b1, b2, b3 float64
		j := 0
		for ; j+3 < len(row); j += 4 {
			a0 += row[j] * c[j]
			b0 += row[j] * s[j]
			a1 += row[j+1] * c[j+1]
			b1 += row[j+1] * s[j+1]
			a2 += row[j+2] * c[j+2]
			b2 += row[j+2] * s[j+2]
			a3 += row[j+3] * c[j+3]
			b3 += row[j+3] * s[j+3]
		}
		for ; j < len(row); j++ {
			a0 += row[j] * c[j]
			b0 += row[j] * s[j]
		}
		sr, si := (a0+a1)+(a2+a3), (b0+b1)+(b2+b3)
		ws, wc := math.Sincos(-2 * math.Pi * ky * float64(i-ny/2) / float64(ny))
		tr += sr*wc - si*ws
		ti += sr*ws + si*wc
	}
	trigPool.Put(buf)
	t := p.taper(kx, ky)
	return complex(t*tr, t*ti)
}

// latticeSpectrum returns Spectrum at (u/L, v/L) from the lattice's table:
// with M = L·N, Σ_j v_j exp(−2πi (u/L)(j − c)/N) = exp(2πi u·c/M) · DFT_M(v
// zero-padded to M)[u mod M], c = N/2. ok is false when the table would be
// too large.
func (p *ImagePhantom) latticeSpectrum(L int, u, v int64) (complex128, bool) {
	lt := &p.lattice[L]
	lt.once.Do(func() { lt.dft = p.buildDFT(L) })
	if lt.dft == nil {
		return 0, false
	}
	mx, my := int64(L*p.nx), int64(L*p.ny)
	// The phase angle 2π·(u·c mod M)/M, reduced exactly in integers.
	ph := 2 * math.Pi * (float64(mod(u*int64(p.nx/2), mx))/float64(mx) + float64(mod(v*int64(p.ny/2), my))/float64(my))
	ps, pc := math.Sincos(ph)
	t := p.taper(float64(u)/float64(L), float64(v)/float64(L))
	return complex(t, 0) * complex(pc, ps) * lt.dft[mod(v, my)*mx+mod(u, mx)], true
}

func mod(a, n int64) int64 {
	r := a % n
	if r < 0 {
		r += n
	}
	return r
}

// buildDFT returns the unnormalised DFT of the object zero-padded to
// L·Ny × L·Nx (the image in the top-left corner), computed with the
// package's orthonormal FFT and scaled by √(L²·Nx·Ny); nil when that is more
// than MaxLatticeEntries values.
func (p *ImagePhantom) buildDFT(L int) []complex128 {
	my, mx := L*p.ny, L*p.nx
	if my*mx > MaxLatticeEntries {
		return nil
	}
	plan, err := fft.NewPlan2D(my, mx)
	if err != nil {
		return nil
	}
	d := make([]complex128, my*mx)
	for i := range p.ny {
		row := d[i*mx:]
		for j, v := range p.v[i*p.nx : (i+1)*p.nx] {
			row[j] = complex(v, 0)
		}
	}
	plan.Forward(d, d)
	s := complex(math.Sqrt(float64(mx)*float64(my)), 0)
	for i := range d {
		d[i] *= s
	}
	return d
}

// SpectrumPoints returns Spectrum at many points (kx[j], ky[j]) at once, for
// non-Cartesian trajectories, where one Spectrum call costs a full pixel sum.
// Points inside the object's own band (|kx| ≤ Nx/2, |ky| ≤ Ny/2) are
// evaluated together by a type-2 NUFFT of the object's grid (package nufft:
// Kaiser-Bessel kernel of width 8 on a 2× oversampled grid, Jackson JI et
// al., IEEE TMI 1991;10:473-478; Beatty PJ et al., IEEE TMI 2005;24:799-808),
// whose relative error against the exact sum is about 1e-7 (measured in
// TestImagePhantomSpectrumPoints): far below any measurement noise, but not
// exact, which is why Spectrum itself never uses it. Points on a lattice that
// Spectrum tabulates, and points outside the band, are evaluated exactly by
// Spectrum. The cost is one FFT of 4·Nx·Ny cells plus 64 kernel weights per
// point.
func (p *ImagePhantom) SpectrumPoints(kx, ky []float64) ([]complex128, error) {
	if len(kx) != len(ky) {
		return nil, fmt.Errorf("simulate: %d kx coordinates but %d ky coordinates", len(kx), len(ky))
	}
	out := make([]complex128, len(kx))
	var idx []int
	var bx, by []float64
	hx, hy := float64(p.nx)/2, float64(p.ny)/2
	for j := range kx {
		x, y := kx[j], ky[j]
		if math.IsNaN(x) || math.IsNaN(y) || math.IsInf(x, 0) || math.IsInf(y, 0) {
			return nil, fmt.Errorf("simulate: k-space point %d is (%g, %g); both must be finite", j, x, y)
		}
		if math.Abs(x) > hx || math.Abs(y) > hy || p.onLattice(x, y) {
			out[j] = p.Spectrum(x, y)
			continue
		}
		idx = append(idx, j)
		bx, by = append(bx, x), append(by, y)
	}
	if len(idx) == 0 {
		return out, nil
	}
	plan, err := nufft.New(p.ny, p.nx, bx, by, nufft.Options{Width: nufft.MaxWidth, Oversampling: 2})
	if err != nil {
		return nil, fmt.Errorf("simulate: %w", err)
	}
	src := make([]complex128, len(p.v))
	for i, v := range p.v {
		src[i] = complex(v, 0)
	}
	y := make([]complex128, len(idx))
	plan.Forward(y, src)
	root := math.Sqrt(float64(p.nx) * float64(p.ny))
	for n, j := range idx {
		out[j] = complex(root*p.taper(kx[j], ky[j]), 0) * y[n]
	}
	return out, nil
}

// onLattice reports whether Spectrum would read (kx, ky) from a lattice
// table (small lattices only, so the check is cheap).
func (p *ImagePhantom) onLattice(kx, ky float64) bool {
	for L := 1; L <= MaxLattice; L++ {
		u, v := kx*float64(L), ky*float64(L)
		if u == math.Trunc(u) && v == math.Trunc(v) {
			return L*L*p.nx*p.ny <= MaxLatticeEntries
		}
	}
	return false
}

// axisWeights lists, for each target pixel along one axis, the object pixels
// it overlaps and the fraction of the target pixel each one covers:
// idx[start[t]:start[t+1]] and w[start[t]:start[t+1]].
type axisWeights struct {
	start []int
	idx   []int
	w     []float64
}

// boxWeights returns the exact overlaps between the N object pixels and the
// n target pixels of one axis, both FFT-centred over the FOV. In units of
// 1/(2nN) of the FOV every pixel edge is an integer: object pixel j spans
// (2(j − N/2) ± 1)·n and target pixel t spans (2(t − n/2) ± 1)·N, so each
// overlap is an exact integer and each fraction overlap/(2N) a correctly
// rounded quotient.
func boxWeights(N, n int) axisWeights {
	aw := axisWeights{start: make([]int, n+1)}
	cN, cn := int64(N/2), int64(n/2)
	NN, nn := int64(N), int64(n)
	for t := range n {
		tlo := (2*(int64(t)-cn) - 1) * NN
		thi := (2*(int64(t)-cn) + 1) * NN
		// Object pixels whose centre lies within a pixel of the target span.
		jlo := max(int64(0), floorDiv(tlo, 2*nn)+cN-1)
		jhi := min(NN-1, floorDiv(thi, 2*nn)+cN+1)
		for j := jlo; j <= jhi; j++ {
			olo := (2*(j-cN) - 1) * nn
			ohi := (2*(j-cN) + 1) * nn
			if ov := min(thi, ohi) - max(tlo, olo); ov > 0 {
				aw.idx = append(aw.idx, int(j))
				aw.w = append(aw.w, float64(ov)/float64(2*NN))
			}
		}
		aw.start[t+1] = len(aw.idx)
	}
	return aw
}

func floorDiv(a, b int64) int64 {
	q := a / b
	if (a%b != 0) && ((a < 0) != (b < 0)) {
		q--
	}
	return q
}

// Rasterize returns the exact area average of the box-pixel object over each
// pixel of the ny-by-nx FFT-centred grid, row-major: each target pixel is the
// sum of the object pixels it overlaps, weighted by the overlapping area over
// its own area. The weights are separable (an overlap of rectangles is the
// product of the overlaps of their sides), so the cost is that of two 1D
// passes. On the object's own grid it returns the image itself. Where the two
// grids' extents differ (FFT-centred grids of different sizes are offset by
// up to half a pixel at their edges) the part of an edge pixel outside the
// target grid is left out. It returns nil when nx or ny is not positive.
func (p *ImagePhantom) Rasterize(nx, ny int) []float64 {
	if nx <= 0 || ny <= 0 {
		return nil
	}
	wx := boxWeights(p.nx, nx)
	wy := boxWeights(p.ny, ny)
	tmp := make([]float64, p.ny*nx) // object rows, target columns
	for i := range p.ny {
		src := p.v[i*p.nx : (i+1)*p.nx]
		dst := tmp[i*nx : (i+1)*nx]
		for t := range nx {
			var s float64
			for q := wx.start[t]; q < wx.start[t+1]; q++ {
				s += wx.w[q] * src[wx.idx[q]]
			}
			dst[t] = s
		}
	}
	out := make([]float64, ny*nx)
	for s := range ny {
		dst := out[s*nx : (s+1)*nx]
		for q := wy.start[s]; q < wy.start[s+1]; q++ {
			w := wy.w[q]
			src := tmp[wy.idx[q]*nx : (wy.idx[q]+1)*nx]
			for t, v := range src {
				dst[t] += w * v
			}
		}
	}
	return out
}

// Support returns, row-major on the ny-by-nx FFT-centred grid, the pixels
// that belong to the object: the rasterised object is thresholded at
// SupportFraction (5%) of the object's largest value, and the pixels below
// it that are connected (4-neighbour) to the edge of the grid are the
// background; everything else, dark holes inside the object included, is the
// support, the region in which quality is scored. It returns nil when nx or
// ny is not positive.
func (p *ImagePhantom) Support(nx, ny int) []bool {
	r := p.Rasterize(nx, ny)
	if r == nil {
		return nil
	}
	thr := SupportFraction * p.hi
	bg := make([]bool, len(r))
	var stack []int
	seed := func(q int) {
		if !bg[q] && r[q] <= thr {
			bg[q] = true
			stack = append(stack, q)
		}
	}
	for j := range nx {
		seed(j)
		seed((ny-1)*nx + j)
	}
	for i := range ny {
		seed(i * nx)
		seed(i*nx + nx - 1)
	}
	for len(stack) > 0 {
		q := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		i, j := q/nx, q%nx
		if i > 0 {
			seed(q - nx)
		}
		if i < ny-1 {
			seed(q + nx)
		}
		if j > 0 {
			seed(q - 1)
		}
		if j < nx-1 {
			seed(q + 1)
		}
	}
	in := make([]bool, len(r))
	for q, b := range bg {
		in[q] = !b
	}
	return in
}

// InverseCrime reports whether simulating on this object for a
// reconstruction on the ny-by-nx grid commits the inverse crime in its exact
// form: every object pixel is a union of whole reconstruction pixels, so the
// object is itself a piecewise-constant image on the reconstruction grid and
// its Cartesian data are that image's DFT times the box taper. With
// FFT-centred grids this happens, along each axis, exactly when the
// reconstruction size is an odd multiple of the object's (the same size
// included); it must hold along both axes. An object at least FinerFactor
// times finer than the grid (see Finer) avoids the crime in every form.
func (p *ImagePhantom) InverseCrime(ny, nx int) bool {
	oddMultiple := func(n, N int) bool { return n > 0 && n%N == 0 && (n/N)%2 == 1 }
	return oddMultiple(ny, p.ny) && oddMultiple(nx, p.nx)
}

// Finer returns how many times finer the object's grid is than the ny-by-nx
// grid along its coarser direction: min(Ny/ny, Nx/nx). Below FinerFactor the
// object carries little or no detail beyond what the reconstruction grid can
// represent.
func (p *ImagePhantom) Finer(ny, nx int) float64 {
	return min(float64(p.ny)/float64(ny), float64(p.nx)/float64(nx))
}

// Refine returns a finer object, factor times as many pixels along each
// axis, made by cubic convolution interpolation of this one (Keys RG, IEEE
// Trans Acoust Speech Signal Process 1981;29:1153-1160, with a = −½): each new
// pixel centre is placed on the old grid, x·Nx + Nx/2 in old pixel units, and
// the image is interpolated there from its 4×4 nearest pixel centres, edge
// pixels repeated beyond the border. Results are clipped to the image's own
// range, so the interpolation adds no overshoot. The refined object is
// smoother at the old pixel edges but carries no detail finer than the
// image's pixels: refining only moves the object off the reconstruction's
// grid. factor runs from 1 (a copy) to 16; the result must stay within
// MaxObjectSide and MaxObjectPixels. The pixel spacing, when known, is
// divided by factor.
func (p *ImagePhantom) Refine(factor int) (*ImagePhantom, error) {
	if factor < 1 || factor > 16 {
		return nil, fmt.Errorf("simulate: refinement factor %d; it must be 1 to 16", factor)
	}
	my, mx := p.ny*factor, p.nx*factor
	if my > MaxObjectSide || mx > MaxObjectSide || my*mx > MaxObjectPixels {
		return nil, fmt.Errorf("simulate: refining the %d×%d object %d× gives %d×%d pixels, more than allowed (%d per side, %d pixels)", p.ny, p.nx, factor, my, mx, MaxObjectSide, MaxObjectPixels)
	}
	pos := func(N, M int) []float64 {
		u := make([]float64, M)
		for J := range u {
			u[J] = float64(J-M/2)/float64(factor) + float64(N/2)
		}
		return u
	}
	out := cubicResample(p.v, p.ny, p.nx, pos(p.ny, my), pos(p.nx, mx))
	for i, v := range out {
		out[i] = min(max(v, p.lo), p.hi)
	}
	r, err := NewImagePhantom(out, my, mx)
	if err != nil {
		return nil, err
	}
	r.pixelMM = [2]float64{p.pixelMM[0] / float64(factor), p.pixelMM[1] / float64(factor)}
	return r, nil
}

// keys is the cubic convolution kernel of Keys (1981) with a = −½.
func keys(s float64) float64 {
	const a = -0.5
	s = math.Abs(s)
	switch {
	case s <= 1:
		return ((a+2)*s-(a+3))*s*s + 1
	case s < 2:
		return ((a*s-5*a)*s+8*a)*s - 4*a
	}
	return 0
}

// cubicResample interpolates the row-major ny×nx image src by cubic
// convolution at the row positions uy and column positions ux (in pixel
// units: pixel centres at 0, 1, …), separably (columns first), repeating
// edge pixels beyond the border.
func cubicResample(src []float64, ny, nx int, uy, ux []float64) []float64 {
	type taps struct {
		idx [4]int
		w   [4]float64
	}
	mk := func(u []float64, n int) []taps {
		t := make([]taps, len(u))
		for J, x := range u {
			b := int(math.Floor(x))
			for q := range 4 {
				k := b - 1 + q
				t[J].w[q] = keys(x - float64(k))
				t[J].idx[q] = min(max(k, 0), n-1)
			}
		}
		return t
	}
	tx, ty := mk(ux, nx), mk(uy, ny)
	mx, my := len(ux), len(uy)
	tmp := make([]float64, ny*mx)
	for i := range ny {
		row := src[i*nx : (i+1)*nx]
		dst := tmp[i*mx : (i+1)*mx]
		for J, t := range tx {
			dst[J] = t.w[0]*row[t.idx[0]] + t.w[1]*row[t.idx[1]] + t.w[2]*row[t.idx[2]] + t.w[3]*row[t.idx[3]]
		}
	}
	out := make([]float64, my*mx)
	for I, t := range ty {
		dst := out[I*mx : (I+1)*mx]
		for q := range 4 {
			w := t.w[q]
			r := tmp[t.idx[q]*mx : (t.idx[q]+1)*mx]
			for J, v := range r {
				dst[J] += w * v
			}
		}
	}
	return out
}

// ForGrid returns the object to simulate from for a reconstruction on the
// ny-by-nx grid, with warnings for the user. This is the default the plans
// use: an object at least FinerFactor (2) times finer than the grid along
// both axes is returned as it is, with no warning; a coarser one is refined
// (Refine) by the smallest integer factor that makes it so, and a warning
// says that its grid invited the inverse crime, what was done and what a fair
// test needs. It fails when the refined object would exceed the limits.
func (p *ImagePhantom) ForGrid(ny, nx int) (*ImagePhantom, []string, error) {
	if ny < 1 || nx < 1 {
		return nil, nil, fmt.Errorf("simulate: reconstruction grid %d×%d; both sizes must be ≥ 1", ny, nx)
	}
	if p.Finer(ny, nx) >= FinerFactor {
		return p, nil, nil
	}
	f := max(ceilDiv(FinerFactor*ny, p.ny), ceilDiv(FinerFactor*nx, p.nx))
	r, err := p.Refine(f)
	if err != nil {
		return nil, nil, fmt.Errorf("simulate: the %d×%d object image is coarser than %d× the %d×%d reconstruction grid and cannot be refined enough: %w", p.ny, p.nx, FinerFactor, ny, nx, err)
	}
	why := "carries little detail beyond what the reconstruction grid can hold, which flatters every method (close to the inverse crime)"
	if p.InverseCrime(ny, nx) {
		why = "lies on the reconstruction grid itself (each of its pixels is a union of reconstruction pixels), so data drawn from it would follow the reconstruction's own model (the inverse crime)"
	}
	w := fmt.Sprintf("the object image (%d×%d pixels) is not %d× finer than the %d×%d reconstruction grid: it %s. It was refined %d× by cubic interpolation to %d×%d pixels, which moves the object off the reconstruction grid but adds no detail finer than the image's own pixels; for a fair test give an image of at least %d×%d pixels",
		p.ny, p.nx, FinerFactor, ny, nx, why, f, r.ny, r.nx, FinerFactor*ny, FinerFactor*nx)
	return r, []string{w}, nil
}

func ceilDiv(a, b int) int { return (a + b - 1) / b }

// pngSignature opens every PNG file (ISO/IEC 15948, 5.2).
const pngSignature = "\x89PNG\r\n\x1a\n"

// LoadImagePhantom reads the user's own object from an image file, told
// apart by its first bytes (whatever its name): an 8- or 16-bit PNG, or a
// NIfTI-1 single file (.nii or gzipped .nii.gz; decoded by package
// accelplan/simulate/nifti, which package out shares) holding one 2D slice.
// It returns the object and warnings the user should see (a colour image
// turned grey, transparency, negative values). Use LoadImagePhantomSlice for
// one slice of a volume.
//
// Values: PNG grey levels are divided by the largest level of their depth
// (255 or 65535), so the object's values run from 0 to 1; NIfTI voxels are
// taken as stored after scl_slope and scl_inter. Orientation: a PNG's first
// row is row 0 (the top). For a NIfTI file with a qform or sform, the rows
// are put in the order of the package nifti convention (the first row the
// most anterior, or superior for a coronal or sagittal slice, and columns
// running towards +x, the subject's right, when the in-plane x axis is a
// column axis), so that files written by package out load unchanged; without
// either, storage order is kept (the first NIfTI row is row 0). The pixel
// spacing of a NIfTI file (mm, converted from m or µm when the units say so)
// is kept for FOVmm.
func LoadImagePhantom(path string) (*ImagePhantom, []string, error) {
	return LoadImagePhantomSlice(path, -1)
}

// LoadImagePhantomSlice is LoadImagePhantom that takes slice number slice
// (from 0) of a NIfTI volume; slice < 0 asks for a file of one slice, and a
// volume is then an error that says how many slices it has.
func LoadImagePhantomSlice(path string, slice int) (*ImagePhantom, []string, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, nil, fmt.Errorf("simulate: object image: %w", err)
	}
	defer f.Close()
	p, warn, err := ReadImagePhantom(f, slice)
	if err != nil {
		return nil, nil, fmt.Errorf("simulate: object image %s: %w", path, err)
	}
	return p, warn, nil
}

// ReadImagePhantom is LoadImagePhantomSlice for a stream. Its errors do not
// name a file.
func ReadImagePhantom(r io.Reader, slice int) (*ImagePhantom, []string, error) {
	br := bufio.NewReader(r)
	head, _ := br.Peek(len(pngSignature))
	switch {
	case len(head) == 0:
		return nil, nil, errors.New("the file is empty")
	case string(head) == pngSignature:
		return readPNGPhantom(br)
	case len(head) >= 2 && head[0] == 0x1f && head[1] == 0x8b,
		len(head) >= 4 && (binary.LittleEndian.Uint32(head) == nifti.HeaderSize || binary.BigEndian.Uint32(head) == nifti.HeaderSize):
		return readNIfTIPhantom(br, slice)
	}
	return nil, nil, errors.New("not a PNG or NIfTI-1 image (give an 8- or 16-bit greyscale PNG, a .nii or a .nii.gz)")
}

func readPNGPhantom(r *bufio.Reader) (*ImagePhantom, []string, error) {
	// Read the whole (compressed) file once: DecodeConfig checks the size
	// before Decode allocates the pixels.
	raw, err := io.ReadAll(io.LimitReader(r, 1<<30+1))
	if err != nil {
		return nil, nil, err
	}
	if len(raw) > 1<<30 {
		return nil, nil, errors.New("PNG file larger than 1 GiB")
	}
	cfg, err := png.DecodeConfig(bytes.NewReader(raw))
	if err != nil {
		return nil, nil, fmt.Errorf("corrupt PNG: %w", err)
	}
	if cfg.Width > MaxImageSide || cfg.Height > MaxImageSide {
		return nil, nil, fmt.Errorf("PNG of %d×%d pixels; at most %d per side is accepted", cfg.Width, cfg.Height, MaxImageSide)
	}
	m, err := png.Decode(bytes.NewReader(raw))
	if err != nil {
		return nil, nil, fmt.Errorf("corrupt PNG: %w", err)
	}
	b := m.Bounds()
	ny, nx := b.Dy(), b.Dx()
	if ny < 1 || nx < 1 {
		return nil, nil, fmt.Errorf("PNG of %d×%d pixels holds no image", nx, ny)
	}
	img := make([]float64, ny*nx)
	var warn []string
	switch g := m.(type) {
	case *image.Gray:
		for i := range ny {
			for j := range nx {
				img[i*nx+j] = float64(g.GrayAt(b.Min.X+j, b.Min.Y+i).Y) / 255
			}
		}
	case *image.Gray16:
		for i := range ny {
			for j := range nx {
				img[i*nx+j] = float64(g.Gray16At(b.Min.X+j, b.Min.Y+i).Y) / 65535
			}
		}
	default:
		colour, alpha := false, false
		for i := range ny {
			for j := range nx {
				cr, cg, cb, ca := m.At(b.Min.X+j, b.Min.Y+i).RGBA()
				if cr != cg || cg != cb {
					colour = true
				}
				if ca != 0xffff {
					alpha = true
				}
				// ITU-R BT.601 luma weights (common practice; also those of
				// Go's color.GrayModel), on 16-bit premultiplied channels.
				img[i*nx+j] = (0.299*float64(cr) + 0.587*float64(cg) + 0.114*float64(cb)) / 65535
			}
		}
		if colour {
			warn = append(warn, "the PNG is in colour; it was turned grey with the luma weights 0.299 R + 0.587 G + 0.114 B")
		}
		if alpha {
			warn = append(warn, "the PNG has transparent pixels; they were composited over black")
		}
	}
	p, err := NewImagePhantom(img, ny, nx)
	if err != nil {
		return nil, nil, stripPrefix(err)
	}
	return p, warn, nil
}

// stripPrefix drops "simulate: " from an error of NewImagePhantom, which the
// loader's callers wrap again.
func stripPrefix(err error) error {
	return errors.New(strings.TrimPrefix(err.Error(), "simulate: "))
}

func readNIfTIPhantom(r io.Reader, slice int) (*ImagePhantom, []string, error) {
	im, err := nifti.Read(r)
	if err != nil {
		return nil, nil, err
	}
	d := im.Dims
	nx, ny, nz := d[0], 1, 1
	if len(d) > 1 {
		ny = d[1]
	}
	if len(d) > 2 {
		nz = d[2]
	}
	for k := 3; k < len(d); k++ {
		if d[k] != 1 {
			return nil, nil, fmt.Errorf("NIfTI image of %s voxels has %d dimensions beyond the third; give one 2D slice", dimsString(d), len(d)-3)
		}
	}
	if nx > MaxImageSide || ny > MaxImageSide {
		return nil, nil, fmt.Errorf("NIfTI slice of %d×%d pixels; at most %d per side is accepted", nx, ny, MaxImageSide)
	}
	switch {
	case slice < 0 && nz > 1:
		return nil, nil, fmt.Errorf("NIfTI volume of %d slices (%s voxels); choose one slice (0 to %d)", nz, dimsString(d), nz-1)
	case slice < 0:
		slice = 0
	case slice >= nz:
		return nil, nil, fmt.Errorf("slice %d asked of a NIfTI image of %d slice(s) (0 to %d)", slice, nz, nz-1)
	}
	img := im.Data[slice*ny*nx : (slice+1)*ny*nx]
	for q, v := range img {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, nil, fmt.Errorf("NIfTI voxel at column %d, row %d, slice %d (storage order) is %g; every value must be finite", q%nx, q/nx, slice, v)
		}
	}
	img = append([]float64(nil), img...)
	flipRows, flipCols := niftiFlips(&im.Header)
	if flipRows {
		for i := range ny / 2 {
			a, b := img[i*nx:(i+1)*nx], img[(ny-1-i)*nx:(ny-i)*nx]
			for j := range a {
				a[j], b[j] = b[j], a[j]
			}
		}
	}
	if flipCols {
		for i := range ny {
			row := img[i*nx : (i+1)*nx]
			for j := range nx / 2 {
				row[j], row[nx-1-j] = row[nx-1-j], row[j]
			}
		}
	}
	p, err := NewImagePhantom(img, ny, nx)
	if err != nil {
		return nil, nil, stripPrefix(err)
	}
	var warn []string
	if p.lo < 0 {
		warn = append(warn, fmt.Sprintf("the NIfTI image has negative values (down to %g); a magnitude image should not, and they are kept as they are", p.lo))
	}
	scale := 1.0
	switch im.XYZTUnits & 7 {
	case 1: // metres
		scale = 1000
	case 3: // micrometres
		scale = 1e-3
	}
	dx, dy := 0.0, 0.0
	if len(im.Pixdim) > 1 {
		dx, dy = math.Abs(im.Pixdim[0])*scale, math.Abs(im.Pixdim[1])*scale
	}
	if dx > 0 && dy > 0 && !math.IsInf(dx, 0) && !math.IsInf(dy, 0) {
		p.pixelMM = [2]float64{dx, dy}
	}
	return p, warn, nil
}

// niftiFlips says which in-plane axes to reverse so that rows run from the
// most anterior (or superior) and columns towards the subject's right, from
// the header's sform or qform; with neither, nothing is reversed. Each
// in-plane voxel axis is matched to the world axis it follows most (the
// largest component of its column of the affine). The row axis (second
// index) is reversed when its world direction is positive, so that row 0 is
// the most anterior/superior/right; the column axis (first index) is
// reversed when its direction is negative.
func niftiFlips(h *nifti.Header) (rows, cols bool) {
	a, _, ok := h.Affine()
	if !ok {
		return false, false
	}
	dominant := func(c int) float64 {
		best := 0.0
		for r := range 3 {
			if v := a[r][c]; math.Abs(v) > math.Abs(best) {
				best = v
			}
		}
		return best
	}
	return dominant(1) > 0, dominant(0) < 0
}

func dimsString(d []int) string {
	s := make([]string, len(d))
	for i, v := range d {
		s[i] = fmt.Sprint(v)
	}
	return strings.Join(s, "×")
}
