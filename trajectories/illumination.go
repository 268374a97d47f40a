package trajectories

import (
	"fmt"
	"math"
)

// Scheme names of the illumination patterns.
const (
	SchemeFan          = "illum-fan"           // 2D: in-plane, evenly spaced in the pupil
	SchemeFanGolden    = "illum-fan-golden"    // 2D: in-plane, golden-ratio order
	SchemeRing         = "illum-ring"          // 3D: on the NA circle, evenly spaced azimuths
	SchemeRingGolden   = "illum-ring-golden"   // 3D: on the NA circle, golden-angle azimuths
	SchemeFibonacciCap = "illum-fibonacci-cap" // 3D: filling the illumination cone
)

// goldenAzimuth is 360°·(1 − 1/φ) ≈ 137.5078°, the azimuth increment of
// golden-ratio ordering on a circle (common practice).
var goldenAzimuth = 360 * (1 - 1/Phi)

// IlluminationSpec describes a set of plane-wave illuminations for optical
// diffraction tomography (ODT). Lengths share one unit (e.g. µm); the optical
// axis is z.
type IlluminationSpec struct {
	// Pattern is "fan" or "fan-golden" (2D, directions in the x–z plane),
	// "ring", "ring-golden" or "fibonacci-cap" (3D).
	Pattern string
	// Count is the number of illuminations (shots).
	Count int
	// Wavelength is the vacuum wavelength λ.
	Wavelength float64
	// Medium is the refractive index n_m of the immersion medium.
	Medium float64
	// NA is the illumination numerical aperture, n_m·sin(α_max) < n_m.
	NA float64
	// NADetect is the detection NA (2D fans: the width of each Ewald arc);
	// 0 means equal to NA.
	NADetect float64
	// FOV is the field of view (same unit as Wavelength).
	FOV float64
	// N is the reconstruction grid (N×N in the x–z plane for 2D).
	N int
}

// Illumination is one plane-wave illumination.
type Illumination struct {
	// Dir is the unit propagation direction (x, y, z) in the medium.
	Dir [3]float64
	// K is the incident wave vector n_m/λ·Dir in cycles per FOV.
	K [3]float64
	// PolarDeg is the angle from the optical axis, AzimuthDeg the angle of
	// the transverse part from +x, in degrees.
	PolarDeg, AzimuthDeg float64
}

func (sp IlluminationSpec) check() error {
	switch {
	case sp.Count < 1:
		return fmt.Errorf("trajectories: illuminations = %d: must be at least 1", sp.Count)
	case !(sp.Wavelength > 0) || math.IsInf(sp.Wavelength, 0):
		return fmt.Errorf("trajectories: wavelength = %g: must be finite and > 0", sp.Wavelength)
	case !(sp.Medium >= 1) || math.IsInf(sp.Medium, 0):
		return fmt.Errorf("trajectories: medium index = %g: must be finite and ≥ 1", sp.Medium)
	case !(sp.NA > 0) || sp.NA >= sp.Medium:
		return fmt.Errorf("trajectories: illumination NA = %g: must be in (0, %g) (below the medium index)", sp.NA, sp.Medium)
	case sp.NADetect < 0 || sp.NADetect >= sp.Medium || math.IsNaN(sp.NADetect):
		return fmt.Errorf("trajectories: detection NA = %g: must be in [0, %g) (0 means the illumination NA)", sp.NADetect, sp.Medium)
	case !(sp.FOV > 0) || math.IsInf(sp.FOV, 0):
		return fmt.Errorf("trajectories: FOV = %g: must be finite and > 0", sp.FOV)
	case sp.N < 2:
		return fmt.Errorf("trajectories: grid N = %d: must be at least 2", sp.N)
	}
	return nil
}

// IlluminationReference returns the number of illuminations that fill the
// accessible spectrum without gaps for a pattern: the count whose incident
// transverse wave vectors are at most one cycle per FOV apart (common
// practice; our bookkeeping rule). With r = NA·FOV/λ cycles per FOV: fans
// ⌊2r⌋ + 1 across the pupil diameter, rings ⌈2π·r⌉ around the NA circle, the
// filled cone ⌈π·r²⌉ over the pupil disc.
func IlluminationReference(sp IlluminationSpec) (int, error) {
	if err := sp.check(); err != nil {
		return 0, err
	}
	r := sp.NA * sp.FOV / sp.Wavelength
	switch sp.Pattern {
	case "fan", "fan-golden":
		return int(math.Floor(2*r)) + 1, nil
	case "ring", "ring-golden":
		return int(math.Ceil(2 * math.Pi * r)), nil
	case "fibonacci-cap":
		return int(math.Ceil(math.Pi * r * r)), nil
	}
	return 0, fmt.Errorf("trajectories: illumination pattern %q: must be \"fan\", \"fan-golden\", \"ring\", \"ring-golden\" or \"fibonacci-cap\"", sp.Pattern)
}

// Illuminations returns the illumination directions of sp, in acquisition
// order, with their incident wave vectors k_in = n_m/λ·(sin α cos φ,
// sin α sin φ, cos α), sin α ≤ NA/n_m:
//   - fan: transverse wave numbers evenly spaced over [−NA/λ, NA/λ] (one
//     illumination: normal incidence), in the x–z plane;
//   - fan-golden: transverse wave numbers (2·frac(½ + j/φ) − 1)·NA/λ, which
//     start at normal incidence and stay evenly spread for any prefix;
//   - ring: sin α = NA/n_m, azimuths j·360°/Count;
//   - ring-golden: sin α = NA/n_m, azimuths j·137.5078° (360°(1 − 1/φ));
//   - fibonacci-cap: equal-area Fibonacci spiral on the spherical cap
//     α ≤ α_max, cos α_j = 1 − (j + ½)/Count·(1 − cos α_max), azimuths
//     j·137.5078° (González Á, Math Geosci 2010;42:49-64, memory).
func Illuminations(sp IlluminationSpec) ([]Illumination, error) {
	if _, err := IlluminationReference(sp); err != nil {
		return nil, err
	}
	km := sp.Medium / sp.Wavelength * sp.FOV // cycles per FOV
	sinMax := sp.NA / sp.Medium
	out := make([]Illumination, sp.Count)
	set := func(j int, sinA, az float64) {
		cosA := math.Sqrt(1 - sinA*sinA)
		sz, cz := math.Sincos(az * math.Pi / 180)
		dir := [3]float64{sinA * cz, sinA * sz, cosA}
		if sinA < 0 { // fans: a negative transverse wave number
			az = 180
			dir = [3]float64{sinA, 0, cosA}
		}
		out[j] = Illumination{
			Dir:        dir,
			K:          [3]float64{km * dir[0], km * dir[1], km * dir[2]},
			PolarDeg:   math.Asin(math.Abs(sinA)) * 180 / math.Pi,
			AzimuthDeg: az,
		}
	}
	n := sp.Count
	switch sp.Pattern {
	case "fan":
		for j := range n {
			u := 0.0
			if n > 1 {
				u = 2*float64(j)/float64(n-1) - 1
			}
			set(j, u*sinMax, 0)
		}
	case "fan-golden":
		for j := range n {
			f := 0.5 + float64(j)/Phi
			u := 2*(f-math.Floor(f)) - 1
			set(j, u*sinMax, 0)
		}
	case "ring":
		for j := range n {
			set(j, sinMax, 360*float64(j)/float64(n))
		}
	case "ring-golden":
		for j := range n {
			set(j, sinMax, math.Mod(float64(j)*goldenAzimuth, 360))
		}
	case "fibonacci-cap":
		cosMax := math.Sqrt(1 - sinMax*sinMax)
		for j := range n {
			c := 1 - (float64(j)+0.5)/float64(n)*(1-cosMax)
			set(j, math.Sqrt(max(0, 1-c*c)), math.Mod(float64(j)*goldenAzimuth, 360))
		}
	}
	return out, nil
}

// IlluminationSet returns the sampling of an illumination set: shots =
// Count, FullShots = IlluminationReference, R = FullShots/Count, and Angles
// the illumination azimuths. For the 2D fans it also lists the object
// frequencies each illumination measures under the first Born approximation
// (Fourier diffraction theorem: Wolf E, Opt Commun 1969;1:153-156; Kak AC,
// Slaney M, Principles of Computerized Tomographic Imaging, 1988, ch. 6): for
// detected transverse frequencies q = j cycles/FOV, |q| ≤ NADetect·FOV/λ, the
// point (q − k_in,x, √(k_m² − q²) − k_in,z), on the Ewald circle of radius
// k_m = n_m·FOV/λ shifted by −k_in. K then holds (kx, kz) in cycles per FOV,
// one shot per illumination, for the N×N x–z grid (rows z). Weights are the
// Jacobian of (q, k_in,x) ↦ K, |k_in,x/k_in,z − q/k_z(q)|, times the detector
// step (1) and the illumination's share of the pupil. 3D patterns carry no K:
// their caps are left to the forward model.
func IlluminationSet(sp IlluminationSpec) (Sampling, []Illumination, error) {
	ill, err := Illuminations(sp)
	if err != nil {
		return Sampling{}, nil, err
	}
	ref, _ := IlluminationReference(sp)
	s := Sampling{
		Family:    FamilyIllumination,
		Nx:        sp.N,
		Ny:        sp.N,
		Shots:     sp.Count,
		FullShots: ref,
		Angles:    make([]float64, len(ill)),
	}
	s.R = float64(ref) / float64(sp.Count)
	for j, il := range ill {
		s.Angles[j] = il.AzimuthDeg
	}
	switch sp.Pattern {
	case "fan":
		s.Scheme, s.Dim = SchemeFan, 2
	case "fan-golden":
		s.Scheme, s.Dim = SchemeFanGolden, 2
	case "ring":
		s.Scheme, s.Dim = SchemeRing, 3
	case "ring-golden":
		s.Scheme, s.Dim = SchemeRingGolden, 3
	case "fibonacci-cap":
		s.Scheme, s.Dim = SchemeFibonacciCap, 3
	}
	if s.Dim != 2 {
		return s, ill, nil
	}
	km := sp.Medium / sp.Wavelength * sp.FOV
	nad := sp.NADetect
	if nad == 0 {
		nad = sp.NA
	}
	qmax := int(math.Floor(nad * sp.FOV / sp.Wavelength))
	s.ShotLen = 2*qmax + 1
	// Each illumination's share of the pupil: half the gaps to its
	// neighbours in transverse wave number (the pupil edges close the
	// outermost ones).
	kin := make([]float64, len(ill))
	for j, il := range ill {
		kin[j] = il.K[0]
	}
	share := pupilShares(kin, sp.NA*sp.FOV/sp.Wavelength)
	for j, il := range ill {
		ax, az := il.K[0], il.K[2]
		for q := -qmax; q <= qmax; q++ {
			fq := float64(q)
			kz := math.Sqrt(km*km - fq*fq)
			s.K = append(s.K, [2]float64{fq - ax, kz - az})
			s.Weights = append(s.Weights, math.Abs(ax/az-fq/kz)*share[j])
		}
	}
	return s, ill, nil
}

// pupilShares returns for each transverse wave number in x (inside
// [−edge, edge]) the width of pupil it stands for: half the gaps to its
// sorted neighbours, the outermost reaching to the edge.
func pupilShares(x []float64, edge float64) []float64 {
	n := len(x)
	w := make([]float64, n)
	if n == 1 {
		w[0] = 2 * edge
		return w
	}
	order := make([]int, n)
	for i := range order {
		order[i] = i
	}
	// Insertion sort: illumination counts are small.
	for i := 1; i < n; i++ {
		for j := i; j > 0 && x[order[j]] < x[order[j-1]]; j-- {
			order[j], order[j-1] = order[j-1], order[j]
		}
	}
	for p, i := range order {
		lo, hi := -edge, edge
		if p > 0 {
			lo = (x[order[p-1]] + x[i]) / 2
		}
		if p < n-1 {
			hi = (x[order[p+1]] + x[i]) / 2
		}
		w[i] = hi - lo
	}
	return w
}
