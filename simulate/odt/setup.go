package odt

import (
	"fmt"
	"math"

	"accelplan/trajectories"
)

// Setup is the optical system of a 2D ODT acquisition. Lengths are in µm.
type Setup struct {
	// Wavelength is the vacuum wavelength λ in µm (plan key wavelength_um).
	Wavelength float64
	// Medium is the refractive index n_m of the immersion medium (plan key
	// medium_index), at least 1.
	Medium float64
	// NAIllumination is the illumination numerical aperture (plan key
	// na_illumination), in (0, Medium): the largest n_m·sin θ of the
	// incident waves.
	NAIllumination float64
	// NADetection is the detection numerical aperture (plan key
	// na_detection), in [NAIllumination, Medium): the detector keeps
	// transverse frequencies |q| ≤ NADetection/λ. It must reach the
	// illumination NA so that the unscattered wave reaches the camera, as a
	// holographic field measurement needs (common practice).
	NADetection float64
	// FOV is the side L of the square field of view in µm (plan key fov_um).
	FOV float64
	// Grid is the number N of pixels along each side of the N×N
	// reconstruction grid (rows z, columns x), at least 2 (plan key grid).
	Grid int
	// DetectorZ is the plane z = d (µm from the centre of the FOV) to which
	// the measured field is refocused; 0 means the centre.
	DetectorZ float64
}

// finite reports whether v is neither NaN nor infinite.
func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// Validate reports the first value out of range, naming its plan key and the
// allowed range.
func (s Setup) Validate() error {
	switch {
	case !(s.Wavelength > 0) || !finite(s.Wavelength):
		return fmt.Errorf("odt: wavelength_um = %g: must be finite and > 0", s.Wavelength)
	case !(s.Medium >= 1) || !finite(s.Medium):
		return fmt.Errorf("odt: medium_index = %g: must be finite and ≥ 1", s.Medium)
	case !(s.NAIllumination > 0) || !(s.NAIllumination < s.Medium):
		return fmt.Errorf("odt: na_illumination = %g: must be in (0, %g), below medium_index", s.NAIllumination, s.Medium)
	case !(s.NADetection >= s.NAIllumination) || !(s.NADetection < s.Medium):
		return fmt.Errorf("odt: na_detection = %g: must be in [%g, %g), from na_illumination up to below medium_index", s.NADetection, s.NAIllumination, s.Medium)
	case !(s.FOV > 0) || !finite(s.FOV):
		return fmt.Errorf("odt: fov_um = %g: must be finite and > 0", s.FOV)
	case s.Grid < 2:
		return fmt.Errorf("odt: grid = %d: must be at least 2", s.Grid)
	case !finite(s.DetectorZ):
		return fmt.Errorf("odt: detector plane z = %g µm: must be finite", s.DetectorZ)
	}
	return nil
}

// MediumWavenumber returns n_m/λ in cycles per µm, the radius of the Ewald
// circle.
func (s Setup) MediumWavenumber() float64 { return s.Medium / s.Wavelength }

// DetectedHalfWidth returns the largest detector frequency index j_max =
// ⌊NA_det·L/λ⌋: the detector keeps q_j = j/L for |j| ≤ j_max.
func (s Setup) DetectedHalfWidth() int {
	return int(math.Floor(s.NADetection * s.FOV / s.Wavelength))
}

// TransverseBound returns (NA_ill + NA_det)·L/λ in cycles per FOV, the
// largest transverse object frequency that transmission ODT can reach
// (common practice).
func (s Setup) TransverseBound() float64 {
	return (s.NAIllumination + s.NADetection) * s.FOV / s.Wavelength
}

// MinGrid returns the smallest even grid size whose band |k| ≤ N/2 holds
// every object frequency the setup can reach: 2·⌈(NA_ill + NA_det)·L/λ⌉,
// i.e. a pixel no larger than λ/(2(NA_ill + NA_det)). The axial reach,
// (n_m − √(n_m² − NA²))·L/λ, is always smaller.
func (s Setup) MinGrid() int {
	return 2 * int(math.Ceil(s.TransverseBound()-1e-9))
}

// Arcs is the sampling geometry of an illumination set: for every
// illumination the detector frequencies q_j and the object frequencies they
// measure, K = (q_j − k_in,x, √(k_m² − q_j²) − k_in,z), on the Ewald arc
// shifted by the incident wave vector (Fourier diffraction theorem; Wolf E,
// Opt Commun 1969;1:153-156; Kak & Slaney 1988, ch. 6). Samples are stored
// illumination by illumination, PerShot each, detector index j ascending.
type Arcs struct {
	// Setup is the optical system.
	Setup Setup
	// Illuminations are the incident plane waves, in acquisition order.
	Illuminations []trajectories.Illumination
	// PerShot is the number of detector frequencies per illumination,
	// 2·DetectedHalfWidth()+1.
	PerShot int
	// KX and KZ hold the object frequency of each sample in cycles per FOV
	// (KX along the grid's columns, KZ along its rows).
	KX, KZ []float64
	// Factor is the physical factor of each sample, mapping the image's
	// orthonormal non-uniform DFT at (KX, KZ) to the datum (see Factor in the
	// package doc and NewArcs).
	Factor []complex128
	// incident wave vector per illumination, cycles per µm
	inX, inZ []float64
}

// NewArcs returns the arcs of the illuminations ill under setup s. Each
// illumination's direction must be a unit vector in the x–z plane (Dir[1] = 0)
// travelling forwards (Dir[2] > 0) with n_m·|sin θ| ≤ NAIllumination; its
// incident wave vector is taken as n_m/λ·Dir (its K field, which depends on
// the FOV it was made for, is not used).
//
// The factor of sample (j, illumination) is
//
//	F_j = i·2π·n_m·L·exp(2πi·η_j·d) / (λ²·η_j·√N),  η_j = √((n_m/λ)² − q_j²),
//
// which is √N/L · i/(2γ)·exp(iγd) · 2n_m·k0²·L² · N⁻¹ with γ = 2π·η_j: the
// detector scaling √N/L, the Fourier diffraction factor, the potential
// o = 2n_m·k0²·c, the change of variables from µm to FOV units (L²) and the
// orthonormal NUFFT's √(N·N) (see package nufft). So datum = F_j ·
// NUFFT(c)_j for an image c of the Born index contrast.
func NewArcs(s Setup, ill []trajectories.Illumination) (*Arcs, error) {
	if err := s.Validate(); err != nil {
		return nil, err
	}
	if len(ill) == 0 {
		return nil, fmt.Errorf("odt: illuminations = 0: must be at least 1")
	}
	sinMax := s.NAIllumination / s.Medium
	for i, il := range ill {
		d := il.Dir
		norm := math.Sqrt(d[0]*d[0] + d[1]*d[1] + d[2]*d[2])
		switch {
		case !finite(norm) || math.Abs(norm-1) > 1e-9:
			return nil, fmt.Errorf("odt: illumination %d: direction %v is not a unit vector", i, d)
		case math.Abs(d[1]) > 1e-12:
			return nil, fmt.Errorf("odt: illumination %d: direction %v leaves the x–z plane (y component must be 0 in 2D)", i, d)
		case !(d[2] > 0):
			return nil, fmt.Errorf("odt: illumination %d: direction %v must travel along +z (z component > 0)", i, d)
		case math.Abs(d[0]) > sinMax*(1+1e-9):
			return nil, fmt.Errorf("odt: illumination %d: n_m·sin θ = %g exceeds na_illumination = %g", i, s.Medium*math.Abs(d[0]), s.NAIllumination)
		}
	}
	jmax := s.DetectedHalfWidth()
	per := 2*jmax + 1
	n := len(ill) * per
	a := &Arcs{
		Setup:         s,
		Illuminations: append([]trajectories.Illumination(nil), ill...),
		PerShot:       per,
		KX:            make([]float64, n),
		KZ:            make([]float64, n),
		Factor:        make([]complex128, n),
		inX:           make([]float64, len(ill)),
		inZ:           make([]float64, len(ill)),
	}
	km := s.MediumWavenumber()
	L := s.FOV
	scale := 2 * math.Pi * s.Medium * L / (s.Wavelength * s.Wavelength * math.Sqrt(float64(s.Grid)))
	factor := make([]complex128, per)
	eta := make([]float64, per)
	for j := -jmax; j <= jmax; j++ {
		q := float64(j) / L
		e := math.Sqrt(km*km - q*q)
		ps, pc := math.Sincos(2 * math.Pi * e * s.DetectorZ)
		m := scale / e
		// i·exp(iφ) = (−sin φ, cos φ)
		factor[j+jmax] = complex(-m*ps, m*pc)
		eta[j+jmax] = e
	}
	for i, il := range ill {
		ax, az := km*il.Dir[0], km*il.Dir[2]
		a.inX[i], a.inZ[i] = ax, az
		for j := -jmax; j <= jmax; j++ {
			k := i*per + j + jmax
			a.KX[k] = (float64(j)/L - ax) * L
			a.KZ[k] = (eta[j+jmax] - az) * L
			a.Factor[k] = factor[j+jmax]
		}
	}
	return a, nil
}

// Len returns the number of samples, illuminations × PerShot.
func (a *Arcs) Len() int { return len(a.KX) }

// DetectorFrequency returns q_j in cycles per µm for the sample index k.
func (a *Arcs) DetectorFrequency(k int) float64 {
	jmax := (a.PerShot - 1) / 2
	return float64(k%a.PerShot-jmax) / a.Setup.FOV
}

// Incident returns the incident wave vector (k_x, k_z) of illumination i in
// cycles per µm.
func (a *Arcs) Incident(i int) (kx, kz float64) { return a.inX[i], a.inZ[i] }

// Reach returns the largest |KX| and |KZ| over all samples, in cycles per FOV.
func (a *Arcs) Reach() (kx, kz float64) {
	for k := range a.KX {
		kx = max(kx, math.Abs(a.KX[k]))
		kz = max(kz, math.Abs(a.KZ[k]))
	}
	return kx, kz
}

// Illuminations returns count in-plane illuminations of a 2D pattern of
// package trajectories ("fan": transverse wave numbers evenly spaced over the
// illumination pupil; "fan-golden": golden-ratio order) for setup s, so that
// a plan can go from its keys to arcs in one call.
func Illuminations(s Setup, pattern string, count int) ([]trajectories.Illumination, error) {
	if err := s.Validate(); err != nil {
		return nil, err
	}
	if count < 1 {
		return nil, fmt.Errorf("odt: illuminations = %d: must be at least 1", count)
	}
	if pattern != "fan" && pattern != "fan-golden" {
		return nil, fmt.Errorf("odt: illumination pattern %q: a 2D setup needs \"fan\" or \"fan-golden\"", pattern)
	}
	return trajectories.Illuminations(trajectories.IlluminationSpec{
		Pattern:    pattern,
		Count:      count,
		Wavelength: s.Wavelength,
		Medium:     s.Medium,
		NA:         s.NAIllumination,
		NADetect:   s.NADetection,
		FOV:        s.FOV,
		N:          s.Grid,
	})
}
