package trajectories

import "fmt"

// Spec selects and parameterises one sampling for Build: a plain value that a
// plan can fill from its file. Only the fields of the chosen Scheme are read.
type Spec struct {
	// Scheme is one of "cartesian-uniform", "cartesian-random",
	// "cartesian3d-uniform", "cartesian3d-shifted", "cartesian3d-random",
	// "cartesian3d-poisson-disc", "radial", "spiral" or "illumination".
	Scheme string
	// Ny, Nx: 2D Cartesian grid (rows = phase encode).
	Ny, Nx int
	// Step is the line step of "cartesian-uniform".
	Step int
	// Lines and Power are the line count and polynomial density power of
	// "cartesian-random".
	Lines int
	Power float64
	// Calib is the 2D calibration band.
	Calib int
	// Grid is the phase-encode plane of the 3D schemes; Ry, Rz and Shift
	// the lattice of "cartesian3d-uniform"/"cartesian3d-shifted"; Samples,
	// Density and DiscGrowth the count and laws of the random and
	// Poisson-disc 3D schemes.
	Grid       Grid3D
	Ry, Rz     int
	Shift      int
	Samples    int
	Density    Density
	DiscGrowth float64
	// Radial, Spiral and Illumination parameterise those schemes.
	Radial       RadialSpec
	Spiral       SpiralSpec
	Illumination IlluminationSpec
	// Seed drives every random draw.
	Seed uint64
}

// Build returns the sampling that sp describes, calling the constructor of
// its scheme; errors are the constructor's.
func Build(sp Spec) (Sampling, error) {
	switch sp.Scheme {
	case SchemeCartesianUniform:
		return CartesianUniform(sp.Ny, sp.Nx, sp.Step, sp.Calib)
	case SchemeCartesianRandom:
		return CartesianRandom(sp.Ny, sp.Nx, sp.Lines, sp.Calib, sp.Power, sp.Seed)
	case SchemeCartesian3DUniform:
		return Cartesian3DUniform(sp.Grid, sp.Ry, sp.Rz)
	case SchemeCartesian3DShifted:
		return Cartesian3DShifted(sp.Grid, sp.Ry, sp.Rz, sp.Shift)
	case SchemeCartesian3DRandom:
		return Cartesian3DRandom(sp.Grid, sp.Samples, sp.Density, sp.Seed)
	case SchemeCartesian3DPoissonDisc:
		return Cartesian3DPoissonDisc(sp.Grid, sp.Samples, sp.DiscGrowth, sp.Seed)
	case "radial":
		return Radial(sp.Radial)
	case "spiral":
		s, _, err := Spiral(sp.Spiral)
		return s, err
	case "illumination":
		s, _, err := IlluminationSet(sp.Illumination)
		return s, err
	}
	return Sampling{}, fmt.Errorf("trajectories: scheme %q: must be one of cartesian-uniform, cartesian-random, cartesian3d-uniform, cartesian3d-shifted, cartesian3d-random, cartesian3d-poisson-disc, radial, spiral, illumination", sp.Scheme)
}
