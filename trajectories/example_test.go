package trajectories_test

import (
	"fmt"

	"accelplan/trajectories"
)

func ExampleCartesianUniform() {
	// Every 4th line of 256 plus a 24-line calibration band.
	s, err := trajectories.CartesianUniform(256, 256, 4, 24)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: %d of %d lines, R = %.3f\n", s.Scheme, s.Shots, s.FullShots, s.R)
	// Output: cartesian-uniform: 82 of 256 lines, R = 3.122
}

func ExampleCartesianRandom() {
	n, _ := trajectories.LinesForR(256, 4)
	s, err := trajectories.CartesianRandom(256, 256, n, 16, 2, 1)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: %d lines, R = %g\n", s.Scheme, s.Shots, s.R)
	// Output: cartesian-random: 64 lines, R = 4
}

func ExampleLinesForR() {
	n, _ := trajectories.LinesForR(256, 3)
	fmt.Println(n)
	_, err := trajectories.LinesForR(256, 0.5)
	fmt.Println(err)
	// Output:
	// 85
	// trajectories: acceleration R = 0.5: must be in [1, 256] for 256 lines
}

func ExampleSideLobeToPeak() {
	s, _ := trajectories.CartesianUniform(128, 1, 2, 0)
	psf, _ := s.PSF()
	r, _ := trajectories.SideLobeToPeak(psf, s.Ny, s.Nx)
	fmt.Printf("uniform R=2 without calibration: side-lobe-to-peak %.2f\n", r)
	// Output: uniform R=2 without calibration: side-lobe-to-peak 1.00
}

func ExampleCartesian3DShifted() {
	g := trajectories.Grid3D{Ny: 128, Nz: 96, Nx: 256, CalibY: 24, CalibZ: 24}
	s, err := trajectories.Cartesian3DShifted(g, 2, 2, 1)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%s: %d of %d phase encodes, R = %.2f\n", s.Scheme, s.Shots, s.FullShots, s.R)
	// Output: cartesian3d-shifted: 3504 of 12288 phase encodes, R = 3.51
}

func ExampleCartesian3DPoissonDisc() {
	g := trajectories.Grid3D{Ny: 64, Nz: 64, Nx: 128, CalibY: 12, CalibZ: 12, CornerCut: true}
	s, err := trajectories.Cartesian3DPoissonDisc(g, 64*64/6, 1.5, 7)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d points, R = %.2f\n", s.Shots, s.R)
	// Output: 682 points, R = 6.01
}

func ExampleRadial() {
	s, err := trajectories.Radial(trajectories.RadialSpec{N: 256, Spokes: 101, Order: "golden", TinyN: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d spokes of %d samples, reference %d, R = %.2f, second spoke at %.4f°\n",
		s.Shots, s.ShotLen, s.FullShots, s.R, s.Angles[1])
	// Output: 101 spokes of 512 samples, reference 402, R = 3.98, second spoke at 111.2461°
}

func ExampleTinyGoldenAngle() {
	for _, n := range []int{1, 2, 7} {
		fmt.Printf("ψ_%d = %.4f°\n", n, trajectories.TinyGoldenAngle(n))
	}
	// Output:
	// ψ_1 = 111.2461°
	// ψ_2 = 68.7539°
	// ψ_7 = 23.6281°
}

func ExampleSpiral() {
	s, d, err := trajectories.Spiral(trajectories.SpiralSpec{
		N: 128, FOV: 0.24, Interleaves: 8, GMax: 0.04, SMax: 150, Dt: 4e-6,
		EdgeUndersampling: 1, DenseFraction: 1,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("readout %.2f ms, %d interleaves, Nyquist needs %d, limits kept: %v\n",
		d.Readout*1e3, s.Shots, s.FullShots, d.PeakG <= 0.04 && d.PeakSlew <= 150)
	// Output: readout 6.94 ms, 8 interleaves, Nyquist needs 8, limits kept: true
}

func ExampleIlluminationSet() {
	s, ill, err := trajectories.IlluminationSet(trajectories.IlluminationSpec{
		Pattern: "ring", Count: 40, Wavelength: 0.532, Medium: 1.337, NA: 1.0, FOV: 20, N: 128,
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%d illuminations at %.1f° from the axis, reference %d, R = %.2f\n",
		s.Shots, ill[0].PolarDeg, s.FullShots, s.R)
	// Output: 40 illuminations at 48.4° from the axis, reference 237, R = 5.92
}

func ExampleBuild() {
	s, err := trajectories.Build(trajectories.Spec{Scheme: "cartesian-uniform", Ny: 192, Nx: 192, Step: 2, Calib: 16})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(s.Shots, s.R)
	// Output: 104 1.8461538461538463
}
