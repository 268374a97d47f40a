package trajectories

import (
	"errors"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"
)

// MaskPSF returns the point-spread function of a Cartesian mask: the inverse
// discrete Fourier transform of the mask (ones where sampled) on the centred
// grid, scaled by 1/(nx·ny) so that a fully sampled mask gives a unit impulse
// at the image centre (row ny/2, column nx/2). The value at the centre is thus
// the sampled fraction, 1/R for line sampling. Row-major ny×nx, positions on
// the FFT-centred image grid (row i is y = (i − ny/2)/ny FOV).
func MaskPSF(mask []bool, ny, nx int) ([]complex128, error) {
	if ny < 1 || nx < 1 || len(mask) != ny*nx {
		return nil, errors.New("trajectories: MaskPSF: mask length must be ny·nx with ny, nx ≥ 1")
	}
	// Place sample (m, n), ky = m − ny/2, kx = n − nx/2, at FFT index
	// (ky mod ny, kx mod nx).
	a := make([]complex128, ny*nx)
	for m := range ny {
		km := ((m-ny/2)%ny + ny) % ny
		for n := range nx {
			if mask[m*nx+n] {
				kn := ((n-nx/2)%nx + nx) % nx
				a[km*nx+kn] = 1
			}
		}
	}
	// Inverse 2D DFT, rows then columns, one plan per dimension.
	rowFFT := fourier.NewCmplxFFT(nx)
	for m := range ny {
		r := a[m*nx : (m+1)*nx]
		rowFFT.Sequence(r, r)
	}
	colFFT := fourier.NewCmplxFFT(ny)
	col := make([]complex128, ny)
	for n := range nx {
		for m := range ny {
			col[m] = a[m*nx+n]
		}
		colFFT.Sequence(col, col)
		for m := range ny {
			a[m*nx+n] = col[m]
		}
	}
	// Image pixel (i, j) sits at FFT index ((i − ny/2) mod ny, (j − nx/2) mod nx).
	out := make([]complex128, ny*nx)
	scale := complex(1/float64(ny*nx), 0)
	for i := range ny {
		p := ((i-ny/2)%ny + ny) % ny
		for j := range nx {
			q := ((j-nx/2)%nx + nx) % nx
			out[i*nx+j] = a[p*nx+q] * scale
		}
	}
	return out, nil
}

// PSF returns the point-spread function of a Cartesian sampling (see MaskPSF),
// scaled so that full sampling gives a unit impulse: ny×nx for
// FamilyCartesian2D, the nz×ny (z rows, y columns) phase-encode plane for
// FamilyCartesian3D (the readout contributes a unit impulse along x).
func (s Sampling) PSF() ([]complex128, error) {
	switch {
	case s.Mask == nil:
		return nil, errors.New("trajectories: PSF: sampling " + s.Scheme + " has no Cartesian mask")
	case s.Family == FamilyCartesian3D:
		return MaskPSF(s.Mask, s.Nz, s.Ny)
	default:
		return MaskPSF(s.Mask, s.Ny, s.Nx)
	}
}

// SideLobeToPeak returns the largest PSF magnitude away from the centre pixel
// (row ny/2, column nx/2) divided by the magnitude at the centre: the
// incoherence figure of Lustig, Donoho & Pauly (MRM 2007;58:1182-1195). It is
// 1 for uniform undersampling without calibration (replicas as tall as the
// peak) and 0 for full sampling.
func SideLobeToPeak(psf []complex128, ny, nx int) (float64, error) {
	if ny < 1 || nx < 1 || len(psf) != ny*nx {
		return 0, errors.New("trajectories: SideLobeToPeak: psf length must be ny·nx with ny, nx ≥ 1")
	}
	c := (ny/2)*nx + nx/2
	peak := cmplx.Abs(psf[c])
	if peak == 0 {
		return 0, errors.New("trajectories: SideLobeToPeak: PSF is zero at the centre")
	}
	side := 0.0
	for i, v := range psf {
		if i != c {
			side = max(side, cmplx.Abs(v))
		}
	}
	return side / peak, nil
}
