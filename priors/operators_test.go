package priors

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"

	"accelplan/priors/wavelet"
)

// Test operators. The project's own Cartesian operator lives in package
// simulate; the solvers are tested here on operators whose every property is
// known in closed form.

// maskedDFT is E = M·F with F the orthonormal, uncentred 2D DFT
// (F x)[u,v] = (ny·nx)^(−1/2) Σ_{r,c} x[r,c]·exp(−2πi(u·r/ny + v·c/nx)), the
// convention of numpy.fft.fft2(norm="ortho"), and M the selection of the
// samples where mask is true, stored compactly in row-major order. It is
// built on gonum's dsp/fourier FFT.
type maskedDFT struct {
	ny, nx         int
	idx            []int
	rowFFT, colFFT *fourier.CmplxFFT
	grid, col      []complex128
	scale          float64
}

func newMaskedDFT(ny, nx int, mask []bool) *maskedDFT {
	o := &maskedDFT{
		ny: ny, nx: nx,
		rowFFT: fourier.NewCmplxFFT(nx), colFFT: fourier.NewCmplxFFT(ny),
		grid: make([]complex128, ny*nx), col: make([]complex128, ny),
		scale: 1 / math.Sqrt(float64(ny*nx)),
	}
	for i, m := range mask {
		if m {
			o.idx = append(o.idx, i)
		}
	}
	return o
}

func (o *maskedDFT) ImageLen() int { return o.ny * o.nx }
func (o *maskedDFT) DataLen() int  { return len(o.idx) }

// fft2 transforms o.grid in place, forward or backward, unnormalised.
func (o *maskedDFT) fft2(forward bool) {
	for r := range o.ny {
		row := o.grid[r*o.nx : (r+1)*o.nx]
		if forward {
			o.rowFFT.Coefficients(row, row)
		} else {
			o.rowFFT.Sequence(row, row)
		}
	}
	for c := range o.nx {
		for r := range o.ny {
			o.col[r] = o.grid[r*o.nx+c]
		}
		if forward {
			o.colFFT.Coefficients(o.col, o.col)
		} else {
			o.colFFT.Sequence(o.col, o.col)
		}
		for r := range o.ny {
			o.grid[r*o.nx+c] = o.col[r]
		}
	}
}

func (o *maskedDFT) Forward(dst, src []complex128) {
	copy(o.grid, src)
	o.fft2(true)
	s := complex(o.scale, 0)
	for j, i := range o.idx {
		dst[j] = o.grid[i] * s
	}
}

func (o *maskedDFT) Adjoint(dst, src []complex128) {
	clear(o.grid)
	for j, i := range o.idx {
		o.grid[i] = src[j]
	}
	o.fft2(false)
	s := complex(o.scale, 0)
	for i := range dst {
		dst[i] = o.grid[i] * s
	}
}

// directDFT2 is the textbook sum defining F above, O(n²).
func directDFT2(x []complex128, ny, nx int) []complex128 {
	out := make([]complex128, ny*nx)
	s := 1 / math.Sqrt(float64(ny*nx))
	for u := range ny {
		for v := range nx {
			var acc complex128
			for r := range ny {
				for c := range nx {
					ph := -2 * math.Pi * (float64(u*r)/float64(ny) + float64(v*c)/float64(nx))
					acc += x[r*nx+c] * cmplx.Rect(1, ph)
				}
			}
			out[u*nx+v] = acc * complex(s, 0)
		}
	}
	return out
}

// diagOp is E = diag(d), real d.
type diagOp struct{ d []float64 }

func (o diagOp) ImageLen() int { return len(o.d) }
func (o diagOp) DataLen() int  { return len(o.d) }
func (o diagOp) Forward(dst, src []complex128) {
	for i, v := range src {
		dst[i] = complex(o.d[i], 0) * v
	}
}
func (o diagOp) Adjoint(dst, src []complex128) { o.Forward(dst, src) }

// diagWaveletOp is E = diag(d)·W with W an orthonormal wavelet transform, so
// that ½‖E x − y‖² + λ‖(W x)_detail‖₁ separates over the coefficients and
// has a closed-form minimiser.
type diagWaveletOp struct {
	w   *wavelet.Transform
	d   []float64
	buf []complex128
}

func (o *diagWaveletOp) ImageLen() int { return o.w.Len() }
func (o *diagWaveletOp) DataLen() int  { return o.w.Len() }
func (o *diagWaveletOp) Forward(dst, src []complex128) {
	o.w.Forward(dst, src)
	for i := range dst {
		dst[i] *= complex(o.d[i], 0)
	}
}
func (o *diagWaveletOp) Adjoint(dst, src []complex128) {
	for i, v := range src {
		o.buf[i] = complex(o.d[i], 0) * v
	}
	o.w.Inverse(dst, o.buf)
}

func randVec(n int, seed uint64) []complex128 {
	r := rand.New(rand.NewPCG(seed, 0xacce1))
	x := make([]complex128, n)
	for i := range x {
		x[i] = complex(r.NormFloat64(), r.NormFloat64())
	}
	return x
}

func randMask(n int, frac float64, seed uint64) []bool {
	r := rand.New(rand.NewPCG(seed, 0x3a5c))
	m := make([]bool, n)
	for i := range m {
		m[i] = r.Float64() < frac
	}
	m[0] = true
	return m
}

func dot(a, b []complex128) complex128 {
	var s complex128
	for i := range a {
		s += a[i] * cmplx.Conj(b[i])
	}
	return s
}

func norm2(x []complex128) float64 { return math.Sqrt(real(dot(x, x))) }

func maxDiff(a, b []complex128) float64 {
	var m float64
	for i := range a {
		m = math.Max(m, cmplx.Abs(a[i]-b[i]))
	}
	return m
}

// The test operator against the defining DFT sum, and its adjoint against
// ⟨E x, y⟩ = ⟨x, E^H y⟩.
func TestMaskedDFTAgainstDirectSum(t *testing.T) {
	for _, c := range []struct{ ny, nx int }{{16, 16}, {8, 12}} {
		n := c.ny * c.nx
		full := make([]bool, n)
		for i := range full {
			full[i] = true
		}
		op := newMaskedDFT(c.ny, c.nx, full)
		x := randVec(n, 1)
		got := make([]complex128, n)
		op.Forward(got, x)
		if d := maxDiff(got, directDFT2(x, c.ny, c.nx)); d > 1e-12 {
			t.Errorf("%d×%d: gonum-based DFT differs from the direct sum by %.3g", c.ny, c.nx, d)
		}
		part := newMaskedDFT(c.ny, c.nx, randMask(n, 0.4, 2))
		y := randVec(part.DataLen(), 3)
		ex := make([]complex128, part.DataLen())
		ehy := make([]complex128, n)
		part.Forward(ex, x)
		part.Adjoint(ehy, y)
		if d := cmplx.Abs(dot(ex, y) - dot(x, ehy)); d > 1e-11 {
			t.Errorf("%d×%d: ⟨Ex,y⟩ − ⟨x,E^H y⟩ = %.3g", c.ny, c.nx, d)
		}
	}
}
