package fft_test

import (
	"fmt"
	"math"
	"strings"
	"sync"

	"accelplan/simulate/fft"
)

// A length-4 orthonormal DFT of an impulse is flat, and Inverse brings it
// back.
func ExamplePlan() {
	p, err := fft.NewPlan(4)
	if err != nil {
		panic(err)
	}
	x := []complex128{1, 0, 0, 0}
	X := make([]complex128, 4)
	p.Forward(X, x)
	fmt.Println(X)
	p.Inverse(x, X)
	fmt.Println(x)
	// Output:
	// [(0.5+0i) (0.5+0i) (0.5+0i) (0.5+0i)]
	// [(1+0i) (0+0i) (0+0i) (0+0i)]
}

// A cosine with one cycle per FOV along x, on the FFT-centred grid, shows up
// in centred k-space at kx = ±1 around DC at (ny/2, nx/2) = (2, 4).
func ExamplePlan2D_CentredForward() {
	const ny, nx = 4, 8
	p, err := fft.NewPlan2D(ny, nx)
	if err != nil {
		panic(err)
	}
	img := make([]complex128, ny*nx)
	for i := range ny {
		for j := range nx {
			x := float64(j-nx/2) / nx // FOV units
			img[i*nx+j] = complex(math.Cos(2*math.Pi*x), 0)
		}
	}
	k := make([]complex128, ny*nx)
	p.CentredForward(k, img)
	for m := range ny {
		row := make([]string, nx)
		for n := range nx {
			v := math.Round(real(k[m*nx+n])*100) / 100
			row[n] = fmt.Sprintf("%.2f", v+0) // +0 turns -0 into 0
		}
		fmt.Println(strings.Join(row, " "))
	}
	// Output:
	// 0.00 0.00 0.00 0.00 0.00 0.00 0.00 0.00
	// 0.00 0.00 0.00 0.00 0.00 0.00 0.00 0.00
	// 0.00 0.00 0.00 2.83 0.00 2.83 0.00 0.00
	// 0.00 0.00 0.00 0.00 0.00 0.00 0.00 0.00
}

// Shift moves DC from index 0 to the centre; IShift moves it back, also for
// odd sizes where the two differ.
func ExampleShift() {
	x := []complex128{0, 1, 2, 3, 4}
	y := make([]complex128, 5)
	fft.Shift(y, x, 1, 5)
	fmt.Println(real(y[0]), real(y[1]), real(y[2]), real(y[3]), real(y[4]))
	fft.IShift(y, y, 1, 5)
	fmt.Println(real(y[0]), real(y[1]), real(y[2]), real(y[3]), real(y[4]))
	// Output:
	// 3 4 0 1 2
	// 0 1 2 3 4
}

// Forward and Inverse of a 2D plan, in place: the orthonormal scaling keeps
// the energy, and the round trip returns the image.
func ExamplePlan2D() {
	p, err := fft.NewPlan2D(3, 4)
	if err != nil {
		panic(err)
	}
	img := []complex128{1, 2, 3, 4, 0, 0, 0, 0, 5, 6, 7, 8}
	energy := func(x []complex128) (e float64) {
		for _, v := range x {
			e += real(v)*real(v) + imag(v)*imag(v)
		}
		return e
	}
	before := energy(img)
	p.Forward(img, img)
	fmt.Printf("DC %.4f, energy kept: %v\n", real(img[0]), math.Abs(energy(img)-before) < 1e-12)
	p.Inverse(img, img)
	fmt.Printf("%.0f\n", real(img[8]))
	// Output:
	// DC 10.3923, energy kept: true
	// 5
}

// Each goroutine needs its own plan; Clone shares the tables.
func ExamplePlan2D_Clone() {
	p, err := fft.NewPlan2D(64, 64)
	if err != nil {
		panic(err)
	}
	var wg sync.WaitGroup
	sums := make([]float64, 4)
	for g := range sums {
		q := p.Clone()
		wg.Go(func() {
			x := make([]complex128, q.Len())
			x[0] = complex(float64(g+1), 0)
			q.Forward(x, x)
			sums[g] = real(x[q.Len()-1]) * 64 // every sample is (g+1)/64
		})
	}
	wg.Wait()
	fmt.Println(sums)
	// Output:
	// [1 2 3 4]
}

// A column filter along y keeps only the DC row of centred k-space (ky = 0
// at row ny/2): the image 1 + (−1)^i, a constant plus the highest frequency
// along y, comes back as the constant.
func ExamplePlan2D_CentredColumnFilter() {
	const ny, nx = 4, 3
	p, err := fft.NewPlan2D(ny, nx)
	if err != nil {
		panic(err)
	}
	img := make([]complex128, ny*nx)
	for i := range ny {
		for j := range nx {
			img[i*nx+j] = complex(1+math.Pow(-1, float64(i)), 0)
		}
	}
	h := make([]float64, ny)
	h[ny/2] = 1
	p.CentredColumnFilter(img, img, h)
	for i := range ny {
		fmt.Printf("%.3f %.3f %.3f\n", real(img[i*nx]), real(img[i*nx+1]), real(img[i*nx+2]))
	}
	// Output:
	// 1.000 1.000 1.000
	// 1.000 1.000 1.000
	// 1.000 1.000 1.000
	// 1.000 1.000 1.000
}
