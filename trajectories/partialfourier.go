package trajectories

import (
	"fmt"
	"math"
	"slices"
)

// PFInfo records what PartialFourier did to a 2D Cartesian sampling: the
// fraction asked for and achieved, the lowest phase-encode frequency kept and
// the fully sampled symmetric band around DC that a partial-Fourier
// reconstruction estimates the image phase from. It is plain data.
type PFInfo struct {
	// Fraction is the requested fraction of the phase-encode extent.
	Fraction float64
	// Achieved is the fraction of the ny phase-encode positions that lie in
	// the kept range ky ≥ KyMin: (ny − ny/2 − KyMin)/ny. It differs from
	// Fraction only by the rounding of KyMin to a whole line.
	Achieved float64
	// KyMin is the lowest phase-encode frequency kept, in cycles per FOV
	// (−K in the notation of PartialFourier); rows with ky < KyMin are not
	// acquired.
	KyMin int
	// Band is the half-width B of the symmetric band: every row with
	// |ky| ≤ B is acquired, so the band holds 2B+1 lines centred on DC.
	Band int
	// Added counts the lines of the band that the input sampling lacked and
	// PartialFourier added (zero for a fully sampled input).
	Added int
}

// BandRows returns the half-open row range [lo, hi) of the symmetric band on
// an ny-row centred grid (row m is ky = m − ny/2).
func (p PFInfo) BandRows(ny int) (lo, hi int) {
	return ny/2 - p.Band, ny/2 + p.Band + 1
}

// PartialFourier restricts a 2D Cartesian line sampling to a fraction of
// k-space along the phase-encode direction: it keeps only the rows with
//
//	ky ≥ −K,  K = round((fraction − ½)·ny),
//
// so that about fraction·ny of the ny phase-encode positions remain, e.g. 5/8,
// 6/8 or 7/8 (common practice; the acquired fraction of partial Fourier
// imaging as in Bernstein MA, King KF, Zhou XJ, Handbook of MRI Pulse
// Sequences, 2004, section on partial Fourier reconstruction, from memory).
// The positive-ky side is kept whole and the negative side truncated, so the
// missing rows are the conjugate partners of acquired ones (ky ↔ −ky), which
// the homodyne and POCS reconstructions of package priors exploit.
//
// The rows |ky| ≤ B with B = min(K, (ny−1)/2) form the symmetric band from
// which those reconstructions estimate the phase; B is clipped so that every
// band row has its partner on the grid (on an even grid the row ky = −ny/2 has
// none). Every band row is kept acquired: for an undersampled input (uniform
// or random lines) the band rows it lacks are added, and PFInfo.Added counts
// them. Rows of the input's calibration band below −K are dropped like any
// other; the result's Calib is the largest centred band, no larger than the
// input's, that is still fully acquired.
//
// Shots and R are recounted, R against the family's full reference ny (so R
// includes the partial-Fourier saving). Scheme and the other fields are
// copied; the result shares no slice with s. Fraction 1 returns a copy of s
// with every band row acquired (nothing is dropped).
//
// Errors: s is not a valid 2D Cartesian sampling; fraction is not in
// [0.5, 1].
func PartialFourier(s Sampling, fraction float64) (Sampling, PFInfo, error) {
	if s.Family != FamilyCartesian2D {
		return Sampling{}, PFInfo{}, fmt.Errorf("trajectories: partial Fourier needs a %s sampling of phase-encode lines, got family %q", FamilyCartesian2D, s.Family)
	}
	if err := s.Validate(); err != nil {
		return Sampling{}, PFInfo{}, fmt.Errorf("trajectories: partial Fourier of an invalid sampling: %w", err)
	}
	if math.IsNaN(fraction) || fraction < 0.5 || fraction > 1 {
		return Sampling{}, PFInfo{}, fmt.Errorf("trajectories: partial Fourier fraction %g: must be in [0.5, 1] (e.g. 0.625 for 5/8 of k-space)", fraction)
	}
	ny, nx := s.Ny, s.Nx
	k := min(int(math.Round((fraction-0.5)*float64(ny))), ny/2)
	band := min(k, (ny-1)/2)
	info := PFInfo{Fraction: fraction, KyMin: -k, Band: band}
	info.Achieved = float64(ny-ny/2+k) / float64(ny)

	in := make([]bool, ny)
	for _, m := range s.Lines {
		in[m] = true
	}
	acq := make([]bool, ny)
	for m := range ny {
		ky := m - ny/2
		switch {
		case ky >= -band && ky <= band:
			acq[m] = true
			if !in[m] {
				info.Added++
			}
		case ky >= -k:
			acq[m] = in[m]
		}
	}
	calib := s.Calib
	for ; calib > 0; calib-- {
		lo, hi := calibBand(ny, calib)
		if !slices.Contains(acq[lo:hi], false) {
			break
		}
	}
	out := s
	fresh := newCartesian2D(s.Scheme, ny, nx, calib, acq)
	out.Mask, out.Lines, out.Shots, out.R, out.Calib = fresh.Mask, fresh.Lines, fresh.Shots, fresh.R, fresh.Calib
	out.FullShots = fresh.FullShots
	// Non-Cartesian fields are nil for this family; copy any others anyway so
	// that the result never aliases s.
	out.K = slices.Clone(s.K)
	out.Weights = slices.Clone(s.Weights)
	out.Angles = slices.Clone(s.Angles)
	return out, info, nil
}
