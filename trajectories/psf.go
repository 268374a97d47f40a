package trajectories

import (
	"errors"
	"math"
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

// PSF returns the point-spread function of s. For Cartesian samplings it is
// MaskPSF, scaled so that full sampling gives a unit impulse: ny×nx for
// FamilyCartesian2D, the nz×ny (z rows, y columns) phase-encode plane for
// FamilyCartesian3D (the readout contributes a unit impulse along x). For
// non-Cartesian samplings it is PointPSF on the Ny×Nx grid, peak-normalised.
func (s Sampling) PSF() ([]complex128, error) {
	switch {
	case s.Mask == nil && s.K != nil:
		return PointPSF(s.K, s.Weights, s.Ny, s.Nx)
	case s.Mask == nil:
		return nil, errors.New("trajectories: PSF: sampling " + s.Scheme + " has neither a mask nor sample positions")
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

// PointPSF returns the point-spread function of non-Cartesian samples k
// (cycles per FOV) with density-compensation weights w: the adjoint of unit
// data, psf(x, y) = Σ_j w_j exp(2πi(kx_j·x + ky_j·y)), evaluated by direct
// summation on the ny×nx FFT-centred grid (pixel (i, j) at
// x = (j − nx/2)/nx, y = (i − ny/2)/ny FOV) and divided by its value at the
// centre, Σ w_j. The cost is len(k)·ny·nx complex multiply-adds; a gridded
// adjoint (NUFFT) is the fast alternative for large problems. A nil w means
// unit weights.
func PointPSF(k [][2]float64, w []float64, ny, nx int) ([]complex128, error) {
	if ny < 1 || nx < 1 {
		return nil, errors.New("trajectories: PointPSF: grid sizes must be at least 1")
	}
	if len(k) == 0 {
		return nil, errors.New("trajectories: PointPSF: no samples")
	}
	if w != nil && len(w) != len(k) {
		return nil, errors.New("trajectories: PointPSF: one weight per sample needed")
	}
	out := make([]complex128, ny*nx)
	ex := make([]complex128, nx)
	ey := make([]complex128, ny)
	total := 0.0
	for s, kk := range k {
		ws := 1.0
		if w != nil {
			ws = w[s]
		}
		total += ws
		phase(ex, kk[0], nx)
		phase(ey, kk[1], ny)
		for i := range ny {
			a := complex(ws, 0) * ey[i]
			row := out[i*nx : (i+1)*nx]
			for j, e := range ex {
				row[j] += a * e
			}
		}
	}
	if total == 0 {
		return nil, errors.New("trajectories: PointPSF: weights sum to zero")
	}
	inv := complex(1/total, 0)
	for i := range out {
		out[i] *= inv
	}
	return out, nil
}

// phase fills e[j] = exp(2πi·k·(j − n/2)/n).
func phase(e []complex128, k float64, n int) {
	for j := range e {
		s, c := math.Sincos(2 * math.Pi * k * float64(j-n/2) / float64(n))
		e[j] = complex(c, s)
	}
}

// SideLobeToPeakOutside is SideLobeToPeak with the side lobes sought only at
// pixels farther than radius pixels from the centre, so that the main lobe of
// a non-Cartesian PSF (whose first neighbours are not aliasing) is left out.
func SideLobeToPeakOutside(psf []complex128, ny, nx int, radius float64) (float64, error) {
	if ny < 1 || nx < 1 || len(psf) != ny*nx {
		return 0, errors.New("trajectories: SideLobeToPeakOutside: psf length must be ny·nx with ny, nx ≥ 1")
	}
	c := (ny/2)*nx + nx/2
	peak := cmplx.Abs(psf[c])
	if peak == 0 {
		return 0, errors.New("trajectories: SideLobeToPeakOutside: PSF is zero at the centre")
	}
	side := 0.0
	for i := range ny {
		for j := range nx {
			if math.Hypot(float64(i-ny/2), float64(j-nx/2)) > radius {
				side = max(side, cmplx.Abs(psf[i*nx+j]))
			}
		}
	}
	return side / peak, nil
}
