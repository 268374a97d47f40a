package simulate

import (
	"fmt"
	"math"
	"math/cmplx"
	"strings"
	"testing"

	dspfft "github.com/mjibson/go-dsp/fft"
	"gonum.org/v1/gonum/dsp/fourier"

	"accelplan/simulate/quality"
)

// taskShapes are the test objects: axis-aligned, rotated and quarter-turned
// rectangles, alone and mixed with ellipses (invented geometry).
func taskShapes() []struct {
	name string
	s    Shapes
} {
	return []struct {
		name string
		s    Shapes
	}{
		{"axis-aligned rectangle", Shapes{Rects: []Rect{{Rho: 1, X0: 0.0731, Y0: -0.1177, W: 0.3013, H: 0.1219}}}},
		{"rectangle at 23°", Shapes{Rects: []Rect{{Rho: 0.7, X0: -0.061, Y0: 0.093, W: 0.27, H: 0.083, ThetaDeg: 23}}}},
		{"rectangle at 90°", Shapes{Rects: []Rect{{Rho: 1.3, X0: 0.011, Y0: 0.02, W: 0.2, H: 0.05, ThetaDeg: 90}}}},
		{"rectangle at −5°", Shapes{Rects: []Rect{{Rho: -0.4, X0: 0.1, Y0: 0.1, W: 0.1, H: 0.2, ThetaDeg: -5}}}},
		{"disc with bars and a slanted square", Shapes{
			Ellipses: Ellipses{{Rho: 0.5, A: 0.4, B: 0.4}, {Rho: 0.1, X0: -0.2, Y0: 0.15, A: 0.05, B: 0.03, ThetaDeg: 30}},
			Rects: []Rect{
				{Rho: 0.5, X0: 0, Y0: -0.15, W: 0.2, H: 0.2, ThetaDeg: 5},
				{Rho: 0.5, X0: 0.1, Y0: 0.15, W: 0.01, H: 0.07},
				{Rho: 0.5, X0: 0.12, Y0: 0.15, W: 0.01, H: 0.07},
			}}},
	}
}

// shapesIntegral is the object's integral: Σρ·W·H over rectangles plus
// Σρ·π·a·b over ellipses (areas of a rectangle and an ellipse; geometry).
func shapesIntegral(s Shapes) float64 {
	v := 0.0
	for _, r := range s.Rects {
		v += r.Rho * r.W * r.H
	}
	for _, e := range s.Ellipses {
		v += e.Rho * math.Pi * e.A * e.B
	}
	return v
}

func TestRectSpectrumAtZero(t *testing.T) {
	// The Fourier transform at k = 0 is the integral of the object (definition
	// of the transform), Σρ·W·H for rectangles.
	for _, c := range taskShapes() {
		got := c.s.Spectrum(0, 0)
		want := shapesIntegral(c.s)
		if math.Abs(real(got)-want) > 1e-15*math.Abs(want) || imag(got) != 0 {
			t.Errorf("%s: F(0) = %v, want %v", c.name, got, want)
		}
	}
}

// taskLowDFT returns, for |kx|, |ky| ≤ kmax, the centred 2D DFT of the n×n
// image divided by n² (a Riemann sum of the continuous transform), computed
// with go-dsp's FFT as the outside reference, indexed [(ky+kmax)·(2kmax+1) +
// kx+kmax]. Pixel (i, j) sits at ((j−n/2)/n, (i−n/2)/n), which multiplies the
// standard DFT by (−1)^(kx+ky) for even n.
func taskLowDFT(img []float64, n, kmax int) []complex128 {
	w := 2*kmax + 1
	cols := make([][]complex128, w)
	for c := range cols {
		cols[c] = make([]complex128, n)
	}
	for i := range n {
		row := dspfft.FFTReal(img[i*n : (i+1)*n])
		for kx := -kmax; kx <= kmax; kx++ {
			cols[kx+kmax][i] = row[(kx+n)%n]
		}
	}
	out := make([]complex128, w*w)
	for c := range w {
		col := dspfft.FFT(cols[c])
		kx := c - kmax
		for ky := -kmax; ky <= kmax; ky++ {
			s := 1.0
			if (kx+ky)%2 != 0 {
				s = -1
			}
			out[(ky+kmax)*w+c] = col[(ky+n)%n] * complex(s/float64(n*n), 0)
		}
	}
	return out
}

func TestRectSpectrumMatchesFFTOfRaster(t *testing.T) {
	// Reference: go-dsp's FFT of the exact area-averaged raster. By Poisson
	// summation (standard sampling theory) DFT/N of an area-averaged image is
	// Σ_aliases F(k + a)·sinc(kx/n)·sinc(ky/n); dividing by the pixel box sinc
	// leaves F(k) plus the aliases from |k| ≈ n. A rectangle's transform
	// decays only as 1/|k| along its axes, so the aliases shrink as about
	// 1/n² here. Measured worst over |k| ≤ 16, relative to F(0): up to 1.5e-3
	// at n = 256 and 7.9e-5 at n = 1024 for the axis-aligned rectangles
	// (whose transform does not decay at all across the other axis), 2e-6 or
	// less at n = 1024 for the rotated ones. The bound is 1.2e-4 at n = 1024,
	// and going from 256 to 1024 must shrink the error at least 8-fold (the
	// 1/n² law predicts 16). A 1 % error in one side changes F by about
	// 1e-2·F(0) at low k, a wrong rotation sign by far more.
	const kmax = 16
	box := func(kx, ky float64, n int) float64 {
		return sincNorm(kx/float64(n)) * sincNorm(ky/float64(n))
	}
	for _, c := range taskShapes() {
		f0 := math.Abs(shapesIntegral(c.s))
		worst := map[int]float64{}
		for _, n := range []int{256, 1024} {
			ref := taskLowDFT(c.s.Rasterize(n, n), n, kmax)
			for ky := -kmax; ky <= kmax; ky++ {
				for kx := -kmax; kx <= kmax; kx++ {
					want := ref[(ky+kmax)*(2*kmax+1)+kx+kmax] / complex(box(float64(kx), float64(ky), n), 0)
					got := c.s.Spectrum(float64(kx), float64(ky))
					worst[n] = math.Max(worst[n], cmplx.Abs(got-want)/f0)
				}
			}
		}
		t.Logf("%s: worst |F − DFT/(N·sinc)|/F(0): n=256 %.3g, n=1024 %.3g", c.name, worst[256], worst[1024])
		if worst[1024] > 1.2e-4 {
			t.Errorf("%s: spectrum differs from the FFT of the 1024² raster by %.3g of F(0)", c.name, worst[1024])
		}
		if worst[256] < 8*worst[1024] {
			t.Errorf("%s: error does not shrink with the grid as aliasing does (256: %.3g, 1024: %.3g)", c.name, worst[256], worst[1024])
		}
	}
}

func TestShapesCartesianSpectrumMatchesGeneric(t *testing.T) {
	// The separable fast path must give what the package function gives by
	// evaluating Spectrum point by point (the definition it shortcuts), to
	// rounding, on square and oblong grids, for every test object and both
	// task phantoms.
	objs := taskShapes()
	lc, _ := NewLowContrastPhantom(LowContrastSpec{FOVmm: 220})
	rp, _ := NewResolutionPhantom(ResolutionSpec{FOVmm: 220})
	objs = append(objs, struct {
		name string
		s    Shapes
	}{"low-contrast phantom", lc.Shapes}, struct {
		name string
		s    Shapes
	}{"resolution phantom", rp.Shapes})
	for _, c := range objs {
		for _, g := range [][2]int{{64, 64}, {48, 36}} {
			nx, ny := g[0], g[1]
			fast := c.s.CartesianSpectrum(nx, ny)
			var ref []complex128
			for m := range ny {
				for n := range nx {
					ref = append(ref, CartesianSample(c.s, float64(n-nx/2), float64(m-ny/2), nx, ny))
				}
			}
			peak := cmplx.Abs(ref[(ny/2)*nx+nx/2])
			for k := range ref {
				if d := cmplx.Abs(fast[k] - ref[k]); d > 1e-12*peak {
					t.Fatalf("%s on %d×%d: sample %d differs by %.3g of the DC value", c.name, nx, ny, k, d/peak)
				}
			}
		}
	}
	if (Shapes{}).CartesianSpectrum(0, 3) != nil {
		t.Error("a grid without pixels must give nil")
	}
}

func TestRectRasterizeConservesIntegral(t *testing.T) {
	// Exact area averaging: the pixel sum times the pixel area equals the
	// object's integral (geometry), to rounding, on square and oblong grids.
	for _, c := range taskShapes() {
		for _, g := range [][2]int{{64, 64}, {257, 130}, {100, 301}} {
			nx, ny := g[0], g[1]
			img := c.s.Rasterize(nx, ny)
			sum := 0.0
			for _, v := range img {
				sum += v
			}
			got := sum / float64(nx*ny)
			want := shapesIntegral(c.s)
			if math.Abs(got-want) > 1e-12*math.Abs(want) {
				t.Errorf("%s on %d×%d: integral %.15g, want %.15g", c.name, nx, ny, got, want)
			}
		}
	}
}

func TestRectRasterizeMatchesSupersampling(t *testing.T) {
	// Independent reference: the fraction of a 64×64 lattice of points in
	// each pixel that the rectangle contains. Where an edge crosses a pixel
	// the lattice miscounts at most one row or column of points per edge,
	// so the two agree within 2·(1/64) of ρ per pixel; on average far better.
	const n, sub = 48, 64
	for _, c := range taskShapes() {
		if len(c.s.Ellipses) > 0 {
			continue
		}
		r := c.s.Rects[0]
		// Containment written out here, independently of Rect.contains.
		sn, cs := math.Sin(r.ThetaDeg*math.Pi/180), math.Cos(r.ThetaDeg*math.Pi/180)
		inside := func(x, y float64) bool {
			u := (x-r.X0)*cs + (y-r.Y0)*sn
			v := -(x-r.X0)*sn + (y-r.Y0)*cs
			return 2*math.Abs(u) <= r.W && 2*math.Abs(v) <= r.H
		}
		img := c.s.Rasterize(n, n)
		var worst, meanAbs float64
		for i := range n {
			for j := range n {
				hits := 0
				for a := range sub {
					y := (float64(i-n/2) - 0.5 + (float64(a)+0.5)/sub) / n
					for b := range sub {
						x := (float64(j-n/2) - 0.5 + (float64(b)+0.5)/sub) / n
						if inside(x, y) {
							hits++
						}
					}
				}
				want := r.Rho * float64(hits) / (sub * sub)
				d := math.Abs(img[i*n+j]-want) / math.Abs(r.Rho)
				worst = math.Max(worst, d)
				meanAbs += d / (n * n)
			}
		}
		t.Logf("%s: worst %.3g, mean %.3g of ρ", c.name, worst, meanAbs)
		if worst > 2.0/sub {
			t.Errorf("%s: raster differs from supersampling by %.3g of ρ in one pixel", c.name, worst)
		}
	}
}

func TestRectQuarterTurnAndNearAxis(t *testing.T) {
	// A rectangle turned by 90° is the same set as one with W and H swapped
	// (geometry), and one turned by a hair must give the same raster through
	// the polygon-clipping path as the axis-aligned path gives at 0°.
	a := Shapes{Rects: []Rect{{Rho: 1, X0: 0.013, Y0: -0.07, W: 0.21, H: 0.057, ThetaDeg: 90}}}
	b := Shapes{Rects: []Rect{{Rho: 1, X0: 0.013, Y0: -0.07, W: 0.057, H: 0.21}}}
	c := Shapes{Rects: []Rect{{Rho: 1, X0: 0.013, Y0: -0.07, W: 0.057, H: 0.21, ThetaDeg: 1e-9}}}
	ra, rb, rc := a.Rasterize(77, 64), b.Rasterize(77, 64), c.Rasterize(77, 64)
	for k := range ra {
		if math.Abs(ra[k]-rb[k]) > 1e-14 || math.Abs(rc[k]-rb[k]) > 1e-6 {
			t.Fatalf("pixel %d: 90° %.16g, swapped %.16g, 1e-9° %.16g", k, ra[k], rb[k], rc[k])
		}
	}
}

func TestShapesValidate(t *testing.T) {
	cases := []struct {
		name string
		s    Shapes
		want string
	}{
		{"empty", Shapes{}, "no shapes"},
		{"zero width", Shapes{Rects: []Rect{{Rho: 1, W: 0, H: 0.1}}}, "rectangle 0 has sides"},
		{"NaN angle", Shapes{Rects: []Rect{{Rho: 1, W: 0.1, H: 0.1}, {Rho: 1, W: 0.1, H: 0.1, ThetaDeg: math.NaN()}}}, "rectangle 1 has a non-finite"},
		{"bad ellipse", Shapes{Ellipses: Ellipses{{Rho: 1, A: -1, B: 1}}}, "ellipse 0"},
		{"good", Shapes{Rects: []Rect{{Rho: 1, W: 0.1, H: 0.1}}}, ""},
	}
	for _, c := range cases {
		err := c.s.Validate()
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%s: unexpected error %v", c.name, err)
		case c.want != "" && (err == nil || !strings.Contains(err.Error(), c.want)):
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
	if (Shapes{}).Rasterize(0, 4) != nil || (Shapes{}).Support(4, -1) != nil {
		t.Error("a grid without pixels must give nil")
	}
}

func TestLowContrastLayout(t *testing.T) {
	p, err := NewLowContrastPhantom(LowContrastSpec{FOVmm: 220})
	if err != nil {
		t.Fatal(err)
	}
	// The positions the layout rule of the doc comment gives for the
	// defaults, worked out by hand: columns from gaps max(d_i, d_j) + 10 mm
	// between edges, rows 2·12 + 10 = 34 mm apart.
	xs := []float64{-55.5, -23.5, 1.5, 22.5, 40, 55.5}
	ys := []float64{-34, 0, 34}
	if len(p.Targets) != len(xs)*len(ys) {
		t.Fatalf("%d targets, want %d", len(p.Targets), len(xs)*len(ys))
	}
	for k, d := range p.Targets {
		r, c := k/len(xs), k%len(xs)
		if math.Abs(d.X0*220-xs[c]) > 1e-12 || math.Abs(d.Y0*220-ys[r]) > 1e-12 {
			t.Errorf("target %d at (%.6g, %.6g) mm, want (%g, %g)", k, d.X0*220, d.Y0*220, xs[c], ys[r])
		}
		if d.DiameterMM != DefaultLowContrastDiametersMM[c] || d.Contrast != DefaultLowContrastContrasts[r] {
			t.Errorf("target %d: %g mm at %g, want %g mm at %g", k, d.DiameterMM, d.Contrast, DefaultLowContrastDiametersMM[c], DefaultLowContrastContrasts[r])
		}
		// The intensity at the centre is background·(1 + contrast); just
		// outside the disc it is the background.
		if v := p.Value(d.X0, d.Y0); math.Abs(v-(1+d.Contrast)) > 1e-15 {
			t.Errorf("target %d: intensity %v at its centre, want %v", k, v, 1+d.Contrast)
		}
		if v := p.Value(d.X0+(d.DiameterMM/2+0.5)/220, d.Y0); v != 1 {
			t.Errorf("target %d: intensity %v just outside, want 1", k, v)
		}
	}
	// The noise ROI is sizeable and holds only background.
	const n = 256
	roi := p.NoiseROI(n, n)
	img := p.Rasterize(n, n)
	count := 0
	for k, in := range roi {
		if in {
			count++
			if img[k] != 1 {
				t.Fatalf("noise ROI pixel %d has intensity %v, want the background 1", k, img[k])
			}
		}
	}
	if count < 5000 {
		t.Errorf("noise ROI has %d pixels, want several thousand", count)
	}
	// The quality package accepts the layout on this grid.
	g := quality.Grid{Nx: n, Ny: n, FOVmm: 220}
	if _, err := quality.DetectDiscs(img, g, p.Targets, quality.DetectOptions{Sigma: 0.01}); err != nil {
		t.Errorf("DetectDiscs refuses the default layout on %d²: %v", n, err)
	}
}

func TestLowContrastBadSpec(t *testing.T) {
	cases := []struct {
		name string
		spec LowContrastSpec
		want string
	}{
		{"no FOV", LowContrastSpec{}, "positive finite FOV"},
		{"FOV too small", LowContrastSpec{FOVmm: 150}, "at least 183 mm"},
		{"negative diameter", LowContrastSpec{FOVmm: 220, DiametersMM: []float64{4, -2}}, "diameter 1"},
		{"zero contrast", LowContrastSpec{FOVmm: 220, Contrasts: []float64{0.01, 0}}, "contrast 1 is 0"},
		{"repeated contrast", LowContrastSpec{FOVmm: 220, Contrasts: []float64{0.01, 0.01}}, "appears twice"},
		{"below −100 %", LowContrastSpec{FOVmm: 220, Contrasts: []float64{-2}}, "between −1 and 10"},
		{"NaN background", LowContrastSpec{FOVmm: 220, Background: math.NaN()}, "background intensity"},
		{"empty list", LowContrastSpec{FOVmm: 220, DiametersMM: []float64{}}, "at least one diameter"},
	}
	for _, c := range cases {
		_, err := NewLowContrastPhantom(c.spec)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
	// The smallest FOV named in the message is enough.
	if _, err := NewLowContrastPhantom(LowContrastSpec{FOVmm: 183}); err != nil {
		t.Errorf("FOV 183 mm: %v", err)
	}
}

func TestResolutionLayout(t *testing.T) {
	const fov = 220.0
	p, err := NewResolutionPhantom(ResolutionSpec{FOVmm: fov})
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Groups) != 2*len(DefaultResolutionPeriodsMM) {
		t.Fatalf("%d groups, want %d", len(p.Groups), 2*len(DefaultResolutionPeriodsMM))
	}
	// Every bar lies inside the background disc with its margin, bars do not
	// touch one another, and each group's bars sit where the group says.
	for k, r := range p.Rects[1:] {
		for _, cx := range []float64{-1, 1} {
			for _, cy := range []float64{-1, 1} {
				x, y := r.X0+cx*r.W/2, r.Y0+cy*r.H/2
				if math.Hypot(x, y) > TaskBackgroundRadius-resBarsMargin+1e-12 {
					t.Errorf("bar %d corner (%.4g, %.4g) outside the allowed disc", k, x, y)
				}
			}
		}
		for q, o := range p.Rects[1 : k+1] {
			if math.Abs(r.X0-o.X0) < (r.W+o.W)/2 && math.Abs(r.Y0-o.Y0) < (r.H+o.H)/2 {
				t.Errorf("bars %d and %d overlap", q, k)
			}
		}
	}
	for _, g := range p.Groups {
		// Bar centres: intensity background + contrast; gap centres: background.
		for b := range g.Bars {
			off := (float64(b) - float64(g.Bars-1)/2) * g.PeriodMM / fov
			gap := off + g.PeriodMM/2/fov
			bx, by, gx, gy := g.X0+off, g.Y0, g.X0+gap, g.Y0
			if g.AlongY {
				bx, by, gx, gy = g.X0, g.Y0+off, g.X0, g.Y0+gap
			}
			if v := p.Value(bx, by); v != 1 {
				t.Errorf("group %g mm (along y %v) bar %d: intensity %v, want 1", g.PeriodMM, g.AlongY, b, v)
			}
			if v := p.Value(gx, gy); v != 0.5 {
				t.Errorf("group %g mm (along y %v) gap %d: intensity %v, want 0.5", g.PeriodMM, g.AlongY, b, v)
			}
		}
	}
	// Inside each edge rectangle the object is the square on one side of the
	// edge line and the background on the other: nothing else intrudes.
	for k, e := range p.Edges {
		sn, cs := math.Sincos(e.NormalDeg * math.Pi / 180)
		for a := -20; a <= 20; a++ {
			for b := -20; b <= 20; b++ {
				s := float64(a) / 20 * e.HalfLengthMM / fov
				d := float64(b) / 20 * e.HalfWidthMM / fov
				if d == 0 {
					continue
				}
				x := e.X0 + d*cs - s*sn
				y := e.Y0 + d*sn + s*cs
				want := 1.0
				if d > 0 {
					want = 0.5
				}
				if v := p.Value(x, y); v != want {
					t.Fatalf("edge %d at (%+d, %+d): intensity %v, want %v", k, a, b, v, want)
				}
			}
		}
	}
}

func TestResolutionBadSpec(t *testing.T) {
	cases := []struct {
		name string
		spec ResolutionSpec
		want string
	}{
		{"no FOV", ResolutionSpec{}, "positive finite FOV"},
		{"axis-aligned edge", ResolutionSpec{FOVmm: 220, SlantDeg: 0.5}, "use 2° to 20°"},
		{"two bars", ResolutionSpec{FOVmm: 220, Bars: 2}, "use 3 to 50"},
		{"bad period", ResolutionSpec{FOVmm: 220, PeriodsMM: []float64{2, math.Inf(1)}}, "bar period 1"},
		{"bars too wide", ResolutionSpec{FOVmm: 220, PeriodsMM: []float64{40}}, "do not fit"},
		{"too many groups", ResolutionSpec{FOVmm: 60}, "do not fit"},
		{"contrast below background", ResolutionSpec{FOVmm: 220, Contrast: -1}, "not below −background"},
	}
	for _, c := range cases {
		_, err := NewResolutionPhantom(c.spec)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
}

// taskBandLimited returns the orthonormal inverse centred DFT of the
// phantom's exact spectrum on the n×n grid (real part): what a fully sampled
// Cartesian scan without noise reconstructs. gonum's FFT is the reference
// transform; for n divisible by 4 the centring is a factor (−1)^(m+n) on the
// spectrum and (−1)^(i+j) on the image.
func taskBandLimited(p Phantom, n int) []float64 {
	return taskBandLimitedY(p, n, n)
}

// taskBandLimitedY is taskBandLimited with the rows |ky| ≥ kyMax of
// k-space set to zero (a scan with fewer phase-encode lines, zero-filled).
func taskBandLimitedY(p Phantom, n, kyMax int) []float64 {
	spec := CartesianSpectrum(p, n, n)
	for m := range n {
		if ky := m - n/2; ky >= kyMax || ky <= -kyMax {
			clear(spec[m*n : (m+1)*n])
		}
	}
	fft := fourier.NewCmplxFFT(n)
	buf := make([]complex128, n)
	out := make([]complex128, n)
	for m := range n {
		for k := range n {
			v := spec[m*n+k]
			if (m+k)%2 != 0 {
				v = -v
			}
			buf[k] = v
		}
		fft.Sequence(out, buf)
		copy(spec[m*n:(m+1)*n], out)
	}
	for k := range n {
		for m := range n {
			buf[m] = spec[m*n+k]
		}
		fft.Sequence(out, buf)
		for m := range n {
			spec[m*n+k] = out[m]
		}
	}
	img := make([]float64, n*n)
	for i := range n {
		for j := range n {
			s := 1.0
			if (i+j)%2 != 0 {
				s = -1
			}
			img[i*n+j] = s * real(spec[i*n+j]) / float64(n)
		}
	}
	return img
}

func TestResolutionPhantomFullySampled(t *testing.T) {
	// A noiseless, fully sampled Cartesian scan passes every spatial
	// frequency with |kx|, |ky| < n/2 cycles per FOV unchanged and none above
	// (sampling theory, common practice). Along an edge normal at angle φ
	// from x the cut-off is met at f = (n/2)/(FOV·cos φ), so MTF50 lies
	// there, to within the smoothing of the cut-off by the finite edge window
	// (measured 0.5 % above; bound 3 %). A group of N bars of period p has
	// its fundamental spread over 1/p ± 1/(N·p); where all of that lies below
	// the cut-off, i.e. p > 2·(1 + 1/N) pixels, it passes whole and the
	// modulation is 1 (measured within 0.5 %; bound 2 %). Closer to the
	// cut-off part of the fundamental is lost and the value is only logged
	// (2.33 pixels: 0.94 and 1.06); periods of two pixels or less are beyond
	// the grid and must be reported as not resolvable.
	const n, fov = 256, 220.0
	p, err := NewResolutionPhantom(ResolutionSpec{FOVmm: fov})
	if err != nil {
		t.Fatal(err)
	}
	img := taskBandLimited(p, n)
	g := quality.Grid{Nx: n, Ny: n, FOVmm: fov}
	pix := fov / n
	for k, e := range p.Edges {
		res, err := quality.EdgeResponse(img, g, e, quality.EdgeOptions{})
		if err != nil {
			t.Fatalf("edge %d: %v", k, err)
		}
		cut := 0.5 / pix / math.Cos(p.Spec.SlantDeg*math.Pi/180)
		t.Logf("edge %d: MTF50 %.4f cycles/mm, cut-off %.4f; 10–90 %% width %.3f mm (%.2f px)", k, res.MTF50, cut, res.Width1090, res.Width1090/pix)
		if math.Abs(res.MTF50/cut-1) > 0.03 {
			t.Errorf("edge %d: MTF50 %.4f cycles/mm, want the cut-off %.4f", k, res.MTF50, cut)
		}
	}
	for _, gr := range p.Groups {
		sc, err := quality.BarModulation(img, g, gr)
		if err != nil {
			t.Fatalf("group %g mm: %v", gr.PeriodMM, err)
		}
		beyond := gr.PeriodMM <= 2*pix
		whole := gr.PeriodMM > 2*pix*(1+1/float64(gr.Bars))
		t.Logf("period %.2f mm (%.2f px) along y %v: modulation %.4f resolvable %v", gr.PeriodMM, gr.PeriodMM/pix, gr.AlongY, sc.Modulation, sc.Resolvable)
		switch {
		case beyond && sc.Resolvable:
			t.Errorf("period %g mm is beyond the grid but reported resolvable", gr.PeriodMM)
		case !beyond && !sc.Resolvable:
			t.Errorf("period %g mm is within the grid but reported not resolvable", gr.PeriodMM)
		case whole && math.Abs(sc.Modulation-1) > 0.02:
			t.Errorf("period %g mm (along y %v): modulation %.4f, want 1", gr.PeriodMM, gr.AlongY, sc.Modulation)
		}
	}
}

func TestResolutionPhantomAnisotropicCutoff(t *testing.T) {
	// Keeping only the rows |ky| < 64 of a 256² k-space (half of the
	// phase-encode lines, zero-filled) moves the cut-off along y to
	// 64/FOV cycles/mm and leaves x alone (sampling theory, as in
	// TestResolutionPhantomFullySampled): the lower edge's MTF50 must halve
	// and the right edge's stay, each within 3 % of its cut-off (measured
	// 1.7 % and 0.4 %). The x bars keep a modulation of 1 within 2 %; the y
	// bars whose whole fundamental lobe, 1/p ± 1/(N·p), lies above the new
	// cut-off lose it, and their modulation must be within 0.1 of 0
	// (measured 0.02 at most).
	const n, fov, kyMax = 256, 220.0, 64
	p, err := NewResolutionPhantom(ResolutionSpec{FOVmm: fov})
	if err != nil {
		t.Fatal(err)
	}
	img := taskBandLimitedY(p, n, kyMax)
	g := quality.Grid{Nx: n, Ny: n, FOVmm: fov}
	cosT := math.Cos(p.Spec.SlantDeg * math.Pi / 180)
	for k, want := range []float64{0.5 * n / fov / cosT, kyMax / fov / cosT} {
		res, err := quality.EdgeResponse(img, g, p.Edges[k], quality.EdgeOptions{})
		if err != nil {
			t.Fatalf("edge %d: %v", k, err)
		}
		t.Logf("edge %d: MTF50 %.4f cycles/mm, cut-off %.4f", k, res.MTF50, want)
		if math.Abs(res.MTF50/want-1) > 0.03 {
			t.Errorf("edge %d: MTF50 %.4f cycles/mm, want %.4f", k, res.MTF50, want)
		}
	}
	for _, gr := range p.Groups {
		sc, err := quality.BarModulation(img, g, gr)
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("period %.2f mm along y %v: modulation %.4f", gr.PeriodMM, gr.AlongY, sc.Modulation)
		switch {
		case !gr.AlongY && gr.PeriodMM > 2*fov/n*(1+1/float64(gr.Bars)):
			if math.Abs(sc.Modulation-1) > 0.02 {
				t.Errorf("x bars %g mm: modulation %.4f, want 1", gr.PeriodMM, sc.Modulation)
			}
		case gr.AlongY && sc.Resolvable && (1-1/float64(gr.Bars))/gr.PeriodMM > kyMax/fov:
			if math.Abs(sc.Modulation) > 0.1 {
				t.Errorf("y bars %g mm beyond the new cut-off: modulation %.4f, want about 0", gr.PeriodMM, sc.Modulation)
			}
		}
	}
}

func BenchmarkShapesRasterize256(b *testing.B) {
	p, _ := NewResolutionPhantom(ResolutionSpec{FOVmm: 220})
	b.ReportAllocs()
	for b.Loop() {
		_ = p.Rasterize(256, 256)
	}
}

// The generic package function evaluates Spectrum at every grid point; the
// method uses separability.
func BenchmarkShapesCartesianSpectrum256(b *testing.B) {
	p, _ := NewResolutionPhantom(ResolutionSpec{FOVmm: 220})
	b.Run("generic", func(b *testing.B) {
		for b.Loop() {
			_ = CartesianSpectrum(p, 256, 256)
		}
	})
	b.Run("separable", func(b *testing.B) {
		for b.Loop() {
			_ = p.CartesianSpectrum(256, 256)
		}
	})
}

func ExampleNewLowContrastPhantom() {
	p, err := NewLowContrastPhantom(LowContrastSpec{FOVmm: 220})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("contrast  diameter  centre (mm)")
	for _, d := range p.Targets[:7] {
		fmt.Printf("%5.0f %%   %4.0f mm   (%6.1f, %5.1f)\n", 100*d.Contrast, d.DiameterMM, d.X0*220, d.Y0*220)
	}
	_, err = NewLowContrastPhantom(LowContrastSpec{FOVmm: 120})
	fmt.Println(err)
	// Output:
	// contrast  diameter  centre (mm)
	//     5 %     12 mm   ( -55.5, -34.0)
	//     5 %      8 mm   ( -23.5, -34.0)
	//     5 %      6 mm   (   1.5, -34.0)
	//     5 %      4 mm   (  22.5, -34.0)
	//     5 %      3 mm   (  40.0, -34.0)
	//     5 %      2 mm   (  55.5, -34.0)
	//     2 %     12 mm   ( -55.5,   0.0)
	// phantom: the low-contrast layout needs a background radius of 82.1 mm (disc 12 mm at -55.5, -34.0 mm) but a FOV of 120 mm gives 54.0 mm; use fewer or smaller discs or a larger FOV (at least 183 mm)
}

func ExampleNewResolutionPhantom() {
	p, err := NewResolutionPhantom(ResolutionSpec{FOVmm: 220})
	if err != nil {
		fmt.Println(err)
		return
	}
	for k, e := range p.Edges {
		fmt.Printf("edge %d: point (%.4f, %.4f) FOV, normal %.0f°\n", k, e.X0, e.Y0, e.NormalDeg)
	}
	for _, g := range p.Groups[:3] {
		fmt.Printf("bars %.2f lp/mm along y %-5v centre (%.1f, %.1f) mm\n", 1/g.PeriodMM, g.AlongY, g.X0*220, g.Y0*220)
	}
	// Output:
	// edge 0: point (0.1195, -0.1895) FOV, normal 5°
	// edge 1: point (-0.0105, -0.0805) FOV, normal 95°
	// bars 0.25 lp/mm along y false centre (-46.5, 14.1) mm
	// bars 0.33 lp/mm along y false centre (-23.8, 14.1) mm
	// bars 0.40 lp/mm along y false centre (-5.4, 14.1) mm
}
