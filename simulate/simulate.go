// Package simulate owns what a scanner or microscope would measure: analytic
// phantoms (an image and its exact spectrum), linear encoding operators that map
// an image grid to samples (masked Cartesian FFT, NUFFT, diffraction tomography),
// coil sensitivities and measurement noise. Quality metrics live in the
// sub-package quality; the FFT engine in fft.
//
// Conventions shared by every file here:
//   - Images are row-major []complex128 (or []float64) of ny rows by nx columns.
//     Row index i grows downwards on screen, column index j to the right.
//   - Positions are in units of the field of view (FOV): the pixel (i, j) has its
//     centre at x = (j - nx/2)/nx, y = (i - ny/2)/ny, the FFT-centred grid.
//   - Spatial frequencies are in cycles per FOV; on the centred k-space grid the
//     sample (m, n) sits at kx = n - nx/2, ky = m - ny/2.
//   - FFT scaling is orthonormal, so white noise of standard deviation σ per
//     k-space sample (per real and imaginary channel) appears with the same σ in
//     a fully sampled image.
package simulate

// Operator is a linear encoding operator E, from an image of ImageLen values to
// DataLen measured samples, and its adjoint E^H. Implementations hold scratch
// space and are not safe for concurrent use unless they say otherwise; make one
// per goroutine. dst and src never alias.
type Operator interface {
	Forward(dst, src []complex128) // image -> samples
	Adjoint(dst, src []complex128) // samples -> image
	ImageLen() int
	DataLen() int
}

// NormalOperator is an Operator that applies its normal operator EᴴE to an
// image directly, in less work than Forward followed by Adjoint (for a
// Cartesian mask of whole phase-encode rows the readout transforms cancel).
// Solvers that need only EᴴE and Eᴴy (gradient steps, conjugate gradients on
// the normal equations) use it when the operator offers it. As with the
// other methods, dst and src never alias.
type NormalOperator interface {
	Operator
	Normal(dst, src []complex128) // image -> image, EᴴE·src
}

// OrthonormalRows is a NormalOperator that can report E·Eᴴ = I: its rows are
// orthonormal, as for a selection of samples of a unitary DFT. Eᴴ then maps
// the data space isometrically into the image space, so a solver may keep a
// data-space vector q as the image Eᴴq (and recover q = E·Eᴴq), trading a
// Forward and an Adjoint per iteration for one Normal.
type OrthonormalRows interface {
	NormalOperator
	OrthonormalRows() bool // reports whether E·Eᴴ = I holds
}

// Phantom is an object known in closed form, so that measured data are drawn
// from its exact spectrum and never from the FFT of the grid that is
// reconstructed on (which would commit the inverse crime).
type Phantom interface {
	// Rasterize returns the object averaged over the area of each pixel of an
	// ny-by-nx FFT-centred grid covering the FOV, row-major.
	Rasterize(nx, ny int) []float64
	// Spectrum is the continuous Fourier transform
	// F(kx, ky) = ∫∫ f(x, y) exp(-2πi(kx·x + ky·y)) dx dy
	// with x, y in FOV units and kx, ky in cycles per FOV.
	Spectrum(kx, ky float64) complex128
}
