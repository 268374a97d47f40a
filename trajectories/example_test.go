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
