package fft

import (
	"fmt"
	"testing"

	dspfft "github.com/mjibson/go-dsp/fft"
	"gonum.org/v1/gonum/dsp/fourier"
)

// Benchmarks compare this package with the two general-purpose Go FFT
// libraries on the same data, in one run. All are single-threaded: go-dsp's
// worker pool is set to one worker.

func rand2D(ny, nx int) []complex128 { return randVec(ny*nx, uint64(ny*nx)) }

func benchOurs2D(b *testing.B, ny, nx int) {
	p, err := NewPlan2D(ny, nx)
	if err != nil {
		b.Fatal(err)
	}
	x := rand2D(ny, nx)
	y := make([]complex128, ny*nx)
	b.ResetTimer()
	for b.Loop() {
		p.Forward(y, x)
	}
}

// gonum2D is the row/column loop a user of gonum's dsp/fourier would write,
// with the CmplxFFT plans made once.
type gonum2D struct {
	ny, nx     int
	row, col   *fourier.CmplxFFT
	colIn, out []complex128
}

func newGonum2D(ny, nx int) *gonum2D {
	return &gonum2D{ny: ny, nx: nx, row: fourier.NewCmplxFFT(nx), col: fourier.NewCmplxFFT(ny),
		colIn: make([]complex128, ny), out: make([]complex128, ny)}
}

func (g *gonum2D) forward(dst, src []complex128) {
	for i := range g.ny {
		g.row.Coefficients(dst[i*g.nx:(i+1)*g.nx], src[i*g.nx:(i+1)*g.nx])
	}
	for j := range g.nx {
		for i := range g.ny {
			g.colIn[i] = dst[i*g.nx+j]
		}
		g.col.Coefficients(g.out, g.colIn)
		for i := range g.ny {
			dst[i*g.nx+j] = g.out[i]
		}
	}
}

func benchGonum2D(b *testing.B, ny, nx int) {
	g := newGonum2D(ny, nx)
	x := rand2D(ny, nx)
	y := make([]complex128, ny*nx)
	b.ResetTimer()
	for b.Loop() {
		g.forward(y, x)
	}
}

func benchGoDSP2D(b *testing.B, ny, nx int) {
	dspfft.SetWorkerPoolSize(1)
	defer dspfft.SetWorkerPoolSize(0)
	flat := rand2D(ny, nx)
	x := make([][]complex128, ny)
	for i := range x {
		x[i] = flat[i*nx : (i+1)*nx]
	}
	b.ResetTimer()
	for b.Loop() {
		_ = dspfft.FFT2(x)
	}
}

func bench2DSet(b *testing.B, ny, nx int) {
	b.Run("ours", func(b *testing.B) { benchOurs2D(b, ny, nx) })
	b.Run("gonum", func(b *testing.B) { benchGonum2D(b, ny, nx) })
	b.Run("godsp", func(b *testing.B) { benchGoDSP2D(b, ny, nx) })
}

func BenchmarkFFT2_256(b *testing.B) { bench2DSet(b, 256, 256) }
func BenchmarkFFT2_192(b *testing.B) { bench2DSet(b, 192, 192) }
func BenchmarkFFT2_240(b *testing.B) { bench2DSet(b, 240, 240) }
func BenchmarkFFT2_128(b *testing.B) { bench2DSet(b, 128, 128) }

// BenchmarkFFT2_512 is the size of a 2×-oversampled gridding transform of a
// 256² image; only ours and gonum (go-dsp allocates 4 MiB per call).
func BenchmarkFFT2_512(b *testing.B) {
	b.Run("ours", func(b *testing.B) { benchOurs2D(b, 512, 512) })
	b.Run("gonum", func(b *testing.B) { benchGonum2D(b, 512, 512) })
}

// BenchmarkFFT2_256_Inverse and _Centred time the other 256² entry points.
func BenchmarkFFT2_256_Inverse(b *testing.B) {
	p, _ := NewPlan2D(256, 256)
	x := rand2D(256, 256)
	for b.Loop() {
		p.Inverse(x, x)
	}
}

func BenchmarkFFT2_256_Centred(b *testing.B) {
	p, _ := NewPlan2D(256, 256)
	x := rand2D(256, 256)
	for b.Loop() {
		p.CentredForward(x, x)
	}
}

func BenchmarkFFT1(b *testing.B) {
	for _, n := range []int{256, 240, 1024, 97} {
		b.Run(fmt.Sprintf("ours_%d", n), func(b *testing.B) {
			p, err := NewPlan(n)
			if err != nil {
				b.Fatal(err)
			}
			x := randVec(n, 1)
			y := make([]complex128, n)
			for b.Loop() {
				p.Forward(y, x)
			}
		})
		b.Run(fmt.Sprintf("gonum_%d", n), func(b *testing.B) {
			g := fourier.NewCmplxFFT(n)
			x := randVec(n, 1)
			y := make([]complex128, n)
			for b.Loop() {
				g.Coefficients(y, x)
			}
		})
		b.Run(fmt.Sprintf("godsp_%d", n), func(b *testing.B) {
			dspfft.SetWorkerPoolSize(1)
			defer dspfft.SetWorkerPoolSize(0)
			x := randVec(n, 1)
			for b.Loop() {
				_ = dspfft.FFT(x)
			}
		})
	}
}
