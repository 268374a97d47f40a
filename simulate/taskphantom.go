package simulate

// Task phantoms: objects made to be looked at by an observer rather than
// compared pixel by pixel. A low-contrast phantom holds rows of faint discs;
// a resolution phantom holds a slanted square (two straight edges) and groups
// of bars of decreasing period. Both are sums of ellipses and rectangles, so
// their spectra are exact and data drawn from them commit no inverse crime.
// The layouts are our own design.

import (
	"errors"
	"fmt"
	"math"

	"accelplan/simulate/quality"
)

// Rect is one filled rectangle of constant intensity. Overlapping shapes add
// their intensities. Lengths are in FOV units on the package's grid (x to the
// right, y downwards, the FOV spanning [-½, ½) in both directions).
type Rect struct {
	// Rho is the intensity added inside the rectangle.
	Rho float64
	// X0, Y0 locate the centre (FOV units; Y0 grows downwards).
	X0, Y0 float64
	// W is the full side length along the rectangle's first axis, H along
	// its second (FOV units, both > 0).
	W, H float64
	// ThetaDeg is the angle in degrees from the +x direction to the first
	// axis, turning towards +y (clockwise as displayed), as for Ellipse.
	ThetaDeg float64
}

// Shapes is a phantom made of a sum of filled ellipses and rectangles. It
// implements Phantom: Spectrum is the exact continuous Fourier transform and
// Rasterize the exact area average over each pixel. Parts outside the FOV
// are left out of Rasterize and Support but not of Spectrum; keep shapes
// inside the FOV when both are compared. Its methods only read it, so they
// are safe for concurrent use.
type Shapes struct {
	Ellipses Ellipses
	Rects    []Rect
}

// valid reports whether the rectangle can be drawn at all; Rasterize, Support
// and Spectrum skip the ones that cannot (Validate names them).
func (r Rect) valid() bool {
	return r.W > 0 && r.H > 0 && !math.IsInf(r.W, 0) && !math.IsInf(r.H, 0) &&
		!math.IsNaN(r.Rho+r.X0+r.Y0+r.ThetaDeg) && !math.IsInf(r.Rho+r.X0+r.Y0+r.ThetaDeg, 0)
}

// Validate reports an empty phantom or the first shape with a non-finite
// value or a size that is not positive.
func (s Shapes) Validate() error {
	if len(s.Ellipses) == 0 && len(s.Rects) == 0 {
		return errors.New("phantom: no shapes")
	}
	if len(s.Ellipses) > 0 {
		if err := s.Ellipses.Validate(); err != nil {
			return err
		}
	}
	for i, r := range s.Rects {
		for _, v := range [...]float64{r.Rho, r.X0, r.Y0, r.W, r.H, r.ThetaDeg} {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("phantom: rectangle %d has a non-finite value", i)
			}
		}
		if r.W <= 0 || r.H <= 0 {
			return fmt.Errorf("phantom: rectangle %d has sides %g and %g; both must be > 0", i, r.W, r.H)
		}
	}
	return nil
}

// sincNorm returns sin(πu)/(πu), 1 at u = 0.
func sincNorm(u float64) float64 {
	z := math.Pi * u
	if math.Abs(z) < 1e-4 {
		// Taylor series; the first omitted term, z⁴/120, is below 1e-18.
		return 1 - z*z/6
	}
	return math.Sin(z) / z
}

// spectrum returns the rectangle's exact Fourier transform at (kx, ky)
// cycles per FOV:
//
//	ρ·W·H·sinc(W·k_u)·sinc(H·k_v)·exp(−2πi k·c),  sinc(u) = sin(πu)/(πu),
//
// with (k_u, k_v) the components of k along the rectangle's two axes and c
// its centre: the transform of a centred box is the product of two sincs, a
// rotation of the object rotates its transform and a shift multiplies it by
// a phase (Bracewell RN, The Fourier Transform and Its Applications, 1965;
// textbook). At k = 0 it is ρ·W·H, the rectangle's integral.
func (r Rect) spectrum(kx, ky float64) complex128 {
	ku, kv := kx, ky
	if r.ThetaDeg != 0 {
		s, c := math.Sincos(r.ThetaDeg * math.Pi / 180)
		ku, kv = kx*c+ky*s, -kx*s+ky*c
	}
	mag := r.Rho * r.W * r.H * sincNorm(r.W*ku) * sincNorm(r.H*kv)
	ps, pc := math.Sincos(-2 * math.Pi * (kx*r.X0 + ky*r.Y0))
	return complex(mag*pc, mag*ps)
}

// Spectrum returns the exact continuous Fourier transform of the phantom at
// (kx, ky) in cycles per FOV: the ellipses' transform (see
// Ellipses.Spectrum) plus each rectangle's ρ·W·H·sinc(W·k_u)·sinc(H·k_v)·
// exp(−2πi k·c) (see Rect).
func (s Shapes) Spectrum(kx, ky float64) complex128 {
	var sum complex128
	if len(s.Ellipses) > 0 {
		sum = s.Ellipses.Spectrum(kx, ky)
	}
	for _, r := range s.Rects {
		if r.valid() {
			sum += r.spectrum(kx, ky)
		}
	}
	return sum
}

// CartesianSpectrum returns what the package function CartesianSpectrum
// returns for s, the noiseless fully sampled k-space on the centred ny-by-nx
// grid scaled by √(nx·ny), but faster: the ellipses go through the
// separable-phase path of Ellipses, and an axis-aligned rectangle's transform
// on the grid is the outer product of a row factor W·sinc(W·kx)·e^(−2πi·kx·x0)
// and a column factor, computed once each (the transform of a box is
// separable; textbook). Rotated rectangles are evaluated point by point. It
// returns nil when nx or ny is not positive.
func (s Shapes) CartesianSpectrum(nx, ny int) []complex128 {
	if nx <= 0 || ny <= 0 {
		return nil
	}
	var out []complex128
	if len(s.Ellipses) > 0 {
		out = CartesianSpectrum(s.Ellipses, nx, ny)
	} else {
		out = make([]complex128, nx*ny)
	}
	scale := math.Sqrt(float64(nx) * float64(ny))
	row := make([]complex128, nx)
	col := make([]complex128, ny)
	for _, r := range s.Rects {
		if !r.valid() {
			continue
		}
		wx, hy, ok := r.axisAligned()
		if !ok {
			for m := range ny {
				ky := float64(m - ny/2)
				for n := range nx {
					out[m*nx+n] += complex(scale, 0) * r.spectrum(float64(n-nx/2), ky)
				}
			}
			continue
		}
		for n := range row {
			kx := float64(n - nx/2)
			ps, pc := math.Sincos(-2 * math.Pi * kx * r.X0)
			a := r.Rho * scale * wx * sincNorm(wx*kx)
			row[n] = complex(a*pc, a*ps)
		}
		for m := range col {
			ky := float64(m - ny/2)
			ps, pc := math.Sincos(-2 * math.Pi * ky * r.Y0)
			a := hy * sincNorm(hy*ky)
			col[m] = complex(a*pc, a*ps)
		}
		for m, c := range col {
			o := out[m*nx : (m+1)*nx]
			for n, v := range row {
				o[n] += c * v
			}
		}
	}
	return out
}

// Rasterize returns the phantom averaged over the area of each pixel of the
// ny-by-nx FFT-centred grid, row-major (see Ellipses.Rasterize). Each
// rectangle's share of a pixel is exact up to rounding: an axis-aligned
// rectangle (ThetaDeg a multiple of 90) gives the product of two overlap
// lengths, a rotated one the area of the pixel clipped to it, a convex
// polygon. It returns nil when nx or ny is not positive.
func (s Shapes) Rasterize(nx, ny int) []float64 {
	if nx <= 0 || ny <= 0 {
		return nil
	}
	var img []float64
	if len(s.Ellipses) > 0 {
		img = s.Ellipses.Rasterize(nx, ny)
	} else {
		img = make([]float64, nx*ny)
	}
	for _, r := range s.Rects {
		if r.valid() {
			r.addTo(img, nx, ny)
		}
	}
	return img
}

// axisAligned reports whether the rectangle's sides are parallel to the pixel
// axes and returns its extent along x and y.
func (r Rect) axisAligned() (wx, hy float64, ok bool) {
	switch m := math.Mod(r.ThetaDeg, 180); m {
	case 0:
		return r.W, r.H, true
	case 90, -90:
		return r.H, r.W, true
	}
	return 0, 0, false
}

// rectOverlap1D returns the length of [a0, a1] ∩ [b0, b1].
func rectOverlap1D(a0, a1, b0, b1 float64) float64 {
	return max(0, min(a1, b1)-max(a0, b0))
}

// addTo adds the rectangle's exact area-averaged intensity to img.
func (r Rect) addTo(img []float64, nx, ny int) {
	fx, fy := float64(nx), float64(ny)
	hpx, hpy := 0.5/fx, 0.5/fy // half a pixel
	if wx, hy, ok := r.axisAligned(); ok {
		j0, j1 := span(r.X0, wx/2, nx)
		i0, i1 := span(r.Y0, hy/2, ny)
		x0, x1 := r.X0-wx/2, r.X0+wx/2
		y0, y1 := r.Y0-hy/2, r.Y0+hy/2
		for i := i0; i <= i1; i++ {
			yc := float64(i-ny/2) / fy
			oy := rectOverlap1D(yc-hpy, yc+hpy, y0, y1) * fy
			if oy == 0 {
				continue
			}
			row := img[i*nx : (i+1)*nx]
			for j := j0; j <= j1; j++ {
				xc := float64(j-nx/2) / fx
				if ox := rectOverlap1D(xc-hpx, xc+hpx, x0, x1) * fx; ox > 0 {
					row[j] += r.Rho * ox * oy
				}
			}
		}
		return
	}
	sn, cs := math.Sincos(r.ThetaDeg * math.Pi / 180)
	hw, hh := r.W/2, r.H/2
	as, ac := math.Abs(sn), math.Abs(cs)
	j0, j1 := span(r.X0, hw*ac+hh*as, nx)
	i0, i1 := span(r.Y0, hw*as+hh*ac, ny)
	// Half-pixel vectors in the rectangle's frame and the pixel's half
	// extents along its two axes.
	ax, ay := hpx*cs, -hpx*sn
	bx, by := hpy*sn, hpy*cs
	ru := hpx*ac + hpy*as
	rv := hpx*as + hpy*ac
	scale := r.Rho * fx * fy // 1/pixel area
	for i := i0; i <= i1; i++ {
		dy := float64(i-ny/2)/fy - r.Y0
		row := img[i*nx : (i+1)*nx]
		for j := j0; j <= j1; j++ {
			dx := float64(j-nx/2)/fx - r.X0
			u := dx*cs + dy*sn
			v := -dx*sn + dy*cs
			au, av := math.Abs(u), math.Abs(v)
			switch {
			case au+ru <= hw && av+rv <= hh:
				row[j] += r.Rho
			case au-ru >= hw || av-rv >= hh:
			default:
				row[j] += scale * boxClipArea(u, v, ax, ay, bx, by, hw, hh)
			}
		}
	}
}

// boxClipArea returns the area of the parallelogram with centre (cu, cv) and
// half-edge vectors a and b that lies inside the box |u| ≤ hw, |v| ≤ hh: the
// parallelogram is clipped against the four sides in turn (Sutherland-Hodgman
// clipping; Sutherland IE, Hodgman GW, Commun ACM 1974;17:32-42) and the
// area of the convex result taken by the shoelace formula.
func boxClipArea(cu, cv, ax, ay, bx, by, hw, hh float64) float64 {
	var bufA, bufB [8][2]float64
	poly := bufA[:0]
	poly = append(poly,
		[2]float64{cu - ax - bx, cv - ay - by},
		[2]float64{cu + ax - bx, cv + ay - by},
		[2]float64{cu + ax + bx, cv + ay + by},
		[2]float64{cu - ax + bx, cv - ay + by})
	// Each side as (axis, sign, limit): keep points with sign·p[axis] ≤ limit.
	sides := [4]struct {
		axis int
		sign float64
		lim  float64
	}{{0, 1, hw}, {0, -1, hw}, {1, 1, hh}, {1, -1, hh}}
	in, out := poly, bufB[:0]
	for _, sd := range sides {
		out = out[:0]
		n := len(in)
		for k := range n {
			p, q := in[k], in[(k+1)%n]
			fp := sd.sign*p[sd.axis] - sd.lim
			fq := sd.sign*q[sd.axis] - sd.lim
			if fp <= 0 {
				out = append(out, p)
			}
			if (fp < 0 && fq > 0) || (fp > 0 && fq < 0) {
				t := fp / (fp - fq)
				out = append(out, [2]float64{p[0] + t*(q[0]-p[0]), p[1] + t*(q[1]-p[1])})
			}
		}
		if len(out) < 3 {
			return 0
		}
		in, out = out, in[:0]
	}
	var area float64
	n := len(in)
	for k := range n {
		p, q := in[k], in[(k+1)%n]
		area += p[0]*q[1] - p[1]*q[0]
	}
	return math.Abs(area) / 2
}

// contains reports whether (x, y) lies in the rectangle, boundary included.
func (r Rect) contains(x, y float64) bool {
	s, c := math.Sincos(r.ThetaDeg * math.Pi / 180)
	dx, dy := x-r.X0, y-r.Y0
	return math.Abs(dx*c+dy*s) <= r.W/2 && math.Abs(-dx*s+dy*c) <= r.H/2
}

// Value returns the phantom's intensity at the point (x, y) in FOV units: the
// sum of the intensities of the shapes that contain it, boundary included.
func (s Shapes) Value(x, y float64) float64 {
	v := s.Ellipses.Value(x, y)
	for _, r := range s.Rects {
		if r.valid() && r.contains(x, y) {
			v += r.Rho
		}
	}
	return v
}

// Support returns, row-major on the ny-by-nx FFT-centred grid, which pixels
// have their centre inside at least one shape; for the task phantoms here,
// whose shapes all lie inside a background disc, that is the disc. It
// returns nil when nx or ny is not positive.
func (s Shapes) Support(nx, ny int) []bool {
	if nx <= 0 || ny <= 0 {
		return nil
	}
	in := s.Ellipses.Support(nx, ny)
	for _, r := range s.Rects {
		if !r.valid() {
			continue
		}
		for i := range ny {
			y := float64(i-ny/2) / float64(ny)
			for j := range nx {
				if !in[i*nx+j] && r.contains(float64(j-nx/2)/float64(nx), y) {
					in[i*nx+j] = true
				}
			}
		}
	}
	return in
}

// ---------------------------------------------------------------------------
// Low-contrast detectability phantom

// TaskBackgroundRadius is the radius of the uniform background disc of both
// task phantoms, in FOV units (it leaves 0.05 FOV free at the border).
const TaskBackgroundRadius = 0.45

// LowContrastSpec describes a low-contrast detectability phantom; zero fields
// take the defaults named.
type LowContrastSpec struct {
	// FOVmm is the side of the square FOV in mm (required, > 0).
	FOVmm float64
	// DiametersMM are the disc diameters of each row, left to right;
	// default 12, 8, 6, 4, 3, 2 mm.
	DiametersMM []float64
	// Contrasts are the fractional contrasts of the rows, top to bottom
	// (0.05 = 5 % brighter than the background; negative = darker, ≥ −1);
	// default 0.05, 0.02, 0.01.
	Contrasts []float64
	// Background is the background disc's intensity; default 1.
	Background float64
}

// DefaultLowContrastDiametersMM and DefaultLowContrastContrasts are the
// defaults of LowContrastSpec (our choice).
var (
	DefaultLowContrastDiametersMM = []float64{12, 8, 6, 4, 3, 2}
	DefaultLowContrastContrasts   = []float64{0.05, 0.02, 0.01}
)

// LowContrastPhantom is a uniform disc with rows of faint discs. It
// implements Phantom through the embedded Shapes.
//
// Layout (our design; all in mm from the FOV centre, x right, y down): the
// background is a disc of radius TaskBackgroundRadius·FOV and intensity
// Background. Row r (one per contrast, top to bottom) holds one disc per
// diameter, left to right, of intensity Background·(1 + contrast). The edge
// gap between neighbours in a row is the larger of their two diameters plus
// 10 mm; each row is centred on x = 0; rows are 2·dmax + 10 mm apart (dmax the
// largest diameter) and centred on y = 0. For the defaults and any FOV the
// disc centres are at x = −53, −29, −11, 5, 16.5, 25.5 … (see the package
// example) and y = −34, 0, 34 mm. Every disc must keep a margin of its radius
// plus 5 mm to the background's edge, beyond its own radius, else the
// constructor fails.
type LowContrastPhantom struct {
	Shapes
	// Spec is the specification with defaults filled in.
	Spec LowContrastSpec
	// Targets are the discs, row by row, in the geometry package quality
	// measures them by.
	Targets []quality.Disc
}

// NewLowContrastPhantom lays out the phantom described by spec (see
// LowContrastPhantom), or reports why it cannot.
func NewLowContrastPhantom(spec LowContrastSpec) (*LowContrastPhantom, error) {
	if !(spec.FOVmm > 0) || math.IsInf(spec.FOVmm, 0) {
		return nil, fmt.Errorf("phantom: low-contrast phantom needs a positive finite FOV in mm, got %v", spec.FOVmm)
	}
	if spec.DiametersMM == nil {
		spec.DiametersMM = append([]float64(nil), DefaultLowContrastDiametersMM...)
	}
	if spec.Contrasts == nil {
		spec.Contrasts = append([]float64(nil), DefaultLowContrastContrasts...)
	}
	if spec.Background == 0 {
		spec.Background = 1
	}
	if !(spec.Background > 0) || math.IsInf(spec.Background, 0) {
		return nil, fmt.Errorf("phantom: background intensity %v; it must be positive and finite", spec.Background)
	}
	if len(spec.DiametersMM) == 0 || len(spec.Contrasts) == 0 {
		return nil, errors.New("phantom: low-contrast phantom needs at least one diameter and one contrast")
	}
	dmax := 0.0
	for k, d := range spec.DiametersMM {
		if !(d > 0) || math.IsInf(d, 0) {
			return nil, fmt.Errorf("phantom: disc diameter %d is %v mm; it must be positive and finite", k, d)
		}
		dmax = max(dmax, d)
	}
	for k, c := range spec.Contrasts {
		if math.IsNaN(c) || math.IsInf(c, 0) || c == 0 || c < -1 || c > 10 {
			return nil, fmt.Errorf("phantom: contrast %d is %v; it must be non-zero and between −1 and 10", k, c)
		}
		for _, o := range spec.Contrasts[:k] {
			if o == c {
				return nil, fmt.Errorf("phantom: contrast %v appears twice", c)
			}
		}
	}
	// Column positions (mm), centred.
	n := len(spec.DiametersMM)
	xs := make([]float64, n)
	for k := 1; k < n; k++ {
		a, b := spec.DiametersMM[k-1], spec.DiametersMM[k]
		xs[k] = xs[k-1] + a/2 + max(a, b) + 10 + b/2
	}
	shift := (xs[0] + xs[n-1]) / 2
	for k := range xs {
		xs[k] -= shift
	}
	pitch := 2*dmax + 10
	rows := len(spec.Contrasts)
	fov := spec.FOVmm
	rbg := TaskBackgroundRadius * fov
	p := &LowContrastPhantom{Spec: spec}
	p.Ellipses = Ellipses{{Rho: spec.Background, A: TaskBackgroundRadius, B: TaskBackgroundRadius}}
	for r, c := range spec.Contrasts {
		y := (float64(r) - float64(rows-1)/2) * pitch
		for k, d := range spec.DiametersMM {
			x, rad := xs[k], d/2
			if need := math.Hypot(x, y) + rad + max(rad, 5) + 5; need > rbg {
				return nil, fmt.Errorf("phantom: the low-contrast layout needs a background radius of %.1f mm (disc %g mm at %.1f, %.1f mm) but a FOV of %g mm gives %.1f mm; use fewer or smaller discs or a larger FOV (at least %.0f mm)",
					need, d, x, y, fov, rbg, math.Ceil(need/TaskBackgroundRadius))
			}
			delta := spec.Background * c
			p.Ellipses = append(p.Ellipses, Ellipse{Rho: delta, X0: x / fov, Y0: y / fov, A: rad / fov, B: rad / fov})
			p.Targets = append(p.Targets, quality.Disc{X0: x / fov, Y0: y / fov, DiameterMM: d, Contrast: c, Delta: delta})
		}
	}
	return p, nil
}

// NoiseROI returns, row-major on the ny-by-nx grid, the background pixels in
// which noise is measured: pixel centres within 0.85 of the background
// radius and farther than r + max(r, 5 mm) + 3 pixels from the centre of every
// disc of radius r (clear of the discs, their blur and their annuli). It
// returns nil when nx or ny is not positive.
func (p *LowContrastPhantom) NoiseROI(nx, ny int) []bool {
	if nx <= 0 || ny <= 0 {
		return nil
	}
	fov := p.Spec.FOVmm
	pix := fov / float64(min(nx, ny))
	rb := 0.85 * TaskBackgroundRadius * fov
	roi := make([]bool, nx*ny)
	for i := range ny {
		y := float64(i-ny/2) / float64(ny) * fov
		for j := range nx {
			x := float64(j-nx/2) / float64(nx) * fov
			if math.Hypot(x, y) > rb {
				continue
			}
			ok := true
			for _, t := range p.Targets {
				r := t.DiameterMM / 2
				if math.Hypot(x-t.X0*fov, y-t.Y0*fov) <= r+max(r, 5)+3*pix {
					ok = false
					break
				}
			}
			roi[i*nx+j] = ok
		}
	}
	return roi
}

// ---------------------------------------------------------------------------
// Resolution phantom

// ResolutionSpec describes a resolution phantom; zero fields take the
// defaults named.
type ResolutionSpec struct {
	// FOVmm is the side of the square FOV in mm (required, > 0).
	FOVmm float64
	// PeriodsMM are the bar periods (one bar plus one gap, mm) of the bar
	// groups, coarsest first; default 4, 3, 2.5, 2, 1.6, 1.25, 1 mm (0.25
	// to 1 line pair per mm).
	PeriodsMM []float64
	// Bars is the number of bars per group; default 5, at least 3.
	Bars int
	// BarLengthMM is the length of each bar; default 15 mm.
	BarLengthMM float64
	// SlantDeg is the angle of the square's edges against the pixel axes;
	// default 5°, allowed 2° to 20°.
	SlantDeg float64
	// Background is the intensity of the background disc, default 0.5;
	// Contrast is what the square and the bars add to it, default 0.5.
	Background, Contrast float64
}

// Defaults of ResolutionSpec (our choice).
var DefaultResolutionPeriodsMM = []float64{4, 3, 2.5, 2, 1.6, 1.25, 1}

const (
	resDefaultBars        = 5
	resDefaultBarLengthMM = 15
	resDefaultSlantDeg    = 5
	// Geometry of the slanted square, FOV units: centre and side, and the
	// measured stretch of each edge.
	resSquareY0       = -0.2
	resSquareSide     = 0.24
	resEdgeHalfLength = 0.3 * resSquareSide
	resEdgeHalfWidth  = 0.08
	resBarsTop        = 0.03 // first bar shelf starts here (FOV units)
	resBarsMargin     = 0.02 // clearance to the background's edge (FOV units)
	resBarsGapMM      = 3.0  // extra gap between groups, mm
)

// ResolutionPhantom is a uniform disc holding a slanted square and bar
// groups. It implements Phantom through the embedded Shapes.
//
// Layout (our design; FOV units, x right, y down): the background disc has
// radius TaskBackgroundRadius and intensity Background. In the upper half a
// square of side 0.24, centred at (0, −0.2) and turned by SlantDeg, adds
// Contrast; its right edge (normal at SlantDeg) measures resolution along x,
// its lower edge (normal at SlantDeg + 90°) along y, each over ±0.072 along
// the edge and ±0.08 across it (Edges[0] and Edges[1]). In the lower half,
// from y = 0.03 down, shelves of bar groups: first the groups whose
// intensity varies along x (vertical bars), then, on a new shelf, those
// varying along y (horizontal bars), each in the order of PeriodsMM, left to
// right, wrapping to a new shelf when the next group would come within 0.02
// of the background's edge; each shelf is centred on x = 0 and its groups
// share their top edge. A group of period p has
// Bars bars of width p/2 and length BarLengthMM, p apart; neighbouring groups
// are separated by the larger period plus 3 mm, shelves by the larger period
// plus 3 mm. Bars adds Contrast.
type ResolutionPhantom struct {
	Shapes
	// Spec is the specification with defaults filled in.
	Spec ResolutionSpec
	// Edges are the square's right edge (resolution along x) and its lower
	// edge (resolution along y).
	Edges [2]quality.Edge
	// Groups are the bar groups: those varying along x first, then those
	// varying along y, each in the order of Spec.PeriodsMM.
	Groups []quality.BarGroup
}

// NewResolutionPhantom lays out the phantom described by spec (see
// ResolutionPhantom), or reports why it cannot.
func NewResolutionPhantom(spec ResolutionSpec) (*ResolutionPhantom, error) {
	if !(spec.FOVmm > 0) || math.IsInf(spec.FOVmm, 0) {
		return nil, fmt.Errorf("phantom: resolution phantom needs a positive finite FOV in mm, got %v", spec.FOVmm)
	}
	if spec.PeriodsMM == nil {
		spec.PeriodsMM = append([]float64(nil), DefaultResolutionPeriodsMM...)
	}
	if spec.Bars == 0 {
		spec.Bars = resDefaultBars
	}
	if spec.BarLengthMM == 0 {
		spec.BarLengthMM = resDefaultBarLengthMM
	}
	if spec.SlantDeg == 0 {
		spec.SlantDeg = resDefaultSlantDeg
	}
	if spec.Background == 0 {
		spec.Background = 0.5
	}
	if spec.Contrast == 0 {
		spec.Contrast = 0.5
	}
	switch {
	case len(spec.PeriodsMM) == 0:
		return nil, errors.New("phantom: resolution phantom needs at least one bar period")
	case spec.Bars < 3 || spec.Bars > 50:
		return nil, fmt.Errorf("phantom: %d bars per group; use 3 to 50", spec.Bars)
	case !(spec.BarLengthMM > 0) || math.IsInf(spec.BarLengthMM, 0):
		return nil, fmt.Errorf("phantom: bar length %v mm; it must be positive and finite", spec.BarLengthMM)
	case !(spec.SlantDeg >= 2 && spec.SlantDeg <= 20):
		return nil, fmt.Errorf("phantom: edge slant %v°; use 2° to 20° so that the slanted-edge method can bin the edge", spec.SlantDeg)
	case !(spec.Background > 0) || math.IsInf(spec.Background, 0):
		return nil, fmt.Errorf("phantom: background intensity %v; it must be positive and finite", spec.Background)
	case math.IsNaN(spec.Contrast) || math.IsInf(spec.Contrast, 0) || spec.Contrast < -spec.Background:
		return nil, fmt.Errorf("phantom: contrast %v; it must be finite and not below −background (%v)", spec.Contrast, -spec.Background)
	}
	for k, p := range spec.PeriodsMM {
		if !(p > 0) || math.IsInf(p, 0) {
			return nil, fmt.Errorf("phantom: bar period %d is %v mm; it must be positive and finite", k, p)
		}
	}
	fov := spec.FOVmm
	ph := &ResolutionPhantom{Spec: spec}
	ph.Ellipses = Ellipses{{Rho: spec.Background, A: TaskBackgroundRadius, B: TaskBackgroundRadius}}
	// The slanted square and its two edges.
	th := spec.SlantDeg * math.Pi / 180
	sn, cs := math.Sincos(th)
	ph.Rects = append(ph.Rects, Rect{Rho: spec.Contrast, X0: 0, Y0: resSquareY0, W: resSquareSide, H: resSquareSide, ThetaDeg: spec.SlantDeg})
	half := resSquareSide / 2
	ph.Edges[0] = quality.Edge{X0: half * cs, Y0: resSquareY0 + half*sn, NormalDeg: spec.SlantDeg,
		HalfLengthMM: resEdgeHalfLength * fov, HalfWidthMM: resEdgeHalfWidth * fov}
	ph.Edges[1] = quality.Edge{X0: -half * sn, Y0: resSquareY0 + half*cs, NormalDeg: spec.SlantDeg + 90,
		HalfLengthMM: resEdgeHalfLength * fov, HalfWidthMM: resEdgeHalfWidth * fov}
	// Bar groups on shelves (mm from here on).
	type box struct {
		w, h, p float64
		alongY  bool
	}
	n, L := float64(spec.Bars), spec.BarLengthMM
	var boxes []box
	for _, p := range spec.PeriodsMM {
		boxes = append(boxes, box{w: (n - 0.5) * p, h: L, p: p})
	}
	for _, p := range spec.PeriodsMM {
		boxes = append(boxes, box{w: L, h: (n - 0.5) * p, p: p, alongY: true})
	}
	reach := (TaskBackgroundRadius - resBarsMargin) * fov
	chord := func(yFar float64) float64 { // half-width allowed at depth yFar
		if yFar >= reach {
			return -1
		}
		return math.Sqrt(reach*reach - yFar*yFar)
	}
	top := resBarsTop * fov
	for k := 0; k < len(boxes); {
		// Fill one shelf greedily.
		width, height, pmax := boxes[k].w, boxes[k].h, boxes[k].p
		if width/2 > chord(top+height) {
			return nil, fmt.Errorf("phantom: the bar groups do not fit in the background disc of a %g mm FOV (group of period %g mm at %.1f mm below the centre); use fewer, shorter or coarser bars or a larger FOV",
				fov, boxes[k].p, top)
		}
		end := k + 1
		for end < len(boxes) {
			b := boxes[end]
			if b.alongY != boxes[k].alongY {
				break // each orientation starts its own shelf
			}
			w := width + max(pmax, b.p) + resBarsGapMM + b.w
			h := max(height, b.h)
			if w/2 > chord(top+h) {
				break
			}
			width, height, pmax = w, h, max(pmax, b.p)
			end++
		}
		x := -width / 2
		for q := k; q < end; q++ {
			b := boxes[q]
			if q > k {
				x += max(b.p, boxes[q-1].p) + resBarsGapMM
			}
			cx, cy := x+b.w/2, top+b.h/2
			ph.addBars(cx, cy, b.p, b.alongY)
			x += b.w
		}
		top += height + pmax + resBarsGapMM
		k = end
	}
	return ph, nil
}

// addBars adds one bar group centred at (cx, cy) mm.
func (ph *ResolutionPhantom) addBars(cx, cy, p float64, alongY bool) {
	fov, s := ph.Spec.FOVmm, ph.Spec
	for b := range s.Bars {
		off := (float64(b) - float64(s.Bars-1)/2) * p
		r := Rect{Rho: s.Contrast, X0: (cx + off) / fov, Y0: cy / fov, W: p / 2 / fov, H: s.BarLengthMM / fov}
		if alongY {
			r = Rect{Rho: s.Contrast, X0: cx / fov, Y0: (cy + off) / fov, W: s.BarLengthMM / fov, H: p / 2 / fov}
		}
		ph.Rects = append(ph.Rects, r)
	}
	ph.Groups = append(ph.Groups, quality.BarGroup{X0: cx / fov, Y0: cy / fov, PeriodMM: p, LengthMM: s.BarLengthMM,
		Bars: s.Bars, AlongY: alongY, Delta: s.Contrast})
}
