package simulate

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"fmt"
	"hash/crc32"
	"image"
	"image/color"
	"image/png"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"accelplan/simulate/nifti"

	dspfft "github.com/mjibson/go-dsp/fft"
)

// testObject returns an ny×nx image of seeded random values in [0, 1) with
// a zero border of width `border` pixels.
func testObject(ny, nx, border int, seed uint64) []float64 {
	rng := rand.New(rand.NewPCG(seed, 7))
	img := make([]float64, ny*nx)
	for i := border; i < ny-border; i++ {
		for j := border; j < nx-border; j++ {
			img[i*nx+j] = rng.Float64()
		}
	}
	return img
}

func mustImagePhantom(t testing.TB, img []float64, ny, nx int) *ImagePhantom {
	t.Helper()
	p, err := NewImagePhantom(img, ny, nx)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// bruteSpectrum is the pixel sum of the box-pixel transform written out term
// by term, each phase from its own Sincos: the definition, independent of
// the table and direct-sum paths.
func bruteSpectrum(img []float64, ny, nx int, kx, ky float64) complex128 {
	var s complex128
	for i := range ny {
		y := float64(i-ny/2) / float64(ny)
		for j := range nx {
			x := float64(j-nx/2) / float64(nx)
			sn, cs := math.Sincos(-2 * math.Pi * (kx*x + ky*y))
			s += complex(img[i*nx+j]*cs, img[i*nx+j]*sn)
		}
	}
	t := func(u float64) float64 {
		if u == 0 {
			return 1
		}
		return math.Sin(math.Pi*u) / (math.Pi * u)
	}
	return s * complex(t(kx/float64(nx))*t(ky/float64(ny))/float64(nx*ny), 0)
}

// The transform at k = 0 is the object's integral, Σ v·(pixel area)
// (definition of the Fourier transform), on both the grid path and, just off
// zero, the direct path.
func TestImagePhantomSpectrumAtZero(t *testing.T) {
	for _, sz := range [][2]int{{8, 8}, {7, 10}, {33, 17}} {
		ny, nx := sz[0], sz[1]
		img := testObject(ny, nx, 0, uint64(ny*nx))
		p := mustImagePhantom(t, img, ny, nx)
		var sum float64
		for _, v := range img {
			sum += v
		}
		want := sum / float64(ny*nx)
		if got := p.Spectrum(0, 0); cmplx.Abs(got-complex(want, 0)) > 1e-14*want {
			t.Errorf("%d×%d: F(0) = %v, want Σv·area = %v", ny, nx, got, want)
		}
		if got := p.Spectrum(1e-12, -1e-12); cmplx.Abs(got-complex(want, 0)) > 1e-12*want {
			t.Errorf("%d×%d: F(1e-12) = %v, want ≈ %v", ny, nx, got, want)
		}
	}
}

// An object made of one block of equal pixels is a rectangle, whose
// transform is the handbook formula w·h·sinc(kx·w)·sinc(ky·h)·exp(−2πi k·c)
// (Bracewell RN, The Fourier Transform and Its Applications, 2000, ch. 6):
// the pixel sums, both paths, must give it at integer and non-integer k.
func TestImagePhantomRectangleTransform(t *testing.T) {
	const ny, nx = 24, 20
	i0, i1, j0, j1 := 5, 15, 3, 9 // rows i0..i1-1, columns j0..j1-1
	img := make([]float64, ny*nx)
	for i := i0; i < i1; i++ {
		for j := j0; j < j1; j++ {
			img[i*nx+j] = 2.5
		}
	}
	p := mustImagePhantom(t, img, ny, nx)
	w, h := float64(j1-j0)/nx, float64(i1-i0)/ny
	cx := (float64(j0-nx/2) - 0.5 + float64(j1-j0)/2) / nx
	cy := (float64(i0-ny/2) - 0.5 + float64(i1-i0)/2) / ny
	sinc := func(u float64) float64 {
		if u == 0 {
			return 1
		}
		return math.Sin(math.Pi*u) / (math.Pi * u)
	}
	rng := rand.New(rand.NewPCG(3, 4))
	for n := range 200 {
		kx, ky := rng.Float64()*80-40, rng.Float64()*80-40
		if n%2 == 0 {
			kx, ky = math.Round(kx), math.Round(ky)
		}
		sn, cs := math.Sincos(-2 * math.Pi * (kx*cx + ky*cy))
		want := complex(2.5*w*h*sinc(kx*w)*sinc(ky*h), 0) * complex(cs, sn)
		if got := p.Spectrum(kx, ky); cmplx.Abs(got-want) > 1e-14 {
			t.Fatalf("F(%g, %g) = %v, rectangle formula %v", kx, ky, got, want)
		}
	}
}

// The Cartesian values (one FFT of the object, then a lookup) equal the
// direct sum and the term-by-term definition at random grid points,
// within 1e-10 of F(0); so do direct evaluations at random off-grid points.
func TestImagePhantomCartesianMatchesDirect(t *testing.T) {
	for _, sz := range [][2]int{{64, 64}, {45, 52}, {37, 29}} {
		ny, nx := sz[0], sz[1]
		img := testObject(ny, nx, 2, uint64(ny+nx))
		p := mustImagePhantom(t, img, ny, nx)
		f0 := real(p.Spectrum(0, 0))
		rng := rand.New(rand.NewPCG(uint64(ny), uint64(nx)))
		for range 100 {
			kx := float64(rng.IntN(4*nx) - 2*nx) // beyond the object's own band too
			ky := float64(rng.IntN(4*ny) - 2*ny)
			grid := p.Spectrum(kx, ky)
			direct := p.directSpectrum(kx, ky)
			brute := bruteSpectrum(img, ny, nx, kx, ky)
			if cmplx.Abs(grid-direct) > 1e-10*f0 || cmplx.Abs(grid-brute) > 1e-10*f0 {
				t.Fatalf("%d×%d at (%g, %g): FFT %v, direct %v, definition %v", ny, nx, kx, ky, grid, direct, brute)
			}
			kx, ky = rng.Float64()*float64(nx)-float64(nx)/2, rng.Float64()*float64(ny)-float64(ny)/2
			if d, b := p.Spectrum(kx, ky), bruteSpectrum(img, ny, nx, kx, ky); cmplx.Abs(d-b) > 1e-10*f0 {
				t.Fatalf("%d×%d at (%g, %g): direct %v, definition %v", ny, nx, kx, ky, d, b)
			}
		}
	}
}

// The tables on the lattices 1/2, 1/3 and 1/4 (for receive-array spectra)
// equal the definition too, and the default receive array's Cartesian
// spectra of an image object (CoilArray.CartesianSpectra, which evaluates
// the phantom on the half-integer lattice) equal Σ_t c_t·F(k − f_t) summed
// from the definition.
func TestImagePhantomLattice(t *testing.T) {
	const ny, nx = 26, 22
	img := testObject(ny, nx, 2, 17)
	p := mustImagePhantom(t, img, ny, nx)
	f0 := real(p.Spectrum(0, 0))
	rng := rand.New(rand.NewPCG(5, 6))
	for _, L := range []int{2, 3, 4} {
		for range 50 {
			kx := float64(rng.IntN(6*L*nx)-3*L*nx) / float64(L)
			ky := float64(rng.IntN(6*L*ny)-3*L*ny) / float64(L)
			if got, want := p.Spectrum(kx, ky), bruteSpectrum(img, ny, nx, kx, ky); cmplx.Abs(got-want) > 1e-10*f0 {
				t.Fatalf("L = %d, (%g, %g): %v, definition %v", L, kx, ky, got, want)
			}
		}
		if p.lattice[L].dft == nil {
			t.Errorf("lattice 1/%d was not tabulated", L)
		}
	}
	ring, err := DefaultCoilRing(4).Build()
	if err != nil {
		t.Fatal(err)
	}
	const gy, gx = 12, 10
	spectra, err := ring.CartesianSpectra(p, gy, gx)
	if err != nil {
		t.Fatal(err)
	}
	for _, q := range []int{0, 17, gy*gx/2 + gx/2, gy*gx - 1} {
		kx, ky := float64(q%gx-gx/2), float64(q/gx-gy/2)
		for c := range ring.Coils() {
			var want complex128
			for tt, w := range ring.Coef[c] {
				want += w * bruteSpectrum(img, ny, nx, kx-ring.FX[tt], ky-ring.FY[tt])
			}
			want *= complex(math.Sqrt(gy*gx), 0)
			if got := spectra[c][q]; cmplx.Abs(got-want) > 1e-9*f0 {
				t.Fatalf("coil %d, k = (%g, %g): %v, definition %v", c, kx, ky, got, want)
			}
		}
	}
}

// SpectrumPoints: exact (Spectrum) on lattices and outside the band, the
// NUFFT inside it within the accuracy its doc states, here measured as the
// relative 2-norm error against the definition over random points.
func TestImagePhantomSpectrumPoints(t *testing.T) {
	const ny, nx = 40, 36
	img := testObject(ny, nx, 2, 23)
	p := mustImagePhantom(t, img, ny, nx)
	rng := rand.New(rand.NewPCG(8, 9))
	n := 400
	kx, ky := make([]float64, n), make([]float64, n)
	for j := range n {
		kx[j] = (rng.Float64() - 0.5) * nx
		ky[j] = (rng.Float64() - 0.5) * ny
	}
	kx[0], ky[0] = 3, -4       // a grid point
	kx[1], ky[1] = 30.25, 1.7  // outside the band
	kx[2], ky[2] = -nx/2, ny/2 // the band edge
	got, err := p.SpectrumPoints(kx, ky)
	if err != nil {
		t.Fatal(err)
	}
	var num, den float64
	for j := range n {
		want := bruteSpectrum(img, ny, nx, kx[j], ky[j])
		d := cmplx.Abs(got[j] - want)
		num += d * d
		den += cmplx.Abs(want) * cmplx.Abs(want)
		if j < 2 && d > 1e-14 {
			t.Errorf("point %d (%g, %g) should be exact: %v vs %v", j, kx[j], ky[j], got[j], want)
		}
	}
	rel := math.Sqrt(num / den)
	t.Logf("relative error of the NUFFT path: %.2e", rel)
	if rel > 1e-6 {
		t.Errorf("relative error %.2e, documented about 1e-7", rel)
	}
	if _, err := p.SpectrumPoints([]float64{1}, nil); err == nil {
		t.Error("mismatched lengths: no error")
	}
	if _, err := p.SpectrumPoints([]float64{math.NaN()}, []float64{0}); err == nil {
		t.Error("NaN point: no error")
	}
}

// Spectrum allocates nothing once warm, on and off the lattices.
func TestImagePhantomSpectrumAllocatesNothing(t *testing.T) {
	p := mustImagePhantom(t, testObject(32, 32, 0, 2), 32, 32)
	p.Spectrum(1, 2)
	p.Spectrum(0.3, 0.7)
	if n := testing.AllocsPerRun(50, func() { p.Spectrum(3, -5) }); n != 0 {
		t.Errorf("grid point: %v allocations", n)
	}
	if n := testing.AllocsPerRun(50, func() { p.Spectrum(0.31, -5.2) }); n != 0 {
		t.Errorf("off-grid point: %v allocations", n)
	}
}

// The inverse crime spelled out: on the object's own grid, the Cartesian
// data CartesianSpectrum draws are exactly the orthonormal centred DFT of
// the rasterised truth (computed here by go-dsp's FFT2, an outside
// implementation) times the box taper sinc(kx/N)·sinc(ky/N). This is why
// ForGrid refines such an object.
func TestImagePhantomCrimeIdentity(t *testing.T) {
	const ny, nx = 16, 12
	img := testObject(ny, nx, 1, 11)
	p := mustImagePhantom(t, img, ny, nx)
	if !p.InverseCrime(ny, nx) {
		t.Fatal("own grid not reported as the inverse crime")
	}
	data := CartesianSpectrum(p, nx, ny)
	// Centred DFT: ifftshift, FFT2, fftshift, orthonormal scaling.
	x := make([][]complex128, ny)
	truth := p.Rasterize(nx, ny)
	for i := range x {
		x[i] = make([]complex128, nx)
		for j := range x[i] {
			x[i][j] = complex(truth[((i+ny/2)%ny)*nx+(j+nx/2)%nx], 0) // ifftshift for even sizes
		}
	}
	X := dspfft.FFT2(x)
	sinc := func(u float64) float64 {
		if u == 0 {
			return 1
		}
		return math.Sin(math.Pi*u) / (math.Pi * u)
	}
	for m := range ny {
		for n := range nx {
			ky, kx := m-ny/2, n-nx/2
			dft := X[(m+ny/2)%ny][(n+nx/2)%nx] / complex(math.Sqrt(ny*nx), 0)
			want := dft * complex(sinc(float64(kx)/nx)*sinc(float64(ky)/ny), 0)
			if cmplx.Abs(data[m*nx+n]-want) > 1e-12 {
				t.Fatalf("k = (%d, %d): data %v, tapered DFT of the truth %v", kx, ky, data[m*nx+n], want)
			}
		}
	}
}

// overlap1D is the length of [a0, a1] ∩ [b0, b1].
func overlap1D(a0, a1, b0, b1 float64) float64 { return max(0, min(a1, b1)-max(a0, b0)) }

// Rasterize is the exact area average: the identity on the object's own
// grid, the integral conserved on other grids (object inside the common
// extent), and each value the overlap-weighted sum written out with
// floating-point interval overlaps.
func TestImagePhantomRasterize(t *testing.T) {
	const ny, nx = 30, 24
	img := testObject(ny, nx, 3, 5)
	p := mustImagePhantom(t, img, ny, nx)
	own := p.Rasterize(nx, ny)
	for q := range img {
		if own[q] != img[q] {
			t.Fatalf("own grid pixel %d: %g, want %g", q, own[q], img[q])
		}
	}
	integral := real(p.Spectrum(0, 0))
	for _, sz := range [][2]int{{15, 12}, {10, 8}, {31, 25}, {64, 48}, {90, 72}, {17, 13}, {45, 36}} {
		ty, tx := sz[0], sz[1]
		r := p.Rasterize(tx, ty)
		var sum float64
		for _, v := range r {
			sum += v
		}
		sum /= float64(tx * ty)
		if math.Abs(sum-integral) > 1e-13*integral {
			t.Errorf("%d×%d: integral %v, object's %v", ty, tx, sum, integral)
		}
		// Independent check of a few pixels.
		for _, q := range []int{0, len(r) / 3, len(r) / 2, len(r) - tx/2} {
			ti, tj := q/tx, q%tx
			ylo := (float64(ti-ty/2) - 0.5) / float64(ty)
			xlo := (float64(tj-tx/2) - 0.5) / float64(tx)
			var want float64
			for i := range ny {
				oy := overlap1D(ylo, ylo+1/float64(ty), (float64(i-ny/2)-0.5)/ny, (float64(i-ny/2)+0.5)/ny)
				for j := range nx {
					ox := overlap1D(xlo, xlo+1/float64(tx), (float64(j-nx/2)-0.5)/nx, (float64(j-nx/2)+0.5)/nx)
					want += img[i*nx+j] * ox * oy
				}
			}
			want *= float64(tx * ty)
			if math.Abs(r[q]-want) > 1e-12 {
				t.Errorf("%d×%d pixel (%d, %d): %v, overlap sum %v", ty, tx, ti, tj, r[q], want)
			}
		}
	}
	if p.Rasterize(0, 4) != nil || p.Support(4, -1) != nil {
		t.Error("non-positive size should give nil")
	}
}

// Support: pixels above 5% of the largest value, plus the dark holes they
// enclose; the background around is out.
func TestImagePhantomSupport(t *testing.T) {
	const n = 40
	img := make([]float64, n*n)
	for i := range n {
		for j := range n {
			r := math.Hypot(float64(i-n/2), float64(j-n/2))
			switch {
			case r < 6: // dark centre (a ventricle), below 5%
				img[i*n+j] = 0.01
			case r < 15:
				img[i*n+j] = 1
			default:
				img[i*n+j] = 0.04 // background noise below 5%
			}
		}
	}
	p := mustImagePhantom(t, img, n, n)
	s := p.Support(n, n)
	for i := range n {
		for j := range n {
			r := math.Hypot(float64(i-n/2), float64(j-n/2))
			if want := r < 15; s[i*n+j] != want {
				t.Fatalf("pixel (%d, %d) at r = %.1f: support %v, want %v", i, j, r, s[i*n+j], want)
			}
		}
	}
}

// The detector of the exact inverse crime and the finer-grid ratio.
func TestImagePhantomInverseCrime(t *testing.T) {
	p := mustImagePhantom(t, testObject(64, 48, 0, 1), 64, 48)
	cases := []struct {
		ny, nx int
		crime  bool
		finer  float64
	}{
		{64, 48, true, 1},         // the same grid
		{192, 144, true, 1.0 / 3}, // 3× finer reconstruction: object pixels are 3×3 blocks
		{128, 96, false, 0.5},     // 2×: centred grids put object edges mid-pixel
		{32, 24, false, 2},        // object twice as fine
		{64, 144, true, 1.0 / 3},  // same rows, 3× finer columns
		{64, 96, false, 0.5},
		{60, 48, false, 1},
	}
	for _, c := range cases {
		if got := p.InverseCrime(c.ny, c.nx); got != c.crime {
			t.Errorf("InverseCrime(%d, %d) = %v, want %v", c.ny, c.nx, got, c.crime)
		}
		if got := p.Finer(c.ny, c.nx); math.Abs(got-c.finer) > 1e-15 {
			t.Errorf("Finer(%d, %d) = %v, want %v", c.ny, c.nx, got, c.finer)
		}
	}
	// On an odd multiple the object is piecewise constant on the
	// reconstruction pixels: object pixel j, centred at (j − 24)/48, covers
	// the reconstruction pixels 3j − 1 … 3j + 1 (centred at (t − 72)/144),
	// and the last reconstruction row and column lie beyond the object.
	r := p.Rasterize(144, 192)
	for i := range 192 {
		for j := range 144 {
			want := 0.0
			if oi, oj := (i+1)/3, (j+1)/3; oi < 64 && oj < 48 {
				want = p.v[oi*48+oj]
			}
			if r[i*144+j] != want {
				t.Fatalf("3× grid pixel (%d, %d) = %g, want its object pixel's value %g", i, j, r[i*144+j], want)
			}
		}
	}
}

// The cubic convolution kernel of Keys (1981, a = −½): interpolating
// (1 at 0, 0 at ±1 and ±2), W(½) = 9/16, W(3/2) = −1/16 (values from the
// kernel's formula, memory), and it reproduces quadratics exactly away from
// the edges, the third-order accuracy shown in that paper (memory).
func TestKeysKernel(t *testing.T) {
	for s, want := range map[float64]float64{0: 1, 1: 0, -1: 0, 2: 0, -2: 0, 0.5: 9.0 / 16, -1.5: -1.0 / 16, 2.5: 0} {
		if got := keys(s); math.Abs(got-want) > 1e-15 {
			t.Errorf("W(%g) = %g, want %g", s, got, want)
		}
	}
	const ny, nx = 12, 10
	quad := func(y, x float64) float64 { return 1 + 0.3*x - 0.2*y + 0.05*x*x + 0.03*x*y - 0.04*y*y }
	img := make([]float64, ny*nx)
	for i := range ny {
		for j := range nx {
			img[i*nx+j] = quad(float64(i), float64(j))
		}
	}
	uy := []float64{2, 2.5, 3.25, 7.9, 8.999}
	ux := []float64{2.1, 4.5, 6.75, 7}
	out := cubicResample(img, ny, nx, uy, ux)
	for I, y := range uy {
		for J, x := range ux {
			if got, want := out[I*len(ux)+J], quad(y, x); math.Abs(got-want) > 1e-13 {
				t.Errorf("at (%g, %g): %.15g, quadratic %.15g", y, x, got, want)
			}
		}
	}
}

type bicubicFixture struct {
	Rows, Cols, Factor int
	Src, Out           []float64
}

// Pillow's BICUBIC resize (Pillow 9.4.0, testdata/imagephantom_make_fixture.py)
// is cubic convolution with a = −½, output pixel J centred at input
// position (J + ½)/f − ½; with those positions our resampler gives Pillow's
// values wherever no tap falls outside the image (Pillow renormalises
// clipped taps at the edges, we repeat the edge pixel). Pillow holds mode-F
// pixels as float32: agreement to 1e-6.
func TestCubicResampleMatchesPillow(t *testing.T) {
	raw, err := os.ReadFile(filepath.Join("testdata", "imagephantom_bicubic.json"))
	if err != nil {
		t.Fatal(err)
	}
	var fx bicubicFixture
	if err := json.Unmarshal(raw, &fx); err != nil {
		t.Fatal(err)
	}
	f := float64(fx.Factor)
	pos := func(n int) []float64 {
		u := make([]float64, n*fx.Factor)
		for J := range u {
			u[J] = (float64(J)+0.5)/f - 0.5
		}
		return u
	}
	uy, ux := pos(fx.Rows), pos(fx.Cols)
	out := cubicResample(fx.Src, fx.Rows, fx.Cols, uy, ux)
	inside := func(u float64, n int) bool { return u >= 1 && u <= float64(n)-2 }
	mx := len(ux)
	checked := 0
	for I, y := range uy {
		for J, x := range ux {
			if !inside(y, fx.Rows) || !inside(x, fx.Cols) {
				continue
			}
			checked++
			if got, want := out[I*mx+J], fx.Out[I*mx+J]; math.Abs(got-want) > 1e-6 {
				t.Errorf("output (%d, %d): %.8g, Pillow %.8g", I, J, got, want)
			}
		}
	}
	if checked < 100 {
		t.Fatalf("only %d interior pixels compared", checked)
	}
}

// Refine: sizes, clipping to the image's range, the spacing, the limits; a
// refined object keeps the integral to within the interpolation's error.
func TestRefine(t *testing.T) {
	const n = 20
	img := make([]float64, n*n)
	for i := range n {
		for j := n / 2; j < n; j++ {
			img[i*n+j] = 1 // a step: cubic interpolation would overshoot
		}
	}
	p := mustImagePhantom(t, img, n, n)
	p.pixelMM = [2]float64{1.2, 0.9}
	r, err := p.Refine(3)
	if err != nil {
		t.Fatal(err)
	}
	if ny, nx := r.Size(); ny != 3*n || nx != 3*n {
		t.Fatalf("refined size %d×%d", ny, nx)
	}
	if lo, hi := r.Range(); lo < 0 || hi > 1 {
		t.Errorf("refined range [%g, %g] leaves the image's [0, 1]", lo, hi)
	}
	if pm := r.PixelMM(); math.Abs(pm[0]-0.4) > 1e-15 || math.Abs(pm[1]-0.3) > 1e-15 {
		t.Errorf("refined spacing %v", pm)
	}
	// Odd factor: every old pixel centre is a new pixel centre, where the
	// interpolation returns the old value.
	for i := range n {
		for j := range n {
			if got := r.v[(3*i)*3*n+3*j]; got != img[i*n+j] {
				t.Fatalf("old centre (%d, %d): %g, want %g", i, j, got, img[i*n+j])
			}
		}
	}
	if same, _ := p.Refine(1); !slicesEqual(same.v, p.v) {
		t.Error("Refine(1) is not a copy")
	}
	for _, f := range []int{0, -2, 17} {
		if _, err := p.Refine(f); err == nil || !strings.Contains(err.Error(), "1 to 16") {
			t.Errorf("Refine(%d): %v", f, err)
		}
	}
	bigImg := make([]float64, 4096*2)
	bigImg[0] = 1
	big := mustImagePhantom(t, bigImg, 2, 4096)
	if _, err := big.Refine(3); err == nil || !strings.Contains(err.Error(), "more than allowed") {
		t.Errorf("oversized refinement: %v", err)
	}
}

func slicesEqual(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// ForGrid: the plans' default (refine to at least 2× finer, warn).
func TestForGrid(t *testing.T) {
	cases := []struct {
		obj, grid int
		want      int // refined size, 0 for unchanged
		crime     bool
	}{
		{256, 256, 512, true},
		{512, 256, 0, false},
		{600, 256, 0, false},
		{300, 256, 600, false},
		{100, 256, 600, false},
		{128, 384, 768, true},
	}
	for _, c := range cases {
		p := mustImagePhantom(t, testObject(c.obj, c.obj, 0, 9), c.obj, c.obj)
		q, warn, err := p.ForGrid(c.grid, c.grid)
		if err != nil {
			t.Fatal(err)
		}
		ny, nx := q.Size()
		if c.want == 0 {
			if q != p || len(warn) != 0 {
				t.Errorf("%d for %d: changed to %d×%d, warnings %v", c.obj, c.grid, ny, nx, warn)
			}
			continue
		}
		if ny != c.want || nx != c.want || len(warn) != 1 {
			t.Fatalf("%d for %d: got %d×%d and %d warnings, want %d", c.obj, c.grid, ny, nx, len(warn), c.want)
		}
		w := warn[0]
		if !strings.Contains(w, "inverse crime") || !strings.Contains(w, fmt.Sprintf("%d×%d", c.want, c.want)) ||
			!strings.Contains(w, fmt.Sprintf("at least %d×%d", 2*c.grid, 2*c.grid)) {
			t.Errorf("warning %q", w)
		}
		if strings.Contains(w, "itself") != c.crime {
			t.Errorf("%d for %d: warning %q should say whether the grids coincide (%v)", c.obj, c.grid, w, c.crime)
		}
		if q.Finer(c.grid, c.grid) < FinerFactor || q.InverseCrime(c.grid, c.grid) {
			t.Errorf("%d for %d: refined object still too coarse", c.obj, c.grid)
		}
	}
	p := mustImagePhantom(t, testObject(8, 8, 0, 1), 8, 8)
	if _, _, err := p.ForGrid(4096, 4096); err == nil || !strings.Contains(err.Error(), "cannot be refined enough") {
		t.Errorf("ForGrid beyond the limits: %v", err)
	}
	if _, _, err := p.ForGrid(0, 8); err == nil {
		t.Error("ForGrid(0, 8) gave no error")
	}
}

func TestNewImagePhantomRejects(t *testing.T) {
	cases := []struct {
		name   string
		img    []float64
		ny, nx int
		want   string
	}{
		{"zero size", nil, 0, 5, "both sizes must be ≥ 1"},
		{"length", make([]float64, 5), 2, 3, "has 5 values, want 2×3 = 6"},
		{"NaN", []float64{1, math.NaN(), 1, 1}, 2, 2, "NaN at row 0, column 1"},
		{"Inf", []float64{1, 1, math.Inf(-1), 1}, 2, 2, "-Inf at row 1, column 0"},
		{"all zero", make([]float64, 4), 2, 2, "no positive value"},
		{"too wide", nil, 1, MaxObjectSide + 1, "too large"},
	}
	for _, c := range cases {
		if _, err := NewImagePhantom(c.img, c.ny, c.nx); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one saying %q", c.name, err, c.want)
		}
	}
}

type pngFixture struct {
	Gray16 struct {
		Rows, Cols int
		Levels     []int
	}
	RGB struct {
		Rows, Cols int
		RGB        [][3]int
		LumaL      []int `json:"luma_L"`
	}
}

func loadPNGFixture(t *testing.T) pngFixture {
	t.Helper()
	raw, err := os.ReadFile(filepath.Join("testdata", "imagephantom_png.json"))
	if err != nil {
		t.Fatal(err)
	}
	var f pngFixture
	if err := json.Unmarshal(raw, &f); err != nil {
		t.Fatal(err)
	}
	return f
}

// PNG files written by Pillow 9.4.0 (testdata/imagephantom_make_fixture.py):
// 16-bit grey levels load as level/65535; an RGB one loads as its luma, with
// a warning, within half a level of Pillow's own 8-bit convert("L").
func TestLoadImagePhantomPillowPNG(t *testing.T) {
	f := loadPNGFixture(t)
	p, warn, err := LoadImagePhantom(filepath.Join("testdata", "imagephantom_gray16.png"))
	if err != nil {
		t.Fatal(err)
	}
	if ny, nx := p.Size(); ny != f.Gray16.Rows || nx != f.Gray16.Cols || len(warn) != 0 {
		t.Fatalf("16-bit PNG: %d×%d, warnings %v", ny, nx, warn)
	}
	for q, l := range f.Gray16.Levels {
		if p.v[q] != float64(l)/65535 {
			t.Fatalf("pixel %d: %g, want %d/65535", q, p.v[q], l)
		}
	}
	p, warn, err = LoadImagePhantom(filepath.Join("testdata", "imagephantom_rgb.png"))
	if err != nil {
		t.Fatal(err)
	}
	if len(warn) != 1 || !strings.Contains(warn[0], "colour") {
		t.Errorf("colour PNG warnings %v", warn)
	}
	for q, rgb := range f.RGB.RGB {
		want := (0.299*float64(rgb[0]) + 0.587*float64(rgb[1]) + 0.114*float64(rgb[2])) / 255
		if math.Abs(p.v[q]-want) > 1e-12 {
			t.Errorf("pixel %d: %g, luma %g", q, p.v[q], want)
		}
		if math.Abs(p.v[q]*255-float64(f.RGB.LumaL[q])) > 0.5+1e-9 {
			t.Errorf("pixel %d: %g levels, Pillow's L %d", q, p.v[q]*255, f.RGB.LumaL[q])
		}
	}
}

// A 16-bit PNG written by Go's image/png loads back level for level; 8-bit
// too; transparency is reported.
func TestLoadImagePhantomPNGRoundTrip(t *testing.T) {
	dir := t.TempDir()
	g16 := image.NewGray16(image.Rect(0, 0, 9, 6))
	g8 := image.NewGray(image.Rect(0, 0, 9, 6))
	na := image.NewNRGBA(image.Rect(0, 0, 9, 6))
	for i := range 6 {
		for j := range 9 {
			g16.SetGray16(j, i, color.Gray16{Y: uint16((i*9+j)*1201 + 1)})
			g8.SetGray(j, i, color.Gray{Y: uint8(i*9 + j*3 + 1)})
			na.SetNRGBA(j, i, color.NRGBA{R: 200, G: 200, B: 200, A: uint8(255 - i)})
		}
	}
	write := func(name string, m image.Image) string {
		var b bytes.Buffer
		if err := png.Encode(&b, m); err != nil {
			t.Fatal(err)
		}
		path := filepath.Join(dir, name)
		if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		return path
	}
	p, warn, err := LoadImagePhantom(write("g16.png", g16))
	if err != nil || len(warn) != 0 {
		t.Fatal(err, warn)
	}
	p8, _, err := LoadImagePhantom(write("g8.png", g8))
	if err != nil {
		t.Fatal(err)
	}
	for i := range 6 {
		for j := range 9 {
			if p.v[i*9+j] != float64(g16.Gray16At(j, i).Y)/65535 || p8.v[i*9+j] != float64(g8.GrayAt(j, i).Y)/255 {
				t.Fatalf("pixel (%d, %d): %g and %g", i, j, p.v[i*9+j], p8.v[i*9+j])
			}
		}
	}
	_, warn, err = LoadImagePhantom(write("alpha.png", na))
	if err != nil || len(warn) != 1 || !strings.Contains(warn[0], "transparent") {
		t.Errorf("alpha PNG: %v %v", err, warn)
	}
}

type niftiFixture struct {
	Nibabel string
	Ras     struct {
		Shape []int
		Data  []float64
	}
	Vol struct {
		Shape []int
		Data  []float64
	}
}

// NIfTI files written by nibabel 5.0.0 with the plain RAS affine (second
// index growing anterior) load with rows reversed, so row 0 is the most
// anterior, and keep their spacing; a volume needs a slice; a NaN is refused.
// A file written by package nifti's Encode (our orientation) loads unchanged.
func TestLoadImagePhantomNIfTI(t *testing.T) {
	raw, err := os.ReadFile(filepath.Join("testdata", "imagephantom_nifti.json"))
	if err != nil {
		t.Fatal(err)
	}
	var f niftiFixture
	if err := json.Unmarshal(raw, &f); err != nil {
		t.Fatal(err)
	}
	p, warn, err := LoadImagePhantom(filepath.Join("testdata", "imagephantom_ras.nii"))
	if err != nil || len(warn) != 0 {
		t.Fatal(err, warn)
	}
	nx, ny := f.Ras.Shape[0], f.Ras.Shape[1]
	for i := range ny {
		for j := range nx {
			if got, want := p.v[i*nx+j], f.Ras.Data[(ny-1-i)*nx+j]; got != want {
				t.Fatalf("row %d column %d: %g, want nibabel's voxel (%d, %d) = %g", i, j, got, j, ny-1-i, want)
			}
		}
	}
	if pm := p.PixelMM(); pm[0] != 0.5 || pm[1] != float64(float32(0.7)) {
		t.Errorf("spacing %v", pm)
	}
	if x, y, ok := p.FOVmm(); !ok || x != 2.5 || y != 4*float64(float32(0.7)) {
		t.Errorf("FOV %g×%g %v", x, y, ok)
	}
	volPath := filepath.Join("testdata", "imagephantom_vol.nii.gz")
	if _, _, err := LoadImagePhantom(volPath); err == nil || !strings.Contains(err.Error(), "volume of 3 slices (4×3×3 voxels); choose one slice (0 to 2)") {
		t.Errorf("volume without a slice: %v", err)
	}
	vx, vy := f.Vol.Shape[0], f.Vol.Shape[1]
	for k := range 3 {
		v, _, err := LoadImagePhantomSlice(volPath, k)
		if err != nil {
			t.Fatal(err)
		}
		for i := range vy {
			for j := range vx {
				if got, want := v.v[i*vx+j], f.Vol.Data[k*vx*vy+(vy-1-i)*vx+j]; got != want {
					t.Fatalf("slice %d row %d column %d: %g, want %g", k, i, j, got, want)
				}
			}
		}
	}
	if _, _, err := LoadImagePhantomSlice(volPath, 3); err == nil || !strings.Contains(err.Error(), "slice 3 asked of a NIfTI image of 3 slice(s)") {
		t.Errorf("slice out of range: %v", err)
	}
	if _, _, err := LoadImagePhantom(filepath.Join("testdata", "imagephantom_nan.nii")); err == nil || !strings.Contains(err.Error(), "is NaN; every value must be finite") {
		t.Errorf("NaN voxel: %v", err)
	}
	// Our own orientation round trip, with a negative value warned about.
	img := []float64{1, 2, 3, 4, 5, 6, 7, 8, -0.5, 10, 11, 12}
	var b bytes.Buffer
	if err := nifti.Encode(&b, img, []int{4, 3}, []float64{0.8, 0.8}, ""); err != nil {
		t.Fatal(err)
	}
	q, warn, err := ReadImagePhantom(&b, -1)
	if err != nil {
		t.Fatal(err)
	}
	if !slicesEqual(q.v, img) || len(warn) != 1 || !strings.Contains(warn[0], "negative values (down to -0.5)") {
		t.Errorf("Encode round trip: %v, warnings %v", q.v, warn)
	}
}

// pngWithSize returns a valid 1×1 grey PNG whose IHDR claims w×h pixels
// (CRC fixed up), for the size limits.
func pngWithSize(t *testing.T, w, h uint32) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := png.Encode(&b, image.NewGray(image.Rect(0, 0, 1, 1))); err != nil {
		t.Fatal(err)
	}
	raw := b.Bytes()
	// Signature (8), IHDR length (4), "IHDR" (4), width, height, …, CRC at 29.
	binary.BigEndian.PutUint32(raw[16:], w)
	binary.BigEndian.PutUint32(raw[20:], h)
	binary.BigEndian.PutUint32(raw[29:], crc32.ChecksumIEEE(raw[12:29]))
	return raw
}

// Files that are not images, broken ones, empty ones and oversized ones are
// refused with a message naming the file.
func TestLoadImagePhantomRejects(t *testing.T) {
	dir := t.TempDir()
	var good bytes.Buffer
	png.Encode(&good, image.NewGray16(image.Rect(0, 0, 4, 4)))
	var vol bytes.Buffer
	if err := nifti.Encode(&vol, make([]float64, 8), []int{2, 2, 2}, []float64{1, 1, 1}, ""); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name string
		data []byte
		want string
	}{
		{"empty.png", nil, "the file is empty"},
		{"text.png", []byte("a plan, not a picture\n"), "not a PNG or NIfTI-1 image"},
		{"cut.png", good.Bytes()[:40], "corrupt PNG"},
		{"black.png", good.Bytes(), "no positive value"},
		{"wide.png", pngWithSize(t, 5000, 10), "PNG of 5000×10 pixels; at most 4096 per side"},
		{"zero.png", pngWithSize(t, 0, 10), "corrupt PNG"},
		{"vol.nii", vol.Bytes(), "NIfTI volume of 2 slices"},
		{"cut.nii", vol.Bytes()[:360], "header says 2×2×2 float32 = 32 bytes after offset 352"},
	}
	for _, c := range cases {
		path := filepath.Join(dir, c.name)
		if err := os.WriteFile(path, c.data, 0o644); err != nil {
			t.Fatal(err)
		}
		_, _, err := LoadImagePhantom(path)
		if err == nil || !strings.Contains(err.Error(), c.want) || !strings.Contains(err.Error(), path) {
			t.Errorf("%s: error %v, want one naming the file and saying %q", c.name, err, c.want)
		}
	}
	if _, _, err := LoadImagePhantom(filepath.Join(dir, "missing.png")); err == nil {
		t.Error("missing file: no error")
	}
}

// FuzzLoadImagePhantom feeds arbitrary bytes, seeded with the PNG and NIfTI
// fixtures, to the loader: an error or a valid object, never a panic. PNG
// inputs that claim more than 256×256 pixels are skipped to keep each run
// small (the limit itself is tested above).
func FuzzLoadImagePhantom(f *testing.F) {
	for _, name := range []string{"imagephantom_gray16.png", "imagephantom_rgb.png", "imagephantom_ras.nii", "imagephantom_vol.nii.gz", "imagephantom_nan.nii"} {
		b, err := os.ReadFile(filepath.Join("testdata", name))
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b, int8(-1))
		f.Add(b, int8(1))
	}
	f.Fuzz(func(t *testing.T, b []byte, slice int8) {
		if len(b) > 1<<16 {
			return
		}
		if cfg, err := png.DecodeConfig(bytes.NewReader(b)); err == nil && cfg.Width*cfg.Height > 256*256 {
			return
		}
		p, _, err := ReadImagePhantom(bytes.NewReader(b), int(slice))
		if err != nil {
			if p != nil {
				t.Fatal("object returned with an error")
			}
			return
		}
		ny, nx := p.Size()
		if ny < 1 || nx < 1 || len(p.v) != ny*nx || !(p.hi > 0) {
			t.Fatalf("invalid object %d×%d, %d values, max %g", ny, nx, len(p.v), p.hi)
		}
		for _, v := range p.v {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				t.Fatal("non-finite value in a loaded object")
			}
		}
	})
}

// ExampleImagePhantom_ForGrid loads nothing from disk: it makes a 64×64
// object and asks for one fit to simulate a 64×64 reconstruction from.
func ExampleImagePhantom_ForGrid() {
	img := make([]float64, 64*64)
	for i := 16; i < 48; i++ {
		for j := 20; j < 44; j++ {
			img[i*64+j] = 1
		}
	}
	p, err := NewImagePhantom(img, 64, 64)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("same grid is the inverse crime:", p.InverseCrime(64, 64))
	q, warnings, err := p.ForGrid(64, 64)
	if err != nil {
		fmt.Println(err)
		return
	}
	ny, nx := q.Size()
	fmt.Println("simulate on", ny, "×", nx, "with", len(warnings), "warning")
	fmt.Printf("integral %.4f (the block covers 0.1875 of the FOV)\n", real(q.Spectrum(0, 0)))
	// Output:
	// same grid is the inverse crime: true
	// simulate on 128 × 128 with 1 warning
	// integral 0.1875 (the block covers 0.1875 of the FOV)
}

func BenchmarkImagePhantomSpectrumDirect512(b *testing.B) {
	p := mustImagePhantom(b, testObject(512, 512, 0, 1), 512, 512)
	b.ResetTimer()
	for n := range b.N {
		p.Spectrum(0.37+float64(n%7), -12.61)
	}
}

// The generic CartesianSpectrum path on a 256² grid from a 512² object:
// one FFT of the object, then one lookup per point.
func BenchmarkImagePhantomCartesian256From512(b *testing.B) {
	img := testObject(512, 512, 0, 1)
	for b.Loop() {
		p := mustImagePhantom(b, img, 512, 512)
		CartesianSpectrum(p, 256, 256)
	}
}

// 20 000 scattered points from a 512² object at once (the NUFFT path);
// compare with 20 000 × BenchmarkImagePhantomSpectrumDirect512.
func BenchmarkImagePhantomSpectrumPoints512(b *testing.B) {
	p := mustImagePhantom(b, testObject(512, 512, 0, 1), 512, 512)
	rng := rand.New(rand.NewPCG(1, 2))
	kx, ky := make([]float64, 20000), make([]float64, 20000)
	for j := range kx {
		kx[j], ky[j] = (rng.Float64()-0.5)*256, (rng.Float64()-0.5)*256
	}
	for b.Loop() {
		if _, err := p.SpectrumPoints(kx, ky); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkImagePhantomRasterize512To256(b *testing.B) {
	p := mustImagePhantom(b, testObject(512, 512, 0, 1), 512, 512)
	for b.Loop() {
		p.Rasterize(256, 256)
	}
}

func BenchmarkImagePhantomRefine256x2(b *testing.B) {
	p := mustImagePhantom(b, testObject(256, 256, 0, 1), 256, 256)
	for b.Loop() {
		p.Refine(2)
	}
}

// ExampleLoadImagePhantom loads a 16-bit greyscale PNG (a small test
// pattern) as the object.
func ExampleLoadImagePhantom() {
	p, warnings, err := LoadImagePhantom(filepath.Join("testdata", "imagephantom_gray16.png"))
	if err != nil {
		fmt.Println(err)
		return
	}
	ny, nx := p.Size()
	lo, hi := p.Range()
	fmt.Println(ny, "rows,", nx, "columns, values", lo, "to", hi, "warnings:", len(warnings))
	// Output: 7 rows, 5 columns, values 0 to 1 warnings: 0
}
