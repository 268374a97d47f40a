package trajectories

import (
	"errors"
	"math"
	"math/cmplx"
)

// Picture returns a row-major image of where s samples, for writers to turn
// into a picture: 1 where sampled, 0 elsewhere. Cartesian 2D: the ny×nx mask;
// Cartesian 3D: the nz×ny phase-encode plane (rows kz); non-Cartesian: the
// samples of K dropped into the nearest cell of the Ny×Nx centred k-space
// grid (cell (i, j) is ky ≈ i − Ny/2, kx ≈ j − Nx/2; samples beyond it are
// left out). 3D illumination sets have no picture.
func (s Sampling) Picture() (img []float64, rows, cols int, err error) {
	switch {
	case s.Mask != nil && s.Family == FamilyCartesian3D:
		rows, cols = s.Nz, s.Ny
	case s.Mask != nil:
		rows, cols = s.Ny, s.Nx
	case s.K != nil:
		rows, cols = s.Ny, s.Nx
		img = make([]float64, rows*cols)
		for _, k := range s.K {
			i := int(math.Round(k[1])) + rows/2
			j := int(math.Round(k[0])) + cols/2
			if i >= 0 && i < rows && j >= 0 && j < cols {
				img[i*cols+j] = 1
			}
		}
		return img, rows, cols, nil
	default:
		return nil, 0, 0, errors.New("trajectories: Picture: sampling " + s.Scheme + " has neither a mask nor sample positions")
	}
	if len(s.Mask) != rows*cols {
		return nil, 0, 0, errors.New("trajectories: Picture: mask size disagrees with the grid")
	}
	img = make([]float64, rows*cols)
	for i, v := range s.Mask {
		if v {
			img[i] = 1
		}
	}
	return img, rows, cols, nil
}

// Magnitude returns |psf| divided by its value at the centre pixel (row
// rows/2, column cols/2), ready to be shown on a linear or logarithmic scale.
func Magnitude(psf []complex128, rows, cols int) ([]float64, error) {
	if rows < 1 || cols < 1 || len(psf) != rows*cols {
		return nil, errors.New("trajectories: Magnitude: psf length must be rows·cols")
	}
	peak := cmplx.Abs(psf[(rows/2)*cols+cols/2])
	if peak == 0 {
		return nil, errors.New("trajectories: Magnitude: PSF is zero at the centre")
	}
	out := make([]float64, len(psf))
	for i, v := range psf {
		out[i] = cmplx.Abs(v) / peak
	}
	return out, nil
}
