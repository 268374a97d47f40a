package simulate

import (
	"encoding/json"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/mjibson/go-dsp/fft"
	"gonum.org/v1/gonum/dsp/fourier"
	"gonum.org/v1/gonum/mat"

	"accelplan/simulate/nufft"
)

// coilBesselFixture is testdata/coils_bessel.json, written by
// testdata/coils_make_bessel.py with SciPy 1.10.1 (scipy.special.iv and jv).
type coilBesselFixture struct {
	Library string `json:"library"`
	IV      []struct {
		N   int     `json:"n"`
		ReZ float64 `json:"re_z"`
		ImZ float64 `json:"im_z"`
		Re  float64 `json:"re"`
		Im  float64 `json:"im"`
	} `json:"iv"`
	JV []struct {
		N int     `json:"n"`
		X float64 `json:"x"`
		V float64 `json:"v"`
	} `json:"jv"`
}

func loadCoilBessel(t *testing.T) coilBesselFixture {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", "coils_bessel.json"))
	if err != nil {
		t.Fatal(err)
	}
	var f coilBesselFixture
	if err := json.Unmarshal(b, &f); err != nil {
		t.Fatal(err)
	}
	return f
}

// The series for I_n(z) (Abramowitz & Stegun 9.6.10) and J_n(x) = i^(−n)
// I_n(ix) against SciPy 1.10.1's scipy.special.iv and jv. The bound is
// 1e-12 relative plus 1e-15·e^{|z|} absolute, the rounding scale of a power
// series whose largest term is about e^{|z|}; the worst ratio of error to
// bound is reported.
func TestBesselMatchesSciPy(t *testing.T) {
	f := loadCoilBessel(t)
	if len(f.IV) == 0 || len(f.JV) == 0 {
		t.Fatal("empty fixture")
	}
	var worstI, worstJ float64
	for _, r := range f.IV {
		z := complex(r.ReZ, r.ImZ)
		want := complex(r.Re, r.Im)
		got := besselI(r.N, z)
		bound := 1e-12*cmplx.Abs(want) + 1e-15*math.Exp(cmplx.Abs(z))
		d := cmplx.Abs(got - want)
		worstI = math.Max(worstI, d/bound)
		if d > bound {
			t.Errorf("I_%d(%v) = %v, SciPy %v (error %.2g, bound %.2g)", r.N, z, got, want, d, bound)
		}
	}
	for _, r := range f.JV {
		got := besselJ(r.N, r.X)
		bound := 1e-12*math.Abs(r.V) + 1e-15*math.Exp(math.Abs(r.X))
		d := math.Abs(got - r.V)
		worstJ = math.Max(worstJ, d/bound)
		if d > bound {
			t.Errorf("J_%d(%g) = %.17g, SciPy %.17g", r.N, r.X, got, r.V)
		}
	}
	t.Logf("%s: worst error/bound %.2g for I_n over %d values, %.2g for J_n over %d", f.Library, worstI, len(f.IV), worstJ, len(f.JV))
}

// closedFormBump is B_c(d) of the CoilRing doc comment evaluated directly,
// without any series: the target the Fourier coefficients must reproduce.
func closedFormBump(r CoilRing, c int, x, y float64) complex128 {
	theta := (r.StartDeg + 360*float64(c)/float64(r.Coils)) * math.Pi / 180
	s, co := math.Sincos(theta)
	dx, dy := x-r.Radius*co, y-r.Radius*s
	w := 2 * math.Pi / r.Period
	z := complex(r.Falloff, r.RadialPhase)
	sum := math.Cos(w*dx) - 1 + math.Cos(w*dy) - 1 + 0.5*(math.Cos(w*(dx+dy))-1) + 0.5*(math.Cos(w*(dx-dy))-1)
	ph := r.TangentialPhase * (-s*math.Sin(w*dx) + co*math.Sin(w*dy))
	return complex(co, s) * cmplx.Exp(z*complex(sum, 0)+complex(0, ph))
}

// With enough harmonics the Fourier series of the ring equals the closed form
// of its doc comment (the generating functions of I_n and J_n, Abramowitz &
// Stegun 9.6.33 and 9.1.41), up to the common factor A, which must be the one
// that makes the mean RSS over the disc of radius NormRadius (on 128² pixel
// centres) equal to 1, computed here from the closed form.
func TestCoilRingMatchesClosedForm(t *testing.T) {
	cases := []struct {
		name  string
		ring  CoilRing
		bound float64 // on max |S − A·closed| / max |S| over the FOV
	}{
		{"8 coils, order 16", func() CoilRing { r := DefaultCoilRing(8); r.Order = 16; return r }(), 2e-12},
		{"5 coils, steeper, twisted, order 16", CoilRing{Coils: 5, Radius: 0.55, Falloff: 1.5, RadialPhase: -0.6, TangentialPhase: 1.8,
			Period: 2.5, Order: 16, StartDeg: 17, NormRadius: 0.3}, 5e-9},
		// The default truncation (order 3) is the definition of the default
		// coils, not an approximation the data rely on; its distance from
		// the untruncated bump is reported and bounded only to catch a
		// regression in the design.
		{"default 8 coils (order 3)", DefaultCoilRing(8), 0.1},
	}
	for _, tc := range cases {
		a, err := tc.ring.Build()
		if err != nil {
			t.Fatal(err)
		}
		const g = 128
		var sum float64
		var cnt int
		for i := range g {
			y := float64(i-g/2) / g
			for j := range g {
				x := float64(j-g/2) / g
				if x*x+y*y > tc.ring.NormRadius*tc.ring.NormRadius {
					continue
				}
				var ss float64
				for c := range tc.ring.Coils {
					v := closedFormBump(tc.ring, c, x, y)
					ss += real(v)*real(v) + imag(v)*imag(v)
				}
				sum += math.Sqrt(ss)
				cnt++
			}
		}
		A := float64(cnt) / sum
		var worst, peak float64
		for c := range tc.ring.Coils {
			for i := range 21 {
				for j := range 21 {
					x, y := float64(j)/20-0.5, float64(i)/20-0.5
					got := a.Sensitivity(c, x, y)
					want := complex(A, 0) * closedFormBump(tc.ring, c, x, y)
					worst = math.Max(worst, cmplx.Abs(got-want))
					peak = math.Max(peak, cmplx.Abs(got))
				}
			}
		}
		t.Logf("%s: %d terms, max |S − A·closed form| = %.3g of the peak", tc.name, a.Terms(), worst/peak)
		if worst > tc.bound*peak {
			t.Errorf("%s: series differs from the closed form by %.3g of the peak (bound %g)", tc.name, worst/peak, tc.bound)
		}
	}
}

// The default 8-coil ring looks like a loop array: each coil's magnitude
// peaks at the edge of the FOV towards its own position, the phase varies
// smoothly over the object (no jump above 0.1 rad between neighbouring pixels
// of a 96² grid inside the Shepp-Logan support) but does vary (a range of
// more than 1 rad there), and the mean RSS over the normalisation disc is 1.
// The spread of the RSS over the support and each coil's smallest magnitude
// over the whole FOV (relative to its peak) are reported: outside the object,
// in the FOV corner farthest from a coil, the truncated series comes close to
// zero and its phase turns quickly.
func TestCoilRingShape(t *testing.T) {
	const n = 96
	ring := DefaultCoilRing(8)
	a, err := ring.Build()
	if err != nil {
		t.Fatal(err)
	}
	maps, err := a.Maps(n, n)
	if err != nil {
		t.Fatal(err)
	}
	sup := ModifiedSheppLogan().Support(n, n)
	for c, m := range maps {
		best, bi := 0.0, 0
		for i, v := range m {
			if av := cmplx.Abs(v); av > best {
				best, bi = av, i
			}
		}
		x, y := float64(bi%n-n/2)/n, float64(bi/n-n/2)/n
		want := (ring.StartDeg + 45*float64(c)) * math.Pi / 180
		dang := math.Abs(math.Remainder(math.Atan2(y, x)-want, 2*math.Pi))
		if dang > math.Pi/8 || math.Hypot(x, y) < 0.45 {
			t.Errorf("coil %d: magnitude peaks at (%.3f, %.3f), angle off by %.1f°; want the FOV edge towards %.0f°", c, x, y, dang*180/math.Pi, want*180/math.Pi)
		}
		var jump, lo, hi float64 = 0, math.Inf(1), math.Inf(-1)
		ref := m[n/2*n+n/2]
		minMag := best
		for i := range n {
			for j := range n {
				v := m[i*n+j]
				minMag = math.Min(minMag, cmplx.Abs(v))
				if !sup[i*n+j] {
					continue
				}
				if j > 0 && sup[i*n+j-1] {
					jump = math.Max(jump, math.Abs(cmplx.Phase(v/m[i*n+j-1])))
				}
				if i > 0 && sup[(i-1)*n+j] {
					jump = math.Max(jump, math.Abs(cmplx.Phase(v/m[(i-1)*n+j])))
				}
				p := cmplx.Phase(v / ref)
				lo, hi = math.Min(lo, p), math.Max(hi, p)
			}
		}
		t.Logf("coil %d: peak at (%.2f, %.2f), smallest magnitude %.3g of the peak, phase range over the object %.2f rad, largest step %.3f rad", c, x, y, minMag/best, hi-lo, jump)
		if jump > 0.1 {
			t.Errorf("coil %d: phase jumps by %.3f rad between neighbouring pixels", c, jump)
		}
		if hi-lo < 1 {
			t.Errorf("coil %d: phase varies by only %.3f rad over the object", c, hi-lo)
		}
	}
	rss := rssMaps(maps)
	lo, hi := math.Inf(1), 0.0
	for i, s := range sup {
		if s {
			lo, hi = math.Min(lo, rss[i]), math.Max(hi, rss[i])
		}
	}
	// Mean over the normalisation disc, on the 128² grid Build uses.
	m128, _ := a.Maps(128, 128)
	r128 := rssMaps(m128)
	var sum float64
	var cnt int
	for i := range 128 {
		for j := range 128 {
			x, y := float64(j-64)/128, float64(i-64)/128
			if x*x+y*y <= 0.16 {
				sum += r128[i*128+j]
				cnt++
			}
		}
	}
	if d := math.Abs(sum/float64(cnt) - 1); d > 1e-12 {
		t.Errorf("mean RSS over the disc is %.15f, want 1", sum/float64(cnt))
	}
	t.Logf("default 8-coil ring: RSS over the Shepp-Logan support in [%.3f, %.3f]", lo, hi)
}

// coilDFT2 returns, for |kx|, |ky| ≤ kmax, the centred 2D DFT of the complex
// n-by-n image img divided by n² (a Riemann sum for the continuous transform),
// computed with gonum's dsp/fourier FFT as the outside reference; indexed
// [(ky+kmax)(2kmax+1) + kx+kmax].
func coilDFT2(img []complex128, n, kmax int) []complex128 {
	f := fourier.NewCmplxFFT(n)
	w := 2*kmax + 1
	rows := make([]complex128, n*w)
	in := make([]complex128, n)
	out := make([]complex128, n)
	for i := range n {
		copy(in, img[i*n:(i+1)*n])
		f.Coefficients(out, in)
		for kx := -kmax; kx <= kmax; kx++ {
			rows[i*w+kx+kmax] = out[(kx+n)%n]
		}
	}
	res := make([]complex128, w*w)
	for c := range w {
		for i := range n {
			in[i] = rows[i*w+c]
		}
		f.Coefficients(out, in)
		kx := c - kmax
		for ky := -kmax; ky <= kmax; ky++ {
			// pixel index j sits at j − n/2 on our grid: a factor (−1)^k per axis.
			sign := 1.0
			if (kx+ky)%2 != 0 {
				sign = -1
			}
			res[(ky+kmax)*w+c] = out[(ky+n)%n] * complex(sign/float64(n*n), 0)
		}
	}
	return res
}

func coilSinc(u float64) float64 {
	if u == 0 {
		return 1
	}
	return math.Sin(math.Pi*u) / (math.Pi * u)
}

// The coil-weighted analytic spectrum against the FFT (gonum dsp/fourier) of
// the rasterised sensitivity times the finely rasterised phantom. The raster
// is S_c at the pixel centres times the exact pixel average of the phantom,
// i.e. samples of S_c·(f ∗ box); by the shift theorem and Poisson summation
// (standard sampling theory) its DFT/N is Σ_aliases Σ_t a_t·F(k − f_t)·
// box(k − f_t), box(k) = sinc(kx/n)·sinc(ky/n). The analytic side applies the
// box per term, so what remains is the aliasing from |k| ≈ n, measured at
// n = 1024 for |k| ≤ 16 and bounded by 1e-5 of the largest |coefficient|
// (the phantom test bounds the same aliasing of the bare phantom at n = 1024
// by 5e-6·F(0); the aliases fall as about n^(−2.5)). For scale: a sign error in the shift
// would show as an error of the order of the spectrum itself.
func TestCoilSpectrumMatchesFFTOfRaster(t *testing.T) {
	const n, kmax = 1024, 16
	ph := ModifiedSheppLogan()
	raster := ph.Rasterize(n, n)
	a, err := DefaultCoilRing(8).Build()
	if err != nil {
		t.Fatal(err)
	}
	img := make([]complex128, n*n)
	box := func(kx, ky float64) float64 { return coilSinc(kx/n) * coilSinc(ky/n) }
	for _, c := range []int{0, 3, 6} {
		one := &CoilArray{FX: a.FX, FY: a.FY, Coef: a.Coef[c : c+1]}
		maps, err := one.Maps(n, n)
		if err != nil {
			t.Fatal(err)
		}
		for i, v := range raster {
			img[i] = maps[0][i] * complex(v, 0)
		}
		ref := coilDFT2(img, n, kmax)
		var worst, peak float64
		for ky := -kmax; ky <= kmax; ky++ {
			for kx := -kmax; kx <= kmax; kx++ {
				var got complex128
				for t, w := range a.Coef[c] {
					ux, uy := float64(kx)-a.FX[t], float64(ky)-a.FY[t]
					got += w * ph.Spectrum(ux, uy) * complex(box(ux, uy), 0)
				}
				want := ref[(ky+kmax)*(2*kmax+1)+kx+kmax]
				worst = math.Max(worst, cmplx.Abs(got-want))
				peak = math.Max(peak, cmplx.Abs(want))
			}
		}
		t.Logf("coil %d: worst |analytic − FFT of raster| over |k| ≤ %d: %.3g of the peak", c, kmax, worst/peak)
		if worst > 1e-5*peak {
			t.Errorf("coil %d: analytic coil spectrum differs from the FFT of the raster by %.3g of the peak", c, worst/peak)
		}
	}
}

// hiddenPhantom hides the Ellipses type so that CartesianSpectra takes its
// generic lattice path.
type hiddenPhantom struct{ e Ellipses }

func (h hiddenPhantom) Rasterize(nx, ny int) []float64 { return h.e.Rasterize(nx, ny) }
func (h hiddenPhantom) Spectrum(kx, ky float64) complex128 {
	return h.e.Spectrum(kx, ky)
}

// The four ways of computing the same data agree to rounding: the lattice
// path through CartesianSpectrum of scaled ellipses, the lattice path through
// Spectrum, the shifted-ellipse path of Samples, and Samples of a phantom
// whose type is hidden (one Spectrum call per term and point, the defining
// formula) at the grid points. This also checks the data layout of
// CartesianData and of Samples.
func TestCartesianSpectraPaths(t *testing.T) {
	ph := ModifiedSheppLogan()
	ring := DefaultCoilRing(3)
	ring.Period = 3 // lattice spacing 1/3
	a, err := ring.Build()
	if err != nil {
		t.Fatal(err)
	}
	// A non-lattice array: frequencies that are no multiple of 1/L, L ≤ 16.
	b := &CoilArray{FX: []float64{0, 0.3183, -0.71}, FY: []float64{0, -0.27, 0.1},
		Coef: [][]complex128{{1, 0.2i, -0.1}, {0.5, 0.3, 0.1i}}}
	for _, sz := range [][2]int{{24, 32}, {17, 25}} {
		ny, nx := sz[0], sz[1]
		var kx, ky []float64
		for m := range ny {
			for n := range nx {
				kx = append(kx, float64(n-nx/2))
				ky = append(ky, float64(m-ny/2))
			}
		}
		for _, arr := range []*CoilArray{a, b} {
			fast, err := arr.CartesianSpectra(ph, ny, nx)
			if err != nil {
				t.Fatal(err)
			}
			slow, err := arr.CartesianSpectra(hiddenPhantom{ph}, ny, nx)
			if err != nil {
				t.Fatal(err)
			}
			direct, err := arr.Samples(hiddenPhantom{ph}, ny, nx, kx, ky, 3)
			if err != nil {
				t.Fatal(err)
			}
			shifted, err := arr.Samples(ph, ny, nx, kx, ky, 1)
			if err != nil {
				t.Fatal(err)
			}
			mask := make([]bool, ny*nx)
			for i := range mask {
				mask[i] = i%3 != 1
			}
			data, err := arr.CartesianData(ph, ny, nx, mask)
			if err != nil {
				t.Fatal(err)
			}
			var peak, d1, d2, d3, d4 float64
			k := 0
			for c := range arr.Coils() {
				for i := range ny * nx {
					want := direct[c*ny*nx+i]
					peak = math.Max(peak, cmplx.Abs(want))
					d1 = math.Max(d1, cmplx.Abs(fast[c][i]-want))
					d2 = math.Max(d2, cmplx.Abs(slow[c][i]-want))
					d4 = math.Max(d4, cmplx.Abs(shifted[c*ny*nx+i]-want))
					if mask[i] {
						d3 = math.Max(d3, cmplx.Abs(data[k]-want))
						k++
					}
				}
			}
			if k != len(data) {
				t.Errorf("CartesianData has %d values, the mask selects %d", len(data), k)
			}
			for _, d := range []struct {
				name string
				v    float64
			}{{"scaled-ellipse lattice", d1}, {"Spectrum lattice", d2}, {"CartesianData", d3}, {"shifted ellipses", d4}} {
				if d.v > 1e-12*peak {
					t.Errorf("%d×%d, %d terms: %s differs from Samples by %.3g of the peak", ny, nx, arr.Terms(), d.name, d.v/peak)
				}
			}
		}
	}
}

// realEmbed returns the real 2n×2n matrix [[Re A, −Im A], [Im A, Re A]] of a
// complex n×n A (row-major), which represents A acting on [Re v; Im v].
func realEmbed(a []complex128, n int) *mat.Dense {
	m := mat.NewDense(2*n, 2*n, nil)
	for i := range n {
		for j := range n {
			v := a[i*n+j]
			m.Set(i, j, real(v))
			m.Set(i, j+n, -imag(v))
			m.Set(i+n, j, imag(v))
			m.Set(i+n, j+n, real(v))
		}
	}
	return m
}

func randomHermitianPD(n int, rng *rand.Rand) []complex128 {
	b := make([]complex128, n*n)
	for i := range b {
		b[i] = complex(rng.NormFloat64(), rng.NormFloat64())
	}
	a := make([]complex128, n*n)
	for i := range n {
		for j := range n {
			var s complex128
			for k := range n {
				s += b[i*n+k] * cmplx.Conj(b[j*n+k])
			}
			a[i*n+j] = s
		}
		a[i*n+i] += complex(0.5, 0)
	}
	return a
}

// The complex Cholesky factor against gonum: the real embedding M of Ψ has
// det M = |det Ψ|² = Π L_ii⁴, so gonum's Cholesky LogDet of M must equal
// 4·Σ log L_ii; and Inverse must embed to gonum's inverse of M. L·Lᴴ = Ψ is
// checked directly.
func TestNoiseCovarianceMatchesGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	for _, n := range []int{1, 2, 5, 8} {
		psi := randomHermitianPD(n, rng)
		nc, err := NewNoiseCovariance(n, psi)
		if err != nil {
			t.Fatal(err)
		}
		l := nc.Cholesky()
		var scale, worst float64
		for i := range n {
			for j := range n {
				var s complex128
				for k := range n {
					s += l[i*n+k] * cmplx.Conj(l[j*n+k])
				}
				worst = math.Max(worst, cmplx.Abs(s-psi[i*n+j]))
				scale = math.Max(scale, cmplx.Abs(psi[i*n+j]))
				if j > i && l[i*n+j] != 0 {
					t.Fatalf("n=%d: L is not lower triangular at (%d, %d)", n, i, j)
				}
			}
		}
		if worst > 1e-13*scale {
			t.Errorf("n=%d: ‖L·Lᴴ − Ψ‖max = %.3g", n, worst)
		}
		m := realEmbed(psi, n)
		sym := mat.NewSymDense(2*n, nil)
		for i := range 2 * n {
			for j := range 2 * n {
				sym.SetSym(i, j, m.At(i, j))
			}
		}
		var ch mat.Cholesky
		if !ch.Factorize(sym) {
			t.Fatalf("n=%d: gonum finds the embedding not positive definite", n)
		}
		var ld float64
		for i := range n {
			ld += 4 * math.Log(real(l[i*n+i]))
		}
		if d := math.Abs(ld - ch.LogDet()); d > 1e-10*math.Max(1, math.Abs(ld)) {
			t.Errorf("n=%d: 4·Σ log L_ii = %.15g, gonum log det = %.15g", n, ld, ch.LogDet())
		}
		var minv mat.Dense
		if err := minv.Inverse(m); err != nil {
			t.Fatal(err)
		}
		inv := realEmbed(nc.Inverse(), n)
		if !mat.EqualApprox(inv, &minv, 1e-10*mat.Norm(&minv, math.Inf(1))) {
			t.Errorf("n=%d: Ψ⁻¹ differs from gonum's inverse", n)
		}
	}
}

// Drawn noise has the asked covariance: the sample covariance of m = 40000
// draws, divided by 2σ², must match Ψ entry by entry within 5 standard errors
// (the standard error of the sample mean of n_i·conj(n_j)/(2σ²) is
// √(Ψ_ii·Ψ_jj/m) for circular Gaussian noise; Isserlis' theorem), its
// pseudo-covariance E[n_i n_j] must vanish within the same bound (circular
// noise), and after whitening the covariance must be the identity.
func TestNoiseCovarianceDraws(t *testing.T) {
	const coils, m, sigma = 4, 40000, 0.7
	psi := RingNoiseCovariance(coils, 0.35)
	nc, err := NewNoiseCovariance(coils, psi)
	if err != nil {
		t.Fatal(err)
	}
	data := make([]complex128, coils*m)
	if err := nc.AddNoise(data, sigma, rand.New(rand.NewPCG(5, 6))); err != nil {
		t.Fatal(err)
	}
	check := func(name string, d []complex128, want []complex128) {
		bound := 5 * math.Sqrt(1.0/m) * 1.5
		for i := range coils {
			for j := range coils {
				var cov, pcov complex128
				for k := range m {
					cov += d[i*m+k] * cmplx.Conj(d[j*m+k])
					pcov += d[i*m+k] * d[j*m+k]
				}
				cov /= complex(2*sigma*sigma*m, 0)
				pcov /= complex(2*sigma*sigma*m, 0)
				if cmplx.Abs(cov-want[i*coils+j]) > bound {
					t.Errorf("%s: covariance (%d, %d) = %.4f, want %.4f ± %.3f", name, i, j, cov, want[i*coils+j], bound)
				}
				if cmplx.Abs(pcov) > bound {
					t.Errorf("%s: pseudo-covariance (%d, %d) = %.4f, want 0 ± %.3f", name, i, j, pcov, bound)
				}
			}
		}
	}
	check("drawn", data, psi)
	if err := nc.Whiten(data); err != nil {
		t.Fatal(err)
	}
	check("whitened", data, RingNoiseCovariance(coils, 0))
}

func TestNewNoiseCovarianceRejects(t *testing.T) {
	cases := []struct {
		name  string
		coils int
		psi   []complex128
		want  string
	}{
		{"no coil", 0, nil, "allowed are 1 to"},
		{"too many coils", MaxCoils + 1, nil, "allowed are 1 to"},
		{"wrong size", 2, []complex128{1, 0, 0}, "want 2×2"},
		{"not Hermitian", 2, []complex128{1, 0.5i, 0.5i, 1}, "not Hermitian"},
		{"indefinite", 2, []complex128{1, 2, 2, 1}, "not positive definite"},
		{"NaN", 2, []complex128{1, 0, 0, complex(math.NaN(), 0)}, "not finite"},
	}
	for _, c := range cases {
		_, err := NewNoiseCovariance(c.coils, c.psi)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
	nc, _ := NewNoiseCovariance(3, nil)
	if err := nc.AddNoise(make([]complex128, 10), 1, rand.New(rand.NewPCG(1, 1))); err == nil {
		t.Error("AddNoise accepted 10 values for 3 coils")
	}
	if err := nc.AddNoise(make([]complex128, 9), -1, rand.New(rand.NewPCG(1, 1))); err == nil {
		t.Error("AddNoise accepted σ = −1")
	}
}

func TestCoilRingRejects(t *testing.T) {
	mod := func(f func(*CoilRing)) CoilRing { r := DefaultCoilRing(8); f(&r); return r }
	cases := []struct {
		name string
		ring CoilRing
		want string
	}{
		{"no coils", DefaultCoilRing(0), "coils = 0 is outside the allowed range 1 to 64"},
		{"too many coils", DefaultCoilRing(65), "coils = 65"},
		{"radius", mod(func(r *CoilRing) { r.Radius = 1.2 }), "radius 1.2"},
		{"falloff", mod(func(r *CoilRing) { r.Falloff = 0 }), "falloff 0"},
		{"order", mod(func(r *CoilRing) { r.Order = 0 }), "order 0"},
		{"period", mod(func(r *CoilRing) { r.Period = math.NaN() }), "period NaN"},
		{"norm radius", mod(func(r *CoilRing) { r.NormRadius = 0.7 }), "normalisation radius 0.7"},
		{"phase", mod(func(r *CoilRing) { r.TangentialPhase = 9 }), "tangential phase 9"},
	}
	for _, c := range cases {
		_, err := c.ring.Build()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
	bad := []*CoilArray{
		{},
		{FX: []float64{0}, FY: []float64{0, 1}, Coef: [][]complex128{{1}}},
		{FX: []float64{0}, FY: []float64{0}, Coef: [][]complex128{{1, 2}}},
		{FX: []float64{math.Inf(1)}, FY: []float64{0}, Coef: [][]complex128{{1}}},
	}
	for i, b := range bad {
		if err := b.Validate(); err == nil {
			t.Errorf("bad array %d validated", i)
		}
		if _, err := b.Maps(4, 4); err == nil {
			t.Errorf("bad array %d gave maps", i)
		}
	}
	a, _ := DefaultCoilRing(2).Build()
	if _, err := a.Samples(ModifiedSheppLogan(), 8, 8, []float64{1}, nil, 1); err == nil {
		t.Error("Samples accepted 1 kx and 0 ky")
	}
	if _, err := a.CartesianData(ModifiedSheppLogan(), 8, 8, make([]bool, 64)); err == nil {
		t.Error("CartesianData accepted an empty mask")
	}
}

// Uniform Cartesian SENSE cannot unfold more aliased pixels than there are
// coils (Pruessmann 1999); the error names the limit.
func TestCheckSENSEFactor(t *testing.T) {
	cases := []struct {
		coils int
		r     float64
		want  string // "" for no error
	}{
		{8, 1, ""},
		{8, 8, ""},
		{8, 4.5, ""},
		{8, 9, "needs at least that many receive coils; this array has 8 coils (allowed: R ≤ 8)"},
		{1, 2, "allowed: R ≤ 1"},
		{4, 0.5, "must be a finite number ≥ 1"},
		{0, 1, "at least one receive coil"},
	}
	for _, c := range cases {
		err := CheckSENSEFactor(c.coils, c.r)
		switch {
		case c.want == "" && err != nil:
			t.Errorf("%d coils, R = %g: unexpected error %v", c.coils, c.r, err)
		case c.want != "" && (err == nil || !strings.Contains(err.Error(), c.want)):
			t.Errorf("%d coils, R = %g: error %v, want one containing %q", c.coils, c.r, err, c.want)
		}
	}
}

func coilDot(a, b []complex128) complex128 {
	var s complex128
	for i := range a {
		s += a[i] * cmplx.Conj(b[i])
	}
	return s
}

func coilNorm(a []complex128) float64 { return math.Sqrt(real(coilDot(a, a))) }

// senseOperators returns Cartesian and NUFFT SENSE operators on an ny×nx grid
// with 8 default coils, each with and without prewhitening.
func senseOperators(t testing.TB, ny, nx int, rng *rand.Rand) map[string]*SENSE {
	a, err := DefaultCoilRing(8).Build()
	if err != nil {
		t.Fatal(err)
	}
	maps, err := a.Maps(ny, nx)
	if err != nil {
		t.Fatal(err)
	}
	nc, err := NewNoiseCovariance(8, RingNoiseCovariance(8, 0.3))
	if err != nil {
		t.Fatal(err)
	}
	mask := randomMask(ny, nx, 0.4, rng)
	kx := make([]float64, 300)
	ky := make([]float64, 300)
	for j := range kx {
		kx[j] = (rng.Float64() - 0.5) * float64(nx)
		ky[j] = (rng.Float64() - 0.5) * float64(ny)
	}
	out := map[string]*SENSE{}
	for _, w := range []struct {
		name string
		nc   *NoiseCovariance
	}{{"", nil}, {" whitened", nc}} {
		c, err := NewCartesianSENSE(ny, nx, mask, maps, w.nc)
		if err != nil {
			t.Fatal(err)
		}
		out["Cartesian"+w.name] = c
		u, err := NewNUFFTSENSE(ny, nx, kx, ky, nufft.Options{}, maps, w.nc)
		if err != nil {
			t.Fatal(err)
		}
		out["NUFFT"+w.name] = u
	}
	return out
}

// The adjoint identity ⟨Ex, y⟩ = ⟨x, Eᴴy⟩ (the definition of Eᴴ), to 1e-10
// relative to ‖Ex‖·‖y‖, for every kind of SENSE operator and a clone.
func TestSENSEAdjointIdentity(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	for name, op := range senseOperators(t, 24, 20, rng) {
		for pass, o := range []*SENSE{op, mustClone(t, op)} {
			x := randomVec(o.ImageLen(), rng)
			y := randomVec(o.DataLen(), rng)
			ex := make([]complex128, o.DataLen())
			ehy := make([]complex128, o.ImageLen())
			o.Forward(ex, x)
			o.Adjoint(ehy, y)
			l, r := coilDot(ex, y), coilDot(x, ehy)
			if d := cmplx.Abs(l-r) / (coilNorm(ex) * coilNorm(y)); d > 1e-10 {
				t.Errorf("%s (pass %d): ⟨Ex,y⟩ = %v, ⟨x,Eᴴy⟩ = %v, relative difference %.3g", name, pass, l, r, d)
			}
		}
	}
}

func mustClone(t testing.TB, s *SENSE) *SENSE {
	c, err := s.Clone()
	if err != nil {
		t.Fatal(err)
	}
	return c
}

// Forward of the Cartesian SENSE operator against go-dsp's FFT2 of S_c·x:
// the centred orthonormal DFT is ifftshift, FFT2, fftshift, divided by
// √(nx·ny) (for even sizes the two shifts coincide). The whitened operator
// must equal L⁻¹ applied across coils, with L⁻¹ from gonum's inverse of the
// real embedding of the Cholesky factor.
func TestSENSEForwardMatchesGoDSP(t *testing.T) {
	const ny, nx = 16, 12
	rng := rand.New(rand.NewPCG(31, 32))
	ops := senseOperators(t, ny, nx, rng)
	op, opw := ops["Cartesian"], ops["Cartesian whitened"]
	x := randomVec(ny*nx, rng)
	got := make([]complex128, op.DataLen())
	op.Forward(got, x)
	m := op.SamplesPerCoil()
	idx := op.Base().(*Cartesian).Index()
	want := make([]complex128, op.DataLen())
	for c, s := range op.Maps() {
		g := make([][]complex128, ny)
		for i := range g {
			g[i] = make([]complex128, nx)
		}
		for i := range ny {
			for j := range nx {
				// ifftshift: pixel (i, j) of the centred grid goes to (i − ny/2, j − nx/2) mod n.
				ii, jj := (i-ny/2+ny)%ny, (j-nx/2+nx)%nx
				g[ii][jj] = s[i*nx+j] * x[i*nx+j]
			}
		}
		f := fft.FFT2(g)
		for k, p := range idx {
			mm, nn := p/nx, p%nx
			want[c*m+k] = f[(mm-ny/2+ny)%ny][(nn-nx/2+nx)%nx] / complex(math.Sqrt(ny*nx), 0)
		}
	}
	var worst float64
	for i := range got {
		worst = math.Max(worst, cmplx.Abs(got[i]-want[i]))
	}
	if worst > 1e-12*coilNorm(want) {
		t.Errorf("SENSE Forward differs from go-dsp FFT2 by %.3g", worst)
	}
	l := opw.Noise().Cholesky()
	var linv mat.Dense
	if err := linv.Inverse(realEmbed(l, 8)); err != nil {
		t.Fatal(err)
	}
	gotw := make([]complex128, op.DataLen())
	opw.Forward(gotw, x)
	worst = 0
	v := mat.NewVecDense(16, nil)
	var u mat.VecDense
	for k := range m {
		for c := range 8 {
			v.SetVec(c, real(want[c*m+k]))
			v.SetVec(c+8, imag(want[c*m+k]))
		}
		u.MulVec(&linv, v)
		for c := range 8 {
			worst = math.Max(worst, cmplx.Abs(gotw[c*m+k]-complex(u.AtVec(c), u.AtVec(c+8))))
		}
	}
	if worst > 1e-12*coilNorm(want) {
		t.Errorf("whitened SENSE Forward differs from L⁻¹ (gonum) times the coil data by %.3g", worst)
	}
}

func TestSENSEAllocatesNothing(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 42))
	for name, op := range senseOperators(t, 16, 16, rng) {
		x := randomVec(op.ImageLen(), rng)
		y := make([]complex128, op.DataLen())
		if a := testing.AllocsPerRun(5, func() { op.Forward(y, x); op.Adjoint(x, y) }); a != 0 {
			t.Errorf("%s: %v allocations per Forward+Adjoint", name, a)
		}
	}
	nc, _ := NewNoiseCovariance(4, RingNoiseCovariance(4, 0.2))
	d := make([]complex128, 400)
	rng2 := rand.New(rand.NewPCG(1, 2))
	if a := testing.AllocsPerRun(5, func() { _ = nc.AddNoise(d, 1, rng2); _ = nc.Whiten(d) }); a != 0 {
		t.Errorf("AddNoise+Whiten: %v allocations", a)
	}
}

func TestNewSENSERejects(t *testing.T) {
	base, _ := NewCartesian(4, 4, make([]bool, 16))
	full := make([]bool, 16)
	for i := range full {
		full[i] = true
	}
	op, _ := NewCartesian(4, 4, full)
	nc3, _ := NewNoiseCovariance(3, nil)
	cases := []struct {
		name string
		err  func() error
		want string
	}{
		{"no operator", func() error { _, err := NewSENSE(nil, [][]complex128{make([]complex128, 16)}, nil); return err }, "single-coil"},
		{"no maps", func() error { _, err := NewSENSE(op, nil, nil); return err }, "0 sensitivity maps"},
		{"short map", func() error { _, err := NewSENSE(op, [][]complex128{make([]complex128, 15)}, nil); return err }, "has 15 pixels"},
		{"covariance size", func() error {
			_, err := NewSENSE(op, [][]complex128{make([]complex128, 16), make([]complex128, 16)}, nc3)
			return err
		}, "for 3 coils but 2"},
		{"empty mask", func() error {
			_, err := NewCartesianSENSE(4, 4, make([]bool, 16), [][]complex128{make([]complex128, 16)}, nil)
			return err
		}, "acquires no sample"},
	}
	_ = base
	for _, c := range cases {
		err := c.err()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
}

// Eight default coils on a 64×64 grid: the coil count, the number of
// exponential terms and the noiseless Cartesian data of the phantom, encoded
// with the SENSE operator at R = 2.
func ExampleCoilRing() {
	coils, err := DefaultCoilRing(8).Build()
	if err != nil {
		fmt.Println(err)
		return
	}
	const n = 64
	maps, _ := coils.Maps(n, n)
	mask := make([]bool, n*n)
	for m := 0; m < n; m += 2 { // every other phase-encode row
		for k := range n {
			mask[m*n+k] = true
		}
	}
	op, err := NewCartesianSENSE(n, n, mask, maps, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	y, _ := coils.CartesianData(ModifiedSheppLogan(), n, n, mask)
	fmt.Printf("%d coils, %d terms each, %d samples (%d per coil), data fit the operator: %v\n",
		coils.Coils(), coils.Terms(), op.DataLen(), op.SamplesPerCoil(), len(y) == op.DataLen())
	fmt.Println(CheckSENSEFactor(coils.Coils(), 10))
	// Output:
	// 8 coils, 49 terms each, 16384 samples (2048 per coil), data fit the operator: true
	// simulate: uniform Cartesian SENSE at R = 10 folds 10 pixels onto each measured one and needs at least that many receive coils; this array has 8 coils (allowed: R ≤ 8)
}

// Radial multi-coil data: 8 coils, 24 spokes of 64 samples on a 64² grid,
// analytic samples of the phantom and the NUFFT SENSE operator that models
// them, with correlated coil noise drawn and whitened.
func ExampleNewNUFFTSENSE() {
	const n, spokes = 64, 24
	coils, _ := DefaultCoilRing(8).Build()
	maps, _ := coils.Maps(n, n)
	var kx, ky []float64
	for s := range spokes {
		sn, cs := math.Sincos(math.Pi * float64(s) / spokes)
		for r := range n {
			k := float64(r - n/2)
			kx, ky = append(kx, k*cs), append(ky, k*sn)
		}
	}
	y, err := coils.Samples(ModifiedSheppLogan(), n, n, kx, ky, 1)
	if err != nil {
		fmt.Println(err)
		return
	}
	noise, _ := NewNoiseCovariance(8, RingNoiseCovariance(8, 0.2))
	_ = noise.AddNoise(y, 0.05, rand.New(rand.NewPCG(1, 2)))
	_ = noise.Whiten(y) // the operator below whitens the same way
	op, err := NewNUFFTSENSE(n, n, kx, ky, nufft.Options{}, maps, noise)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(op.Coils(), op.SamplesPerCoil(), len(y) == op.DataLen())
	// Output: 8 1536 true
}

// Correlated coil noise: draw it with the Cholesky factor of Ψ, then whiten.
func ExampleNoiseCovariance() {
	nc, err := NewNoiseCovariance(4, RingNoiseCovariance(4, 0.3))
	if err != nil {
		fmt.Println(err)
		return
	}
	data := make([]complex128, 4*1000) // 4 coils × 1000 samples, coil-major
	_ = nc.AddNoise(data, 0.01, rand.New(rand.NewPCG(1, 2)))
	_ = nc.Whiten(data) // now white, σ = 0.01 per channel
	fmt.Println(nc.Coils(), nc.IsIdentity())
	// Output: 4 false
}

func BenchmarkCoilRingBuild8(b *testing.B) {
	for b.Loop() {
		if _, err := DefaultCoilRing(8).Build(); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkCoilCartesianSpectra256x8(b *testing.B) {
	a, _ := DefaultCoilRing(8).Build()
	ph := ModifiedSheppLogan()
	for b.Loop() {
		if _, err := a.CartesianSpectra(ph, 256, 256); err != nil {
			b.Fatal(err)
		}
	}
}

// 32 full-diameter radial spokes of 256 samples, 8 coils, 49 terms: the
// shifted-ellipse path of Samples and, for the ratio, the generic path that
// calls Spectrum once per term and point.
func BenchmarkCoilSamplesRadial8(b *testing.B) {
	a, _ := DefaultCoilRing(8).Build()
	var kx, ky []float64
	for s := range 32 {
		sn, cs := math.Sincos(math.Pi * float64(s) / 32)
		for r := range 256 {
			k := float64(r - 128)
			kx, ky = append(kx, k*cs), append(ky, k*sn)
		}
	}
	for _, c := range []struct {
		name string
		p    Phantom
	}{{"shifted", ModifiedSheppLogan()}, {"generic", hiddenPhantom{ModifiedSheppLogan()}}} {
		b.Run(c.name, func(b *testing.B) {
			for b.Loop() {
				if _, err := a.Samples(c.p, 256, 256, kx, ky, 1); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(len(kx))*float64(b.N)/b.Elapsed().Seconds(), "points/s")
		})
	}
}

// Forward+Adjoint at 256², R = 2 rows: the bare single-coil operator, and
// SENSE with 1 and 8 coils, white and whitened; the 8-coil cost should be
// about 8 single-coil pairs.
func BenchmarkSENSECartesianForwardAdjoint256(b *testing.B) {
	const n = 256
	a, _ := DefaultCoilRing(8).Build()
	maps, _ := a.Maps(n, n)
	mask := make([]bool, n*n)
	for i := range mask {
		mask[i] = (i/n)%2 == 0
	}
	nc, _ := NewNoiseCovariance(8, RingNoiseCovariance(8, 0.3))
	single, _ := NewCartesian(n, n, mask)
	one, _ := NewCartesianSENSE(n, n, mask, maps[:1], nil)
	eight, _ := NewCartesianSENSE(n, n, mask, maps, nil)
	white, _ := NewCartesianSENSE(n, n, mask, maps, nc)
	for _, c := range []struct {
		name string
		op   Operator
	}{{"single-coil Cartesian", single}, {"SENSE 1 coil", one}, {"SENSE 8 coils", eight}, {"SENSE 8 coils whitened", white}} {
		b.Run(c.name, func(b *testing.B) {
			x := make([]complex128, c.op.ImageLen())
			y := make([]complex128, c.op.DataLen())
			for b.Loop() {
				c.op.Forward(y, x)
				c.op.Adjoint(x, y)
			}
		})
	}
}

// EᴴE of the same operators through Normal: for this mask of whole rows the
// column transforms only (compare with BenchmarkSENSECartesianForwardAdjoint256).
func BenchmarkSENSECartesianNormal256(b *testing.B) {
	const n = 256
	a, _ := DefaultCoilRing(8).Build()
	maps, _ := a.Maps(n, n)
	mask := make([]bool, n*n)
	for i := range mask {
		mask[i] = (i/n)%2 == 0
	}
	nc, _ := NewNoiseCovariance(8, RingNoiseCovariance(8, 0.3))
	single, _ := NewCartesian(n, n, mask)
	eight, _ := NewCartesianSENSE(n, n, mask, maps, nil)
	white, _ := NewCartesianSENSE(n, n, mask, maps, nc)
	for _, c := range []struct {
		name string
		op   NormalOperator
	}{{"single-coil Cartesian", single}, {"SENSE 8 coils", eight}, {"SENSE 8 coils whitened", white}} {
		b.Run(c.name, func(b *testing.B) {
			x := make([]complex128, c.op.ImageLen())
			g := make([]complex128, c.op.ImageLen())
			for b.Loop() {
				c.op.Normal(g, x)
			}
		})
	}
}
