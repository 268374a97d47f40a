package fft

import (
	"math/rand/v2"
	"testing"

	dspfft "github.com/mjibson/go-dsp/fft"
)

// refColumnFilter computes the column filter the long way with go-dsp's 1D
// FFT (reference library) on each column, the shifts written out with
// numpy's conventions: fftshift = roll by ⌊n/2⌋, ifftshift = roll by −⌊n/2⌋
// (numpy.fft documentation). go-dsp's IFFT includes the 1/n, so the
// unnormalised pair already equals the orthonormal pair.
func refColumnFilter(x []complex128, ny, nx int, h []float64) []complex128 {
	out := make([]complex128, ny*nx)
	col := make([]complex128, ny)
	half := ny / 2
	for j := range nx {
		for i := range ny {
			col[i] = x[((i+half)%ny)*nx+j] // ifftshift
		}
		k := dspfft.FFT(col)
		for i := range k {
			k[i] *= complex(h[(i+half)%ny], 0) // centred row of frequency i
		}
		y := dspfft.IFFT(k)
		for i := range ny {
			out[((i+half)%ny)*nx+j] = y[i] // fftshift
		}
	}
	return out
}

// TestCentredColumnFilter checks the filter against go-dsp column by column,
// and against the 2D centred pair with the weight spread along kx, on shapes
// that take the slot rotation (sides multiple of 4), the modulated and the
// shifted 2D centring (the filter then shifts explicitly), Bluestein columns
// (82 = 2·41, 97) and last column blocks of width 1; in place and out of
// place.
func TestCentredColumnFilter(t *testing.T) {
	shapes := [][2]int{{256, 256}, {192, 192}, {64, 100}, {16, 65}, {6, 10}, {82, 6}, {97, 12}, {5, 8}, {1, 4}, {2, 3}, {240, 256}}
	r := rand.New(rand.NewPCG(7, 11))
	for _, sh := range shapes {
		ny, nx := sh[0], sh[1]
		p, err := NewPlan2D(ny, nx)
		if err != nil {
			t.Fatal(err)
		}
		h := make([]float64, ny)
		for i := range h {
			if r.Float64() < 0.4 {
				h[i] = r.Float64() * 2 // a weight, or 0 for a row not acquired
			}
		}
		h[ny/2] = 1
		x := randVec(ny*nx, uint64(ny*31+nx))
		want := refColumnFilter(x, ny, nx, h)

		got := make([]complex128, ny*nx)
		p.CentredColumnFilter(got, x, h)
		if e := relErr(got, want); e > tol {
			t.Errorf("%d×%d: column filter differs from go-dsp by %.3g", ny, nx, e)
		}
		inPlace := append([]complex128(nil), x...)
		p.CentredColumnFilter(inPlace, inPlace, h)
		if e := relErr(inPlace, want); e > tol {
			t.Errorf("%d×%d: in-place column filter differs from go-dsp by %.3g", ny, nx, e)
		}

		// The 2D pair with H[k, l] = h[k]: the row transforms cancel.
		two := make([]complex128, ny*nx)
		p.CentredForward(two, x)
		for k := range ny {
			for l := range nx {
				two[k*nx+l] *= complex(h[k], 0)
			}
		}
		p.CentredInverse(two, two)
		if e := relErr(got, two); e > tol {
			t.Errorf("%d×%d: column filter differs from the 2D centred pair by %.3g", ny, nx, e)
		}
	}
}

// TestCentredColumnFilterAllocates checks that only the first call
// allocates (the plan keeps its scratch block).
func TestCentredColumnFilterAllocates(t *testing.T) {
	p, err := NewPlan2D(64, 64)
	if err != nil {
		t.Fatal(err)
	}
	x := randVec(64*64, 3)
	h := make([]float64, 64)
	h[32] = 1
	p.CentredColumnFilter(x, x, h)
	if n := testing.AllocsPerRun(5, func() { p.CentredColumnFilter(x, x, h) }); n != 0 {
		t.Errorf("CentredColumnFilter allocates %v times per call after the first", n)
	}
}
