package priors

import (
	"errors"
	"fmt"
	"math"

	"accelplan/simulate/fft"
)

// Partial-Fourier reconstruction.
//
// A partial-Fourier scan acquires the phase-encode rows ky ≥ −K of the
// centred grid and leaves out ky < −K (see trajectories.PartialFourier). The
// spectrum of a real image is Hermitian, F(−k) = conj F(k), so an image
// whose phase is known and smooth is nearly determined by a little more than
// half of k-space. Both methods here estimate that phase from the rows
// |ky| ≤ B that are acquired on both sides of DC (the symmetric band), and
// differ in how they use it: the homodyne method once, with a weighting of
// k-space; POCS by iterating between the phase constraint and the measured
// data.
//
// Data layout: the compact data of simulate.NewCartesian for the same mask,
// one value per acquired sample in row-major order of the centred ny×nx
// grid, orthonormal FFT scaling.

// PartialFourierOptions tunes the phase estimate of a PartialFourier
// reconstructor. The zero value takes the whole symmetric band with a Hann
// taper.
type PartialFourierOptions struct {
	// PhaseBand is the half-width, in lines, of the central band the phase
	// is estimated from: rows |ky| ≤ PhaseBand. 0 takes the whole symmetric
	// band the mask acquires (PartialFourier.Band); a larger value than that
	// band is an error. A narrower band gives a smoother phase.
	PhaseBand int
	// BoxWindow uses the band rows as they are. By default they are
	// weighted by the Hann taper cos²(π·ky / (2(PhaseBand+1))), which keeps
	// the ringing of the truncated band out of the phase (common practice).
	BoxWindow bool
}

// PartialFourier reconstructs single-coil partial-Fourier Cartesian data on
// one mask by the homodyne method or by POCS. It holds the FFT plan, the
// weights and the scratch images, all made once by NewPartialFourier; its
// methods allocate nothing. It is not safe for concurrent use; give each
// goroutine a Clone.
type PartialFourier struct {
	ny, nx    int
	index     []int     // acquired grid positions, ascending (compact data order)
	weight    []float64 // homodyne weight per acquired sample
	window    []float64 // phase-band window per acquired sample (0 outside)
	band      int       // half-width B of the fully acquired symmetric band
	phaseBand int       // half-width of the band the phase comes from
	side      int       // +1: the extra rows are at positive ky, −1 negative, 0 none
	plan      *fft.Plan2D
	grid      []complex128 // k-space scratch
	phasor    []complex128 // unit phasor of the phase estimate
	prev      []complex128 // previous POCS iterate
}

// NewPartialFourier prepares homodyne and POCS reconstruction for data
// acquired with mask, ny*nx entries on the centred grid (row m is
// ky = m − ny/2, column n is kx = n − nx/2), as simulate.NewCartesian takes
// it.
//
// From the mask it finds the symmetric band: the largest B ≤ (ny−1)/2 such
// that every row with |ky| ≤ B is fully acquired. It then gives each
// acquired sample k a homodyne weight W(k) with
//
//	W(k) + W(−k) = 2
//
// wherever k or its conjugate partner −k (taken modulo the grid, as the DFT
// is periodic) is acquired, which is the condition under which the real part
// of the phase-corrected weighted image is the object (Noll DC, Nishimura
// DG, Macovski A, IEEE Trans Med Imaging 1991;10:154-163): W = 2 for an acquired sample whose
// partner is not, W = 0 for samples not acquired, and inside the band the
// ramp W = 1 + s·ky/(B+1), s = +1 when the unpaired rows lie at positive ky
// (as trajectories.PartialFourier makes them), −1 when at negative ky, and
// 0 (W = 1) for a symmetric mask. Other paired samples weigh 1. The ramp
// takes the weight from 0 to 2 across the band, the transition Noll et al.
// describe, rather than in one step at the band's edges.
//
// Errors: sizes below 1, a mask of the wrong length or acquiring nothing, a
// DC row not fully acquired (no band to estimate the phase from), or a
// PhaseBand below 0 or larger than the acquired symmetric band.
func NewPartialFourier(ny, nx int, mask []bool, opt PartialFourierOptions) (*PartialFourier, error) {
	if ny < 1 || nx < 1 {
		return nil, fmt.Errorf("priors: partial Fourier matrix %d×%d: both sizes must be at least 1", ny, nx)
	}
	if len(mask) != ny*nx {
		return nil, fmt.Errorf("priors: partial Fourier mask has %d entries, want %d×%d = %d", len(mask), ny, nx, ny*nx)
	}
	rowFull := func(m int) bool {
		for _, v := range mask[m*nx : (m+1)*nx] {
			if !v {
				return false
			}
		}
		return true
	}
	if !rowFull(ny / 2) {
		return nil, errors.New("priors: partial Fourier needs the DC line (ky = 0) fully acquired, to estimate the phase from a symmetric band around it")
	}
	band := 0
	for band < (ny-1)/2 && rowFull(ny/2-band-1) && rowFull(ny/2+band+1) {
		band++
	}
	pb := opt.PhaseBand
	switch {
	case pb < 0:
		return nil, fmt.Errorf("priors: partial Fourier phase band %d is negative", pb)
	case pb > band:
		return nil, fmt.Errorf("priors: partial Fourier phase band ±%d lines is larger than the symmetric band the mask acquires (±%d lines around DC)", pb, band)
	case pb == 0:
		pb = band
	}
	plan, err := fft.NewPlan2D(ny, nx)
	if err != nil {
		return nil, err
	}
	p := &PartialFourier{ny: ny, nx: nx, band: band, phaseBand: pb, plan: plan}
	partner := func(i int) int {
		m, n := i/nx, i%nx
		pm := ((2*(ny/2)-m)%ny + ny) % ny
		pn := ((2*(nx/2)-n)%nx + nx) % nx
		return pm*nx + pn
	}
	var pos, neg int
	for i, v := range mask {
		if !v {
			continue
		}
		p.index = append(p.index, i)
		if !mask[partner(i)] {
			if i/nx > ny/2 {
				pos++
			} else {
				neg++
			}
		}
	}
	switch {
	case pos > neg:
		p.side = 1
	case neg > pos:
		p.side = -1
	}
	p.weight = make([]float64, len(p.index))
	p.window = make([]float64, len(p.index))
	for j, i := range p.index {
		ky := i/nx - ny/2
		switch {
		case ky >= -band && ky <= band:
			p.weight[j] = 1 + float64(p.side*ky)/float64(band+1)
		case mask[partner(i)]:
			p.weight[j] = 1
		default:
			p.weight[j] = 2
		}
		if ky >= -pb && ky <= pb {
			if opt.BoxWindow {
				p.window[j] = 1
			} else {
				c := math.Cos(math.Pi * float64(ky) / float64(2*(pb+1)))
				p.window[j] = c * c
			}
		}
	}
	p.alloc()
	return p, nil
}

func (p *PartialFourier) alloc() {
	n := p.ny * p.nx
	p.grid = make([]complex128, n)
	p.phasor = make([]complex128, n)
	p.prev = make([]complex128, n)
}

// Clone returns a reconstructor for the same mask and options with scratch
// of its own, sharing the read-only weights and FFT tables.
func (p *PartialFourier) Clone() *PartialFourier {
	c := *p
	c.plan = p.plan.Clone()
	c.alloc()
	return &c
}

// ImageLen returns ny*nx.
func (p *PartialFourier) ImageLen() int { return p.ny * p.nx }

// DataLen returns the number of acquired samples, the length of the data.
func (p *PartialFourier) DataLen() int { return len(p.index) }

// Band returns the half-width B of the fully acquired symmetric band: the
// rows |ky| ≤ B.
func (p *PartialFourier) Band() int { return p.band }

// PhaseBand returns the half-width of the band the phase is estimated from.
func (p *PartialFourier) PhaseBand() int { return p.phaseBand }

// Side returns +1 when the acquired rows without a conjugate partner lie at
// positive ky, −1 when they lie at negative ky, and 0 for a symmetric mask.
func (p *PartialFourier) Side() int { return p.side }

// Weights returns a copy of the homodyne weight of each acquired sample, in
// the order of the data.
func (p *PartialFourier) Weights() []float64 { return append([]float64(nil), p.weight...) }

func (p *PartialFourier) check(dst, y []complex128) error {
	if len(y) != len(p.index) {
		return fmt.Errorf("priors: partial Fourier data has %d samples, the mask acquires %d", len(y), len(p.index))
	}
	if len(dst) != p.ny*p.nx {
		return fmt.Errorf("priors: partial Fourier image has %d pixels, want %d×%d = %d", len(dst), p.ny, p.nx, p.ny*p.nx)
	}
	return nil
}

// scatter writes w[j]·y[j] into the zeroed grid at the acquired positions
// (w nil: weight 1) and transforms it to the image dst.
func (p *PartialFourier) scatter(dst, y []complex128, w []float64) {
	clear(p.grid)
	if w == nil {
		for j, i := range p.index {
			p.grid[i] = y[j]
		}
	} else {
		for j, i := range p.index {
			p.grid[i] = complex(w[j], 0) * y[j]
		}
	}
	p.plan.CentredInverse(dst, p.grid)
}

// phase writes the unit phasors of the low-resolution image of the phase
// band into p.phasor (1 where that image is zero).
func (p *PartialFourier) phase(y []complex128) {
	p.scatter(p.phasor, y, p.window)
	for i, v := range p.phasor {
		// Image values are far from overflow, so the plain root of the
		// squares serves (math.Hypot costs about twice as much here).
		if a2 := real(v)*real(v) + imag(v)*imag(v); a2 > 0 {
			r := 1 / math.Sqrt(a2)
			p.phasor[i] = complex(real(v)*r, imag(v)*r)
		} else {
			p.phasor[i] = 1
		}
	}
}

// Phase writes into dst the unit phasors exp(iφ) of the phase estimate that
// both reconstructions use: the phase of the image made from the phase band
// alone (windowed as the options say), 1 where that image is zero.
func (p *PartialFourier) Phase(dst, y []complex128) error {
	if err := p.check(dst, y); err != nil {
		return err
	}
	p.phase(y)
	copy(dst, p.phasor)
	return nil
}

// project replaces x by its projection Re(x·e^{−iφ})·e^{iφ} onto the images
// of phase φ (up to sign).
func project(x, phasor []complex128) {
	for i, v := range x {
		ph := phasor[i]
		r := real(v)*real(ph) + imag(v)*imag(ph)
		x[i] = complex(r*real(ph), r*imag(ph))
	}
}

// Homodyne writes into dst the homodyne reconstruction of the data y (Noll,
// Nishimura & Macovski, IEEE TMI 1991;10:154-163): the zero-filled inverse
// FFT of the weighted data W·y (weights as NewPartialFourier describes),
// demodulated by the phase estimate φ from the symmetric band, of which the
// real part ρ = Re(e^{−iφ}·F^H(W·y)) is kept. The image returned is
// ρ·e^{iφ}: its magnitude |ρ| is the homodyne magnitude image and its phase
// the smooth estimate. ρ may be negative where the estimated phase is off by
// π (in the ringing of the band image); the magnitude is unaffected.
//
// For a real object (φ = 0 or π wherever the band image is not zero) the
// reconstruction is exact: Re F^H(W·F) = F^H(½(W(k) + W(−k))·F) = F^H F
// wherever k or −k is acquired. Errors report wrong lengths. dst must not
// alias y.
func (p *PartialFourier) Homodyne(dst, y []complex128) error {
	if err := p.check(dst, y); err != nil {
		return err
	}
	p.phase(y)
	p.scatter(dst, y, p.weight)
	project(dst, p.phasor)
	return nil
}

// POCSOptions tunes POCS. The zero value runs 30 iterations with no early
// stop.
type POCSOptions struct {
	// MaxIter caps the iterations; 0 means 30.
	MaxIter int
	// Tol stops once ‖x_k − x_{k−1}‖ ≤ Tol·‖x_k‖; 0 runs MaxIter iterations.
	Tol float64
}

// POCSInfo reports how a POCS run ended.
type POCSInfo struct {
	Iterations int     // iterations performed
	RelChange  float64 // ‖x_k − x_{k−1}‖ / ‖x_k‖ of the last iteration
	Converged  bool    // the Tol test stopped the run
}

// POCS writes into dst the partial-Fourier reconstruction by projection onto
// convex sets (Haacke EM, Lindskog ED, Lin W, J Magn Reson
// 1991;92:126-145). Starting from the zero-filled image, each iteration
//
//  1. constrains the image to the estimated phase φ of the symmetric band:
//     x ← Re(x·e^{−iφ})·e^{iφ}, the projection onto the images m·e^{iφ}
//     with m real;
//  2. enforces the data: the acquired k-space samples of x are replaced by
//     the measured ones, the missing ones kept as step 1 filled them.
//
// Both sets are convex (a subspace and an affine set), and alternating
// projections between them converge: to a point of their intersection when
// the data agree with the phase, otherwise (noise, a phase not quite right)
// towards the data-consistent image nearest the phase-constrained set, ever
// more slowly. For a real object and exact data the missing samples approach
// the conjugates of their partners geometrically (the error halves every
// iteration) and the image approaches the object. With noise the error to
// the object is often lowest after a few iterations and creeps up after, so
// a small MaxIter is a reasonable choice. The returned image is the
// data-consistent iterate of the last step 2.
//
// The iterations allocate nothing. Errors report wrong lengths or invalid
// options. dst must not alias y.
func (p *PartialFourier) POCS(dst, y []complex128, opt POCSOptions) (POCSInfo, error) {
	var info POCSInfo
	if err := p.check(dst, y); err != nil {
		return info, err
	}
	if opt.MaxIter < 0 {
		return info, fmt.Errorf("priors: POCS iteration cap %d is negative", opt.MaxIter)
	}
	if math.IsNaN(opt.Tol) || math.IsInf(opt.Tol, 0) || opt.Tol < 0 {
		return info, fmt.Errorf("priors: POCS tolerance %g, want a finite value ≥ 0", opt.Tol)
	}
	maxIter := opt.MaxIter
	if maxIter == 0 {
		maxIter = 30
	}
	p.phase(y)
	p.scatter(p.prev, y, nil)
	for k := 1; k <= maxIter; k++ {
		copy(dst, p.prev)
		project(dst, p.phasor)
		p.plan.CentredForward(p.grid, dst)
		for j, i := range p.index {
			p.grid[i] = y[j]
		}
		p.plan.CentredInverse(dst, p.grid)
		var dn, xn float64
		for i, v := range dst {
			d := v - p.prev[i]
			dn += real(d)*real(d) + imag(d)*imag(d)
			xn += real(v)*real(v) + imag(v)*imag(v)
		}
		copy(p.prev, dst)
		info.Iterations = k
		if xn > 0 {
			info.RelChange = math.Sqrt(dn / xn)
		} else {
			info.RelChange = math.Sqrt(dn)
		}
		if opt.Tol > 0 && info.RelChange <= opt.Tol {
			info.Converged = true
			break
		}
	}
	return info, nil
}

// Homodyne returns the homodyne reconstruction of the data y acquired with
// mask on the centred ny×nx grid, with the default options; see
// NewPartialFourier and PartialFourier.Homodyne. It allocates the
// reconstructor; build one with NewPartialFourier to reuse it.
func Homodyne(ny, nx int, mask []bool, y []complex128) ([]complex128, error) {
	p, err := NewPartialFourier(ny, nx, mask, PartialFourierOptions{})
	if err != nil {
		return nil, err
	}
	x := make([]complex128, ny*nx)
	if err := p.Homodyne(x, y); err != nil {
		return nil, err
	}
	return x, nil
}

// POCS returns the POCS reconstruction of the data y acquired with mask on
// the centred ny×nx grid, with the default phase options; see
// NewPartialFourier and PartialFourier.POCS. It allocates the reconstructor;
// build one with NewPartialFourier to reuse it.
func POCS(ny, nx int, mask []bool, y []complex128, opt POCSOptions) ([]complex128, POCSInfo, error) {
	p, err := NewPartialFourier(ny, nx, mask, PartialFourierOptions{})
	if err != nil {
		return nil, POCSInfo{}, err
	}
	x := make([]complex128, ny*nx)
	info, err := p.POCS(x, y, opt)
	if err != nil {
		return nil, POCSInfo{}, err
	}
	return x, info, nil
}
