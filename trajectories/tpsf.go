package trajectories

import (
	"errors"
	"fmt"
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"
)

// haar2 applies levels of the orthonormal 2D Haar wavelet transform in place
// (forward, or its inverse) to a rows×cols row-major image, with the layout of
// PyWavelets' coeffs_to_array: at each level the current top-left block is
// split into approximation (top left), detail along columns (top right),
// along rows (bottom left) and both (bottom right). One level maps a pair
// (a, b) to ((a + b)/√2, (a − b)/√2). rows and cols must be divisible by
// 2^levels. tmp must hold max(rows, cols) values.
func haar2(x []complex128, rows, cols, levels int, inverse bool, tmp []complex128) {
	r, c := rows, cols
	type block struct{ r, c int }
	var blocks []block
	for range levels {
		blocks = append(blocks, block{r, c})
		r, c = r/2, c/2
	}
	if inverse {
		for i, j := 0, len(blocks)-1; i < j; i, j = i+1, j-1 {
			blocks[i], blocks[j] = blocks[j], blocks[i]
		}
	}
	for _, b := range blocks {
		if !inverse {
			for i := range b.r {
				haar1(x[i*cols:], 1, b.c, false, tmp)
			}
			for j := range b.c {
				haar1(x[j:], cols, b.r, false, tmp)
			}
		} else {
			for j := range b.c {
				haar1(x[j:], cols, b.r, true, tmp)
			}
			for i := range b.r {
				haar1(x[i*cols:], 1, b.c, true, tmp)
			}
		}
	}
}

// haar1 transforms n values x[0], x[stride], … : forward puts the n/2 sums
// first and the n/2 differences after them; inverse undoes it.
func haar1(x []complex128, stride, n int, inverse bool, tmp []complex128) {
	s := complex(1/math.Sqrt2, 0)
	h := n / 2
	if !inverse {
		for k := range h {
			a, b := x[2*k*stride], x[(2*k+1)*stride]
			tmp[k] = (a + b) * s
			tmp[h+k] = (a - b) * s
		}
	} else {
		for k := range h {
			a, d := x[k*stride], x[(h+k)*stride]
			tmp[2*k] = (a + d) * s
			tmp[2*k+1] = (a - d) * s
		}
	}
	for k := range n {
		x[k*stride] = tmp[k]
	}
}

// WaveletPSF returns the transform-domain point-spread function of a
// Cartesian mask (Lustig M, Donoho D, Pauly JM, MRM 2007;58:1182-1195): for
// the wavelet coefficient coeff (an index into the rows×cols coefficient
// layout of an orthonormal Haar transform with levels levels, approximation
// at the top left), TPSF = Ψ F^H M F Ψ^H e_coeff, returned as magnitudes
// divided by the magnitude at coeff itself, together with the largest of them
// away from coeff (the transform-domain side-lobe-to-peak ratio). rows and
// cols must be divisible by 2^levels. The mask is on the centred k-space
// grid; F is the FFT, and F^H M F is a circular convolution, so the centring
// does not change the result.
func WaveletPSF(mask []bool, rows, cols, levels, coeff int) ([]float64, float64, error) {
	if rows < 1 || cols < 1 || len(mask) != rows*cols {
		return nil, 0, errors.New("trajectories: WaveletPSF: mask length must be rows·cols")
	}
	if levels < 1 || rows%(1<<levels) != 0 || cols%(1<<levels) != 0 {
		return nil, 0, fmt.Errorf("trajectories: WaveletPSF: %d levels need rows and cols divisible by %d (have %d×%d)", levels, 1<<max(levels, 0), rows, cols)
	}
	if coeff < 0 || coeff >= rows*cols {
		return nil, 0, fmt.Errorf("trajectories: WaveletPSF: coefficient %d outside 0..%d", coeff, rows*cols-1)
	}
	x := make([]complex128, rows*cols)
	tmp := make([]complex128, max(rows, cols))
	x[coeff] = 1
	haar2(x, rows, cols, levels, true, tmp)
	rowFFT := fourier.NewCmplxFFT(cols)
	colFFT := fourier.NewCmplxFFT(rows)
	col := make([]complex128, rows)
	fft2 := func(forward bool) {
		for i := range rows {
			r := x[i*cols : (i+1)*cols]
			if forward {
				rowFFT.Coefficients(r, r)
			} else {
				rowFFT.Sequence(r, r)
			}
		}
		for j := range cols {
			for i := range rows {
				col[i] = x[i*cols+j]
			}
			if forward {
				colFFT.Coefficients(col, col)
			} else {
				colFFT.Sequence(col, col)
			}
			for i := range rows {
				x[i*cols+j] = col[i]
			}
		}
	}
	fft2(true)
	for m := range rows {
		km := floorMod(m-rows/2, rows)
		for n := range cols {
			if !mask[m*cols+n] {
				x[km*cols+floorMod(n-cols/2, cols)] = 0
			}
		}
	}
	fft2(false)
	haar2(x, rows, cols, levels, false, tmp)
	peak := cmplx.Abs(x[coeff])
	if peak == 0 {
		return nil, 0, errors.New("trajectories: WaveletPSF: the mask removes the coefficient entirely")
	}
	out := make([]float64, len(x))
	side := 0.0
	for i, v := range x {
		out[i] = cmplx.Abs(v) / peak
		if i != coeff {
			side = max(side, out[i])
		}
	}
	return out, side, nil
}
