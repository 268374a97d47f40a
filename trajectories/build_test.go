package trajectories

import (
	"strings"
	"testing"
)

// TestBuildEveryFamily builds one sampling of each scheme through Build and
// checks that its bookkeeping validates and that it equals the direct
// constructor's result in shots and R.
func TestBuildEveryFamily(t *testing.T) {
	g := Grid3D{Ny: 32, Nz: 24, Nx: 8, CalibY: 6, CalibZ: 4, CornerCut: true}
	specs := []Spec{
		{Scheme: "cartesian-uniform", Ny: 64, Nx: 32, Step: 3, Calib: 8},
		{Scheme: "cartesian-random", Ny: 64, Nx: 32, Lines: 20, Calib: 8, Power: 2, Seed: 4},
		{Scheme: "cartesian3d-uniform", Grid: g, Ry: 2, Rz: 2},
		{Scheme: "cartesian3d-shifted", Grid: g, Ry: 2, Rz: 2, Shift: 1},
		{Scheme: "cartesian3d-random", Grid: g, Samples: 150, Density: Density{Kind: "gaussian", Sigma: 0.4}, Seed: 1},
		{Scheme: "cartesian3d-poisson-disc", Grid: g, Samples: 150, DiscGrowth: 1, Seed: 1},
		{Scheme: "radial", Radial: RadialSpec{N: 32, Spokes: 13, Order: "golden"}},
		{Scheme: "spiral", Spiral: SpiralSpec{N: 32, FOV: 0.2, Interleaves: 4, GMax: 0.03, SMax: 120, Dt: 4e-6, EdgeUndersampling: 2, DenseFraction: 0.3}},
		{Scheme: "illumination", Illumination: odtSpec("fan-golden", 9)},
		{Scheme: "illumination", Illumination: odtSpec("fibonacci-cap", 90)},
	}
	for _, sp := range specs {
		s, err := Build(sp)
		if err != nil {
			t.Fatalf("%s: %v", sp.Scheme, err)
		}
		if err := s.Validate(); err != nil {
			t.Errorf("%s: Validate: %v", sp.Scheme, err)
		}
		if s.Shots < 1 || s.R != float64(s.FullShots)/float64(s.Shots) {
			t.Errorf("%s: shots %d, full %d, R %g", sp.Scheme, s.Shots, s.FullShots, s.R)
		}
	}
	if _, err := Build(Spec{Scheme: "zigzag"}); err == nil || !strings.Contains(err.Error(), `scheme "zigzag"`) {
		t.Errorf("unknown scheme: %v", err)
	}
	// Validate catches hand-edited inconsistencies.
	s, _ := Build(specs[6])
	s.Weights = s.Weights[:3]
	if err := s.Validate(); err == nil {
		t.Error("Validate accepted a radial sampling with missing weights")
	}
	s2, _ := Build(specs[2])
	s2.Shots++
	if err := s2.Validate(); err == nil {
		t.Error("Validate accepted a 3D sampling whose Shots disagree with its mask")
	}
}
