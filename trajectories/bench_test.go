package trajectories

import "testing"

func BenchmarkCartesianRandom256(b *testing.B) {
	for i := 0; b.Loop(); i++ {
		if _, err := CartesianRandom(256, 256, 64, 16, 2, uint64(i)); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkMaskPSF256(b *testing.B) {
	s, _ := CartesianRandom(256, 256, 64, 16, 2, 1)
	for b.Loop() {
		if _, err := s.PSF(); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkCartesian3DRandom256(b *testing.B) {
	g := Grid3D{Ny: 256, Nz: 256, Nx: 1, CalibY: 24, CalibZ: 24, CornerCut: true}
	d := Density{Kind: "polynomial", Power: 2}
	for i := 0; b.Loop(); i++ {
		if _, err := Cartesian3DRandom(g, 256*256/8, d, uint64(i)); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkPoissonDisc256R8(b *testing.B) {
	g := Grid3D{Ny: 256, Nz: 256, Nx: 1, CalibY: 24, CalibZ: 24, CornerCut: true}
	for i := 0; b.Loop(); i++ {
		if _, err := Cartesian3DPoissonDisc(g, 256*256/8, 1, uint64(i)); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkPointPSFRadial64(b *testing.B) {
	s, _ := Radial(RadialSpec{N: 64, Spokes: 50, Order: "golden"})
	for b.Loop() {
		if _, err := s.PSF(); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkSpiral256(b *testing.B) {
	sp := SpiralSpec{N: 256, FOV: 0.24, Interleaves: 16, GMax: 0.04, SMax: 150, Dt: 4e-6, EdgeUndersampling: 2, DenseFraction: 0.2}
	for b.Loop() {
		if _, _, err := Spiral(sp); err != nil {
			b.Fatal(err)
		}
	}
}
