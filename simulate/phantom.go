package simulate

import (
	"errors"
	"fmt"
	"math"
)

// Ellipse is one filled ellipse of constant intensity. Overlapping ellipses
// add their intensities. All lengths are in FOV units on the package's grid
// (x to the right, y downwards, the FOV spanning [-½, ½) in both directions).
type Ellipse struct {
	// Rho is the intensity added inside the ellipse.
	Rho float64
	// X0, Y0 locate the centre (FOV units; Y0 grows downwards).
	X0, Y0 float64
	// A is the semi-axis along the ellipse's first axis, B the one along its
	// second axis (FOV units, both > 0).
	A, B float64
	// ThetaDeg is the angle in degrees from the +x direction to the first
	// axis, turning towards +y. Because +y points down the screen, a positive
	// angle turns the first axis clockwise as displayed.
	ThetaDeg float64
}

// Ellipses is a phantom made of a sum of filled ellipses. It implements
// Phantom: Spectrum is the exact continuous Fourier transform and Rasterize the
// exact area average of the object over each pixel.
//
// Parts of an ellipse outside the FOV are left out of Rasterize and Support,
// but not of Spectrum, which is the transform of the whole object; keep
// ellipses inside the FOV when both are compared.
type Ellipses []Ellipse

// ModifiedSheppLogan returns the ten-ellipse head phantom of Shepp and Logan
// (Shepp LA, Logan BF, "The Fourier reconstruction of a head section", IEEE
// Trans Nucl Sci 1974;21:21-43) with the higher-contrast intensities 1, −0.8,
// −0.2, −0.2 and 0.1 for the remaining six ellipses (Toft P, PhD thesis,
// Technical University of Denmark 1996). The table was written down from
// memory; the tests check it against scikit-image's rasterised modified
// Shepp-Logan image, which it reproduces pixel for pixel.
//
// The published table lives on the square [-1, 1]² with y pointing up. Here it
// is scaled by ½ into FOV units and mirrored in y (each centre's y and each
// angle are negated), because our y grows downwards with the image row; the
// phantom therefore appears upright, as published, when rows are written from
// top to bottom. Its grey levels are 0 outside, 1 in the skull, 0.2 in the
// brain, 0 in the two large ventricles and 0.1 to 0.4 in the small features.
func ModifiedSheppLogan() Ellipses {
	// Published rows (on [-1,1]², y up): rho, x0, y0, a, b, phi in degrees.
	table := [10][6]float64{
		{1.0, 0, 0, 0.69, 0.92, 0},
		{-0.8, 0, -0.0184, 0.6624, 0.8740, 0},
		{-0.2, 0.22, 0, 0.11, 0.31, -18},
		{-0.2, -0.22, 0, 0.16, 0.41, 18},
		{0.1, 0, 0.35, 0.21, 0.25, 0},
		{0.1, 0, 0.1, 0.046, 0.046, 0},
		{0.1, 0, -0.1, 0.046, 0.046, 0},
		{0.1, -0.08, -0.605, 0.046, 0.023, 0},
		{0.1, 0, -0.606, 0.023, 0.023, 0},
		{0.1, 0.06, -0.605, 0.023, 0.046, 0},
	}
	e := make(Ellipses, len(table))
	for i, r := range table {
		e[i] = Ellipse{
			Rho:      r[0],
			X0:       r[1] / 2,
			Y0:       -r[2] / 2,
			A:        r[3] / 2,
			B:        r[4] / 2,
			ThetaDeg: -r[5],
		}
	}
	return e
}

// Validate reports the first ellipse with a non-finite value or a semi-axis
// that is not positive.
func (e Ellipses) Validate() error {
	if len(e) == 0 {
		return errors.New("phantom: no ellipses")
	}
	for i, el := range e {
		for _, v := range [...]float64{el.Rho, el.X0, el.Y0, el.A, el.B, el.ThetaDeg} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("phantom: ellipse %d has a non-finite value", i)
			}
		}
		if el.A <= 0 || el.B <= 0 {
			return fmt.Errorf("phantom: ellipse %d has semi-axes %g and %g; both must be > 0", i, el.A, el.B)
		}
	}
	return nil
}

// valid reports whether one ellipse can be drawn at all; Rasterize, Support
// and Spectrum skip the ones that cannot (Validate names them).
func (el Ellipse) valid() bool {
	return el.A > 0 && el.B > 0 && !math.IsInf(el.A, 0) && !math.IsInf(el.B, 0) &&
		!math.IsNaN(el.Rho+el.X0+el.Y0+el.ThetaDeg)
}

// diskFT returns J1(2πq)/q, the Fourier transform of the unit disk at radial
// frequency q (cycles per unit length), which tends to π as q → 0.
func diskFT(q float64) float64 {
	z := 2 * math.Pi * q
	if z < 1e-2 {
		// Power series of J1 (Abramowitz & Stegun 1964, 9.1.10):
		// J1(z)/z = ½ − z²/16 + z⁴/384 − z⁶/18432 + …; the first omitted term
		// is below 1e-20 here.
		z2 := z * z
		return 2 * math.Pi * (0.5 - z2/16 + z2*z2/384 - z2*z2*z2/18432)
	}
	return math.J1(z) / q
}

// Spectrum returns the exact continuous Fourier transform of the phantom at
// (kx, ky) in cycles per FOV. An ellipse of intensity ρ, semi-axes a, b,
// rotation θ and centre c contributes
//
//	ρ·a·b·J1(2πq)/q · exp(−2πi k·c),  q = √((a·k_u)² + (b·k_v)²),
//
// where (k_u, k_v) are the components of k along the ellipse's two axes; at
// q = 0 the value is ρπab, the ellipse's integral. Sources: Koay CG et al., MRM
// 2007;58:430-436; Guerquin-Kern M et al., IEEE TMI 2012;31:626-636.
func (e Ellipses) Spectrum(kx, ky float64) complex128 {
	var sum complex128
	for _, el := range e {
		if !el.valid() {
			continue
		}
		s, c := math.Sincos(el.ThetaDeg * math.Pi / 180)
		ku := kx*c + ky*s
		kv := -kx*s + ky*c
		q := math.Hypot(el.A*ku, el.B*kv)
		mag := el.Rho * el.A * el.B * diskFT(q)
		ps, pc := math.Sincos(-2 * math.Pi * (kx*el.X0 + ky*el.Y0))
		sum += complex(mag*pc, mag*ps)
	}
	return sum
}

// Rasterize returns the phantom averaged over the area of each pixel of the
// ny-by-nx FFT-centred grid, row-major; pixel (i, j) covers
// [x-½/nx, x+½/nx] × [y-½/ny, y+½/ny] around x = (j-nx/2)/nx,
// y = (i-ny/2)/ny. The average is exact up to rounding: pixels wholly inside
// or outside an ellipse are classified by a bound, and each boundary pixel's
// overlap is the area of a unit disk cut by a parallelogram after mapping the
// ellipse to the unit disk. It returns nil when nx or ny is not positive.
func (e Ellipses) Rasterize(nx, ny int) []float64 {
	if nx <= 0 || ny <= 0 {
		return nil
	}
	img := make([]float64, nx*ny)
	for _, el := range e {
		if el.valid() {
			el.addTo(img, nx, ny)
		}
	}
	return img
}

// frame is an ellipse prepared for pixel work: it maps a position (x, y) to
// the coordinates s in which the ellipse is the unit disk.
type frame struct {
	el       Ellipse
	cos, sin float64
}

func newFrame(el Ellipse) frame {
	s, c := math.Sincos(el.ThetaDeg * math.Pi / 180)
	return frame{el: el, cos: c, sin: s}
}

// toDisk maps the offset (dx, dy) from the ellipse centre to unit-disk
// coordinates.
func (f *frame) toDisk(dx, dy float64) (float64, float64) {
	return (dx*f.cos + dy*f.sin) / f.el.A, (-dx*f.sin + dy*f.cos) / f.el.B
}

// box returns the half-widths of the ellipse's axis-aligned bounding box.
func (f *frame) box() (hx, hy float64) {
	a, b := f.el.A, f.el.B
	return math.Hypot(a*f.cos, b*f.sin), math.Hypot(a*f.sin, b*f.cos)
}

// span returns the index range [lo, hi] of pixels of an n-pixel axis whose
// extent may meet the interval [c-h, c+h]; lo > hi when none can.
func span(c, h float64, n int) (lo, hi int) {
	fn := float64(n)
	lo = int(math.Floor((c-h)*fn+fn/2-0.5)) - 1
	hi = int(math.Ceil((c+h)*fn+fn/2+0.5)) + 1
	return max(lo, 0), min(hi, n-1)
}

// addTo adds the ellipse's exact area-averaged intensity to img.
func (el Ellipse) addTo(img []float64, nx, ny int) {
	f := newFrame(el)
	hx, hy := f.box()
	j0, j1 := span(el.X0, hx, nx)
	i0, i1 := span(el.Y0, hy, ny)
	if j0 > j1 || i0 > i1 {
		return
	}
	// Half-pixel vectors in disk coordinates and the disk-space radius of
	// the pixel's circumscribed circle.
	ux, uy := f.toDisk(0.5/float64(nx), 0)
	vx, vy := f.toDisk(0, 0.5/float64(ny))
	rp := max(math.Hypot(ux+vx, uy+vy), math.Hypot(ux-vx, uy-vy))
	// Pixel area in disk coordinates is 1/(nx·ny·a·b).
	scale := el.Rho * el.A * el.B * float64(nx) * float64(ny)
	for i := i0; i <= i1; i++ {
		dy := (float64(i)-float64(ny/2))/float64(ny) - el.Y0
		row := img[i*nx : (i+1)*nx]
		for j := j0; j <= j1; j++ {
			dx := (float64(j)-float64(nx/2))/float64(nx) - el.X0
			sx, sy := f.toDisk(dx, dy)
			r := math.Hypot(sx, sy)
			switch {
			case r+rp <= 1:
				row[j] += el.Rho
			case r-rp >= 1:
			default:
				row[j] += scale * diskParallelogram(sx, sy, ux, uy, vx, vy)
			}
		}
	}
}

// diskParallelogram returns the area of the unit disk inside the
// parallelogram with centre (cx, cy) and half-edge vectors u and v: the sum,
// over its edges, of the signed area the disk shares with the triangle formed
// by the origin and the edge.
func diskParallelogram(cx, cy, ux, uy, vx, vy float64) float64 {
	p := [4][2]float64{
		{cx - ux - vx, cy - uy - vy},
		{cx + ux - vx, cy + uy - vy},
		{cx + ux + vx, cy + uy + vy},
		{cx - ux + vx, cy - uy + vy},
	}
	var area float64
	for k := range 4 {
		a, b := p[k], p[(k+1)%4]
		area += diskTriangle(a[0], a[1], b[0], b[1])
	}
	return math.Abs(area)
}

// diskTriangle returns the signed area shared by the unit disk and the
// triangle (origin, a, b), positive when a → b turns counter-clockwise.
func diskTriangle(ax, ay, bx, by float64) float64 {
	dx, dy := bx-ax, by-ay
	qa := dx*dx + dy*dy
	if qa == 0 {
		return 0
	}
	// |a + t·d|² = 1 ⇔ qa·t² + qb·t + qc = 0.
	qb := 2 * (ax*dx + ay*dy)
	qc := ax*ax + ay*ay - 1
	ts := [4]float64{0, 0, 0, 1}
	n := 1
	if disc := qb*qb - 4*qa*qc; disc > 0 {
		sq := math.Sqrt(disc)
		// Numerically stable roots, in increasing order.
		var t1, t2 float64
		if qb >= 0 {
			t1 = (-qb - sq) / (2 * qa)
			t2 = 2 * qc / (-qb - sq)
		} else {
			t1 = 2 * qc / (-qb + sq)
			t2 = (-qb + sq) / (2 * qa)
		}
		if t1 > t2 {
			t1, t2 = t2, t1
		}
		for _, t := range [2]float64{t1, t2} {
			if t > 0 && t < 1 {
				ts[n] = t
				n++
			}
		}
	}
	ts[n] = 1
	var area float64
	for k := range n {
		t0, t1 := ts[k], ts[k+1]
		px, py := ax+t0*dx, ay+t0*dy
		qx, qy := ax+t1*dx, ay+t1*dy
		mx, my := (px+qx)/2, (py+qy)/2
		cross := px*qy - py*qx
		if mx*mx+my*my <= 1 {
			area += cross / 2
		} else {
			area += math.Atan2(cross, px*qx+py*qy) / 2
		}
	}
	return area
}

// Value returns the phantom's intensity at the point (x, y) in FOV units: the
// sum of the intensities of the ellipses that contain it, boundary included.
func (e Ellipses) Value(x, y float64) float64 {
	var v float64
	for _, el := range e {
		if !el.valid() {
			continue
		}
		f := newFrame(el)
		sx, sy := f.toDisk(x-el.X0, y-el.Y0)
		if sx*sx+sy*sy <= 1 {
			v += el.Rho
		}
	}
	return v
}

// Support returns, row-major on the ny-by-nx FFT-centred grid, which pixels
// have their centre inside at least one ellipse: for a head phantom whose
// ellipses all lie within the outer one (as in ModifiedSheppLogan) this is the
// inside of the outer ellipse, the region in which quality is scored. It
// returns nil when nx or ny is not positive.
func (e Ellipses) Support(nx, ny int) []bool {
	if nx <= 0 || ny <= 0 {
		return nil
	}
	in := make([]bool, nx*ny)
	for _, el := range e {
		if !el.valid() {
			continue
		}
		f := newFrame(el)
		hx, hy := f.box()
		j0, j1 := span(el.X0, hx, nx)
		i0, i1 := span(el.Y0, hy, ny)
		for i := i0; i <= i1; i++ {
			dy := (float64(i)-float64(ny/2))/float64(ny) - el.Y0
			for j := j0; j <= j1; j++ {
				dx := (float64(j)-float64(nx/2))/float64(nx) - el.X0
				sx, sy := f.toDisk(dx, dy)
				if sx*sx+sy*sy <= 1 {
					in[i*nx+j] = true
				}
			}
		}
	}
	return in
}

// CartesianSample returns the phantom's sample at (kx, ky) cycles per FOV as
// the orthonormal centred DFT of an ny-by-nx image of it would give it:
// √(nx·ny)·F(kx, ky). The reason: a pixel covers 1/(nx·ny) of the FOV, so the
// plain DFT sum over pixels, Σ f(r)·exp(−2πi k·r), approximates nx·ny·F(k);
// the orthonormal DFT divides that sum by √(nx·ny). Noise of standard
// deviation σ added to such samples thus appears with the same σ per pixel in
// the fully sampled image.
func CartesianSample(p Phantom, kx, ky float64, nx, ny int) complex128 {
	return complex(math.Sqrt(float64(nx)*float64(ny)), 0) * p.Spectrum(kx, ky)
}

// CartesianSpectrum returns the noiseless fully sampled Cartesian k-space of
// p on the centred ny-by-nx grid, row-major, scaled as CartesianSample: the
// sample (m, n) is at kx = n − nx/2, ky = m − ny/2, so DC sits at (ny/2, nx/2).
// It returns nil when nx or ny is not positive. For Ellipses it uses the
// separability of each ellipse's phase over the grid.
func CartesianSpectrum(p Phantom, nx, ny int) []complex128 {
	if nx <= 0 || ny <= 0 {
		return nil
	}
	out := make([]complex128, nx*ny)
	scale := complex(math.Sqrt(float64(nx)*float64(ny)), 0)
	if e, ok := p.(Ellipses); ok {
		e.cartesian(out, nx, ny)
		for i := range out {
			out[i] *= scale
		}
		return out
	}
	for m := range ny {
		ky := float64(m - ny/2)
		for n := range nx {
			out[m*nx+n] = scale * p.Spectrum(float64(n-nx/2), ky)
		}
	}
	return out
}

// cartesian adds the unscaled spectrum on the centred integer grid to out,
// computing each ellipse's phase exp(−2πi(kx·x0 + ky·y0)) as a product of a
// column factor and a row factor, and its magnitude ρab·J1(2πq)/q, which is
// even in k, only once for each pair of grid points k and −k.
func (e Ellipses) cartesian(out []complex128, nx, ny int) {
	colPhase := make([]complex128, nx)
	rowPhase := make([]complex128, ny)
	mag := make([]float64, nx*ny)
	for _, el := range e {
		if !el.valid() {
			continue
		}
		for n := range colPhase {
			s, c := math.Sincos(-2 * math.Pi * float64(n-nx/2) * el.X0)
			colPhase[n] = complex(c, s)
		}
		for m := range rowPhase {
			s, c := math.Sincos(-2 * math.Pi * float64(m-ny/2) * el.Y0)
			rowPhase[m] = complex(c, s)
		}
		sn, cs := math.Sincos(el.ThetaDeg * math.Pi / 180)
		w := el.Rho * el.A * el.B
		for m := range ny {
			ky := m - ny/2
			mp := -ky + ny/2 // row of −ky, if on the grid
			row := out[m*nx : (m+1)*nx]
			for n := range row {
				kx := n - nx/2
				np := -kx + nx/2
				idx := m*nx + n
				if pidx := mp*nx + np; mp < ny && np < nx && pidx < idx {
					mag[idx] = mag[pidx]
				} else {
					fx, fy := float64(kx), float64(ky)
					u, v := el.A*(fx*cs+fy*sn), el.B*(-fx*sn+fy*cs)
					mag[idx] = w * diskFT(math.Sqrt(u*u+v*v))
				}
				row[n] += complex(mag[idx], 0) * colPhase[n] * rowPhase[m]
			}
		}
	}
}
