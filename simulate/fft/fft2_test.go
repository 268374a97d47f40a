package fft

import (
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"testing"

	dspfft "github.com/mjibson/go-dsp/fft"
	"gonum.org/v1/gonum/dsp/fourier"
)

var shapes2D = [][2]int{
	{1, 1}, {1, 8}, {8, 1}, {2, 3}, {4, 4}, {3, 5}, {8, 12}, {12, 8}, {15, 16},
	{16, 30}, {60, 64}, {64, 64}, {97, 12}, {7, 11}, {100, 128}, {128, 100},
	{192, 192}, {240, 256}, {256, 256}, {9, 10}, {10, 9},
	{16, 65}, {8, 129}, {12, 66}, // a last column block of width 1 or 2
}

// ref2DGoDSP is go-dsp's fft.FFT2 / IFFT2 (reference library) on the
// row-major image, scaled to orthonormal.
func ref2DGoDSP(x []complex128, ny, nx int, inv bool) []complex128 {
	m := make([][]complex128, ny)
	for i := range m {
		m[i] = x[i*nx : (i+1)*nx]
	}
	var r [][]complex128
	scale := 1 / math.Sqrt(float64(ny*nx))
	if inv {
		r = dspfft.IFFT2(m)
		scale = math.Sqrt(float64(ny * nx))
	} else {
		r = dspfft.FFT2(m)
	}
	out := make([]complex128, 0, ny*nx)
	for _, row := range r {
		out = append(out, row...)
	}
	return scaled(out, scale)
}

// ref2DGonum runs gonum's CmplxFFT (reference library) along rows and then
// columns, scaled to orthonormal.
func ref2DGonum(x []complex128, ny, nx int, inv bool) []complex128 {
	rowF, colF := fourier.NewCmplxFFT(nx), fourier.NewCmplxFFT(ny)
	out := make([]complex128, ny*nx)
	for i := range ny {
		if inv {
			rowF.Sequence(out[i*nx:(i+1)*nx], x[i*nx:(i+1)*nx])
		} else {
			rowF.Coefficients(out[i*nx:(i+1)*nx], x[i*nx:(i+1)*nx])
		}
	}
	col := make([]complex128, ny)
	for j := range nx {
		for i := range ny {
			col[i] = out[i*nx+j]
		}
		if inv {
			colF.Sequence(col, col)
		} else {
			colF.Coefficients(col, col)
		}
		for i := range ny {
			out[i*nx+j] = col[i]
		}
	}
	return scaled(out, 1/math.Sqrt(float64(ny*nx)))
}

func TestPlan2DAgainstReferences(t *testing.T) {
	for _, sh := range shapes2D {
		ny, nx := sh[0], sh[1]
		t.Run(fmt.Sprintf("%dx%d", ny, nx), func(t *testing.T) {
			p, err := NewPlan2D(ny, nx)
			if err != nil {
				t.Fatal(err)
			}
			x := randVec(ny*nx, uint64(ny*1000+nx))
			got := make([]complex128, ny*nx)
			for _, inv := range []bool{false, true} {
				if inv {
					p.Inverse(got, x)
				} else {
					p.Forward(got, x)
				}
				if e := relErr(got, ref2DGoDSP(x, ny, nx, inv)); e > tol {
					t.Errorf("inverse=%v: relative error %.3g against go-dsp FFT2", inv, e)
				}
				if e := relErr(got, ref2DGonum(x, ny, nx, inv)); e > tol {
					t.Errorf("inverse=%v: relative error %.3g against gonum row/column", inv, e)
				}
			}
		})
	}
}

// numpyCase is one shape of testdata/numpy_fft2.json, made by numpy (the
// script testdata/gen_numpy_fixture.py names the library and version).
type numpyCase struct {
	Ny        int       `json:"ny"`
	Nx        int       `json:"nx"`
	InRe      []float64 `json:"in_re"`
	InIm      []float64 `json:"in_im"`
	FwdRe     []float64 `json:"fwd_re"`
	FwdIm     []float64 `json:"fwd_im"`
	InvRe     []float64 `json:"inv_re"`
	InvIm     []float64 `json:"inv_im"`
	CfwdRe    []float64 `json:"cfwd_re"`
	CfwdIm    []float64 `json:"cfwd_im"`
	CinvRe    []float64 `json:"cinv_re"`
	CinvIm    []float64 `json:"cinv_im"`
	FFTShift  []int     `json:"fftshift"`
	IFFTShift []int     `json:"ifftshift"`
}

func cplx(re, im []float64) []complex128 {
	z := make([]complex128, len(re))
	for i := range re {
		z[i] = complex(re[i], im[i])
	}
	return z
}

func loadNumpy(t *testing.T) []numpyCase {
	t.Helper()
	b, err := os.ReadFile("testdata/numpy_fft2.json")
	if err != nil {
		t.Fatal(err)
	}
	var f struct {
		Library string      `json:"library"`
		Cases   []numpyCase `json:"cases"`
	}
	if err := json.Unmarshal(b, &f); err != nil {
		t.Fatal(err)
	}
	if len(f.Cases) == 0 {
		t.Fatal("fixture has no cases")
	}
	return f.Cases
}

// TestAgainstNumpy checks Forward, Inverse, CentredForward and
// CentredInverse against numpy.fft (fft2/ifft2 with norm="ortho", wrapped in
// ifftshift/fftshift for the centred pair), odd and even shapes.
func TestAgainstNumpy(t *testing.T) {
	for _, c := range loadNumpy(t) {
		t.Run(fmt.Sprintf("%dx%d", c.Ny, c.Nx), func(t *testing.T) {
			p, err := NewPlan2D(c.Ny, c.Nx)
			if err != nil {
				t.Fatal(err)
			}
			x := cplx(c.InRe, c.InIm)
			got := make([]complex128, len(x))
			for _, tc := range []struct {
				name string
				f    func(dst, src []complex128)
				want []complex128
			}{
				{"Forward", p.Forward, cplx(c.FwdRe, c.FwdIm)},
				{"Inverse", p.Inverse, cplx(c.InvRe, c.InvIm)},
				{"CentredForward", p.CentredForward, cplx(c.CfwdRe, c.CfwdIm)},
				{"CentredInverse", p.CentredInverse, cplx(c.CinvRe, c.CinvIm)},
			} {
				tc.f(got, x)
				if e := relErr(got, tc.want); e > tol {
					t.Errorf("%s: relative error %.3g against numpy", tc.name, e)
				}
			}
		})
	}
}

// TestShiftAgainstNumpy checks Shift and IShift against numpy.fft.fftshift and
// ifftshift applied to arange(ny*nx), both out of place and in place.
func TestShiftAgainstNumpy(t *testing.T) {
	for _, c := range loadNumpy(t) {
		n := c.Ny * c.Nx
		idx := make([]complex128, n)
		for i := range idx {
			idx[i] = complex(float64(i), -float64(i))
		}
		for _, tc := range []struct {
			name string
			f    func(dst, src []complex128, ny, nx int)
			want []int
		}{
			{"Shift", Shift, c.FFTShift},
			{"IShift", IShift, c.IFFTShift},
		} {
			out := make([]complex128, n)
			tc.f(out, idx, c.Ny, c.Nx)
			inPlace := append([]complex128(nil), idx...)
			tc.f(inPlace, inPlace, c.Ny, c.Nx)
			for i, w := range tc.want {
				want := complex(float64(w), -float64(w))
				if out[i] != want || inPlace[i] != want {
					t.Errorf("%dx%d %s: element %d is %v (in place %v), numpy has index %d",
						c.Ny, c.Nx, tc.name, i, out[i], inPlace[i], w)
					break
				}
			}
		}
	}
}

// TestCentredAgainstExplicitShifts checks the modulation shortcut (even
// sizes) and the shift path (odd sizes) against Shift ∘ Forward ∘ IShift
// written out with this package's own Shift, which TestShiftAgainstNumpy ties
// to numpy.
func TestCentredAgainstExplicitShifts(t *testing.T) {
	// Beyond shapes2D: 6×10 and 82×6 take the modulation path (82 = 2·41 also
	// runs Bluestein on strided columns), 2×2 and 12×20 the slot rotation.
	extra := [][2]int{{6, 10}, {2, 2}, {6, 8}, {5, 8}, {8, 5}, {82, 6}, {6, 82}, {12, 20}}
	seen := map[centring]bool{}
	for _, sh := range append(shapes2D, extra...) {
		ny, nx := sh[0], sh[1]
		p, err := NewPlan2D(ny, nx)
		if err != nil {
			t.Fatal(err)
		}
		seen[p.centre] = true
		x := randVec(ny*nx, uint64(ny*7+nx))
		for _, inv := range []bool{false, true} {
			want := make([]complex128, ny*nx)
			IShift(want, x, ny, nx)
			if inv {
				p.Inverse(want, want)
			} else {
				p.Forward(want, want)
			}
			Shift(want, want, ny, nx)
			got := make([]complex128, ny*nx)
			if inv {
				p.CentredInverse(got, x)
			} else {
				p.CentredForward(got, x)
			}
			if e := relErr(got, want); e > tol {
				t.Errorf("%dx%d inverse=%v: centred transform differs from explicit shifts by %.3g", ny, nx, inv, e)
			}
			// Round trip through the centred pair.
			if inv {
				p.CentredForward(got, got)
			} else {
				p.CentredInverse(got, got)
			}
			if e := relErr(got, x); e > tol {
				t.Errorf("%dx%d inverse=%v: centred round trip error %.3g", ny, nx, inv, e)
			}
		}
	}
	for _, c := range []centring{centreRotate, centreModulate, centreShift} {
		if !seen[c] {
			t.Errorf("no shape exercised centring mode %d", c)
		}
	}
}

// TestRandomShapes draws 60 shapes (seeded) with sides up to 140 and checks
// Forward against gonum row/column transforms (reference library) and the
// centred pair against explicit shifts, in place and out of place. It
// catches block-remainder and radix-order cases a fixed table can miss.
func TestRandomShapes(t *testing.T) {
	r := rand.New(rand.NewPCG(2024, 6))
	for range 60 {
		ny, nx := 1+r.IntN(140), 1+r.IntN(140)
		p, err := NewPlan2D(ny, nx)
		if err != nil {
			t.Fatal(err)
		}
		x := randVec(ny*nx, uint64(ny*1000+nx))
		got := make([]complex128, ny*nx)
		p.Forward(got, x)
		if e := relErr(got, ref2DGonum(x, ny, nx, false)); e > tol {
			t.Errorf("%dx%d: Forward relative error %.3g against gonum", ny, nx, e)
		}
		want := make([]complex128, ny*nx)
		IShift(want, x, ny, nx)
		p.Inverse(want, want)
		Shift(want, want, ny, nx)
		copy(got, x)
		p.CentredInverse(got, got)
		if e := relErr(got, want); e > tol {
			t.Errorf("%dx%d: in-place CentredInverse differs from explicit shifts by %.3g", ny, nx, e)
		}
	}
}
