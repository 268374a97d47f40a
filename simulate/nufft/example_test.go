package nufft_test

import (
	"fmt"
	"math"

	"accelplan/simulate/nufft"
)

// A constant 8×8 image sampled at three k-space points. At DC the
// orthonormal transform gives √(8·8) = 8; at a non-zero integer frequency a
// constant image has no energy; at half a cycle per FOV the sum by hand is
// Σ_{m=−4}^{3} exp(−iπm/8) = 1 + 2(cos π/8 + cos π/4 + cos 3π/8) + i = 5.0273 + 1i.
func ExampleNew() {
	const ny, nx = 8, 8
	kx := []float64{0, 1, 0.5}
	ky := []float64{0, 0, 0}
	plan, err := nufft.New(ny, nx, kx, ky, nufft.Options{Width: 8})
	if err != nil {
		fmt.Println(err)
		return
	}
	img := make([]complex128, plan.ImageLen())
	for i := range img {
		img[i] = 1
	}
	y := make([]complex128, plan.DataLen())
	plan.Forward(y, img)
	for j, v := range y {
		fmt.Printf("k = (%g, %g): %.4f %+.4fi\n", kx[j], ky[j], round4(real(v)), round4(imag(v)))
	}
	// Output:
	// k = (0, 0): 8.0000 +0.0000i
	// k = (1, 0): 0.0000 +0.0000i
	// k = (0.5, 0): 5.0273 +1.0000i
}

// round4 rounds to 4 decimals and turns −0 into 0 for printing.
func round4(x float64) float64 { return math.Round(x*1e4)/1e4 + 0 }

// A radial trajectory's normal operator AᴴA applied by Toeplitz embedding:
// the point-spread function at the centre of a 32×32 image.
func ExampleNewToeplitz() {
	const n, spokes = 32, 50
	var kx, ky []float64
	for s := range spokes {
		sin, cos := math.Sincos(math.Pi * float64(s) / spokes)
		for r := range n {
			kx = append(kx, float64(r-n/2)*cos)
			ky = append(ky, float64(r-n/2)*sin)
		}
	}
	normal, err := nufft.NewToeplitz(n, n, kx, ky, nil, nufft.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	delta := make([]complex128, normal.ImageLen())
	delta[(n/2)*n+n/2] = 1
	psf := make([]complex128, len(delta))
	normal.Apply(psf, delta)
	// AᴴA's diagonal is the number of samples over the pixel count.
	fmt.Printf("centre %.4f, expected %.4f\n", real(psf[(n/2)*n+n/2]), float64(len(kx))/(n*n))
	// Output:
	// centre 1.5625, expected 1.5625
}
