package plans

import (
	"fmt"
	"math"
	"strings"

	"accelplan/simulate"
	"accelplan/trajectories"
)

// 3D Cartesian patterns: the (ky, kz) phase-encode plane is undersampled and
// the readout kx fully sampled. The simulation decouples along the readout:
// after an inverse FFT along kx every readout position x is an independent
// (ky, kz) problem sharing the mask, so the plan reconstructs the planes at
// the readout positions it lists (object.readout_positions), each an
// nz × ny image (rows kz/z, columns ky/y), stacked into one image for the
// priors and the scores. For the ellipsoid phantom each plane's data are the
// exact spectrum of its elliptical cut (simulate.Ellipsoids.SliceX).
const (
	Pattern3DUniform     = "cartesian3d-uniform"
	Pattern3DShifted     = "cartesian3d-shifted"
	Pattern3DRandom      = "cartesian3d-random"
	Pattern3DPoissonDisc = "cartesian3d-poisson-disc"
)

var patterns3D = []string{Pattern3DUniform, Pattern3DShifted, Pattern3DRandom, Pattern3DPoissonDisc}

// Is3D reports whether the plan is a 3D Cartesian one (object.partitions set).
func (p *Plan) Is3D() bool { return p.Object.Partitions > 0 }

// ImageSize returns the rows and columns of the scored image: the
// reconstruction grid in 2D, the stack of readout planes in 3D.
func (p *Plan) ImageSize() (rows, cols int) {
	if p.Is3D() {
		return len(p.Object.ReadoutPositions) * p.Object.Partitions, p.Object.PhaseLines
	}
	return p.Object.PhaseLines, p.Object.ReadoutPoints
}

// PlaneSize returns the rows and columns of one reconstructed plane and of
// the PSF: the 2D grid, or the nz × ny phase-encode plane in 3D.
func (p *Plan) PlaneSize() (rows, cols int) {
	if p.Is3D() {
		return p.Object.Partitions, p.Object.PhaseLines
	}
	return p.Object.PhaseLines, p.Object.ReadoutPoints
}

// object3D validates the 3D keys of [object].
func (v *validator) object3D(p *Plan) {
	o := &p.Object
	if o.Partitions < 16 || o.Partitions > 1024 {
		v.fail("object", -1, "partitions", fmt.Sprintf("must be between 16 and 1024, got %d", o.Partitions), "the kz phase-encode count of a 3D scan")
	}
	if o.ReadoutPositions == nil {
		o.ReadoutPositions = []float64{0}
	}
	if len(o.ReadoutPositions) > 16 {
		v.fail("object", -1, "readout_positions", fmt.Sprintf("at most 16 planes, got %d", len(o.ReadoutPositions)), "")
	}
	for _, x := range o.ReadoutPositions {
		if !finite(x) || x <= -0.5 || x >= 0.5 {
			v.fail("object", -1, "readout_positions", fmt.Sprintf("%v is outside the field of view (−0.5, 0.5)", x), "positions along the readout in FOV units, e.g. [-0.1, 0, 0.1]")
		}
	}
	for _, s := range p.Schemes {
		if !oneOf(s.Pattern, patterns3D) {
			v.fail("object", -1, "partitions", fmt.Sprintf("a 3D plan (partitions set) cannot run the 2D pattern %q", s.Pattern),
				"use "+strings.Join(patterns3D, ", ")+", or remove partitions")
			return
		}
	}
	if o.Phantom == "modified-shepp-logan" {
		o.Phantom = "modified-shepp-logan-3d"
	}
}

// scheme3D validates a 3D Cartesian scheme.
func (v *validator) scheme3D(p *Plan, i int) {
	s := &p.Schemes[i]
	if !p.Is3D() {
		v.fail("scheme", i, "pattern", fmt.Sprintf("pattern %s needs a 3D object", s.Pattern), "set object.partitions (the kz count)")
		return
	}
	if s.Label == "" {
		s.Label = fmt.Sprintf("%s %d", s.Pattern, i+1)
	}
	ny, nz := p.Object.PhaseLines, p.Object.Partitions
	if s.CalibrationLines < 0 || s.CalibrationLines > ny || s.CalibrationPartitions < 0 || s.CalibrationPartitions > nz ||
		(s.CalibrationLines == 0) != (s.CalibrationPartitions == 0) {
		v.fail("scheme", i, "calibration_lines", fmt.Sprintf("the calibration box %d × %d must fit in %d × %d, both sides given or neither",
			s.CalibrationLines, s.CalibrationPartitions, ny, nz), "set calibration_lines and calibration_partitions together")
	}
	if s.Pattern == Pattern3DRandom && s.DensityPower == 0 {
		s.DensityPower = 2
	}
	if s.Pattern == Pattern3DPoissonDisc && s.DiscGrowth == 0 {
		s.DiscGrowth = 2
	}
	if s.Pattern == Pattern3DShifted && s.LatticeShift == 0 {
		s.LatticeShift = 1
	}
	if len(s.Accelerations) == 0 {
		v.fail("scheme", i, "accelerations", "missing or empty", "list the total acceleration factors R = Ry·Rz to try, e.g. [2, 4, 6, 8]")
	}
	for _, r := range s.Accelerations {
		switch {
		case !finite(r) || r < 1 || r > float64(ny*nz):
			v.fail("scheme", i, "accelerations", fmt.Sprintf("R = %v must lie between 1 and the %d phase-encode points", r, ny*nz), "")
		case (s.Pattern == Pattern3DUniform || s.Pattern == Pattern3DShifted) && r != math.Trunc(r):
			v.fail("scheme", i, "accelerations", fmt.Sprintf("R = %v is not a whole number", r), "a lattice undersamples by whole Ry × Rz")
		}
	}
	sortUnique(v, s, i)
}

// split returns the lattice factors Ry ≥ Rz of a total R, as square as
// possible (R = 6 → 3 × 2, R = 8 → 4 × 2, R = 7 → 7 × 1).
func split(r int) (ry, rz int) {
	rz = 1
	for d := 1; d*d <= r; d++ {
		if r%d == 0 {
			rz = d
		}
	}
	return r / rz, rz
}

// sampling3D builds the (ky, kz) mask of a 3D scheme at acceleration r.
func sampling3D(p *Plan, s Scheme, r float64, seed uint64) (trajectories.Sampling, error) {
	g := trajectories.Grid3D{Ny: p.Object.PhaseLines, Nz: p.Object.Partitions, Nx: p.Object.ReadoutPoints,
		CalibY: s.CalibrationLines, CalibZ: s.CalibrationPartitions, CornerCut: s.CornerCut}
	samples := max(1, int(math.Round(float64(g.Ny*g.Nz)/r)))
	switch s.Pattern {
	case Pattern3DUniform:
		ry, rz := split(int(r))
		return trajectories.Cartesian3DUniform(g, ry, rz)
	case Pattern3DShifted:
		ry, rz := split(int(r))
		return trajectories.Cartesian3DShifted(g, ry, rz, s.LatticeShift%max(ry, 1))
	case Pattern3DRandom:
		return trajectories.Cartesian3DRandom(g, samples, trajectories.Density{Kind: "polynomial", Power: s.DensityPower}, seed)
	case Pattern3DPoissonDisc:
		return trajectories.Cartesian3DPoissonDisc(g, samples, s.DiscGrowth, seed)
	}
	return trajectories.Sampling{}, fmt.Errorf("pattern %q has no 3D sampling", s.Pattern)
}

// planes3D is the block-diagonal operator that applies one plane operator to
// each readout plane of a stacked image, so the priors and the solvers see
// one image and one data vector. The plane operators of the sweep (Cartesian,
// SENSE) apply EᴴE directly, and so does the stack.
type planes3D struct {
	op     simulate.NormalOperator
	planes int
}

// Normal applies the plane operator's EᴴE to each plane.
func (b planes3D) Normal(dst, src []complex128) {
	n := b.op.ImageLen()
	for q := 0; q < b.planes; q++ {
		b.op.Normal(dst[q*n:(q+1)*n], src[q*n:(q+1)*n])
	}
}

// OrthonormalRows reports whether the plane operator has E·Eᴴ = I, which
// the block-diagonal stack then has too.
func (b planes3D) OrthonormalRows() bool {
	o, ok := b.op.(simulate.OrthonormalRows)
	return ok && o.OrthonormalRows()
}

func (b planes3D) ImageLen() int { return b.planes * b.op.ImageLen() }
func (b planes3D) DataLen() int  { return b.planes * b.op.DataLen() }

func (b planes3D) Forward(dst, src []complex128) {
	n, m := b.op.ImageLen(), b.op.DataLen()
	for q := 0; q < b.planes; q++ {
		b.op.Forward(dst[q*m:(q+1)*m], src[q*n:(q+1)*n])
	}
}

func (b planes3D) Adjoint(dst, src []complex128) {
	n, m := b.op.ImageLen(), b.op.DataLen()
	for q := 0; q < b.planes; q++ {
		b.op.Adjoint(dst[q*n:(q+1)*n], src[q*m:(q+1)*m])
	}
}

// scene3D fills the truth of a 3D plan: the stack of the phantom's exact
// cuts at the readout positions, each rasterised on the nz × ny plane grid.
func (env *runEnv) scene3D() error {
	p, o := env.plan, env.out
	nz, ny := p.PlaneSize()
	ph := simulate.ModifiedSheppLogan3D()
	// Built afresh, so that a scene set up again for an outcome (noise
	// maps, estimates) does not stack the planes twice.
	env.cuts, env.cutSpectra, o.Truth, o.Support = nil, nil, nil, nil
	for _, x := range p.Object.ReadoutPositions {
		cut := ph.SliceX(x)
		if len(cut) == 0 {
			return &Error{File: p.Source, Key: "object.readout_positions", Msg: fmt.Sprintf("the plane at x = %v misses the object", x),
				Hint: "choose positions that cut the phantom, e.g. within ±0.3"}
		}
		env.cuts = append(env.cuts, cut)
		o.Truth = append(o.Truth, cut.Rasterize(ny, nz)...)
		o.Support = append(o.Support, cut.Support(ny, nz)...)
		env.cutSpectra = append(env.cutSpectra, simulate.CartesianSpectrum(cut, ny, nz))
	}
	var err error
	o.Sigma, err = simulate.NoiseSigma(o.Truth, o.Support, p.Scanner.ReferenceSNR)
	return err
}

// encoding3D builds the stacked-plane operator of a 3D candidate and its
// data: each plane's exact cut spectrum at the acquired (ky, kz) points,
// with a receive array the exact coil-weighted spectra (coil-major within
// each plane, the layout of SENSE).
func (w *workerState) encoding3D(ci int, e *encoding) error {
	env := w.env
	s := env.out.Candidates[ci].Sampling
	nz, ny := env.plan.PlaneSize()
	if env.coils != nil {
		op, err := simulate.NewCartesianSENSE(nz, ny, s.Mask, env.planeMaps, env.coilNoise)
		if err != nil {
			return err
		}
		e.op = planes3D{op: op, planes: len(env.cuts)}
		env.clean.once[ci].Do(func() {
			var d []complex128
			for _, cut := range env.cuts {
				pd, err := env.coils.CartesianData(cut, nz, ny, s.Mask)
				if err != nil {
					env.clean.err[ci] = err
					return
				}
				d = append(d, pd...)
			}
			env.clean.data[ci] = d
		})
		return nil
	}
	op, err := simulate.NewCartesian(nz, ny, s.Mask)
	if err != nil {
		return err
	}
	e.op, e.step = planes3D{op: op, planes: len(env.cuts)}, 1
	env.clean.once[ci].Do(func() {
		m := op.DataLen()
		d := make([]complex128, len(env.cuts)*m)
		for q, sp := range env.cutSpectra {
			op.Gather(d[q*m:(q+1)*m], sp)
		}
		env.clean.data[ci] = d
	})
	return nil
}
