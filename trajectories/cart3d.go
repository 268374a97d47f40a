package trajectories

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Scheme names of the 3D Cartesian constructors.
const (
	SchemeCartesian3DUniform     = "cartesian3d-uniform"
	SchemeCartesian3DShifted     = "cartesian3d-shifted"
	SchemeCartesian3DRandom      = "cartesian3d-random"
	SchemeCartesian3DPoissonDisc = "cartesian3d-poisson-disc"
)

// Grid3D describes the phase-encode plane of a 3D Cartesian scan: Ny × Nz
// phase-encode points, each read out along Nx fully sampled kx samples. The
// simulation of such a scan may decouple along the readout: after a 1D inverse
// FFT along kx every x position is an independent (ky, kz) problem sharing this
// mask, so a chosen set of planes can be reconstructed on its own.
type Grid3D struct {
	// Ny, Nz are the phase-encode sizes; Nx is the readout length.
	Ny, Nz, Nx int
	// CalibY × CalibZ is a fully sampled central calibration box; both zero
	// for none.
	CalibY, CalibZ int
	// CornerCut drops the points outside the ellipse inscribed in the
	// phase-encode plane, (ky/(Ny/2))² + (kz/(Nz/2))² > 1 (elliptical
	// scanning). The calibration box is always kept.
	CornerCut bool
}

func (g Grid3D) check() error {
	if g.Ny < 1 || g.Nz < 1 || g.Nx < 1 {
		return fmt.Errorf("trajectories: 3D grid ny = %d, nz = %d, nx = %d: all must be at least 1", g.Ny, g.Nz, g.Nx)
	}
	if g.CalibY < 0 || g.CalibY > g.Ny {
		return fmt.Errorf("trajectories: calibration ky extent = %d: must be in [0, %d]", g.CalibY, g.Ny)
	}
	if g.CalibZ < 0 || g.CalibZ > g.Nz {
		return fmt.Errorf("trajectories: calibration kz extent = %d: must be in [0, %d]", g.CalibZ, g.Nz)
	}
	if (g.CalibY == 0) != (g.CalibZ == 0) {
		return fmt.Errorf("trajectories: calibration box %d×%d: give both extents or neither", g.CalibY, g.CalibZ)
	}
	return nil
}

// inCalib reports whether plane point (p, m) (kz row, ky column) lies in the
// calibration box.
func (g Grid3D) inCalib(p, m int) bool {
	if g.CalibY == 0 {
		return false
	}
	ylo, yhi := calibBand(g.Ny, g.CalibY)
	zlo, zhi := calibBand(g.Nz, g.CalibZ)
	return m >= ylo && m < yhi && p >= zlo && p < zhi
}

// ellipseRadius returns sqrt((ky/(Ny/2))² + (kz/(Nz/2))²) for plane point
// (p, m); an axis of size 1 contributes 0.
func (g Grid3D) ellipseRadius(p, m int) float64 {
	var a, b float64
	if g.Ny > 1 {
		a = float64(m-g.Ny/2) / float64(g.Ny/2)
	}
	if g.Nz > 1 {
		b = float64(p-g.Nz/2) / float64(g.Nz/2)
	}
	return math.Hypot(a, b)
}

// allowed reports whether a point may be sampled: inside the calibration box,
// or inside the ellipse when corners are cut.
func (g Grid3D) allowed(p, m int) bool {
	return g.inCalib(p, m) || !g.CornerCut || g.ellipseRadius(p, m) <= 1
}

func newCartesian3D(scheme string, g Grid3D, mask []bool) Sampling {
	s := Sampling{
		Scheme:    scheme,
		Family:    FamilyCartesian3D,
		Dim:       3,
		Nx:        g.Nx,
		Ny:        g.Ny,
		Nz:        g.Nz,
		Mask:      mask,
		FullShots: g.Ny * g.Nz,
		Calib:     g.CalibY,
		CalibZ:    g.CalibZ,
	}
	for _, v := range mask {
		if v {
			s.Shots++
		}
	}
	s.R = float64(s.FullShots) / float64(s.Shots)
	return s
}

// Cartesian3DUniform returns a 3D Cartesian sampling that acquires every
// ry-th ky and every rz-th kz on a rectangular lattice anchored at DC (so DC
// is always acquired), plus the calibration box of g. Without calibration and
// with ry | Ny, rz | Nz, the PSF in the (y, z) plane is a lattice of ry·rz
// replicas FOVy/ry and FOVz/rz apart (common practice).
//
// Errors: bad grid (see Grid3D); ry < 1 or > Ny; rz < 1 or > Nz.
func Cartesian3DUniform(g Grid3D, ry, rz int) (Sampling, error) {
	return Cartesian3DShifted(g, ry, rz, 0)
}

// Cartesian3DShifted returns the shifted-lattice ("controlled aliasing")
// sampling of Breuer FA et al., MRM 2006;55:549-556 (memory): every rz-th kz
// row is acquired, and on the j-th acquired row (kz = j·rz) the ky positions
// are shifted by j·shift (mod ry), so ky − j·shift ≡ 0 (mod ry). The lattice
// has the same density 1/(ry·rz) as the rectangular one, but its aliasing
// replicas are sheared: each replica ring along z moves by shift·FOVy/ry in y,
// away from its neighbours. shift = 0 is Cartesian3DUniform.
//
// Errors: as Cartesian3DUniform, and shift < 0 or shift ≥ ry (for ry > 1).
func Cartesian3DShifted(g Grid3D, ry, rz, shift int) (Sampling, error) {
	if err := g.check(); err != nil {
		return Sampling{}, err
	}
	if ry < 1 || ry > g.Ny {
		return Sampling{}, fmt.Errorf("trajectories: ky step Ry = %d: must be in [1, %d]", ry, g.Ny)
	}
	if rz < 1 || rz > g.Nz {
		return Sampling{}, fmt.Errorf("trajectories: kz step Rz = %d: must be in [1, %d]", rz, g.Nz)
	}
	if shift < 0 || shift >= ry {
		return Sampling{}, fmt.Errorf("trajectories: lattice shift = %d: must be in [0, %d] (below Ry)", shift, ry-1)
	}
	mask := make([]bool, g.Ny*g.Nz)
	for p := range g.Nz {
		kz := p - g.Nz/2
		if floorMod(kz, rz) != 0 {
			continue
		}
		j := floorDiv(kz, rz)
		for m := range g.Ny {
			ky := m - g.Ny/2
			if floorMod(ky-j*shift, ry) == 0 && g.allowed(p, m) {
				mask[p*g.Ny+m] = true
			}
		}
	}
	for p := range g.Nz {
		for m := range g.Ny {
			if g.inCalib(p, m) {
				mask[p*g.Ny+m] = true
			}
		}
	}
	scheme := SchemeCartesian3DShifted
	if shift == 0 {
		scheme = SchemeCartesian3DUniform
	}
	return newCartesian3D(scheme, g, mask), nil
}

func floorMod(a, b int) int { return ((a % b) + b) % b }
func floorDiv(a, b int) int { return (a - floorMod(a, b)) / b }

// Density is a variable-density law for random phase-encode sampling, as a
// function of the normalised radius ρ in the phase-encode plane (0 at DC, 1 just
// beyond the outermost allowed point).
type Density struct {
	// Kind is "polynomial", p ∝ (1 − ρ)^Power (Lustig, Donoho & Pauly, MRM
	// 2007;58:1182-1195), or "gaussian", p ∝ exp(−ρ²/(2·Sigma²)).
	Kind  string
	Power float64
	Sigma float64
}

func (d Density) check() error {
	switch d.Kind {
	case "polynomial":
		if math.IsNaN(d.Power) || math.IsInf(d.Power, 0) || d.Power < 0 {
			return fmt.Errorf("trajectories: density power = %g: must be finite and ≥ 0", d.Power)
		}
	case "gaussian":
		if math.IsNaN(d.Sigma) || math.IsInf(d.Sigma, 0) || d.Sigma <= 0 {
			return fmt.Errorf("trajectories: gaussian density sigma = %g: must be finite and > 0", d.Sigma)
		}
	default:
		return fmt.Errorf("trajectories: density kind %q: must be \"polynomial\" or \"gaussian\"", d.Kind)
	}
	return nil
}

func (d Density) at(rho float64) float64 {
	if d.Kind == "gaussian" {
		return math.Exp(-rho * rho / (2 * d.Sigma * d.Sigma))
	}
	return math.Pow(1-rho, d.Power)
}

// planeRho returns, for every plane point, its radius normalised so that the
// outermost allowed point sits at 1/(1 + 1/min(Ny/2, Nz/2)) < 1, one sample
// inside ρ = 1, so every allowed point has a positive polynomial density (the
// 3D analogue of kmax = ny/2 + 1 in LineProbabilities).
func (g Grid3D) planeRho() []float64 {
	rho := make([]float64, g.Ny*g.Nz)
	rmax := 0.0
	for p := range g.Nz {
		for m := range g.Ny {
			r := g.ellipseRadius(p, m)
			rho[p*g.Ny+m] = r
			if g.allowed(p, m) {
				rmax = max(rmax, r)
			}
		}
	}
	half := max(1, min(g.Ny/2, g.Nz/2))
	if g.Ny == 1 || g.Nz == 1 {
		half = max(1, g.Ny/2, g.Nz/2)
	}
	den := rmax * (1 + 1/float64(half))
	if den == 0 {
		den = 1
	}
	for i := range rho {
		rho[i] /= den
	}
	return rho
}

// countAllowed returns the number of allowed plane points and of calibration
// points.
func (g Grid3D) countAllowed() (allowed, calib int) {
	for p := range g.Nz {
		for m := range g.Ny {
			if g.inCalib(p, m) {
				calib++
			}
			if g.allowed(p, m) {
				allowed++
			}
		}
	}
	return allowed, calib
}

func (g Grid3D) checkSamples(samples int) error {
	allowed, calib := g.countAllowed()
	if samples < 1 || samples > allowed {
		return fmt.Errorf("trajectories: samples = %d: must be in [1, %d] (the points this phase-encode plane allows)", samples, allowed)
	}
	if samples < calib {
		return fmt.Errorf("trajectories: samples = %d: fewer than the %d points of the calibration box", samples, calib)
	}
	return nil
}

// PlaneProbabilities returns, for each point of the nz×ny phase-encode plane
// (row-major, row = kz), the probability that Cartesian3DRandom acquires it:
// 1 in the calibration box, 0 outside the allowed region, and elsewhere
// min(1, c·d(ρ)) with c set exactly (water-filling) so the probabilities sum to
// samples.
func PlaneProbabilities(g Grid3D, samples int, d Density) ([]float64, error) {
	if err := g.check(); err != nil {
		return nil, err
	}
	if err := d.check(); err != nil {
		return nil, err
	}
	if err := g.checkSamples(samples); err != nil {
		return nil, err
	}
	rho := g.planeRho()
	prob := make([]float64, g.Ny*g.Nz)
	var cand []int
	calib := 0
	for p := range g.Nz {
		for m := range g.Ny {
			i := p*g.Ny + m
			switch {
			case g.inCalib(p, m):
				prob[i] = 1
				calib++
			case g.allowed(p, m):
				prob[i] = max(d.at(rho[i]), 1e-300)
				cand = append(cand, i)
			}
		}
	}
	waterFill(prob, cand, float64(samples-calib))
	return prob, nil
}

// Cartesian3DRandom returns a 3D Cartesian sampling of exactly samples
// phase-encode points: the calibration box of g plus points drawn without
// replacement with the inclusion probabilities of PlaneProbabilities
// (variable density after Lustig, Donoho & Pauly 2007), by randomised
// systematic sampling (Hartley & Rao 1962), so the count is exact.
//
// Errors: bad grid or density; samples < 1, above the allowed points, or below
// the calibration box.
func Cartesian3DRandom(g Grid3D, samples int, d Density, seed uint64) (Sampling, error) {
	prob, err := PlaneProbabilities(g, samples, d)
	if err != nil {
		return Sampling{}, err
	}
	mask := make([]bool, g.Ny*g.Nz)
	var cand []int
	calib := 0
	for p := range g.Nz {
		for m := range g.Ny {
			i := p*g.Ny + m
			if g.inCalib(p, m) {
				mask[i] = true
				calib++
			} else if g.allowed(p, m) {
				cand = append(cand, i)
			}
		}
	}
	rng := rand.New(rand.NewPCG(seed, seedStream))
	for _, i := range drawSystematic(prob, cand, samples-calib, rng) {
		mask[i] = true
	}
	return newCartesian3D(SchemeCartesian3DRandom, g, mask), nil
}
