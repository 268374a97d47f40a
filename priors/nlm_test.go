package priors

import (
	"encoding/json"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"accelplan/internal/benchcpu"
	"accelplan/simulate/quality"
)

// pnpFixture is testdata/pnp_fixture.json, made by
// testdata/make_pnp_fixture.py with scikit-image 0.19.3, PyWavelets 1.1.1 and
// numpy 1.24.2 (see the script for every call and parameter mapping).
type pnpFixture struct {
	MadeBy      string    `json:"made_by"`
	Ny          int       `json:"ny"`
	Nx          int       `json:"nx"`
	Sigma       float64   `json:"sigma"`
	Clean       []float64 `json:"clean"`
	Noisy       []float64 `json:"noisy"`
	Phase       []float64 `json:"phase"`
	CNoisyRe    []float64 `json:"cnoisy_re"`
	CNoisyIm    []float64 `json:"cnoisy_im"`
	NoisyNRMSE  float64   `json:"noisy_nrmse"`
	CNoisyNRMSE float64   `json:"cnoisy_nrmse"`
	NLM         []struct {
		Kind          string          `json:"kind"`
		PatchSize     int             `json:"patch_size"`
		PatchDistance int             `json:"patch_distance"`
		HFactor       float64         `json:"h_factor"`
		Call          string          `json:"call"`
		NRMSE         float64         `json:"nrmse"`
		Output        json.RawMessage `json:"output"`
	} `json:"nlm"`
	HGrid   []float64 `json:"nlm_h_grid"`
	NLMScan []struct {
		Kind          string  `json:"kind"`
		PatchSize     int     `json:"patch_size"`
		PatchDistance int     `json:"patch_distance"`
		HFactor       float64 `json:"h_factor"`
		NRMSE         float64 `json:"nrmse"`
	} `json:"nlm_scan"`
	TV []struct {
		Weight     float64 `json:"weight"`
		NRMSE      float64 `json:"nrmse"`
		NRMSETight float64 `json:"nrmse_tight"`
	} `json:"tv"`
	Wavelet struct {
		Threshold float64 `json:"threshold"`
		NRMSE     float64 `json:"nrmse"`
	} `json:"wavelet_visushrink"`
	CycleSpin struct {
		Threshold   float64   `json:"threshold"`
		Levels      int       `json:"levels"`
		Wavelet     string    `json:"wavelet"`
		MaxShifts   int       `json:"max_shifts"`
		Output      []float64 `json:"output"`
		NRMSE       float64   `json:"nrmse"`
		NoSpinNRMSE float64   `json:"no_spin_nrmse"`
	} `json:"cycle_spin"`
}

var (
	pnpFixtureOnce sync.Once
	pnpFixtureVal  pnpFixture
	pnpFixtureErr  error
)

func loadPnPFixture(t testing.TB) *pnpFixture {
	t.Helper()
	pnpFixtureOnce.Do(func() {
		raw, err := os.ReadFile(filepath.Join("testdata", "pnp_fixture.json"))
		if err != nil {
			pnpFixtureErr = err
			return
		}
		pnpFixtureErr = json.Unmarshal(raw, &pnpFixtureVal)
	})
	if pnpFixtureErr != nil {
		t.Fatalf("reading the fixture (regenerate with /usr/bin/python3 testdata/make_pnp_fixture.py): %v", pnpFixtureErr)
	}
	f := &pnpFixtureVal
	n := f.Ny * f.Nx
	if n == 0 || len(f.Clean) != n || len(f.Noisy) != n || len(f.CNoisyRe) != n || len(f.CNoisyIm) != n || len(f.Phase) != n {
		t.Fatalf("fixture malformed: %d×%d", f.Ny, f.Nx)
	}
	return f
}

// complexTruth is clean·exp(iφ), the complex image of the fixture.
func (f *pnpFixture) complexTruth() []complex128 {
	out := make([]complex128, len(f.Clean))
	for i, v := range f.Clean {
		out[i] = complex(v, 0) * cmplx.Exp(complex(0, f.Phase[i]))
	}
	return out
}

func (f *pnpFixture) complexNoisy() []complex128 {
	out := make([]complex128, len(f.Clean))
	for i := range out {
		out[i] = complex(f.CNoisyRe[i], f.CNoisyIm[i])
	}
	return out
}

// pnpRealNRMSE is quality.NRMSE of the real part (the textbook
// ‖x − ref‖/‖ref‖, as skimage.metrics.normalized_root_mse).
func pnpRealNRMSE(x []complex128, ref []float64) float64 {
	re := make([]float64, len(x))
	for i, v := range x {
		re[i] = real(v)
	}
	return quality.NRMSE(re, ref, nil)
}

// pnpComplexNRMSE is ‖x − ref‖/‖ref‖ for complex images.
func pnpComplexNRMSE(x, ref []complex128) float64 {
	return math.Sqrt(linSqDist(x, ref) / linSqNorm(ref))
}

// nlmDirect is a direct transcription of the weights of Buades, Coll & Morel
// (CVPR 2005) with the noise subtraction of their IPOL 2011 paper: for every
// pixel, every candidate of the window, the patch distance summed pixel by
// pixel over the mirror-extended image. It is slow and serves to check the
// offset-wise box sums of NLM.Denoise.
func nlmDirect(src []complex128, ny, nx int, opt NLMOptions, sigma float64) []complex128 {
	opt = opt.withDefaults()
	f, s := opt.PatchRadius, opt.SearchRadius
	refl := func(i, n int) int {
		if n == 1 {
			return 0
		}
		p := 2 * (n - 1)
		i %= p
		if i < 0 {
			i += p
		}
		if i >= n {
			i = p - i
		}
		return i
	}
	at := func(i, j int) complex128 { return src[refl(i, ny)*nx+refl(j, nx)] }
	val := func(c complex128) (float64, float64) {
		switch opt.Mode {
		case NLMMagnitude:
			return cmplx.Abs(c), 0
		case NLMReal:
			return real(c), 0
		}
		return real(c), imag(c)
	}
	nch := 1.0
	if opt.Mode == NLMComplex {
		nch = 2
	}
	h := opt.HFactor * sigma
	out := make([]complex128, ny*nx)
	for i := range ny {
		for j := range nx {
			var ws float64
			var acc complex128
			for di := -s; di <= s; di++ {
				for dj := -s; dj <= s; dj++ {
					var d2 float64
					for a := -f; a <= f; a++ {
						for b := -f; b <= f; b++ {
							p0, p1 := val(at(i+a, j+b))
							q0, q1 := val(at(i+di+a, j+dj+b))
							d2 += (p0-q0)*(p0-q0) + (p1-q1)*(p1-q1)
						}
					}
					d2 /= float64((2*f+1)*(2*f+1)) * nch
					w := math.Exp(-math.Max(d2-2*sigma*sigma, 0) / (h * h))
					ws += w
					q := at(i+di, j+dj)
					if opt.Mode == NLMMagnitude {
						q = complex(cmplx.Abs(q), 0)
					}
					acc += complex(w, 0) * q
				}
			}
			v := acc / complex(ws, 0)
			if opt.Mode == NLMMagnitude {
				if a := cmplx.Abs(src[i*nx+j]); a > 0 {
					v = complex(real(v)/a, 0) * src[i*nx+j]
				}
			}
			out[i*nx+j] = v
		}
	}
	return out
}

// TestNLMMatchesDirectSum checks the fast offset-wise computation against
// the direct double sum of the published weight formula, for every mode, for
// patch and search radii that exceed small image sides (repeated mirror
// reflection) and for a non-square grid.
func TestNLMMatchesDirectSum(t *testing.T) {
	cases := []struct {
		name   string
		ny, nx int
		opt    NLMOptions
		sigma  float64
	}{
		{"complex 7×7 in 11×11", 19, 23, NLMOptions{Mode: NLMComplex}, 0.3},
		{"real 5×5 in 7×7", 16, 11, NLMOptions{PatchRadius: 2, SearchRadius: 3, Mode: NLMReal}, 0.2},
		{"magnitude 3×3 in 9×9", 12, 14, NLMOptions{PatchRadius: 1, SearchRadius: 4, HFactor: 1.3, Mode: NLMMagnitude}, 0.25},
		{"tiny image, wide window", 5, 4, NLMOptions{PatchRadius: 2, SearchRadius: 6, Mode: NLMComplex}, 0.4},
		{"one row", 1, 9, NLMOptions{PatchRadius: 1, SearchRadius: 2, Mode: NLMReal}, 0.3},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src := pnpRandImage(c.ny*c.nx, 97)
			d, err := NewNLM(c.ny, c.nx, c.opt)
			if err != nil {
				t.Fatal(err)
			}
			got := make([]complex128, len(src))
			d.Denoise(got, src, c.sigma)
			want := nlmDirect(src, c.ny, c.nx, c.opt, c.sigma)
			if e := pnpMaxDiff(got, want); e > 1e-12 {
				t.Errorf("max |fast − direct| = %.3g", e)
			}
			// In place gives the same.
			in := append([]complex128(nil), src...)
			d.Denoise(in, in, c.sigma)
			if e := pnpMaxDiff(in, got); e != 0 {
				t.Errorf("in-place result differs by %.3g", e)
			}
		})
	}
}

// skimageNLMH maps scikit-image's h to ours: its fast variant sums the
// squared patch differences over the (P−1)×(P−1) block whose corner is the
// centre and divides by P² (read from skimage/restoration/
// _nl_means_denoising.pyx, 0.19.3, _integral_to_distance_2d), so its weights
// are exp(−(P−1)²/P²·max(d̄² − 2σ², 0)/h²) with d̄² the block mean; the same
// scale here needs h·P/(P−1).
func skimageNLMH(hFactor float64, patchSize int) float64 {
	return hFactor * float64(patchSize) / float64(patchSize-1)
}

// nlmFixtureRun denoises the fixture's real or complex noisy image with our
// NLM (patch P = 2f+1, search radius s as scikit-image's patch_distance) and
// returns the output and its NRMSE against the truth.
func nlmFixtureRun(t *testing.T, f *pnpFixture, kind string, patchSize, dist int, hFactor float64) ([]complex128, float64) {
	t.Helper()
	opt := NLMOptions{PatchRadius: patchSize / 2, SearchRadius: dist, HFactor: hFactor, Mode: NLMReal}
	src := pnpComplex(f.Noisy)
	if kind == "complex" {
		opt.Mode = NLMComplex
		src = f.complexNoisy()
	}
	d, err := NewNLM(f.Ny, f.Nx, opt)
	if err != nil {
		t.Fatal(err)
	}
	out := make([]complex128, len(src))
	d.Denoise(out, src, f.Sigma)
	if kind == "complex" {
		return out, pnpComplexNRMSE(out, f.complexTruth())
	}
	return out, pnpRealNRMSE(out, f.Clean)
}

// TestNLMAgainstSkimage compares our non-local means with scikit-image 0.19.3
// denoise_nl_means(fast_mode=True, sigma=σ) on the fixture's noisy
// Shepp-Logan phantom (real, and complex as two channels), with the same
// patch width P, search radius and σ. The two differ in the patch: ours is
// the centred P×P patch of Buades et al., scikit-image's fast variant the
// (P−1)×(P−1) block next to the centre (see skimageNLMH), so they are
// compared on the error, not pixel by pixel:
//
//   - at scikit-image's h = 0.8σ, mapped to ours by skimageNLMH: our NRMSE
//     must be below the noisy image's and within 7% of scikit-image's
//     (measured: 2.4% above for 5×5 in 21×21, 4.4% complex and 5.9% real
//     above for 7×7, whose patch is larger than scikit-image's effective
//     6×6 — smaller patches do better on this small phantom), and the outputs
//     must lie closer to each other than either to the truth;
//   - with h tuned for each over the fixture's grid 0.6σ … 2σ: our best
//     NRMSE must be within 6% of scikit-image's best (measured: 0.6% for
//     5×5 in 21×21, 3.9% complex and 5% real for 7×7 in 11×11).
func TestNLMAgainstSkimage(t *testing.T) {
	f := loadPnPFixture(t)
	for _, c := range f.NLM {
		t.Run(c.Call, func(t *testing.T) {
			out, ours := nlmFixtureRun(t, f, c.Kind, c.PatchSize, c.PatchDistance, skimageNLMH(c.HFactor, c.PatchSize))
			var sk []complex128
			var truth []complex128
			ref := f.NoisyNRMSE
			if c.Kind == "real" {
				var v []float64
				if err := json.Unmarshal(c.Output, &v); err != nil {
					t.Fatal(err)
				}
				sk, truth = pnpComplex(v), pnpComplex(f.Clean)
			} else {
				var v struct{ Re, Im []float64 }
				if err := json.Unmarshal(c.Output, &v); err != nil {
					t.Fatal(err)
				}
				sk = make([]complex128, len(v.Re))
				for i := range sk {
					sk[i] = complex(v.Re[i], v.Im[i])
				}
				truth, ref = f.complexTruth(), f.CNoisyNRMSE
			}
			if e := pnpComplexNRMSE(sk, truth); math.Abs(e-c.NRMSE) > 1e-8 {
				t.Fatalf("fixture output has NRMSE %.10f, fixture says %.10f", e, c.NRMSE)
			}
			apart := math.Sqrt(linSqDist(out, sk) / linSqNorm(truth))
			t.Logf("NRMSE: noisy %.4f, scikit-image %.4f, ours %.4f (%+.1f%%); ‖ours − skimage‖/‖truth‖ = %.4f",
				ref, c.NRMSE, ours, 100*(ours/c.NRMSE-1), apart)
			if ours > 1.07*c.NRMSE {
				t.Errorf("our NRMSE %.4f exceeds scikit-image's %.4f by more than 7%%", ours, c.NRMSE)
			}
			if ours >= ref {
				t.Errorf("our NRMSE %.4f does not improve on the noisy image's %.4f", ours, ref)
			}
			if apart >= min(ours, c.NRMSE) {
				t.Errorf("outputs differ by %.4f, more than either differs from the truth", apart)
			}
		})
	}
	type key struct {
		kind    string
		p, dist int
	}
	best := map[key]float64{}
	for _, c := range f.NLMScan {
		k := key{c.Kind, c.PatchSize, c.PatchDistance}
		if v, ok := best[k]; !ok || c.NRMSE < v {
			best[k] = c.NRMSE
		}
	}
	if len(best) == 0 || len(f.HGrid) < 3 {
		t.Fatal("fixture has no h scan")
	}
	for k, sk := range best {
		ours := math.Inf(1)
		for _, h := range f.HGrid {
			_, e := nlmFixtureRun(t, f, k.kind, k.p, k.dist, h)
			ours = min(ours, e)
		}
		t.Logf("%s %d×%d in %d×%d, best over h: scikit-image %.4f, ours %.4f (%+.1f%%)",
			k.kind, k.p, k.p, 2*k.dist+1, 2*k.dist+1, sk, ours, 100*(ours/sk-1))
		if ours > 1.06*sk {
			t.Errorf("%v: our best NRMSE %.4f exceeds scikit-image's best %.4f by more than 6%%", k, ours, sk)
		}
	}
}

// TestNLMProperties: a constant image is a fixed point (the weights are
// normalised); the result of a second denoiser with the same options is
// identical (deterministic); σ = 0 copies.
func TestNLMProperties(t *testing.T) {
	const ny, nx = 24, 30
	for _, mode := range []NLMMode{NLMComplex, NLMReal, NLMMagnitude} {
		d, _ := NewNLM(ny, nx, NLMOptions{Mode: mode})
		c := make([]complex128, ny*nx)
		for i := range c {
			c[i] = complex(0.7, -0.2)
		}
		out := make([]complex128, len(c))
		d.Denoise(out, c, 0.1)
		if e := pnpMaxDiff(out, c); e > 1e-14 {
			t.Errorf("%v: constant image moved by %.3g", mode, e)
		}
		src := pnpRandImage(ny*nx, 5)
		d.Denoise(out, src, 0.2)
		d2, _ := NewNLM(ny, nx, NLMOptions{Mode: mode})
		out2 := make([]complex128, len(c))
		d2.Denoise(out2, src, 0.2)
		if e := pnpMaxDiff(out, out2); e != 0 {
			t.Errorf("%v: two runs differ by %.3g", mode, e)
		}
		d.Denoise(out, src, 0)
		if e := pnpMaxDiff(out, src); e != 0 {
			t.Errorf("%v: σ = 0 changed the image by %.3g", mode, e)
		}
	}
}

func TestNLMRejects(t *testing.T) {
	cases := []struct {
		ny, nx int
		opt    NLMOptions
		want   string
	}{
		{0, 5, NLMOptions{}, "at least 1×1"},
		{5, 5, NLMOptions{PatchRadius: -1}, "patch radius"},
		{5, 5, NLMOptions{SearchRadius: 40}, "search radius"},
		{5, 5, NLMOptions{HFactor: math.NaN()}, "h factor"},
		{5, 5, NLMOptions{HFactor: -1}, "h factor"},
		{5, 5, NLMOptions{Mode: 7}, "valid: complex, real, magnitude"},
	}
	for _, c := range cases {
		_, err := NewNLM(c.ny, c.nx, c.opt)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("NewNLM(%d, %d, %+v) = %v, want an error about %q", c.ny, c.nx, c.opt, err, c.want)
		}
	}
	if _, err := ParseNLMMode("phase"); err == nil || !strings.Contains(err.Error(), "valid: complex, real, magnitude") {
		t.Errorf("ParseNLMMode(phase) = %v", err)
	}
	for _, m := range []NLMMode{NLMComplex, NLMReal, NLMMagnitude} {
		if got, err := ParseNLMMode(m.String()); err != nil || got != m {
			t.Errorf("ParseNLMMode(%q) = %v, %v", m.String(), got, err)
		}
	}
}

func TestNLMAllocatesNothing(t *testing.T) {
	d, _ := NewNLM(32, 40, DefaultNLMOptions())
	src := pnpRandImage(32*40, 3)
	dst := make([]complex128, len(src))
	if a := testing.AllocsPerRun(3, func() { d.Denoise(dst, src, 0.1) }); a != 0 {
		t.Errorf("Denoise allocates %.0f times per call", a)
	}
}

// nlmBenchImage is a 256² noisy test scene (invented: a bright square and a
// grey disc) for the benchmarks.
func nlmBenchImage() []complex128 {
	const n = 256
	r := rand.New(rand.NewPCG(11, 12))
	x := make([]complex128, n*n)
	for i := range n {
		for j := range n {
			v := 0.2
			if i > 60 && i < 150 && j > 40 && j < 140 {
				v = 1
			}
			if (i-180)*(i-180)+(j-170)*(j-170) < 50*50 {
				v = 0.5
			}
			x[i*n+j] = complex(v+0.05*r.NormFloat64(), 0.05*r.NormFloat64())
		}
	}
	return x
}

// Non-local means at 256², 7×7 patches in an 11×11 window, complex mode.
func BenchmarkNLM256(b *testing.B) {
	for _, c := range []struct {
		name string
		opt  NLMOptions
	}{
		{"7x7in11x11", NLMOptions{PatchRadius: 3, SearchRadius: 5}},
		{"5x5in21x21", NLMOptions{PatchRadius: 2, SearchRadius: 10}},
		{"7x7in11x11real", NLMOptions{PatchRadius: 3, SearchRadius: 5, Mode: NLMReal}},
	} {
		b.Run(c.name, func(b *testing.B) {
			d, _ := NewNLM(256, 256, c.opt)
			src := nlmBenchImage()
			dst := make([]complex128, len(src))
			b.ReportAllocs()
			done := benchcpu.Timer(b)
			for b.Loop() {
				d.Denoise(dst, src, 0.05)
			}
			done()
		})
	}
}

// Non-local means on an invented complex scene (a bright square and a grey
// disc with a phase ramp) with noise of σ = 0.05 per channel.
func ExampleNLM() {
	const ny, nx, sigma = 48, 64, 0.05
	rng := rand.New(rand.NewPCG(1, 2))
	truth := make([]complex128, ny*nx)
	noisy := make([]complex128, ny*nx)
	for i := range ny {
		for j := range nx {
			v := 0.2
			if i > 8 && i < 30 && j > 10 && j < 34 {
				v = 1
			}
			if (i-30)*(i-30)+(j-46)*(j-46) < 100 {
				v = 0.6
			}
			truth[i*nx+j] = cmplx.Rect(v, 0.02*float64(j))
			noisy[i*nx+j] = truth[i*nx+j] + complex(sigma*rng.NormFloat64(), sigma*rng.NormFloat64())
		}
	}
	d, err := NewNLM(ny, nx, DefaultNLMOptions()) // 7×7 patches, 11×11 window, h = 1.2σ
	if err != nil {
		panic(err)
	}
	out := make([]complex128, len(noisy))
	d.Denoise(out, noisy, sigma)
	fmt.Printf("NRMSE noisy %.2f, denoised %.2f\n", pnpComplexNRMSE(noisy, truth), pnpComplexNRMSE(out, truth))
	// Output:
	// NRMSE noisy 0.15, denoised 0.05
}
