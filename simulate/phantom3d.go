package simulate

import (
	"errors"
	"fmt"
	"math"
)

// Ellipsoid is one filled ellipsoid of constant intensity in a 3D field of
// view. Overlapping ellipsoids add their intensities. Lengths are in FOV units
// with each coordinate spanning [-½, ½): x to the right, y downwards (as the
// image row of the 2D phantom grows), z along the third axis.
//
// Orientation. The ellipsoid's three axes, with semi-axes A, B and C, are the
// unit vectors
//
//	u1 = ( cosφ·cosθ,  sinφ·cosθ, sinθ)
//	u2 = (−sinφ,       cosφ,      0   )
//	u3 = (−cosφ·sinθ, −sinφ·sinθ, cosθ)
//
// with φ = PhiDeg and θ = ThetaDeg in degrees, i.e. the columns of Rz(φ)·Ry(θ)
// where Ry(θ) first tips the first axis from +x towards +z and Rz(φ) then
// turns the result about z from +x towards +y. So φ is the azimuth of the
// first axis, measured as Ellipse.ThetaDeg is in the 2D phantom (from +x
// towards +y, clockwise as displayed because y points down), θ its elevation
// towards +z, and the second axis always stays parallel to the xy-plane. With
// θ = 0 the section by any plane z = const is an Ellipse with ThetaDeg = φ.
type Ellipsoid struct {
	// Rho is the intensity added inside the ellipsoid.
	Rho float64
	// X0, Y0, Z0 locate the centre (FOV units; Y0 grows downwards).
	X0, Y0, Z0 float64
	// A, B, C are the semi-axes along u1, u2, u3 (FOV units, all > 0).
	A, B, C float64
	// PhiDeg is the azimuth of the first axis in degrees, from +x towards +y.
	PhiDeg float64
	// ThetaDeg is the elevation of the first axis in degrees, from the
	// xy-plane towards +z; zero for an ellipsoid with one axis along z.
	ThetaDeg float64
}

// Ellipsoids is a 3D phantom made of a sum of filled ellipsoids. Its
// continuous Fourier transform (Spectrum3D) is exact, and every section by a
// plane normal to a coordinate axis (SliceX, SliceY, SliceZ) is an exact 2D
// Ellipses phantom, whose own spectrum and pixel area averages are exact too.
//
// Why sections matter: a 3D Cartesian scan samples the (ky, kz) phase-encode
// plane with the readout kx fully sampled; after the inverse transform along
// the readout, the data at readout position x are the 2D transform of the
// section at x,
//
//	F_x(ky, kz) = ∫∫ f(x, y, z) exp(−2πi(ky·y + kz·z)) dy dz
//	            = ∫ F(kx, ky, kz) exp(2πi·kx·x) dkx,
//
// which is SliceX(x).Spectrum(ky, kz), so each readout position is an
// independent 2D problem with exact data and an exact truth image.
//
// As with Ellipses, parts of an ellipsoid outside the FOV still enter
// Spectrum3D; keep ellipsoids inside the FOV when spectra and grids are
// compared (Bounds tells the extent).
type Ellipsoids []Ellipsoid

// ModifiedSheppLogan3D returns a ten-ellipsoid 3D head phantom whose
// equatorial sections (each ellipsoid cut through its own centre by a plane
// z = const) are exactly the ten ellipses of ModifiedSheppLogan, with the same
// higher-contrast intensities 1, −0.8, −0.2, −0.2, 0.1 × 6 (Toft P, PhD thesis,
// Technical University of Denmark 1996).
//
// Source. 3D ellipsoid versions of the Shepp-Logan head (Shepp LA, Logan BF,
// IEEE Trans Nucl Sci 1974;21:21-43) are used in Kak AC, Slaney M, Principles
// of Computerized Tomographic Imaging, IEEE Press 1988, ch. 3. The table here
// is the 3D extension widely reproduced in open software, which keeps the 2D
// table's x0, y0, a, b, angle and intensity and adds c and z0 (published on
// [-1, 1]³, y up):
//
//	ρ     a      b      c      x0     y0      z0     φ
//	 1    0.69   0.92   0.81   0      0       0      0
//	−0.8  0.6624 0.874  0.78   0     −0.0184  0      0
//	−0.2  0.11   0.31   0.22   0.22   0       0    −18
//	−0.2  0.16   0.41   0.28  −0.22   0       0     18
//	 0.1  0.21   0.25   0.41   0      0.35   −0.15   0
//	 0.1  0.046  0.046  0.05   0      0.1     0.25   0
//	 0.1  0.046  0.046  0.05   0     −0.1     0.25   0
//	 0.1  0.046  0.023  0.05  −0.08  −0.605   0      0
//	 0.1  0.023  0.023  0.02   0     −0.606   0      0
//	 0.1  0.023  0.046  0.02   0.06  −0.605   0      0
//
// It was written down from memory and could not be checked against a
// publication here; it is not Kak & Slaney's own table. One copy in
// circulation also gives the two ventricle ellipsoids (rows 3 and 4) a third
// Euler angle of 10°, which with no tilt would only add to their in-plane
// angle; it is left out, so that the equatorial sections match the 2D
// phantom, which the tests check (and, through it, scikit-image's image).
//
// Mapping to FOV units is the 2D phantom's: every length is scaled by ½, and
// y is mirrored (y0 and φ negated) because our y grows downwards; z is kept.
// The section z = 0 therefore shows the 2D phantom upright, except that the
// ellipsoid in row 5 is cut off-centre (a smaller ellipse) and the two in rows
// 6 and 7, centred at z = 0.125 in FOV units, are missing from it.
func ModifiedSheppLogan3D() Ellipsoids {
	table := [10][8]float64{
		{1.0, 0.69, 0.92, 0.81, 0, 0, 0, 0},
		{-0.8, 0.6624, 0.874, 0.78, 0, -0.0184, 0, 0},
		{-0.2, 0.11, 0.31, 0.22, 0.22, 0, 0, -18},
		{-0.2, 0.16, 0.41, 0.28, -0.22, 0, 0, 18},
		{0.1, 0.21, 0.25, 0.41, 0, 0.35, -0.15, 0},
		{0.1, 0.046, 0.046, 0.05, 0, 0.1, 0.25, 0},
		{0.1, 0.046, 0.046, 0.05, 0, -0.1, 0.25, 0},
		{0.1, 0.046, 0.023, 0.05, -0.08, -0.605, 0, 0},
		{0.1, 0.023, 0.023, 0.02, 0, -0.606, 0, 0},
		{0.1, 0.023, 0.046, 0.02, 0.06, -0.605, 0, 0},
	}
	e := make(Ellipsoids, len(table))
	for i, r := range table {
		e[i] = Ellipsoid{
			Rho: r[0],
			A:   r[1] / 2, B: r[2] / 2, C: r[3] / 2,
			X0: r[4] / 2, Y0: -r[5] / 2, Z0: r[6] / 2,
			PhiDeg: -r[7],
		}
	}
	return e
}

// Validate reports the first ellipsoid with a non-finite value or a semi-axis
// that is not positive, or an empty phantom.
func (e Ellipsoids) Validate() error {
	if len(e) == 0 {
		return errors.New("phantom: no ellipsoids")
	}
	for i, el := range e {
		for _, v := range [...]float64{el.Rho, el.X0, el.Y0, el.Z0, el.A, el.B, el.C, el.PhiDeg, el.ThetaDeg} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("phantom: ellipsoid %d has a non-finite value", i)
			}
		}
		if el.A <= 0 || el.B <= 0 || el.C <= 0 {
			return fmt.Errorf("phantom: ellipsoid %d has semi-axes %g, %g and %g; all must be > 0", i, el.A, el.B, el.C)
		}
	}
	return nil
}

// valid reports whether one ellipsoid can be used at all; the methods skip the
// ones that cannot (Validate names them).
func (el Ellipsoid) valid() bool {
	for _, v := range [...]float64{el.Rho, el.X0, el.Y0, el.Z0, el.A, el.B, el.C, el.PhiDeg, el.ThetaDeg} {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return false
		}
	}
	return el.A > 0 && el.B > 0 && el.C > 0
}

// axes returns the unit axes u1, u2, u3 of the doc comment of Ellipsoid.
func (el Ellipsoid) axes() [3][3]float64 {
	sp, cp := math.Sincos(el.PhiDeg * math.Pi / 180)
	st, ct := math.Sincos(el.ThetaDeg * math.Pi / 180)
	return [3][3]float64{
		{cp * ct, sp * ct, st},
		{-sp, cp, 0},
		{-cp * st, -sp * st, ct},
	}
}

// forms returns S = Σ aᵢ²·uᵢuᵢᵀ and M = S⁻¹ = Σ uᵢuᵢᵀ/aᵢ², so that the
// ellipsoid is the set (r−c)ᵀM(r−c) ≤ 1 and S is its "shape" matrix (its
// half-width along a unit direction n is √(nᵀSn)).
func (el Ellipsoid) forms() (s, m [3][3]float64) {
	u := el.axes()
	semi := [3]float64{el.A, el.B, el.C}
	for k := range 3 {
		a2 := semi[k] * semi[k]
		for i := range 3 {
			for j := range 3 {
				p := u[k][i] * u[k][j]
				s[i][j] += a2 * p
				m[i][j] += p / a2
			}
		}
	}
	return s, m
}

// Value returns the phantom's intensity at the point (x, y, z) in FOV units:
// the sum of the intensities of the ellipsoids that contain it, boundary
// included.
func (e Ellipsoids) Value(x, y, z float64) float64 {
	var v float64
	for _, el := range e {
		if !el.valid() {
			continue
		}
		u := el.axes()
		d := [3]float64{x - el.X0, y - el.Y0, z - el.Z0}
		p := (u[0][0]*d[0] + u[0][1]*d[1] + u[0][2]*d[2]) / el.A
		q := (u[1][0]*d[0] + u[1][1]*d[1] + u[1][2]*d[2]) / el.B
		r := (u[2][0]*d[0] + u[2][1]*d[1] + u[2][2]*d[2]) / el.C
		if p*p+q*q+r*r <= 1 {
			v += el.Rho
		}
	}
	return v
}

// ballFT returns 4π·(sin u − u·cos u)/u³ with u = 2πq, the Fourier transform
// of the unit ball at radial frequency q (cycles per unit length), which tends
// to the ball's volume 4π/3 as q → 0. It equals (sin 2πq − 2πq·cos 2πq)/(2π²q³)
// and 4π·j1(u)/u with the spherical Bessel function j1.
func ballFT(q float64) float64 {
	u := 2 * math.Pi * q
	if u < 0.2 {
		// Power series (sin u − u cos u)/u³ = Σₙ (−1)ⁿ⁺¹·2n·u²ⁿ⁻²/(2n+1)!
		// = 1/3 − u²/30 + u⁴/840 − u⁶/45360 + u⁸/3991680 − …; the first
		// omitted term is below 1e-15 of the sum here, whereas the closed form
		// loses about 1e-16/u² to cancellation.
		u2 := u * u
		return 4 * math.Pi * (1.0/3 + u2*(-1.0/30+u2*(1.0/840+u2*(-1.0/45360+u2/3991680))))
	}
	s, c := math.Sincos(u)
	return 4 * math.Pi * (s - u*c) / (u * u * u)
}

// Spectrum3D returns the exact continuous Fourier transform
//
//	F(kx, ky, kz) = ∫∫∫ f(x, y, z) exp(−2πi(kx·x + ky·y + kz·z)) dx dy dz
//
// of the phantom, with positions in FOV units and frequencies in cycles per
// FOV. An ellipsoid of intensity ρ, semi-axes a, b, c along u1, u2, u3 and
// centre r0 contributes
//
//	ρ·a·b·c · 4π(sin 2πq − 2πq·cos 2πq)/(2πq)³ · exp(−2πi k·r0),
//	q = √((a·u1·k)² + (b·u2·k)² + (c·u3·k)²),
//
// the unit ball's transform (a radial function's 3D transform, Bracewell RN,
// The Fourier Transform and Its Applications, McGraw-Hill, from memory)
// stretched by the affine map from the ball to the ellipsoid, as in the 3D
// analytical MRI phantom of Koay CG et al., MRM 2007;58:430-436 (from
// memory). At k = 0 it is Σ ρ·(4/3)π·abc, the phantom's integral.
func (e Ellipsoids) Spectrum3D(kx, ky, kz float64) complex128 {
	var sum complex128
	for _, el := range e {
		if !el.valid() {
			continue
		}
		u := el.axes()
		qa := el.A * (u[0][0]*kx + u[0][1]*ky + u[0][2]*kz)
		qb := el.B * (u[1][0]*kx + u[1][1]*ky + u[1][2]*kz)
		qc := el.C * (u[2][0]*kx + u[2][1]*ky + u[2][2]*kz)
		mag := el.Rho * el.A * el.B * el.C * ballFT(math.Sqrt(qa*qa+qb*qb+qc*qc))
		ps, pc := math.Sincos(-2 * math.Pi * (kx*el.X0 + ky*el.Y0 + kz*el.Z0))
		sum += complex(mag*pc, mag*ps)
	}
	return sum
}

// Bounds returns the corners lo and hi of the axis-aligned box that holds
// every valid ellipsoid: along axis i an ellipsoid reaches √(Sᵢᵢ) from its
// centre, S = Σ aₖ²·uₖuₖᵀ. Index 0 is x, 1 is y, 2 is z. For a phantom with no
// valid ellipsoid lo > hi (+Inf and −Inf).
func (e Ellipsoids) Bounds() (lo, hi [3]float64) {
	for i := range 3 {
		lo[i], hi[i] = math.Inf(1), math.Inf(-1)
	}
	for _, el := range e {
		if !el.valid() {
			continue
		}
		s, _ := el.forms()
		c := [3]float64{el.X0, el.Y0, el.Z0}
		for i := range 3 {
			h := math.Sqrt(s[i][i])
			lo[i] = min(lo[i], c[i]-h)
			hi[i] = max(hi[i], c[i]+h)
		}
	}
	return lo, hi
}

// SliceX returns the exact 2D phantom in the plane x = const: the section
// of every ellipsoid that the plane cuts, with its intensity unchanged.
//
// Plane layout, for a ky–kz reconstruction grid of nz rows by ny columns: the
// returned ellipses use y as their X (column) coordinate and z as their Y (row)
// coordinate, so SliceX(x).Rasterize(ny, nz) is the nz-by-ny truth image at
// readout position x and SliceX(x).Spectrum(ky, kz) its exact hybrid-space
// data F_x(ky, kz) (see Ellipsoids). CartesianSample(SliceX(x), ky, kz, ny, nz)
// carries the package's orthonormal scaling: it is what the orthonormal
// inverse DFT along the readout gives from 3D samples √(nx·ny·nz)·F(kx, ky, kz)
// taken on the integer kx lattice without limit (for a finite readout the
// readout resolution blurs f along x, which the exact section does not show).
//
// Method: the section of (r−c)ᵀM(r−c) ≤ 1 by the plane x = x0 is, with
// d = x0 − X0 and w the in-plane offset,
//
//	(w − w0)ᵀ N (w − w0) ≤ h,  N = M restricted to (y, z),
//	w0 = d·(S_yx, S_zx)/S_xx,  h = 1 − d²/S_xx,
//
// with S = M⁻¹ (completing the square; the Schur complement of N in M is
// 1/S_xx). It is empty when h ≤ 0; otherwise the closed-form
// eigen-decomposition of the 2×2 matrix N gives the semi-axes √(h/λ) and the
// angle ½·atan2(2N_yz, N_yy − N_zz) of the first axis. The result is nil when
// the plane misses every ellipsoid (a zero phantom, which Ellipses.Validate
// rejects as empty).
func (e Ellipsoids) SliceX(x float64) Ellipses { return e.slice(0, x, 1, 2) }

// SliceY returns the exact 2D phantom in the plane y = const, with x as the
// ellipses' X (column) coordinate and z as their Y (row) coordinate; see
// SliceX for the method.
func (e Ellipsoids) SliceY(y float64) Ellipses { return e.slice(1, y, 0, 2) }

// SliceZ returns the exact 2D phantom in the plane z = const, with x as the
// ellipses' X (column) and y as their Y (row) coordinate, the same layout as a
// 2D phantom: for ModifiedSheppLogan3D, SliceZ(Z0) of each ellipsoid alone is
// the matching ellipse of ModifiedSheppLogan. See SliceX for the method.
func (e Ellipsoids) SliceZ(z float64) Ellipses { return e.slice(2, z, 0, 1) }

// slice cuts every ellipsoid by the plane r[ax] = pos and returns the sections
// with r[col] as X and r[row] as Y.
func (e Ellipsoids) slice(ax int, pos float64, col, row int) Ellipses {
	var out Ellipses
	for _, el := range e {
		if !el.valid() || math.IsNaN(pos) || math.IsInf(pos, 0) {
			continue
		}
		if sec, ok := el.section(ax, pos, col, row); ok {
			if out == nil {
				out = make(Ellipses, 0, len(e))
			}
			out = append(out, sec)
		}
	}
	return out
}

// section returns the ellipse cut from el by the plane r[ax] = pos, with
// r[col] as X and r[row] as Y, and false when the plane misses el.
func (el Ellipsoid) section(ax int, pos float64, col, row int) (Ellipse, bool) {
	s, m := el.forms()
	c := [3]float64{el.X0, el.Y0, el.Z0}
	d := pos - c[ax]
	h := 1 - d*d/s[ax][ax]
	if !(h > 0) {
		return Ellipse{}, false
	}
	p, q, r := m[col][col], m[row][row], m[col][row]
	mean := (p + q) / 2
	rad := math.Hypot((p-q)/2, r)
	l1 := mean + rad
	l2 := (p*q - r*r) / l1 // the smaller eigenvalue, free of cancellation
	if !(l2 > 0) {
		return Ellipse{}, false
	}
	return Ellipse{
		Rho:      el.Rho,
		X0:       c[col] + d*s[col][ax]/s[ax][ax],
		Y0:       c[row] + d*s[row][ax]/s[ax][ax],
		A:        math.Sqrt(h / l1),
		B:        math.Sqrt(h / l2),
		ThetaDeg: 0.5 * math.Atan2(2*r, p-q) * 180 / math.Pi,
	}, true
}
