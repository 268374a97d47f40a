package odt

import (
	"errors"
	"fmt"
	"math"

	"accelplan/simulate"
)

// Body is one elliptical region of a specimen that adds a constant
// refractive-index step to whatever contains it. Lengths are in µm.
type Body struct {
	// DeltaN is the index added inside the body (may be negative).
	DeltaN float64
	// X, Z locate the centre (µm from the centre of the FOV; z along the
	// light, i.e. down the grid's rows).
	X, Z float64
	// A and B are the semi-axes in µm along the body's first and second axes.
	A, B float64
	// ThetaDeg is the angle in degrees from +x to the first axis, turning
	// towards +z (the angle convention of simulate.Ellipse).
	ThetaDeg float64
}

// Specimen is a refractive-index object in a homogeneous medium: n(r) = n_m
// plus the DeltaN of every body that contains r. Bodies must be nested or
// disjoint (no partial overlap), so that the index is constant on the regions
// of a tree of ellipses and any function of it, such as the Born index
// contrast, is again an exact sum of ellipses.
type Specimen struct {
	// Medium is the index n_m of the surrounding medium.
	Medium float64
	// Bodies are the elliptical regions.
	Bodies []Body
}

// DemoCell returns an invented "cell" for demonstrations and tests, about
// 13 × 9 µm in a medium of index 1.333 (water): a cytoplasm (δn = 0.015), a
// nucleus inside it (+0.012), two nucleoli in the nucleus (+0.015, +0.010),
// a dense vesicle (+0.030) and a light vacuole (−0.008) in the cytoplasm.
// The largest index step is 0.045 (in the vesicle). It fits a FOV of
// 16 µm or more.
func DemoCell() Specimen {
	return Specimen{
		Medium: 1.333,
		Bodies: []Body{
			{DeltaN: 0.015, X: 0.4, Z: -0.3, A: 6.5, B: 4.5, ThetaDeg: 20},   // cytoplasm
			{DeltaN: 0.012, X: -0.8, Z: 0.2, A: 2.8, B: 2.2, ThetaDeg: -15},  // nucleus
			{DeltaN: 0.015, X: -1.3, Z: 0.5, A: 0.7, B: 0.55, ThetaDeg: 30},  // nucleolus
			{DeltaN: 0.010, X: 0.2, Z: -0.5, A: 0.5, B: 0.45, ThetaDeg: 0},   // nucleolus
			{DeltaN: 0.030, X: 3.6, Z: 1.4, A: 0.6, B: 0.6, ThetaDeg: 0},     // vesicle
			{DeltaN: -0.008, X: 2.8, Z: -1.9, A: 0.9, B: 0.7, ThetaDeg: -40}, // vacuole
		},
	}
}

// boundarySamples is the number of points on each body's boundary that
// Validate tests against the other bodies.
const boundarySamples = 720

// inside reports whether (x, z) lies inside or on body b, with a relative
// tolerance on the ellipse equation.
func (b Body) inside(x, z, tol float64) bool {
	s, c := math.Sincos(b.ThetaDeg * math.Pi / 180)
	dx, dz := x-b.X, z-b.Z
	u := (dx*c + dz*s) / b.A
	v := (-dx*s + dz*c) / b.B
	return u*u+v*v <= 1+tol
}

// boundary returns the point of b's boundary at parameter t (radians).
func (b Body) boundary(t float64) (x, z float64) {
	s, c := math.Sincos(b.ThetaDeg * math.Pi / 180)
	st, ct := math.Sincos(t)
	u, v := b.A*ct, b.B*st
	return b.X + u*c - v*s, b.Z + u*s + v*c
}

// relation classifies body i against body j by testing boundarySamples
// points of each boundary: +1 if i lies inside j, −1 if j lies inside i, 0
// if they are disjoint; an error if they overlap partially.
func (sp Specimen) relation(i, j int) (int, error) {
	bi, bj := sp.Bodies[i], sp.Bodies[j]
	count := func(a, b Body, tol float64) int {
		n := 0
		for k := range boundarySamples {
			x, z := a.boundary(2 * math.Pi * float64(k) / boundarySamples)
			if b.inside(x, z, tol) {
				n++
			}
		}
		return n
	}
	const tol = 1e-9
	inJ := count(bi, bj, tol)
	inI := count(bj, bi, tol)
	switch {
	case inJ == boundarySamples && inI == 0:
		return +1, nil
	case inI == boundarySamples && inJ == 0:
		return -1, nil
	case inI == boundarySamples && inJ == boundarySamples:
		return 0, fmt.Errorf("odt: bodies %d and %d coincide", i, j)
	case inI == 0 && inJ == 0:
		// Either disjoint or one inside the other with no boundary point
		// inside: a centre test separates the cases.
		if bj.inside(bi.X, bi.Z, tol) || bi.inside(bj.X, bj.Z, tol) {
			return 0, fmt.Errorf("odt: bodies %d and %d overlap partially; bodies must be nested or disjoint", i, j)
		}
		return 0, nil
	}
	return 0, fmt.Errorf("odt: bodies %d and %d overlap partially; bodies must be nested or disjoint", i, j)
}

// parents returns for each body the index of the smallest body containing
// it, or −1.
func (sp Specimen) parents() ([]int, error) {
	n := len(sp.Bodies)
	parent := make([]int, n)
	for i := range parent {
		parent[i] = -1
	}
	area := func(i int) float64 { return sp.Bodies[i].A * sp.Bodies[i].B }
	for i := range n {
		for j := i + 1; j < n; j++ {
			r, err := sp.relation(i, j)
			if err != nil {
				return nil, err
			}
			child, par := i, j
			switch r {
			case 0:
				continue
			case -1:
				child, par = j, i
			}
			if p := parent[child]; p < 0 || area(par) < area(p) {
				parent[child] = par
			}
		}
	}
	return parent, nil
}

// Validate reports a medium index below 1, a body with a non-finite value or
// a semi-axis that is not positive, an index below 1 anywhere, and bodies
// that overlap partially (tested at 720 points on each boundary, so an
// overlap thinner than that spacing can pass unnoticed).
func (sp Specimen) Validate() error {
	if !(sp.Medium >= 1) || !finite(sp.Medium) {
		return fmt.Errorf("odt: specimen medium index %g: must be finite and ≥ 1", sp.Medium)
	}
	if len(sp.Bodies) == 0 {
		return errors.New("odt: the specimen has no bodies")
	}
	for i, b := range sp.Bodies {
		for _, v := range [...]float64{b.DeltaN, b.X, b.Z, b.A, b.B, b.ThetaDeg} {
			if !finite(v) {
				return fmt.Errorf("odt: body %d has a non-finite value", i)
			}
		}
		if !(b.A > 0) || !(b.B > 0) {
			return fmt.Errorf("odt: body %d has semi-axes %g and %g µm; both must be > 0", i, b.A, b.B)
		}
	}
	v, err := sp.regionSteps()
	if err != nil {
		return err
	}
	for i, dn := range v {
		if sp.Medium+dn < 1 {
			return fmt.Errorf("odt: body %d gives an index %g below 1", i, sp.Medium+dn)
		}
	}
	return nil
}

// regionSteps returns for each body the total index step δn inside it and
// outside its children: the sum of DeltaN over the body and the bodies that
// contain it.
func (sp Specimen) regionSteps() ([]float64, error) {
	parent, err := sp.parents()
	if err != nil {
		return nil, err
	}
	v := make([]float64, len(sp.Bodies))
	for i := range v {
		for k := i; k >= 0; k = parent[k] {
			v[i] += sp.Bodies[k].DeltaN
		}
	}
	return v, nil
}

// Index returns the refractive index at (x, z) in µm.
func (sp Specimen) Index(x, z float64) float64 {
	n := sp.Medium
	for _, b := range sp.Bodies {
		if b.inside(x, z, 0) {
			n += b.DeltaN
		}
	}
	return n
}

// ellipses maps the bodies to FOV units with intensities rho[i].
func (sp Specimen) ellipses(fov float64, rho []float64) simulate.Ellipses {
	e := make(simulate.Ellipses, len(sp.Bodies))
	for i, b := range sp.Bodies {
		e[i] = simulate.Ellipse{
			Rho: rho[i], X0: b.X / fov, Y0: b.Z / fov,
			A: b.A / fov, B: b.B / fov, ThetaDeg: b.ThetaDeg,
		}
	}
	return e
}

// Contrast returns the index step δn(r) = n(r) − n_m as ellipses in the FOV
// units of package simulate for a FOV of fov µm (x → X0, z → Y0), so that
// Rasterize gives the truth on the reconstruction grid and Spectrum its exact
// transform.
func (sp Specimen) Contrast(fov float64) (simulate.Ellipses, error) {
	if err := sp.checkFOV(fov); err != nil {
		return nil, err
	}
	rho := make([]float64, len(sp.Bodies))
	for i, b := range sp.Bodies {
		rho[i] = b.DeltaN
	}
	return sp.ellipses(fov, rho), nil
}

// Potential returns the Born index contrast c(r) = (n(r)² − n_m²)/(2n_m) as
// ellipses in FOV units: the image that Operator maps to data, whose Spectrum
// is exact. Because bodies are nested or disjoint, the region of body e
// outside its children has one step v_e, and c = Σ_e 1_e·(g(v_e) −
// g(v_parent)) with g(v) = v + v²/(2n_m).
func (sp Specimen) Potential(fov float64) (simulate.Ellipses, error) {
	if err := sp.checkFOV(fov); err != nil {
		return nil, err
	}
	parent, _ := sp.parents()
	v, _ := sp.regionSteps()
	g := func(x float64) float64 { return x + x*x/(2*sp.Medium) }
	rho := make([]float64, len(sp.Bodies))
	for i := range rho {
		var vp float64
		if parent[i] >= 0 {
			vp = v[parent[i]]
		}
		rho[i] = g(v[i]) - g(vp)
	}
	return sp.ellipses(fov, rho), nil
}

// MaxPhase returns the largest phase delay 2π/λ·∫δn dz, in radians, along
// straight lines parallel to z through the specimen, sampled at columns
// spaced by step µm: the usual measure of how far a specimen is from the
// weak-scattering regime (the Born approximation needs it well below 1 rad;
// common practice).
func (sp Specimen) MaxPhase(wavelength, step float64) float64 {
	if !(step > 0) || !(wavelength > 0) || len(sp.Bodies) == 0 {
		return math.NaN()
	}
	var x0, x1, z0, z1 float64
	for i, b := range sp.Bodies {
		r := max(b.A, b.B)
		if i == 0 {
			x0, x1, z0, z1 = b.X-r, b.X+r, b.Z-r, b.Z+r
		}
		x0, x1 = min(x0, b.X-r), max(x1, b.X+r)
		z0, z1 = min(z0, b.Z-r), max(z1, b.Z+r)
	}
	type prepared struct {
		b    Body
		s, c float64
	}
	pb := make([]prepared, len(sp.Bodies))
	for i, b := range sp.Bodies {
		s, c := math.Sincos(b.ThetaDeg * math.Pi / 180)
		pb[i] = prepared{b, s, c}
	}
	var best float64
	for x := x0; x <= x1; x += step {
		var sum float64
		for z := z0; z <= z1; z += step {
			for _, p := range pb {
				dx, dz := x-p.b.X, z-p.b.Z
				u := (dx*p.c + dz*p.s) / p.b.A
				v := (-dx*p.s + dz*p.c) / p.b.B
				if u*u+v*v <= 1 {
					sum += p.b.DeltaN * step
				}
			}
		}
		best = max(best, math.Abs(sum))
	}
	return 2 * math.Pi / wavelength * best
}

// checkFOV validates the specimen and that every body lies inside the FOV
// square [−L/2, L/2)² of side fov µm.
func (sp Specimen) checkFOV(fov float64) error {
	if !(fov > 0) || !finite(fov) {
		return fmt.Errorf("odt: fov_um = %g: must be finite and > 0", fov)
	}
	if err := sp.Validate(); err != nil {
		return err
	}
	h := fov / 2
	for i, b := range sp.Bodies {
		s, c := math.Sincos(b.ThetaDeg * math.Pi / 180)
		hx := math.Hypot(b.A*c, b.B*s)
		hz := math.Hypot(b.A*s, b.B*c)
		if b.X-hx < -h || b.X+hx > h || b.Z-hz < -h || b.Z+hz > h {
			return fmt.Errorf("odt: body %d reaches outside the FOV of %g µm; fov_um must be larger", i, fov)
		}
	}
	return nil
}
