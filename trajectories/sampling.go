package trajectories

import (
	"fmt"
	"math"
)

// Family names the kind of sampling, which fixes what a shot is and what the
// fully sampled reference is.
const (
	// FamilyCartesian2D is a 2D Cartesian scan: a shot is one phase-encode
	// line (one ky row, readout along kx fully sampled); the reference is ny
	// lines.
	FamilyCartesian2D = "cartesian-2d"
	// FamilyCartesian3D is a 3D Cartesian scan: a shot is one readout line
	// along kx at one (ky, kz) phase-encode point; the reference is ny·nz
	// points (the full rectangle, even when corners are cut).
	FamilyCartesian3D = "cartesian-3d"
	// FamilyRadial is a 2D radial scan: a shot is one spoke; the reference
	// is the Nyquist count π/2·N full spokes (π·N half spokes), rounded, for an
	// N×N image.
	FamilyRadial = "radial"
	// FamilySpiral is a 2D spiral scan: a shot is one interleave; the
	// reference is the number of constant-density interleaves that meet
	// Nyquist with the same readout duration.
	FamilySpiral = "spiral"
	// FamilyIllumination is an ODT illumination set: a shot is one
	// illumination direction; the reference is the count that fills the
	// accessible spectrum without gaps.
	FamilyIllumination = "illumination"
)

// Scheme names of the 2D Cartesian constructors.
const (
	SchemeCartesianUniform = "cartesian-uniform"
	SchemeCartesianRandom  = "cartesian-random"
)

// Sampling is a plain description of one acquisition's sampling pattern and its
// acceleration bookkeeping. It is safe to copy; constructors never share its
// slices with other values.
type Sampling struct {
	// Scheme names the constructor that made it, e.g. "cartesian-uniform".
	Scheme string
	// Family names the kind of sampling, e.g. FamilyCartesian2D.
	Family string
	// Dim is the number of spatial dimensions of the reconstructed grid.
	Dim int
	// Nx, Ny are the grid size (columns, rows). For 3D Cartesian, Nx is the
	// readout length, Ny and Nz the phase-encode sizes.
	Nx, Ny int
	// Nz is the number of partitions of a 3D grid (0 for 2D).
	Nz int
	// Mask is the Cartesian sampling mask on the centred grid.
	// FamilyCartesian2D: ny*nx, row-major; row m is ky = m − ny/2, column n
	// is kx = n − nx/2.
	// FamilyCartesian3D: the nz*ny phase-encode plane, row-major; row p is
	// kz = p − nz/2, column m is ky = m − ny/2; every true entry is one
	// readout line of Nx samples (kx fully sampled).
	// Nil for non-Cartesian families.
	Mask []bool
	// Lines lists the acquired phase-encode rows (indices m), ascending
	// (FamilyCartesian2D only).
	Lines []int
	// Shots is the number of shots acquired (lines for 2D Cartesian).
	Shots int
	// FullShots is the family's fully sampled reference (ny lines for 2D
	// Cartesian).
	FullShots int
	// R is the achieved acceleration FullShots / Shots, as achieved rather
	// than as requested.
	R float64
	// Calib is the number of fully sampled central calibration lines (2D) or
	// the ky extent of the calibration box (3D).
	Calib int
	// CalibZ is the kz extent of the 3D calibration box.
	CalibZ int
	// K lists the k-space sample positions of non-Cartesian families as
	// (kx, ky) in cycles per FOV, shot after shot: samples
	// [i·ShotLen, (i+1)·ShotLen) belong to shot i. Nil for Cartesian ones.
	K [][2]float64
	// ShotLen is the number of samples per shot in K.
	ShotLen int
	// Weights holds one density-compensation weight per sample of K: the
	// k-space area (cycles/FOV)² each sample stands for.
	Weights []float64
	// Angles lists, in acquisition order, the spoke angles (radial), the
	// interleave rotations (spiral) or the illumination azimuths (ODT), in
	// degrees from the +kx axis.
	Angles []float64
	// DiscScale and DiscGrowth are the λ and growth of a Poisson-disc
	// sampling: samples keep PoissonDiscRadius(DiscScale, DiscGrowth, ρ)
	// apart. Zero for other schemes.
	DiscScale, DiscGrowth float64
}

// SampledFraction returns the fraction of the grid's k-space samples that the
// mask acquires, or 0 when there is no mask.
func (s Sampling) SampledFraction() float64 {
	if len(s.Mask) == 0 {
		return 0
	}
	c := 0
	for _, v := range s.Mask {
		if v {
			c++
		}
	}
	return float64(c) / float64(len(s.Mask))
}

// Validate checks that the bookkeeping of s is self-consistent: mask size,
// ascending unique lines inside the grid, mask rows matching Lines, and R equal
// to FullShots/Shots. It is meant for Sampling values built or edited by hand.
func (s Sampling) Validate() error {
	if s.Nx < 1 || s.Ny < 1 {
		return fmt.Errorf("trajectories: grid %d×%d: both sizes must be at least 1", s.Ny, s.Nx)
	}
	if s.Shots < 1 || s.FullShots < 1 {
		return fmt.Errorf("trajectories: shots %d of %d: both must be at least 1", s.Shots, s.FullShots)
	}
	if want := float64(s.FullShots) / float64(s.Shots); s.R != want {
		return fmt.Errorf("trajectories: R = %g but FullShots/Shots = %g", s.R, want)
	}
	switch s.Family {
	case FamilyCartesian2D:
	case FamilyCartesian3D:
		if len(s.Mask) != s.Ny*s.Nz {
			return fmt.Errorf("trajectories: 3D mask has %d entries, want %d×%d = %d", len(s.Mask), s.Nz, s.Ny, s.Ny*s.Nz)
		}
		if n := countMask(s.Mask); n != s.Shots {
			return fmt.Errorf("trajectories: 3D mask has %d points but Shots = %d", n, s.Shots)
		}
		return nil
	case FamilyRadial, FamilySpiral, FamilyIllumination:
		if s.K == nil && s.Dim == 3 {
			return nil // 3D illumination sets carry no sample list
		}
		if s.ShotLen < 1 || len(s.K) != s.ShotLen*s.Shots {
			return fmt.Errorf("trajectories: %d samples but %d shots of %d", len(s.K), s.Shots, s.ShotLen)
		}
		if len(s.Weights) != len(s.K) {
			return fmt.Errorf("trajectories: %d weights for %d samples", len(s.Weights), len(s.K))
		}
		for i, k := range s.K {
			if math.IsNaN(k[0]) || math.IsNaN(k[1]) || math.IsInf(k[0], 0) || math.IsInf(k[1], 0) || math.IsNaN(s.Weights[i]) || s.Weights[i] < 0 {
				return fmt.Errorf("trajectories: sample %d is not finite or has a negative weight", i)
			}
		}
		return nil
	default:
		return fmt.Errorf("trajectories: unknown family %q", s.Family)
	}
	if len(s.Mask) != s.Nx*s.Ny {
		return fmt.Errorf("trajectories: mask has %d entries, want %d×%d = %d", len(s.Mask), s.Ny, s.Nx, s.Nx*s.Ny)
	}
	if len(s.Lines) != s.Shots {
		return fmt.Errorf("trajectories: %d lines listed but Shots = %d", len(s.Lines), s.Shots)
	}
	acq := make([]bool, s.Ny)
	for i, m := range s.Lines {
		if m < 0 || m >= s.Ny {
			return fmt.Errorf("trajectories: line %d outside rows 0..%d", m, s.Ny-1)
		}
		if i > 0 && m <= s.Lines[i-1] {
			return fmt.Errorf("trajectories: lines not strictly ascending at position %d", i)
		}
		acq[m] = true
	}
	for m := 0; m < s.Ny; m++ {
		for n := 0; n < s.Nx; n++ {
			if s.Mask[m*s.Nx+n] != acq[m] {
				return fmt.Errorf("trajectories: mask row %d disagrees with Lines", m)
			}
		}
	}
	return nil
}

func countMask(m []bool) int {
	n := 0
	for _, v := range m {
		if v {
			n++
		}
	}
	return n
}
