package nufft

import (
	"cmp"
	"fmt"
	"math"
	"slices"
)

// DefaultDensityWidth is the kernel width PipeMenon uses when its Options
// leave Width at zero, wider than the transform's default of 4. The iteration
// makes the compensated density equal 1 at the samples only; where samples
// are about one cycle per FOV apart, a narrow kernel's density still dips
// between them, and the weights there come out low by that dip. On a full
// Cartesian grid (α = 2) the tests measure 8.6 % at width 4, 0.9 % at 6 and
// 0.09 % at 8; between spiral arms 1 to 1.6 cycles/FOV apart, 3.2 % at 6 and
// 1.2 % at 8.
const DefaultDensityWidth = 8

// DefaultDensityIterations is the number of Pipe-Menon updates PipeMenon
// runs when asked for 0. By then a radial or spiral trajectory's gridded
// image has converged to a few tenths of a percent (measured in the tests);
// further updates fit the fixed point at the samples more tightly but let the
// weights of irregular trajectories fluctuate more from sample to sample.
const DefaultDensityIterations = 20

// DensityResult tells how an iterative density compensation ended.
type DensityResult struct {
	// Iterations is the number of updates w ← w/(C∗w) applied.
	Iterations int
	// MaxResidual and RMSResidual are the largest and the root-mean-square
	// |(C∗w)_j − 1| over the samples j of the weights the last update
	// started from, with C normalised to unit area: how far they were from
	// the fixed point. The largest sits at the border of the covered region,
	// where the two outermost samples of a readout keep trading weight (a
	// few percent for radial trajectories however long the iteration runs);
	// the RMS keeps falling.
	MaxResidual, RMSResidual float64
}

// PipeMenon returns density-compensation weights for the k-space points
// (kx[j], ky[j]) (cycles per FOV, inside the band of an ny×nx image) after
// iters updates of the iteration of Pipe JG, Menon P, MRM 1999;41:179-186,
// run on the gridding kernel of a Plan built with opts. A zero iters means
// DefaultDensityIterations and a zero opts.Width DefaultDensityWidth. The
// oversampling should stay at its default of 2: on a coarser grid the
// kernel's position relative to the grid cells changes from sample to
// sample, the density ripples with it, and so do the weights (9 to 16 % RMS
// against exact Voronoi areas in the tests at 1.25, against 1.4 to 2.2 % at
// 2). See Plan.PipeMenon for the method and the normalisation: each weight
// is the k-space area in (cycles/FOV)² its sample stands for, and their sum
// is the area covered.
//
// Errors: those of New, and iters < 0.
func PipeMenon(ny, nx int, kx, ky []float64, iters int, opts Options) ([]float64, error) {
	if iters < 0 {
		return nil, fmt.Errorf("nufft: Pipe-Menon iterations %d must be at least 1 (or 0 for the default)", iters)
	}
	if iters == 0 {
		iters = DefaultDensityIterations
	}
	if opts.Width == 0 {
		opts.Width = DefaultDensityWidth
	}
	p, err := New(ny, nx, kx, ky, opts)
	if err != nil {
		return nil, err
	}
	w := make([]float64, len(kx))
	if _, err := p.PipeMenon(w, iters, 0); err != nil {
		return nil, err
	}
	return w, nil
}

// PipeMenon writes into w (DataLen values) density-compensation weights for
// the plan's k-space points by the fixed-point iteration of Pipe JG, Menon P,
// MRM 1999;41:179-186:
//
//	w ← w / (C ∗ w),   (C ∗ w)_i = Σ_j C(k_i, k_j) w_j,
//
// starting from w = 1, for at most maxIters updates, stopping early once the
// RMS residual √(mean_i ((C ∗ w)_i − 1)²) before an update (see
// DensityResult) is at most tol; tol = 0 runs all maxIters updates.
//
// C is the plan's own Kaiser-Bessel kernel φ applied twice: w is spread onto
// the oversampled grid and interpolated back at the samples (the Adjoint's
// and the Forward's gridding steps, without the FFT), so that C(k_i, k_j) =
// Σ_g φ(u_i − g)·φ(u_j − g) over the grid cells g, u being positions in grid
// cells; the grid is periodic, as the transform's is. The plan's width
// therefore matters: see DefaultDensityWidth for the bias of narrow kernels.
//
// Normalisation: C is divided by its integral over k-space in (cycles/FOV)²,
// ∫C = Φ⁴·(nx·ny)/(mx·my), where Φ = ∫φ(t)dt is the kernel's integral in
// grid cells (its Fourier transform at zero) and mx×my the oversampled grid.
// At the fixed point the compensated density D(k) = Σ_j w_j C(k, k_j)/∫C is
// then 1 at every sample, so each w_j is the k-space area in (cycles/FOV)²
// its sample stands for: the unit of the ramp weights of radial
// trajectories, and 1 for a full Cartesian grid of integer points (up to the
// dip of DefaultDensityWidth). Their sum Σ_j w_j = ∫D(k) dk is the area the
// trajectory covers, its border softened by the kernel's reach (1.4 % above
// the disc π(N/2)² for a Nyquist-sampled radial scan in the tests).
//
// The loop allocates nothing; the call allocates two vectors of DataLen
// complex values. It returns how the iteration ended, and an error if w has
// the wrong length, maxIters < 1 or tol is negative or not a number.
func (p *Plan) PipeMenon(w []float64, maxIters int, tol float64) (DensityResult, error) {
	if len(w) != p.nsamples {
		return DensityResult{}, fmt.Errorf("nufft: Pipe-Menon given %d weights for %d samples", len(w), p.nsamples)
	}
	if maxIters < 1 {
		return DensityResult{}, fmt.Errorf("nufft: Pipe-Menon iterations %d must be at least 1", maxIters)
	}
	if !(tol >= 0) {
		return DensityResult{}, fmt.Errorf("nufft: Pipe-Menon tolerance %g must be a number ≥ 0", tol)
	}
	area := p.kernelArea()
	// The iteration runs on v = w/area, whose fixed point has C∗v = 1 with
	// the kernel as it stands (peak 1), so the residual needs no rescaling.
	v := make([]complex128, p.nsamples)
	d := make([]complex128, p.nsamples)
	for j := range v {
		v[j] = 1
	}
	var res DensityResult
	for res.Iterations < maxIters {
		p.densityPass(d, v)
		worst, sq := 0.0, 0.0
		for j, dj := range d {
			c := real(dj)
			worst = max(worst, math.Abs(c-1))
			sq += (c - 1) * (c - 1)
			v[j] = complex(real(v[j])/c, 0)
		}
		res.Iterations++
		res.MaxResidual, res.RMSResidual = worst, math.Sqrt(sq/float64(len(d)))
		if res.RMSResidual <= tol {
			break
		}
	}
	for j := range w {
		w[j] = real(v[j]) * area
	}
	return res, nil
}

// kernelArea returns ∫C dk in (cycles/FOV)² for the kernel C(k_i, k_j) =
// Σ_g φ(u_i − g)φ(u_j − g) of densityPass: integrating over u_j gives
// Φ²·Σ_g φ(u_i − g), and the sum of the kernel over unit-spaced cells is Φ²
// up to its aliased replicas (by Poisson summation; measured below 5e-4 of
// it at W = 4 and 5e-6 from W = 6), so ∫C = Φ⁴ in grid cells², times the
// cell area (nx/mx)·(ny/my).
func (p *Plan) kernelArea() float64 {
	phi := p.kern.phiHat(0)
	return phi * phi * phi * phi * float64(p.nx) * float64(p.ny) / (float64(p.mx) * float64(p.my))
}

// densityPass writes dst = C∗src at the samples: src spread onto the
// oversampled grid with the kernel and interpolated back, without the FFT.
func (p *Plan) densityPass(dst, src []complex128) {
	clear(p.grid)
	p.in = src
	p.next.Store(0)
	p.team.run(p.spreadJob)
	p.in, p.out = nil, dst
	p.team.run(p.interpJob)
	p.out = nil
}

// RadialRamp returns analytic density-compensation weights for a radial
// trajectory: spoke s points along angles[s] (radians from the +kx axis) and
// carries the samples radii[i]·(cos angles[s], sin angles[s]) for every i
// (cycles per FOV), so the weights come spoke-major, w[s·len(radii) + i].
// The radii must be equally spaced by some step h > 0 and include 0 (the DC
// sample). With half false every spoke is a full diameter (radii of both
// signs) and the angles cover a period of π; with half true the spokes run
// from DC outwards (radii ≥ 0) and cover 2π.
//
// Each spoke owns the angular width Δθ_s, half the gaps to its neighbours on
// the circle of the period (so uneven orders such as the golden angle are
// handled, and equal angles share). A sample at r ≠ 0 gets |r|·h·Δθ_s, the
// area of its annular cell (the ramp filter; Kak AC, Slaney M, Principles of
// Computerized Tomographic Imaging, 1988, ch. 3; memory). The DC sample gets
// Δθ_s·h²/6 on a full spoke and Δθ_s·h²/12 on a half spoke, πh²/6 in all:
// the weights are then the trapezoidal rule of ∫∫ g(r, θ) r dr dθ along each
// half-line, and the Euler-Maclaurin formula (Abramowitz M, Stegun IA,
// Handbook of Mathematical Functions, 1964, 23.1.30; memory) puts the end
// correction (h²/12)·∂(r·g)/∂r = (h²/12)·g(0) per radian at r = 0, which
// leaves an error of order h⁴. Giving DC instead the area of its disc of
// radius h/2, πh²/4, overestimates every pixel of a gridded image by
// πh²/12·F(0), F(0) the spectrum at DC: for h = ½ and a disc of radius
// 0.35 FOV, 2.5 % predicted and 2.4 % measured in the tests, against 0.13 %
// left with these weights.
//
// Errors: no angles; fewer than 2 radii; angles or radii not finite; radii
// not equally spaced or without 0; negative radii with half set.
func RadialRamp(angles, radii []float64, half bool) ([]float64, error) {
	if len(angles) == 0 {
		return nil, fmt.Errorf("nufft: radial ramp needs at least one spoke angle")
	}
	if len(radii) < 2 {
		return nil, fmt.Errorf("nufft: radial ramp needs at least 2 samples per spoke, got %d", len(radii))
	}
	for s, a := range angles {
		if math.IsNaN(a) || math.IsInf(a, 0) {
			return nil, fmt.Errorf("nufft: radial ramp: spoke %d has angle %g, want a finite number", s, a)
		}
	}
	h := radii[1] - radii[0]
	if !(h > 0) || math.IsInf(h, 0) {
		return nil, fmt.Errorf("nufft: radial ramp: radii must increase in equal finite steps, got %g then %g", radii[0], radii[1])
	}
	dc := -1
	for i, r := range radii {
		if math.IsNaN(r) || math.Abs(r-(radii[0]+float64(i)*h)) > 1e-9*max(h, math.Abs(r)) {
			return nil, fmt.Errorf("nufft: radial ramp: radius %d is %g, want %g (equal steps of %g)", i, r, radii[0]+float64(i)*h, h)
		}
		if math.Abs(r) <= 1e-9*h {
			dc = i
		}
		if half && r < -1e-9*h {
			return nil, fmt.Errorf("nufft: radial ramp: radius %d is %g, but half spokes run from DC outwards (radii ≥ 0)", i, r)
		}
	}
	if dc < 0 {
		return nil, fmt.Errorf("nufft: radial ramp: the radii (%g to %g in steps of %g) do not include DC", radii[0], radii[len(radii)-1], h)
	}
	period, share := math.Pi, h*h/6
	if half {
		period, share = 2*math.Pi, h*h/12
	}
	width := angularWidths(angles, period)
	n := len(radii)
	w := make([]float64, len(angles)*n)
	for s, dt := range width {
		row := w[s*n : (s+1)*n]
		for i, r := range radii {
			row[i] = math.Abs(r) * h * dt
		}
		row[dc] = share * dt
	}
	return w, nil
}

// angularWidths returns, for each angle, half the sum of the gaps to its
// neighbours on the circle of the given period (angles taken modulo it);
// equal angles split their width equally.
func angularWidths(angles []float64, period float64) []float64 {
	n := len(angles)
	type spoke struct {
		a float64
		i int
	}
	sorted := make([]spoke, n)
	for i, a := range angles {
		a = math.Mod(a, period)
		if a < 0 {
			a += period
		}
		if a >= period { // −ε mod period rounds up to the period
			a = 0
		}
		sorted[i] = spoke{a, i}
	}
	slices.SortFunc(sorted, func(x, y spoke) int { return cmp.Compare(x.a, y.a) })
	// Groups of equal angles: group g holds sorted[start[g]:start[g+1]].
	start := []int{0}
	for p := 1; p < n; p++ {
		if sorted[p].a != sorted[p-1].a {
			start = append(start, p)
		}
	}
	start = append(start, n)
	groups := len(start) - 1
	width := make([]float64, n)
	for g := range groups {
		share := period
		if groups > 1 {
			a := sorted[start[g]].a
			prev := sorted[start[(g+groups-1)%groups]].a
			next := sorted[start[(g+1)%groups]].a
			gp := math.Mod(a-prev+period, period)
			gn := math.Mod(next-a+period, period)
			share = (gp + gn) / 2
		}
		members := start[g+1] - start[g]
		for _, s := range sorted[start[g]:start[g+1]] {
			width[s.i] = share / float64(members)
		}
	}
	return width
}
