package trajectories

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
)

// seedStream is the second PCG word used with every caller-supplied seed, so
// that a Sampling is fully determined by (constructor arguments, seed).
const seedStream = 0x7472616a65637473 // "trajects"

// LinesForR returns the number of phase-encode lines that gives an acceleration
// as close as possible to r on an ny-row grid: round(ny/r), at least 1. It
// returns an error unless 1 ≤ r ≤ ny and ny ≥ 1.
func LinesForR(ny int, r float64) (int, error) {
	if ny < 1 {
		return 0, fmt.Errorf("trajectories: ny = %d: must be at least 1", ny)
	}
	if math.IsNaN(r) || r < 1 || r > float64(ny) {
		return 0, fmt.Errorf("trajectories: acceleration R = %g: must be in [1, %d] for %d lines", r, ny, ny)
	}
	n := int(math.Round(float64(ny) / r))
	return max(n, 1), nil
}

// calibBand returns the half-open row range [lo, hi) of a central calibration
// band of calib rows on an ny-row centred grid. For calib ≥ 1 it always
// contains the DC row ny/2; for odd calib it is symmetric about DC, for even
// calib it has one more row on the negative-ky side.
func calibBand(ny, calib int) (lo, hi int) {
	lo = ny/2 - calib/2
	return lo, lo + calib
}

func checkGrid(ny, nx, calib int) error {
	if ny < 1 || nx < 1 {
		return fmt.Errorf("trajectories: grid ny = %d, nx = %d: both must be at least 1", ny, nx)
	}
	if calib < 0 || calib > ny {
		return fmt.Errorf("trajectories: calibration lines = %d: must be in [0, %d] (the matrix has %d phase-encode lines)", calib, ny, ny)
	}
	return nil
}

// newCartesian2D fills the bookkeeping of a 2D Cartesian sampling from its
// acquired rows (any order, no duplicates).
func newCartesian2D(scheme string, ny, nx, calib int, acquired []bool) Sampling {
	s := Sampling{
		Scheme:    scheme,
		Family:    FamilyCartesian2D,
		Dim:       2,
		Nx:        nx,
		Ny:        ny,
		Mask:      make([]bool, ny*nx),
		FullShots: ny,
		Calib:     calib,
	}
	for m, a := range acquired {
		if !a {
			continue
		}
		s.Lines = append(s.Lines, m)
		row := s.Mask[m*nx : (m+1)*nx]
		for n := range row {
			row[n] = true
		}
	}
	s.Shots = len(s.Lines)
	s.R = float64(s.FullShots) / float64(s.Shots)
	return s
}

// CartesianUniform returns a 2D Cartesian sampling that acquires every step-th
// phase-encode line, on a lattice anchored at the DC line (ky ≡ 0 mod step, so
// DC is always acquired), plus a fully sampled central band of calib lines for
// calibration. With calib = 0 and step dividing ny, the PSF is a comb of step
// replicas exactly FOV/step apart (common practice; any MRI textbook).
//
// Errors: ny or nx < 1; step < 1 or step > ny; calib < 0 or calib > ny.
func CartesianUniform(ny, nx, step, calib int) (Sampling, error) {
	if err := checkGrid(ny, nx, calib); err != nil {
		return Sampling{}, err
	}
	if step < 1 || step > ny {
		return Sampling{}, fmt.Errorf("trajectories: line step = %d: must be in [1, %d] (the matrix has %d phase-encode lines)", step, ny, ny)
	}
	acq := make([]bool, ny)
	for m := range ny {
		ky := m - ny/2
		if ((ky%step)+step)%step == 0 {
			acq[m] = true
		}
	}
	lo, hi := calibBand(ny, calib)
	for m := lo; m < hi; m++ {
		acq[m] = true
	}
	return newCartesian2D(SchemeCartesianUniform, ny, nx, calib, acq), nil
}

// LineProbabilities returns, for each of the ny phase-encode rows, the
// probability that CartesianRandom acquires it: 1 inside the central band of
// calib lines, and outside it
//
//	π(ky) = min(1, c·(1 − |ky|/kmax)^power),  kmax = ny/2 + 1,
//
// the polynomial variable density of Lustig, Donoho & Pauly (MRM 2007;58:1182),
// with c chosen (exactly, by water-filling) so that the probabilities outside
// the band sum to lines − calib. kmax is one line beyond the largest |ky| on the
// grid so that every line has a non-zero chance. power = 0 gives uniform
// random sampling outside the band.
//
// Errors: as CartesianRandom.
func LineProbabilities(ny, lines, calib int, power float64) ([]float64, error) {
	if err := checkGrid(ny, 1, calib); err != nil {
		return nil, err
	}
	if lines < 1 || lines > ny {
		return nil, fmt.Errorf("trajectories: lines = %d: must be in [1, %d] (the matrix has %d phase-encode lines)", lines, ny, ny)
	}
	if calib > lines {
		return nil, fmt.Errorf("trajectories: calibration lines = %d exceed the %d lines requested", calib, lines)
	}
	if math.IsNaN(power) || math.IsInf(power, 0) || power < 0 {
		return nil, fmt.Errorf("trajectories: density power = %g: must be finite and ≥ 0", power)
	}
	p := make([]float64, ny)
	lo, hi := calibBand(ny, calib)
	kmax := float64(ny/2) + 1
	var cand []int
	for m := range ny {
		if m >= lo && m < hi {
			p[m] = 1
			continue
		}
		ky := math.Abs(float64(m - ny/2))
		p[m] = math.Pow(1-ky/kmax, power)
		cand = append(cand, m)
	}
	waterFill(p, cand, float64(lines-calib))
	return p, nil
}

// waterFill replaces p[i] for i in idx by min(1, c·p[i]) with c chosen so that
// they sum to target, which must lie in [0, len(idx)]; every p[i] must be > 0.
// Sorting by weight, the j largest are clipped to 1 and the rest scaled by
// c = (target − j) / (sum of the rest), for the smallest j that keeps every
// scaled weight ≤ 1.
func waterFill(p []float64, idx []int, target float64) {
	if len(idx) == 0 {
		return
	}
	order := slices.Clone(idx)
	sort.SliceStable(order, func(a, b int) bool { return p[order[a]] > p[order[b]] })
	// suffix[j] = sum of weights order[j:].
	suffix := make([]float64, len(order)+1)
	for j := len(order) - 1; j >= 0; j-- {
		suffix[j] = suffix[j+1] + p[order[j]]
	}
	for j := 0; j <= len(order); j++ {
		rest := target - float64(j)
		if j == len(order) || rest <= 0 {
			for k, i := range order {
				if k < j {
					p[i] = 1
				} else {
					p[i] = 0
				}
			}
			return
		}
		c := rest / suffix[j]
		if c*p[order[j]] <= 1 {
			for k, i := range order {
				if k < j {
					p[i] = 1
				} else {
					p[i] = c * p[i]
				}
			}
			return
		}
	}
}

// CartesianRandom returns a 2D Cartesian sampling of exactly lines phase-encode
// lines: a fully sampled central band of calib lines plus lines − calib lines
// drawn at random without replacement outside it, each row with the inclusion
// probability given by LineProbabilities (polynomial variable density, Lustig,
// Donoho & Pauly, MRM 2007;58:1182-1195). The draw is randomised systematic
// sampling with unequal probabilities (Hartley HO, Rao JNK, Ann Math Stat
// 1962;33:350-374): rows are put in a random order and selected where the
// running sum of their probabilities crosses u, u+1, u+2, … for one uniform u,
// which yields exactly the requested count and exactly the stated inclusion
// probabilities. The same (arguments, seed) always give the same sampling.
//
// With calib = 0 the DC line is acquired only if the draw picks it.
//
// Errors: ny or nx < 1; lines < 1 or > ny; calib < 0, > ny or > lines;
// power negative, NaN or infinite.
func CartesianRandom(ny, nx, lines, calib int, power float64, seed uint64) (Sampling, error) {
	if nx < 1 {
		return Sampling{}, fmt.Errorf("trajectories: grid ny = %d, nx = %d: both must be at least 1", ny, nx)
	}
	p, err := LineProbabilities(ny, lines, calib, power)
	if err != nil {
		return Sampling{}, err
	}
	rng := rand.New(rand.NewPCG(seed, seedStream))
	lo, hi := calibBand(ny, calib)
	acq := make([]bool, ny)
	var cand []int
	for m := range ny {
		if m >= lo && m < hi {
			acq[m] = true
		} else {
			cand = append(cand, m)
		}
	}
	for _, m := range drawSystematic(p, cand, lines-calib, rng) {
		acq[m] = true
	}
	return newCartesian2D(SchemeCartesianRandom, ny, nx, calib, acq), nil
}

// drawSystematic draws exactly need distinct indices from cand, each index i
// included with probability p[i] (the p[i] over cand must sum to need and lie
// in [0, 1]), by randomised systematic sampling with unequal probabilities
// (Hartley HO, Rao JNK, Ann Math Stat 1962;33:350-374): cand is put in a
// random order and an index is taken where the running sum of probabilities
// crosses u, u+1, u+2, … for one uniform u in [0, 1). cand is reordered.
func drawSystematic(p []float64, cand []int, need int, rng *rand.Rand) []int {
	if need <= 0 || len(cand) == 0 {
		return nil
	}
	rng.Shuffle(len(cand), func(i, j int) { cand[i], cand[j] = cand[j], cand[i] })
	u := rng.Float64()
	chosen := make([]int, 0, need)
	taken := make(map[int]bool, need)
	cum, prev := 0.0, 0.0 // prev = floor(cum − u + 1) before this index
	for _, m := range cand {
		cum += p[m]
		cnt := math.Floor(cum - u + 1)
		if cnt > prev && len(chosen) < need {
			chosen = append(chosen, m)
			taken[m] = true
		}
		prev = cnt
	}
	// Rounding in the running sum can leave the count one short; settle it
	// with the most probable indices not yet taken so the count is exact.
	if len(chosen) < need {
		byP := slices.Clone(cand)
		sort.SliceStable(byP, func(a, b int) bool { return p[byP[a]] > p[byP[b]] })
		for _, m := range byP {
			if len(chosen) >= need {
				break
			}
			if !taken[m] {
				chosen = append(chosen, m)
				taken[m] = true
			}
		}
	}
	return chosen
}
