package simulate

import (
	"fmt"
	"math"
	"math/rand/v2"

	"accelplan/simulate/fft"
)

// Cartesian is the single-coil Cartesian encoding operator E = M·F: the
// orthonormal, centred 2D DFT of an ny-by-nx image followed by the selection
// of the acquired k-space samples. Data are stored compactly, one value per
// acquired sample, in row-major order of the centred k-space grid.
//
// Because F is unitary and M a selection, E·E^H = I and ‖E‖ = 1, so gradient
// steps of size 1 are admissible in every first-order solver.
type Cartesian struct {
	ny, nx int
	index  []int // acquired sample positions in the centred grid, ascending
	plan   *fft.Plan2D
	grid   []complex128 // scratch, ny*nx
	rows   []float64    // 1 for acquired rows when the mask is made of whole rows, else nil
}

// NewCartesian builds the operator for a mask of ny*nx entries on the centred
// k-space grid (row m is ky = m - ny/2, column n is kx = n - nx/2).
func NewCartesian(ny, nx int, mask []bool) (*Cartesian, error) {
	if ny < 1 || nx < 1 {
		return nil, fmt.Errorf("simulate: matrix %d×%d must be at least 1×1", ny, nx)
	}
	if len(mask) != ny*nx {
		return nil, fmt.Errorf("simulate: mask has %d entries, want %d×%d = %d", len(mask), ny, nx, ny*nx)
	}
	plan, err := fft.NewPlan2D(ny, nx)
	if err != nil {
		return nil, err
	}
	c := &Cartesian{ny: ny, nx: nx, plan: plan, grid: make([]complex128, ny*nx)}
	for i, m := range mask {
		if m {
			c.index = append(c.index, i)
		}
	}
	if len(c.index) == 0 {
		return nil, fmt.Errorf("simulate: the mask acquires no sample")
	}
	c.rows = rowFilter(ny, nx, mask)
	return c, nil
}

// rowFilter returns the indicator of the acquired rows when every row of the
// mask is acquired either in full or not at all (phase-encode lines read out
// completely), and nil otherwise.
func rowFilter(ny, nx int, mask []bool) []float64 {
	h := make([]float64, ny)
	for m := range ny {
		row := mask[m*nx : (m+1)*nx]
		for _, v := range row {
			if v != row[0] {
				return nil
			}
		}
		if row[0] {
			h[m] = 1
		}
	}
	return h
}

// Clone returns an operator for the same mask with scratch of its own, for
// use in another goroutine.
func (c *Cartesian) Clone() *Cartesian {
	return &Cartesian{ny: c.ny, nx: c.nx, index: c.index, rows: c.rows, plan: c.plan.Clone(), grid: make([]complex128, len(c.grid))}
}

// ImageLen returns ny*nx.
func (c *Cartesian) ImageLen() int { return c.ny * c.nx }

// DataLen returns the number of acquired samples.
func (c *Cartesian) DataLen() int { return len(c.index) }

// Index returns the positions of the acquired samples in the centred grid.
// The slice is shared; do not modify it.
func (c *Cartesian) Index() []int { return c.index }

// Forward computes dst = M·F·src.
func (c *Cartesian) Forward(dst, src []complex128) {
	c.plan.CentredForward(c.grid, src)
	for j, i := range c.index {
		dst[j] = c.grid[i]
	}
}

// Adjoint computes dst = F^H·M^T·src (zero-filled inverse).
func (c *Cartesian) Adjoint(dst, src []complex128) {
	clear(c.grid)
	for j, i := range c.index {
		c.grid[i] = src[j]
	}
	c.plan.CentredInverse(dst, c.grid)
}

// Normal computes dst = EᴴE·src = F^H·MᵀM·F·src without the gather and
// scatter of Forward and Adjoint. When the mask is made of whole rows
// (phase-encode lines read out in full) MᵀM is constant along kx, the row
// transforms of the 2D pair cancel and only the column transforms remain
// (fft.Plan2D.CentredColumnFilter), half the work of the pair; other masks
// zero the samples not acquired between the two 2D transforms.
func (c *Cartesian) Normal(dst, src []complex128) {
	if c.rows != nil {
		c.plan.CentredColumnFilter(dst, src, c.rows)
		return
	}
	c.plan.CentredForward(c.grid, src)
	next := 0
	for _, i := range c.index {
		clear(c.grid[next:i])
		next = i + 1
	}
	clear(c.grid[next:])
	c.plan.CentredInverse(dst, c.grid)
}

// OrthonormalRows reports true: E = M·F with F unitary and M a selection of
// distinct samples, so E·Eᴴ = M·Mᵀ = I.
func (c *Cartesian) OrthonormalRows() bool { return true }

// Gather picks the acquired samples out of a full centred k-space grid.
func (c *Cartesian) Gather(dst, grid []complex128) {
	for j, i := range c.index {
		dst[j] = grid[i]
	}
}

// NoiseSigma returns the noise standard deviation per sample, per real and
// imaginary channel, that gives a fully sampled image the reference SNR
// snr = (mean of the truth inside roi) / σ. With orthonormal FFT scaling the
// k-space σ and the image σ are the same number.
func NoiseSigma(truth []float64, roi []bool, snr float64) (float64, error) {
	if !(snr > 0) || math.IsInf(snr, 0) {
		return 0, fmt.Errorf("simulate: reference SNR must be a positive finite number, got %v", snr)
	}
	var sum float64
	var n int
	for i, v := range truth {
		if roi == nil || roi[i] {
			sum += v
			n++
		}
	}
	if n == 0 || sum <= 0 {
		return 0, fmt.Errorf("simulate: the truth has no positive signal in its region of interest")
	}
	return sum / float64(n) / snr, nil
}

// AddNoise adds circular complex white Gaussian noise of standard deviation
// sigma per real and imaginary channel to data, drawing from rng.
func AddNoise(data []complex128, sigma float64, rng *rand.Rand) {
	for i := range data {
		data[i] += complex(sigma*rng.NormFloat64(), sigma*rng.NormFloat64())
	}
}

// Magnitude writes |x| into dst.
func Magnitude(dst []float64, x []complex128) {
	for i, v := range x {
		dst[i] = math.Hypot(real(v), imag(v))
	}
}
