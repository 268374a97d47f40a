package simulate

import (
	"fmt"
	"image"
	"image/png"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/dsp/fourier"
)

// publishedSheppLogan is the ten-ellipse table as published on [-1, 1]² with
// y up (Shepp & Logan, IEEE Trans Nucl Sci 1974) with the higher-contrast
// intensities (Toft 1996, from memory per REFERENCES.md): rho, x0, y0, a, b,
// phi. It is kept apart from phantom.go so that the tests apply the FOV
// mapping (×½, y mirrored) themselves.
var publishedSheppLogan = [10][6]float64{
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

// ellipseIntegral is Σ ρ·π·a·b, the integral of a sum of ellipses (the area
// of an ellipse is πab, handbook formula).
func ellipseIntegral(e Ellipses) float64 {
	var s float64
	for _, el := range e {
		s += el.Rho * math.Pi * el.A * el.B
	}
	return s
}

func TestModifiedSheppLoganMapping(t *testing.T) {
	// The FOV mapping stated in the doc comment: ×½, y and angle negated.
	e := ModifiedSheppLogan()
	if len(e) != len(publishedSheppLogan) {
		t.Fatalf("got %d ellipses, want %d", len(e), len(publishedSheppLogan))
	}
	for i, r := range publishedSheppLogan {
		want := Ellipse{Rho: r[0], X0: r[1] / 2, Y0: -r[2] / 2, A: r[3] / 2, B: r[4] / 2, ThetaDeg: -r[5]}
		if e[i] != want {
			t.Errorf("ellipse %d = %+v, want %+v", i, e[i], want)
		}
	}
	if err := e.Validate(); err != nil {
		t.Fatal(err)
	}
}

func TestSpectrumAtZero(t *testing.T) {
	// Source: the value of an ellipse's transform at k = 0 is ρπab (Koay et
	// al. MRM 2007; Guerquin-Kern et al. IEEE TMI 2012), with a, b the
	// published semi-axes halved for FOV units.
	var want float64
	for _, r := range publishedSheppLogan {
		want += r[0] * math.Pi * (r[3] / 2) * (r[4] / 2)
	}
	got := ModifiedSheppLogan().Spectrum(0, 0)
	if math.Abs(real(got)-want) > 1e-12 || math.Abs(imag(got)) > 1e-12 {
		t.Errorf("Spectrum(0,0) = %v, want %v", got, want)
	}
	// Orthonormal centred DFT scaling: √(nx·ny)·F.
	cs := CartesianSample(ModifiedSheppLogan(), 0, 0, 64, 32)
	if math.Abs(real(cs)-math.Sqrt(64*32)*want) > 1e-11 {
		t.Errorf("CartesianSample(0,0) = %v, want %v", cs, math.Sqrt(64*32)*want)
	}
}

func TestDiskFTSmallArgument(t *testing.T) {
	// J1(z)/z → ½, so J1(2πq)/q → π (series of J1: Abramowitz & Stegun
	// 9.1.10); on both sides of the switch to the series the two forms must
	// agree with math.J1.
	if got := diskFT(0); got != math.Pi {
		t.Errorf("diskFT(0) = %v, want π", got)
	}
	for _, q := range []float64{1e-9, 1e-5, 1.5e-3, 1.59e-3, 1.6e-3, 2e-3, 0.1} {
		want := math.J1(2*math.Pi*q) / q
		if got := diskFT(q); math.Abs(got-want) > 1e-13 {
			t.Errorf("diskFT(%g) = %.17g, J1 form %.17g", q, got, want)
		}
	}
}

func TestDiskParallelogram(t *testing.T) {
	// Areas of the unit disk inside rectangles and rotated squares, from
	// handbook geometry: disk area π, quarter disk π/4, circular segment of a
	// chord at distance d from the centre acos(d) − d√(1−d²).
	seg := func(d float64) float64 { return math.Acos(d) - d*math.Sqrt(1-d*d) }
	r30s, r30c := math.Sincos(math.Pi / 6)
	cases := []struct {
		name                   string
		cx, cy, ux, uy, vx, vy float64
		want                   float64
	}{
		{"square inside disk", 0, 0, 0.5, 0, 0, 0.5, 1},
		{"disk inside square", 0, 0, 2, 0, 0, 2, math.Pi},
		{"quarter disk", 0.5, 0.5, 0.5, 0, 0, 0.5, math.Pi / 4},
		{"half disk", 1, 0, 1, 0, 0, 2, math.Pi / 2},
		{"segment d=0.5", 1.25, 0, 0.75, 0, 0, 2, seg(0.5)},
		{"segment d=0.9 rotated 30°", 1.5 * r30c, 1.5 * r30s, 0.6 * r30c, 0.6 * r30s, -2 * r30s, 2 * r30c, seg(0.9)},
		{"rotated square holding disk", 0.1, -0.2, 3 * r30c, 3 * r30s, -3 * r30s, 3 * r30c, math.Pi},
		{"far away", 5, 5, 0.5, 0, 0, 0.5, 0},
		// A strip |x| ≤ w through the centre holds π − 2·seg(w).
		{"thin strip through centre", 0, 0, 0.001, 0, 0, 3, math.Pi - 2*seg(0.001)},
	}
	for _, c := range cases {
		got := diskParallelogram(c.cx, c.cy, c.ux, c.uy, c.vx, c.vy)
		if math.Abs(got-c.want) > 1e-13 {
			t.Errorf("%s: area %.16g, want %.16g", c.name, got, c.want)
		}
	}
}

func TestRasterizeConservesArea(t *testing.T) {
	// An exact area average sums to the object's integral: Σ pixels / (nx·ny)
	// = Σ ρπab (ellipse area πab, handbook) for ellipses inside the FOV.
	single := Ellipses{{Rho: 2.5, X0: 0.07, Y0: -0.11, A: 0.3, B: 0.05, ThetaDeg: 37}}
	tiny := Ellipses{{Rho: 1, X0: 0.0013, Y0: 0.0021, A: 0.0007, B: 0.0004, ThetaDeg: -12}}
	cases := []struct {
		name   string
		e      Ellipses
		nx, ny int
	}{
		{"Shepp-Logan 256²", ModifiedSheppLogan(), 256, 256},
		{"Shepp-Logan 400²", ModifiedSheppLogan(), 400, 400},
		{"Shepp-Logan 97×130", ModifiedSheppLogan(), 97, 130},
		{"rotated thin ellipse 128×64", single, 128, 64},
		{"ellipse smaller than a pixel", tiny, 64, 64},
	}
	for _, c := range cases {
		img := c.e.Rasterize(c.nx, c.ny)
		var sum float64
		for _, v := range img {
			sum += v
		}
		got := sum / float64(c.nx*c.ny)
		if want := ellipseIntegral(c.e); math.Abs(got-want) > 1e-12*math.Max(1, math.Abs(want)) {
			t.Errorf("%s: integral %.15g, want %.15g", c.name, got, want)
		}
	}
}

func TestRasterizeMatchesSupersampling(t *testing.T) {
	// Each pixel against the midpoint rule with s×s point samples per pixel
	// (numerical quadrature, textbook) of the ellipse inequality
	// ((u·d)/a)² + ((v·d)/b)² ≤ 1, evaluated here independently of Value.
	// For an indicator the midpoint rule errs only in the sub-cells that a
	// boundary crosses: at worst about 2·√2·s of the s² per edge (0.045 for
	// s = 64), but over- and under-counts along a smooth edge largely cancel,
	// and the measured worst pixel is 0.002. The bound 0.01 is five times
	// that; a wrong inside/outside classification of a pixel errs by up to
	// |ρ| ≥ 0.1 of the crossing ellipse and fails it.
	const s = 64
	cases := []struct {
		name   string
		e      Ellipses
		nx, ny int
	}{
		{"Shepp-Logan 40×48", ModifiedSheppLogan(), 40, 48},
		{"rotated thin ellipse 32×32", Ellipses{{Rho: 1, X0: 0.07, Y0: -0.11, A: 0.3, B: 0.05, ThetaDeg: 37}}, 32, 32},
	}
	for _, c := range cases {
		img := c.e.Rasterize(c.nx, c.ny)
		cs := make([][2]float64, len(c.e))
		for k, el := range c.e {
			cs[k][1], cs[k][0] = math.Sincos(el.ThetaDeg * math.Pi / 180)
		}
		value := func(x, y float64) float64 {
			var v float64
			for k, el := range c.e {
				dx, dy := x-el.X0, y-el.Y0
				u := (dx*cs[k][0] + dy*cs[k][1]) / el.A
				w := (-dx*cs[k][1] + dy*cs[k][0]) / el.B
				if u*u+w*w <= 1 {
					v += el.Rho
				}
			}
			return v
		}
		var worst float64
		for i := range c.ny {
			for j := range c.nx {
				var acc float64
				for a := range s {
					y := (float64(i-c.ny/2) + (float64(a)+0.5)/s - 0.5) / float64(c.ny)
					for b := range s {
						x := (float64(j-c.nx/2) + (float64(b)+0.5)/s - 0.5) / float64(c.nx)
						acc += value(x, y)
					}
				}
				worst = math.Max(worst, math.Abs(acc/(s*s)-img[i*c.nx+j]))
			}
		}
		t.Logf("%s: worst pixel difference from %d² supersampling %.3g", c.name, s, worst)
		if worst > 0.01 {
			t.Errorf("%s: a pixel differs from its %d² supersampled value by %.3g", c.name, s, worst)
		}
	}
}

func TestRasterizeBadSize(t *testing.T) {
	e := ModifiedSheppLogan()
	for _, s := range [][2]int{{0, 4}, {4, 0}, {-1, 8}} {
		if e.Rasterize(s[0], s[1]) != nil || e.Support(s[0], s[1]) != nil || CartesianSpectrum(e, s[0], s[1]) != nil {
			t.Errorf("size %v: want nil results", s)
		}
	}
}

func TestValidate(t *testing.T) {
	cases := []struct {
		name string
		e    Ellipses
		ok   bool
	}{
		{"Shepp-Logan", ModifiedSheppLogan(), true},
		{"empty", Ellipses{}, false},
		{"zero axis", Ellipses{{Rho: 1, A: 0, B: 0.1}}, false},
		{"negative axis", Ellipses{{Rho: 1, A: 0.1, B: -0.1}}, false},
		{"NaN intensity", Ellipses{{Rho: math.NaN(), A: 0.1, B: 0.1}}, false},
		{"infinite centre", Ellipses{{Rho: 1, X0: math.Inf(1), A: 0.1, B: 0.1}}, false},
	}
	for _, c := range cases {
		if err := c.e.Validate(); (err == nil) != c.ok {
			t.Errorf("%s: Validate() = %v, want ok=%v", c.name, err, c.ok)
		}
	}
}

// loadSkimage reads the fixture made by testdata/make_phantom_fixture.py
// (scikit-image 0.19.3 skimage.data.shepp_logan_phantom(), 8-bit grey).
func loadSkimage(t *testing.T) (img []float64, n int) {
	t.Helper()
	f, err := os.Open(filepath.Join("testdata", "shepp_logan_skimage.png"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	m, err := png.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	g, ok := m.(*image.Gray)
	if !ok {
		t.Fatalf("fixture is %T, want 8-bit grey", m)
	}
	b := g.Bounds()
	if b.Dx() != 400 || b.Dy() != 400 {
		t.Fatalf("fixture is %v, want 400×400", b)
	}
	img = make([]float64, 400*400)
	for i := range 400 {
		for j := range 400 {
			img[i*400+j] = float64(g.GrayAt(b.Min.X+j, b.Min.Y+i).Y) / 255
		}
	}
	return img, 400
}

func TestSkimagePointSampled(t *testing.T) {
	// Reference: scikit-image 0.19.3 shepp_logan_phantom(). That image holds
	// only the six grey levels, so it is point-sampled without anti-aliasing;
	// comparing point samples of our table on grids of several pitches and
	// offsets with it showed that it is sampled at the positions
	// linspace(-1, 1, 400) of the published square, i.e. at −½ + j/399 in FOV
	// units, and stored in 8 bits. Point-sampling our table on that grid must therefore give every
	// one of the 160000 pixels within the 8-bit rounding of ½/255.
	ref, n := loadSkimage(t)
	e := ModifiedSheppLogan()
	bad := 0
	for i := range n {
		y := -0.5 + float64(i)/float64(n-1)
		for j := range n {
			x := -0.5 + float64(j)/float64(n-1)
			if d := math.Abs(e.Value(x, y) - ref[i*n+j]); d > 0.5/255+1e-12 {
				if bad < 5 {
					t.Errorf("pixel (%d,%d): ours %.4f, scikit-image %.4f", i, j, e.Value(x, y), ref[i*n+j])
				}
				bad++
			}
		}
	}
	if bad > 0 {
		t.Errorf("%d of %d pixels differ from scikit-image", bad, n*n)
	}
}

func TestSkimageAreaAveraged(t *testing.T) {
	// Reference: scikit-image 0.19.3 shepp_logan_phantom() (400×400). Our
	// Rasterize differs from it by construction on edge pixels only: it
	// averages over each pixel's area where scikit-image takes one point,
	// and our FFT-centred grid (pitch 1/400, centres at (j−200)/400) is offset
	// from scikit-image's (pitch 1/399, centres at −½+j/399) by up to half a
	// pixel. Measured here: 1.79% of pixels differ by more than 0.05 and the
	// mean absolute difference is 0.0070; the bounds below leave headroom of
	// about 40% over those figures while a wrong table, mirror or scale
	// (flipped upside down: 15.6% and 0.045; flipped left-right: 6.6% and
	// 0.017) fails them.
	ref, n := loadSkimage(t)
	img := ModifiedSheppLogan().Rasterize(n, n)
	var over int
	var sumAbs float64
	for i, v := range img {
		d := math.Abs(v - ref[i])
		sumAbs += d
		if d > 0.05 {
			over++
		}
	}
	frac := float64(over) / float64(n*n)
	mean := sumAbs / float64(n*n)
	t.Logf("pixels differing by > 0.05: %.3f%%, mean |difference| %.5f", 100*frac, mean)
	if frac > 0.025 {
		t.Errorf("%.3f%% of pixels differ by > 0.05, want ≤ 2.5%%", 100*frac)
	}
	if mean > 0.01 {
		t.Errorf("mean |difference| %.5f, want ≤ 0.01", mean)
	}
	// The grey levels of the interior must be those of the reference.
	for _, p := range []struct {
		i, j int
		want float64
	}{{200, 200, 0.2}, {200, 50, 0}, {200, 130, 0}, {5, 200, 0}, {22, 200, 1}} {
		if got := img[p.i*n+p.j]; math.Abs(got-p.want) > 1e-12 || math.Abs(ref[p.i*n+p.j]-p.want) > 0.5/255 {
			t.Errorf("pixel (%d,%d): ours %.4f, scikit-image %.4f, expected %.1f", p.i, p.j, got, ref[p.i*n+p.j], p.want)
		}
	}
}

// centredDFT2 returns, for |kx|, |ky| ≤ kmax, the centred 2D DFT of the
// n-by-n image img (pixel (i, j) at ((j−n/2)/n, (i−n/2)/n)) divided by n², a
// Riemann sum for the continuous transform (pixel area 1/n²); it equals the
// orthonormal DFT divided by √N, N = n². It is computed with gonum's
// dsp/fourier FFT as an outside reference. The result is indexed
// [(ky+kmax)*(2kmax+1) + kx+kmax].
func centredDFT2(img []float64, n, kmax int) []complex128 {
	fft := fourier.NewCmplxFFT(n)
	w := 2*kmax + 1
	rows := make([]complex128, n*w) // row DFTs, only the wanted columns
	in := make([]complex128, n)
	out := make([]complex128, n)
	for i := range n {
		for j := range n {
			in[j] = complex(img[i*n+j], 0)
		}
		fft.Coefficients(out, in)
		for kx := -kmax; kx <= kmax; kx++ {
			rows[i*w+kx+kmax] = out[(kx+n)%n]
		}
	}
	res := make([]complex128, w*w)
	for c := range w {
		for i := range n {
			in[i] = rows[i*w+c]
		}
		fft.Coefficients(out, in)
		kx := c - kmax
		for ky := -kmax; ky <= kmax; ky++ {
			// Index j on the standard grid sits at j − n/2 on ours: a factor
			// exp(iπk) = (−1)^k per axis.
			sign := 1.0
			if (kx+ky)%2 != 0 {
				sign = -1
			}
			res[(ky+kmax)*w+c] = out[(ky+n)%n] * complex(sign/float64(n*n), 0)
		}
	}
	return res
}

func sinc(u float64) float64 {
	if u == 0 {
		return 1
	}
	return math.Sin(math.Pi*u) / (math.Pi * u)
}

func TestSpectrumMatchesFFTOfRaster(t *testing.T) {
	// Reference: the FFT (gonum dsp/fourier) of a 1024² exact area-averaged
	// rasterisation. By Poisson summation the DFT of an area-averaged image,
	// divided by the pixel count N, is Σ_aliases F(k+a)·sinc(kx/n)·sinc(ky/n)
	// (pixel box of width 1/n, a over the lattice (n·ℤ)²; standard sampling
	// theory). Dividing by the box sinc leaves F(k) plus aliases from
	// |k| ≳ 1000, where an ellipse's transform has decayed as q^(−3/2) and the
	// box sinc, being near its zeros, suppresses them a further factor
	// |k|/n ≤ 1/64.
	//
	// Part 1, all |kx|, |ky| ≤ 16: the aliases are measured at up to 2.0e-6 of
	// F(0) (they fall as about n^(−2.5): 3.2e-5 at n = 256, 2.2e-7 at 2048),
	// so the bound is 5e-6·F(0). For scale: a 0.1% error in one semi-axis
	// changes F by 1e-3 of F(0) here, a wrong rotation sign by 6e-2.
	//
	// Part 2, a few k: adding the aliases themselves, Σ over 0 < max(|a|,|b|)
	// ≤ 40 lattice points of F·sinc·sinc, must close the gap to the
	// truncation of that sum (measured ≤ 1.2e-10 of F(0)); bound 1e-9·F(0).
	const n, kmax, amax = 1024, 16, 40
	cases := []struct {
		name string
		e    Ellipses
	}{
		{"modified Shepp-Logan", ModifiedSheppLogan()},
		{"shifted thin ellipse at 31°", Ellipses{{Rho: 1, X0: 0.13, Y0: -0.21, A: 0.24, B: 0.06, ThetaDeg: 31}}},
	}
	box := func(kx, ky float64) float64 { return sinc(kx/n) * sinc(ky/n) }
	for _, c := range cases {
		ref := centredDFT2(c.e.Rasterize(n, n), n, kmax)
		at := func(kx, ky int) complex128 { return ref[(ky+kmax)*(2*kmax+1)+kx+kmax] }
		f0 := math.Abs(ellipseIntegral(c.e))
		var worst float64
		for ky := -kmax; ky <= kmax; ky++ {
			for kx := -kmax; kx <= kmax; kx++ {
				want := at(kx, ky) / complex(box(float64(kx), float64(ky)), 0)
				got := c.e.Spectrum(float64(kx), float64(ky))
				worst = math.Max(worst, cmplx.Abs(got-want)/f0)
			}
		}
		t.Logf("%s: worst |F − DFT/(N·sinc)| / F(0) over |k| ≤ %d: %.3g", c.name, kmax, worst)
		if worst > 5e-6 {
			t.Errorf("%s: analytic spectrum differs from the FFT of the raster by %.3g of F(0)", c.name, worst)
		}
		for _, k := range [][2]int{{0, 0}, {3, -1}, {16, 0}, {-7, 16}, {16, 16}} {
			kx, ky := float64(k[0]), float64(k[1])
			sum := c.e.Spectrum(kx, ky) * complex(box(kx, ky), 0)
			for a := -amax; a <= amax; a++ {
				for b := -amax; b <= amax; b++ {
					if a == 0 && b == 0 {
						continue
					}
					ux, uy := kx+float64(a*n), ky+float64(b*n)
					sum += c.e.Spectrum(ux, uy) * complex(box(ux, uy), 0)
				}
			}
			d := cmplx.Abs(sum-at(k[0], k[1])) / f0
			if d > 1e-9 {
				t.Errorf("%s k=%v: Poisson sum of the analytic spectrum differs from the DFT by %.3g of F(0)", c.name, k, d)
			}
		}
	}
}

func TestSupport(t *testing.T) {
	// The support is the set of pixel centres inside the outer ellipse of the
	// published table: (x/a)² + (y/b)² ≤ 1 with a = 0.69/2, b = 0.92/2.
	const nx, ny = 120, 90
	sup := ModifiedSheppLogan().Support(nx, ny)
	count := 0
	for i := range ny {
		y := float64(i-ny/2) / ny
		for j := range nx {
			x := float64(j-nx/2) / nx
			want := (x/0.345)*(x/0.345)+(y/0.46)*(y/0.46) <= 1
			if sup[i*nx+j] != want {
				t.Errorf("pixel (%d,%d): support %v, want %v", i, j, sup[i*nx+j], want)
			}
			if want {
				count++
			}
		}
	}
	if count == 0 {
		t.Fatal("empty support")
	}
}

func TestCartesianSpectrumLayout(t *testing.T) {
	// Sample (m, n) holds √(nx·ny)·F(n − nx/2, m − ny/2) (the package's
	// centred grid convention); the separable-phase fast path must agree with
	// the direct formula, and a phantom behind the plain interface takes the
	// generic path.
	type plain struct{ Phantom }
	e := ModifiedSheppLogan()
	for _, sz := range [][2]int{{16, 16}, {15, 9}, {8, 13}} {
		nx, ny := sz[0], sz[1]
		for _, p := range []Phantom{e, plain{e}} {
			k := CartesianSpectrum(p, nx, ny)
			for m := range ny {
				for n := range nx {
					want := CartesianSample(e, float64(n-nx/2), float64(m-ny/2), nx, ny)
					if cmplx.Abs(k[m*nx+n]-want) > 1e-12 {
						t.Fatalf("%T %dx%d (%d,%d): %v, want %v", p, nx, ny, m, n, k[m*nx+n], want)
					}
				}
			}
			if dc := k[(ny/2)*nx+nx/2]; math.Abs(real(dc)-math.Sqrt(float64(nx*ny))*ellipseIntegral(e)) > 1e-12 {
				t.Errorf("%dx%d: DC %v not at (ny/2, nx/2)", nx, ny, dc)
			}
		}
	}
}

func ExampleModifiedSheppLogan() {
	p := ModifiedSheppLogan()
	img := p.Rasterize(256, 256)
	// Row 17 of 256 lies in the skull above the brain, row 128 at the centre.
	fmt.Printf("centre %.1f, skull %.1f\n", img[128*256+128], img[17*256+128])
	fmt.Printf("F(0,0) = %.5f\n", real(p.Spectrum(0, 0)))
	k := CartesianSpectrum(p, 256, 256)
	fmt.Printf("DC sample = %.4f\n", real(k[128*256+128]))
	// Output:
	// centre 0.2, skull 1.0
	// F(0,0) = 0.12382
	// DC sample = 31.6969
}

func BenchmarkRasterize256(b *testing.B) {
	p := ModifiedSheppLogan()
	for b.Loop() {
		p.Rasterize(256, 256)
	}
}

func BenchmarkCartesianSpectrum256(b *testing.B) {
	p := ModifiedSheppLogan()
	for b.Loop() {
		CartesianSpectrum(p, 256, 256)
	}
}

func BenchmarkSpectrum(b *testing.B) {
	p := ModifiedSheppLogan()
	var s complex128
	for i := 0; b.Loop(); i++ {
		s += p.Spectrum(float64(i%64)-32.5, 7.25)
	}
	_ = s
}
