package quality_test

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"
	"strings"
	"testing"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"

	"accelplan/simulate"
	"accelplan/simulate/quality"
)

// gaussianEdge returns an image of a straight edge from lo to hi blurred by a
// Gaussian of standard deviation sigma (mm) and point-sampled at the pixel
// centres: lo + (hi−lo)·Φ(d/σ), d the signed distance (mm) from the line
// through e's point along its normal (the edge-spread function of a Gaussian
// point-spread function; textbook). Φ is gonum's normal CDF.
func gaussianEdge(g quality.Grid, e quality.Edge, sigma, lo, hi float64) []float64 {
	img := make([]float64, g.Nx*g.Ny)
	sn, cs := math.Sincos(e.NormalDeg * math.Pi / 180)
	for i := range g.Ny {
		for j := range g.Nx {
			x, y := g.Centre(i, j)
			d := ((x-e.X0)*cs + (y-e.Y0)*sn) * g.FOVmm
			img[i*g.Nx+j] = lo + (hi-lo)*distuv.UnitNormal.CDF(d/sigma)
		}
	}
	return img
}

func TestEdgeGaussianBlur(t *testing.T) {
	// A Gaussian PSF of standard deviation σ has the MTF exp(−2π²σ²f²)
	// (Fourier transform of a Gaussian; textbook), which is 0.5 at
	// f50 = √(ln 2/2)/(π·σ), and its edge rises from 10 % to 90 % over
	// 2·Φ⁻¹(0.9)·σ = 2·1.2816·σ (common practice; Φ⁻¹ from gonum). The
	// slanted-edge estimate meets f50 within 0.3 % here (measured; bound
	// 1 %). The width reads high by up to 1.5 % for the sharpest edge
	// (σ = 0.8 pixel): the bins add b²/12 to σ² and linear interpolation
	// between bins on the curved ESF moves both crossings outwards by about
	// b²·Φ⁻¹(0.9)/(8σ) each, b the quarter-pixel bin; bound 2 %. Cases vary
	// the blur, the slant, the polarity, the direction (x, y) and the pixel
	// aspect.
	z90 := distuv.UnitNormal.Quantile(0.9)
	cases := []struct {
		name      string
		g         quality.Grid
		normalDeg float64
		sigmaPx   float64
		lo, hi    float64
	}{
		{"σ 1.5 px, 5°", quality.Grid{Nx: 128, Ny: 128, FOVmm: 220}, 5, 1.5, 0.2, 1},
		{"σ 0.8 px, 5°", quality.Grid{Nx: 128, Ny: 128, FOVmm: 220}, 5, 0.8, 0.2, 1},
		{"σ 3 px, −7°", quality.Grid{Nx: 128, Ny: 128, FOVmm: 220}, -7, 3, 0, 2},
		{"σ 1.5 px, 95° (along y)", quality.Grid{Nx: 128, Ny: 128, FOVmm: 220}, 95, 1.5, 0.2, 1},
		{"σ 1.5 px, 185° (bright to dark)", quality.Grid{Nx: 128, Ny: 128, FOVmm: 220}, 185, 1.5, 0.2, 1},
		{"σ 1.2 px, 4°, oblong pixels", quality.Grid{Nx: 160, Ny: 96, FOVmm: 200}, 4, 1.2, 10, 11},
		{"σ 1.2 px, 96°, oblong pixels", quality.Grid{Nx: 160, Ny: 96, FOVmm: 200}, 96, 1.2, 10, 11},
	}
	for _, c := range cases {
		dx, dy := c.g.PixelMM()
		sn, cs := math.Sincos(c.normalDeg * math.Pi / 180)
		sigma := c.sigmaPx * (math.Abs(cs)*dx + math.Abs(sn)*dy)
		// Half-width at least 7σ: plateaus from 3.5σ out (see EdgeResponse).
		e := quality.Edge{X0: 0.013, Y0: -0.021, NormalDeg: c.normalDeg, HalfLengthMM: 40, HalfWidthMM: max(20, 7*sigma)}
		img := gaussianEdge(c.g, e, sigma, c.lo, c.hi)
		res, err := quality.EdgeResponse(img, c.g, e, quality.EdgeOptions{})
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		f50 := math.Sqrt(math.Ln2/2) / (math.Pi * sigma)
		w := 2 * z90 * sigma
		t.Logf("%s: MTF50 %.5f (analytic %.5f, %+.2f %%), 10–90 %.4f mm (analytic %.4f, %+.2f %%), %d samples",
			c.name, res.MTF50, f50, 100*(res.MTF50/f50-1), res.Width1090, w, 100*(res.Width1090/w-1), res.Samples)
		if math.Abs(res.MTF50/f50-1) > 0.01 {
			t.Errorf("%s: MTF50 %.5f cycles/mm, analytic %.5f", c.name, res.MTF50, f50)
		}
		if math.Abs(res.Width1090/w-1) > 0.02 {
			t.Errorf("%s: 10–90 %% width %.4f mm, analytic %.4f", c.name, res.Width1090, w)
		}
		if math.Abs(res.Low-c.lo) > 1e-3*(c.hi-c.lo) || math.Abs(res.High-c.hi) > 1e-3*(c.hi-c.lo) {
			t.Errorf("%s: plateaus %v and %v, want %v and %v", c.name, res.Low, res.High, c.lo, c.hi)
		}
		// The sampled MTF follows the Gaussian up to the pixel Nyquist
		// frequency (where its value is still well above rounding noise).
		for k, f := range res.Freq {
			if f > 0.5/res.PixelMM {
				break
			}
			want := math.Exp(-2 * math.Pi * math.Pi * sigma * sigma * f * f)
			if math.Abs(res.MTF[k]-want) > 0.01 {
				t.Errorf("%s: MTF(%.4f) = %.4f, Gaussian %.4f", c.name, f, res.MTF[k], want)
				break
			}
		}
	}
}

func TestEdgePixelAperture(t *testing.T) {
	// An ideal edge averaged over square pixels of pitch Δ (the exact
	// rasterisation of a rotated rectangle by package simulate) is the edge
	// seen through the pixel box projected on the edge normal, a trapezoid:
	// MTF(f) = sinc(f·Δ·cos φ)·sinc(f·Δ·sin φ) (Fourier transform of a box;
	// textbook). Its 0.5 crossing, found here by bisection of that formula,
	// is met within 1 % (measured up to 0.6 % low, from the uneven spread of
	// pixels within the quarter-pixel bins and the aperture's side lobes
	// aliased by the bins).
	const n, fov = 128, 100.0
	g := quality.Grid{Nx: n, Ny: n, FOVmm: fov}
	sinc := func(u float64) float64 {
		if u == 0 {
			return 1
		}
		return math.Sin(math.Pi*u) / (math.Pi * u)
	}
	for _, phi := range []float64{3, 5, 10, 15} {
		sq := simulate.Shapes{Rects: []simulate.Rect{{Rho: 1, X0: -0.2, Y0: 0.01, W: 0.6, H: 0.8, ThetaDeg: phi}}}
		img := sq.Rasterize(n, n)
		sn, cs := math.Sincos(phi * math.Pi / 180)
		// The rectangle's right edge: centre + W/2 along its first axis.
		e := quality.Edge{X0: -0.2 + 0.3*cs, Y0: 0.01 + 0.3*sn, NormalDeg: phi, HalfLengthMM: 25, HalfWidthMM: 12}
		res, err := quality.EdgeResponse(img, g, e, quality.EdgeOptions{})
		if err != nil {
			t.Fatalf("φ = %g°: %v", phi, err)
		}
		pix := fov / n
		m := func(f float64) float64 { return sinc(f*pix*cs) * sinc(f*pix*sn) }
		a, b := 0.0, 1/pix
		for range 60 {
			if mid := (a + b) / 2; m(mid) > 0.5 {
				a = mid
			} else {
				b = mid
			}
		}
		want := (a + b) / 2
		t.Logf("φ = %g°: MTF50 %.5f cycles/mm, trapezoid aperture %.5f (%+.2f %%)", phi, res.MTF50, want, 100*(res.MTF50/want-1))
		if math.Abs(res.MTF50/want-1) > 0.01 {
			t.Errorf("φ = %g°: MTF50 %.5f, want %.5f", phi, res.MTF50, want)
		}
	}
}

func TestEdgeBadInput(t *testing.T) {
	g := quality.Grid{Nx: 64, Ny: 64, FOVmm: 100}
	good := quality.Edge{NormalDeg: 5, HalfLengthMM: 30, HalfWidthMM: 12}
	img := gaussianEdge(g, good, 2, 0, 1)
	flat := make([]float64, 64*64)
	nan := append([]float64(nil), img...)
	nan[100] = math.NaN()
	cases := []struct {
		name string
		img  []float64
		g    quality.Grid
		e    quality.Edge
		opt  quality.EdgeOptions
		want string
	}{
		{"short image", img[:100], g, good, quality.EdgeOptions{}, "image has 100 values"},
		{"NaN pixel", nan, g, good, quality.EdgeOptions{}, "is NaN"},
		{"no FOV", img, quality.Grid{Nx: 64, Ny: 64}, good, quality.EdgeOptions{}, "field of view"},
		{"edge along the pixel axis", img, g, quality.Edge{NormalDeg: 0, HalfLengthMM: 30, HalfWidthMM: 12}, quality.EdgeOptions{}, "must be slanted"},
		{"no contrast", flat, g, good, quality.EdgeOptions{}, "no edge to measure"},
		{"narrow", img, g, quality.Edge{NormalDeg: 5, HalfLengthMM: 30, HalfWidthMM: 1}, quality.EdgeOptions{}, "spans only"},
		{"short", img, g, quality.Edge{NormalDeg: 5, HalfLengthMM: 0.5, HalfWidthMM: 12}, quality.EdgeOptions{}, "only"},
		{"outside the image", img, g, quality.Edge{X0: 3, NormalDeg: 5, HalfLengthMM: 30, HalfWidthMM: 12}, quality.EdgeOptions{}, "inside the image"},
		{"negative length", img, g, quality.Edge{NormalDeg: 5, HalfLengthMM: -1, HalfWidthMM: 12}, quality.EdgeOptions{}, "must both be > 0"},
		{"bins", img, g, good, quality.EdgeOptions{BinsPerPixel: 100}, "bins per pixel"},
	}
	for _, c := range cases {
		_, err := quality.EdgeResponse(c.img, c.g, c.e, c.opt)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
	if _, err := quality.EdgeResponse(img, g, good, quality.EdgeOptions{}); err != nil {
		t.Errorf("good edge: %v", err)
	}
}

// discImage returns a background of 1 with a disc of intensity 1 + delta
// whose pixels are those with the centre inside (so the true mean inside
// minus the annulus is exactly delta), plus white Gaussian noise of standard
// deviation sigma from rng.
func discImage(g quality.Grid, d quality.Disc, delta, sigma float64, rng *rand.Rand) []float64 {
	img := make([]float64, g.Nx*g.Ny)
	for i := range g.Ny {
		for j := range g.Nx {
			x, y := g.Centre(i, j)
			v := 1.0
			if math.Hypot(x-d.X0, y-d.Y0)*g.FOVmm <= d.DiameterMM/2 {
				v += delta
			}
			if rng != nil {
				v += sigma * rng.NormFloat64()
			}
			img[i*g.Nx+j] = v
		}
	}
	return img
}

func TestDetectRoseFigureExact(t *testing.T) {
	// Noiseless constructed image with σ given: the contrast is exactly
	// delta, CNR = delta/σ and SNR_Rose = CNR·√(πr²/(dx·dy)) (Rose 1948,
	// from memory), to rounding.
	g := quality.Grid{Nx: 96, Ny: 80, FOVmm: 120}
	d := quality.Disc{X0: 0.05, Y0: -0.03, DiameterMM: 9, Contrast: 0.03, Delta: 0.03}
	img := discImage(g, d, 0.03, 0, nil)
	det, err := quality.DetectDiscs(img, g, []quality.Disc{d}, quality.DetectOptions{Sigma: 0.02})
	if err != nil {
		t.Fatal(err)
	}
	s := det.Discs[0]
	dx, dy := g.PixelMM()
	rose := 1.5 * math.Sqrt(math.Pi*4.5*4.5/(dx*dy))
	if math.Abs(s.Contrast-0.03) > 1e-14 || math.Abs(s.CNR-1.5) > 1e-12 || math.Abs(s.RoseSNR-rose) > 1e-12 {
		t.Errorf("contrast %v, CNR %v, Rose %v; want 0.03, 1.5, %v", s.Contrast, s.CNR, s.RoseSNR, rose)
	}
	if !s.Detected || det.Threshold != quality.RoseThreshold || det.NoisePixels != 0 {
		t.Errorf("detected %v threshold %v noise pixels %d", s.Detected, det.Threshold, det.NoisePixels)
	}
	// A darker disc is detected with its own polarity.
	dd := d
	dd.Delta = -0.03
	det, _ = quality.DetectDiscs(discImage(g, dd, -0.03, 0, nil), g, []quality.Disc{dd}, quality.DetectOptions{Sigma: 0.02})
	if math.Abs(det.Discs[0].CNR-1.5) > 1e-12 {
		t.Errorf("dark disc: CNR %v, want 1.5", det.Discs[0].CNR)
	}
	// Pixel-CNR rule: 1.5 reaches 1.4 but not 1.6.
	for _, c := range []struct {
		thr  float64
		want bool
	}{{1.4, true}, {1.6, false}} {
		det, _ := quality.DetectDiscs(img, g, []quality.Disc{d}, quality.DetectOptions{Rule: quality.RulePixelCNR, Threshold: c.thr, Sigma: 0.02})
		if det.Discs[0].Detected != c.want {
			t.Errorf("pixel CNR 1.5 against %v: detected %v", c.thr, det.Discs[0].Detected)
		}
	}
}

func TestDetectCNRStatistics(t *testing.T) {
	// A disc of known contrast δ in white noise of σ, with σ measured in a
	// background ROI: the measured contrast is the difference of two means
	// of independent pixels, unbiased with standard error σ·√(1/N_in +
	// 1/N_ann); σ̂ has relative standard error ≈ 1/√(2(n−1)) (textbook
	// sampling statistics). So CNR has mean ≈ δ/σ and standard deviation ≈
	// √(1/N_in + 1/N_ann + (δ/σ)²/(2(n−1))). Over 200 seeded draws the mean
	// CNR must lie within 4 standard errors of δ/σ and the spread of CNR
	// within 20 % of the prediction (the sample SD of 200 draws scatters by
	// 5 %).
	g := quality.Grid{Nx: 96, Ny: 96, FOVmm: 96}
	d := quality.Disc{X0: 0.1, Y0: 0.05, DiameterMM: 10, Contrast: 0.04, Delta: 0.04}
	const sigma, draws = 0.05, 200
	noise := g.CircleMask(-0.25, -0.2, 12)
	rng := rand.New(rand.NewPCG(6, 2))
	cnr := make([]float64, draws)
	var nIn, nAnn, nNoise int
	for k := range cnr {
		img := discImage(g, d, d.Delta, sigma, rng)
		det, err := quality.DetectDiscs(img, g, []quality.Disc{d}, quality.DetectOptions{NoiseROI: noise})
		if err != nil {
			t.Fatal(err)
		}
		s := det.Discs[0]
		cnr[k] = s.CNR
		nIn, nAnn, nNoise = s.Inside, s.Annulus, det.NoisePixels
	}
	mean, sd := stat.MeanStdDev(cnr, nil) // gonum, sample SD
	want := d.Delta / sigma
	pred := math.Sqrt(1/float64(nIn) + 1/float64(nAnn) + want*want/(2*float64(nNoise-1)))
	t.Logf("N_in %d, N_ann %d, n_noise %d: mean CNR %.4f (want %.4f ± %.4f), SD %.4f (predicted %.4f)",
		nIn, nAnn, nNoise, mean, want, pred/math.Sqrt(draws), sd, pred)
	if math.Abs(mean-want) > 4*pred/math.Sqrt(draws) {
		t.Errorf("mean CNR %.4f, want %.4f within %.4f", mean, want, 4*pred/math.Sqrt(draws))
	}
	if math.Abs(sd/pred-1) > 0.2 {
		t.Errorf("CNR spread %.4f, predicted %.4f", sd, pred)
	}
}

func TestDetectionMonotone(t *testing.T) {
	// On the low-contrast phantom of package simulate with white noise, the
	// fraction of 200 seeded draws in which a disc is detected must not fall
	// significantly as the disc grows or its contrast rises (the Rose figure
	// grows with both): a reversal larger than three binomial standard
	// errors of the difference plus one draw fails. The median over the
	// draws of the smallest detected diameter must not grow with the
	// contrast. Noise-free with σ given, both must hold exactly.
	const n, fov, sigma, draws = 128, 220.0, 0.012, 200
	p, err := simulate.NewLowContrastPhantom(simulate.LowContrastSpec{FOVmm: fov})
	if err != nil {
		t.Fatal(err)
	}
	g := quality.Grid{Nx: n, Ny: n, FOVmm: fov}
	truth := p.Rasterize(n, n)
	roi := p.NoiseROI(n, n)
	cols := len(p.Spec.DiametersMM)
	rows := len(p.Spec.Contrasts)
	// Columns hold diameters in decreasing order, rows contrasts in
	// decreasing order (the defaults): the first of each pair should be
	// detected at least as often.
	reversed := func(big, small float64, trials int) bool {
		if trials == 1 {
			return small > big
		}
		se := math.Sqrt((big*(1-big) + small*(1-small)) / float64(trials))
		return small > big+3*se+1/float64(trials)
	}
	check := func(name string, frac []float64, trials int, smallest []float64) {
		for r := range rows {
			for c := 1; c < cols; c++ {
				if reversed(frac[r*cols+c-1], frac[r*cols+c], trials) {
					t.Errorf("%s: contrast %v: %g mm detected more often (%.3f) than %g mm (%.3f)", name, p.Spec.Contrasts[r],
						p.Spec.DiametersMM[c], frac[r*cols+c], p.Spec.DiametersMM[c-1], frac[r*cols+c-1])
				}
			}
		}
		for c := range cols {
			for r := 1; r < rows; r++ {
				if reversed(frac[(r-1)*cols+c], frac[r*cols+c], trials) {
					t.Errorf("%s: %g mm: contrast %v detected more often (%.3f) than %v (%.3f)", name, p.Spec.DiametersMM[c],
						p.Spec.Contrasts[r], frac[r*cols+c], p.Spec.Contrasts[r-1], frac[(r-1)*cols+c])
				}
			}
		}
		for r := 1; r < rows; r++ {
			if smallest[r] < smallest[r-1] {
				t.Errorf("%s: smallest disc %g mm at contrast %v but %g mm at the higher %v", name, smallest[r], p.Spec.Contrasts[r], smallest[r-1], p.Spec.Contrasts[r-1])
			}
		}
	}
	smallestOf := func(det quality.Detection) []float64 {
		out := make([]float64, rows)
		for r, c := range p.Spec.Contrasts {
			d, ok, err := det.Smallest(c)
			if err != nil {
				t.Fatal(err)
			}
			if !ok {
				d = math.Inf(1)
			}
			out[r] = d
		}
		return out
	}
	// Noise-free, σ given.
	det, err := quality.DetectDiscs(truth, g, p.Targets, quality.DetectOptions{Sigma: sigma})
	if err != nil {
		t.Fatal(err)
	}
	frac := make([]float64, len(p.Targets))
	for k, s := range det.Discs {
		if s.Detected {
			frac[k] = 1
		}
	}
	small := smallestOf(det)
	t.Logf("noise-free: smallest detected per contrast %v mm", small)
	check("noise-free", frac, 1, small)
	// Noisy draws, σ measured in the noise ROI.
	rng := rand.New(rand.NewPCG(11, 3))
	img := make([]float64, len(truth))
	hits := make([]int, len(p.Targets))
	smallest := make([][]float64, rows)
	for range draws {
		for k, v := range truth {
			img[k] = v + sigma*rng.NormFloat64()
		}
		det, err := quality.DetectDiscs(img, g, p.Targets, quality.DetectOptions{NoiseROI: roi})
		if err != nil {
			t.Fatal(err)
		}
		for k, s := range det.Discs {
			if s.Detected {
				hits[k]++
			}
		}
		for r, d := range smallestOf(det) {
			smallest[r] = append(smallest[r], d)
		}
	}
	median := make([]float64, rows)
	for r := range smallest {
		sort.Float64s(smallest[r])
		median[r] = smallest[r][draws/2]
	}
	for k, h := range hits {
		frac[k] = float64(h) / draws
	}
	t.Logf("noisy: detection fractions %.3f", frac)
	t.Logf("noisy: median smallest detected per contrast %v mm", median)
	check("noisy", frac, draws, median)
	// The test must discriminate: something is always detected and
	// something never.
	some, miss := false, false
	for _, h := range hits {
		some = some || h == draws
		miss = miss || h == 0
	}
	if !some || !miss {
		t.Errorf("detection fractions %v do not span detected and missed discs", frac)
	}
}

func TestSmallestUnbrokenRun(t *testing.T) {
	mk := func(d float64, c float64, det bool) quality.DiscScore {
		return quality.DiscScore{Disc: quality.Disc{DiameterMM: d, Contrast: c}, Detected: det}
	}
	det := quality.Detection{Discs: []quality.DiscScore{
		mk(2, 0.05, true), mk(8, 0.05, true), mk(4, 0.05, false), mk(6, 0.05, true),
		mk(8, 0.01, false), mk(2, 0.01, true),
		mk(8, 0.02, true), mk(4, 0.02, true), mk(4, 0.02, false),
	}}
	cases := []struct {
		c    float64
		d    float64
		ok   bool
		fail bool
	}{
		{0.05, 6, true, false}, // 2 mm detected by chance after 4 mm was missed
		{0.01, 0, false, false},
		{0.02, 8, true, false}, // one of the two 4 mm discs missed
		{0.03, 0, false, true},
	}
	for _, c := range cases {
		d, ok, err := det.Smallest(c.c)
		if (err != nil) != c.fail || d != c.d || ok != c.ok {
			t.Errorf("contrast %v: %v %v %v, want %v %v (error %v)", c.c, d, ok, err, c.d, c.ok, c.fail)
		}
	}
	if got := det.Contrasts(); len(got) != 3 || got[0] != 0.05 || got[1] != 0.01 || got[2] != 0.02 {
		t.Errorf("contrasts %v", got)
	}
}

func TestDetectBadInput(t *testing.T) {
	g := quality.Grid{Nx: 64, Ny: 64, FOVmm: 64}
	d := quality.Disc{DiameterMM: 6, Contrast: 0.1, Delta: 0.1}
	img := discImage(g, d, 0.1, 0.01, rand.New(rand.NewPCG(1, 1)))
	flat := make([]float64, 64*64)
	noise := g.CircleMask(-0.3, -0.3, 8)
	cases := []struct {
		name  string
		img   []float64
		discs []quality.Disc
		opt   quality.DetectOptions
		want  string
	}{
		{"no discs", img, nil, quality.DetectOptions{Sigma: 1}, "no disc"},
		{"wrong length", img[:10], []quality.Disc{d}, quality.DetectOptions{Sigma: 1}, "image has 10 values"},
		{"no diameter", img, []quality.Disc{{Contrast: 0.1}}, quality.DetectOptions{Sigma: 1}, "diameter 0 mm"},
		{"NaN centre", img, []quality.Disc{{X0: math.NaN(), DiameterMM: 2}}, quality.DetectOptions{Sigma: 1}, "not finite"},
		{"no noise ROI", img, []quality.Disc{d}, quality.DetectOptions{}, "noise ROI has 0 entries"},
		{"tiny noise ROI", img, []quality.Disc{d}, quality.DetectOptions{NoiseROI: g.CircleMask(-0.3, -0.3, 1)}, "at least 10"},
		{"flat noise ROI", flat, []quality.Disc{d}, quality.DetectOptions{NoiseROI: noise}, "perfectly flat"},
		{"negative σ", img, []quality.Disc{d}, quality.DetectOptions{Sigma: -1}, "noise σ"},
		{"pixel CNR without threshold", img, []quality.Disc{d}, quality.DetectOptions{Rule: quality.RulePixelCNR, Sigma: 1}, "needs a threshold"},
		{"bad threshold", img, []quality.Disc{d}, quality.DetectOptions{Threshold: math.Inf(1), Sigma: 1}, "threshold"},
		{"unknown rule", img, []quality.Disc{d}, quality.DetectOptions{Rule: 7, Sigma: 1}, "unknown detection rule"},
		{"discs too close", img, []quality.Disc{d, {X0: 0.15, DiameterMM: 6}}, quality.DetectOptions{Sigma: 1}, "reaches disc 1"},
		{"outside the image", img, []quality.Disc{{X0: 2, DiameterMM: 2}}, quality.DetectOptions{Sigma: 1}, "past the image border"},
		{"cut by the border", img, []quality.Disc{{X0: 0.45, Y0: 0.3, DiameterMM: 4}}, quality.DetectOptions{Sigma: 1}, "past the image border"},
	}
	for _, c := range cases {
		_, err := quality.DetectDiscs(c.img, g, c.discs, c.opt)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
}

// gaussianBars returns an image of a bar group blurred by a Gaussian of σ mm
// across the bars and point-sampled: background 0.5, each bar adds delta
// times Φ((u−u0)/σ) − Φ((u−u1)/σ) across it (the blurred box; textbook) and
// the full delta along its whole length (no blur along the bars, which the
// measurement averages over).
func gaussianBars(g quality.Grid, b quality.BarGroup, sigma float64) []float64 {
	img := make([]float64, g.Nx*g.Ny)
	for i := range g.Ny {
		for j := range g.Nx {
			x, y := g.Centre(i, j)
			u, v := (x-b.X0)*g.FOVmm, (y-b.Y0)*g.FOVmm
			if b.AlongY {
				u, v = v, u
			}
			val := 0.5
			if math.Abs(v) <= b.LengthMM/2 {
				for k := range b.Bars {
					c := (float64(k) - float64(b.Bars-1)/2) * b.PeriodMM
					lo, hi := c-b.PeriodMM/4, c+b.PeriodMM/4
					if sigma == 0 {
						if u >= lo && u < hi {
							val += b.Delta
						}
						continue
					}
					val += b.Delta * (distuv.UnitNormal.CDF((u-lo)/sigma) - distuv.UnitNormal.CDF((u-hi)/sigma))
				}
			}
			img[i*g.Nx+j] = val
		}
	}
	return img
}

func TestBarModulationGaussian(t *testing.T) {
	// Through a Gaussian blur of σ the fundamental of a bar pattern of period
	// p is multiplied by the blur's MTF exp(−2π²σ²/p²) (Fourier transform of
	// a Gaussian; textbook), so that is the modulation once the harmonics are
	// damped and the blur of the bars outside the fitted span is negligible;
	// measured within 0.01 here, bound 0.02. Unblurred, point-sampled bars of
	// 8 pixels give 1 to within the harmonics' leakage on the grid (measured
	// 0.01; bound 0.03).
	g := quality.Grid{Nx: 200, Ny: 160, FOVmm: 100}
	dx, dy := g.PixelMM()
	cases := []struct {
		name     string
		alongY   bool
		periodPx float64
		sigmaP   float64 // σ as a fraction of the period
		tol      float64
	}{
		{"along x, 8 px, σ = 0.1 p", false, 8, 0.1, 0.02},
		{"along x, 8 px, σ = 0.2 p", false, 8, 0.2, 0.02},
		{"along x, 6 px, σ = 0.25 p", false, 6, 0.25, 0.02},
		{"along y, 8 px, σ = 0.2 p", true, 8, 0.2, 0.02},
		{"along y, 4.3 px, σ = 0.3 p", true, 4.3, 0.3, 0.02},
		{"along x, 8 px, no blur", false, 8, 0, 0.03},
	}
	for _, c := range cases {
		pitch := dx
		if c.alongY {
			pitch = dy
		}
		b := quality.BarGroup{X0: 0.031, Y0: -0.017, PeriodMM: c.periodPx * pitch, LengthMM: 20, Bars: 5, AlongY: c.alongY, Delta: 0.5}
		sigma := c.sigmaP * b.PeriodMM
		img := gaussianBars(g, b, sigma)
		sc, err := quality.BarModulation(img, g, b)
		if err != nil {
			t.Fatalf("%s: %v", c.name, err)
		}
		want := math.Exp(-2 * math.Pi * math.Pi * c.sigmaP * c.sigmaP)
		t.Logf("%s: modulation %.4f, Gaussian MTF %.4f, %d samples", c.name, sc.Modulation, want, sc.Columns)
		if !sc.Resolvable || math.Abs(sc.Modulation-want) > c.tol {
			t.Errorf("%s: modulation %.4f (resolvable %v), want %.4f", c.name, sc.Modulation, sc.Resolvable, want)
		}
	}
	// Periods of two pixels or less cannot be represented on the grid.
	b := quality.BarGroup{PeriodMM: 2 * dx, LengthMM: 20, Bars: 5, Delta: 0.5}
	sc, err := quality.BarModulation(gaussianBars(g, b, 0), g, b)
	if err != nil || sc.Resolvable || !math.IsNaN(sc.Modulation) {
		t.Errorf("period of two pixels: %+v, %v; want not resolvable", sc, err)
	}
}

func TestBarModulationPixelAperture(t *testing.T) {
	// Averaging over pixels of width Δ multiplies the fundamental by the
	// box's transfer sinc(Δ/p) (Fourier transform of a box; textbook). On
	// the exact area-averaged raster of the resolution phantom of package
	// simulate the measured modulation follows it within 0.025 (harmonics
	// aliased by the grid leak into the short fit); bound 0.03.
	const n, fov = 256, 220.0
	p, err := simulate.NewResolutionPhantom(simulate.ResolutionSpec{FOVmm: fov})
	if err != nil {
		t.Fatal(err)
	}
	img := p.Rasterize(n, n)
	g := quality.Grid{Nx: n, Ny: n, FOVmm: fov}
	pix := fov / n
	checked := 0
	for _, gr := range p.Groups {
		sc, err := quality.BarModulation(img, g, gr)
		if err != nil {
			t.Fatal(err)
		}
		if !sc.Resolvable {
			continue
		}
		u := pix / gr.PeriodMM
		want := math.Sin(math.Pi*u) / (math.Pi * u)
		t.Logf("period %.2f mm (along y %v): modulation %.4f, sinc(Δ/p) %.4f", gr.PeriodMM, gr.AlongY, sc.Modulation, want)
		if math.Abs(sc.Modulation-want) > 0.03 {
			t.Errorf("period %g mm (along y %v): modulation %.4f, pixel aperture %.4f", gr.PeriodMM, gr.AlongY, sc.Modulation, want)
		}
		checked++
	}
	if checked != 8 {
		t.Errorf("%d groups resolvable, want 8", checked)
	}
}

func TestBarModulationUnbiasedInNoise(t *testing.T) {
	// The in-phase coefficient is linear in the image, so white noise leaves
	// its mean unchanged (linearity of expectation); over 100 seeded draws
	// the mean modulation must lie within 4 standard errors of the noiseless
	// value, with noise large enough that an amplitude √(c² + s²) would be
	// biased by several standard errors.
	g := quality.Grid{Nx: 128, Ny: 128, FOVmm: 128}
	b := quality.BarGroup{X0: 0.02, PeriodMM: 5, LengthMM: 12, Bars: 5, Delta: 0.2}
	clean := gaussianBars(g, b, 1.5)
	ref, err := quality.BarModulation(clean, g, b)
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(4, 4))
	const draws = 100
	vals := make([]float64, draws)
	img := make([]float64, len(clean))
	for k := range vals {
		for i, v := range clean {
			img[i] = v + 0.3*rng.NormFloat64()
		}
		sc, err := quality.BarModulation(img, g, b)
		if err != nil {
			t.Fatal(err)
		}
		vals[k] = sc.Modulation
	}
	mean, sd := stat.MeanStdDev(vals, nil)
	se := sd / math.Sqrt(draws)
	t.Logf("noiseless %.4f, noisy mean %.4f ± %.4f (SD per draw %.4f)", ref.Modulation, mean, se, sd)
	if math.Abs(mean-ref.Modulation) > 4*se {
		t.Errorf("noisy mean %.4f, noiseless %.4f, standard error %.4f", mean, ref.Modulation, se)
	}
	if sd < 0.1*ref.Modulation {
		t.Errorf("noise SD %.4f too small for the test to mean anything", sd)
	}
}

func TestBarBadInputAndFinest(t *testing.T) {
	g := quality.Grid{Nx: 64, Ny: 64, FOVmm: 64}
	img := make([]float64, 64*64)
	cases := []struct {
		name string
		b    quality.BarGroup
		want string
	}{
		{"two bars", quality.BarGroup{PeriodMM: 4, LengthMM: 10, Bars: 2, Delta: 1}, "at least 3 bars"},
		{"no contrast", quality.BarGroup{PeriodMM: 4, LengthMM: 10, Bars: 5}, "Delta = 0"},
		{"NaN", quality.BarGroup{PeriodMM: math.NaN(), LengthMM: 10, Bars: 5, Delta: 1}, "not finite"},
		{"outside", quality.BarGroup{Y0: 3, PeriodMM: 4, LengthMM: 10, Bars: 5, Delta: 1}, "no pixel within"},
	}
	for _, c := range cases {
		_, err := quality.BarModulation(img, g, c.b)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
	sc := func(p, m float64, y, res bool) quality.BarScore {
		return quality.BarScore{Group: quality.BarGroup{PeriodMM: p, AlongY: y}, Modulation: m, Resolvable: res}
	}
	scores := []quality.BarScore{sc(2, 0.7, false, true), sc(4, 0.9, false, true), sc(1.5, 0.6, false, true),
		sc(3, 0.4, false, true), sc(1, math.NaN(), false, false), sc(4, 0.3, true, true)}
	if p, ok := quality.FinestResolved(scores, false, 0.5); !ok || p != 4 {
		t.Errorf("along x: %v %v, want 4 (3 mm breaks the run)", p, ok)
	}
	if p, ok := quality.FinestResolved(scores, false, 0.3); !ok || p != 1.5 {
		t.Errorf("along x at 0.3: %v %v, want 1.5", p, ok)
	}
	if _, ok := quality.FinestResolved(scores, true, 0.5); ok {
		t.Error("along y: the only group falls short, want not ok")
	}
}

func TestROIStatistics(t *testing.T) {
	// Constructed values: the mean and the sample SD against gonum's
	// stat.MeanStdDev (divisor n − 1) and by hand; bias and RMSE by their
	// definitions.
	img := []float64{1, 2, 3, 4, 10, 10, 1e9 + 1, 1e9 + 3}
	truth := []float64{1, 1, 1, 1, 10, 12, 1e9, 1e9}
	rois := []quality.ROI{
		{Name: "first four", Mask: []bool{true, true, true, true, false, false, false, false}},
		{Name: "one pixel", Mask: []bool{false, false, false, false, true, false, false, false}},
		{Name: "offset", Mask: []bool{false, false, false, false, false, false, true, true}},
		{Name: "all", Mask: []bool{true, true, true, true, true, true, true, true}},
	}
	got, err := quality.ROIStatistics(img, truth, rois)
	if err != nil {
		t.Fatal(err)
	}
	want := []quality.ROIStats{
		// mean 2.5, SD √(5/3), truth 1, bias 1.5, RMSE √((0+1+4+9)/4).
		{Name: "first four", N: 4, Mean: 2.5, Std: math.Sqrt(5.0 / 3), TruthMean: 1, Bias: 1.5, RMSE: math.Sqrt(14.0 / 4)},
		{Name: "one pixel", N: 1, Mean: 10, Std: 0, TruthMean: 10, Bias: 0, RMSE: 0},
		// A large common offset must not cost precision: SD √2, bias 2,
		// RMSE √((1 + 9)/2).
		{Name: "offset", N: 2, Mean: 1e9 + 2, Std: math.Sqrt2, TruthMean: 1e9, Bias: 2, RMSE: math.Sqrt(5)},
	}
	for k, w := range want {
		g := got[k]
		if g.Name != w.Name || g.N != w.N {
			t.Errorf("ROI %d: %+v", k, g)
		}
		for _, p := range [][3]float64{{g.Mean, w.Mean, 1}, {g.Std, w.Std, 1}, {g.TruthMean, w.TruthMean, 1}, {g.Bias, w.Bias, 1}, {g.RMSE, w.RMSE, 1}} {
			if math.Abs(p[0]-p[1]) > 1e-12*math.Max(1, math.Abs(p[1])) {
				t.Errorf("%s: %+v, want %+v", w.Name, g, w)
				break
			}
		}
	}
	m, s := stat.MeanStdDev(img, nil)
	if a := got[3]; math.Abs(a.Mean-m) > 1e-6 || math.Abs(a.Std-s) > 1e-6*s {
		t.Errorf("all: mean %v SD %v, gonum %v %v", a.Mean, a.Std, m, s)
	}
	bad := []struct {
		name       string
		img, truth []float64
		rois       []quality.ROI
		want       string
	}{
		{"lengths", img, truth[:3], rois, "truth 3"},
		{"empty ROI", img, truth, []quality.ROI{{Name: "none", Mask: make([]bool, 8)}}, `"none" is empty`},
		{"mask length", img, truth, []quality.ROI{{Name: "short", Mask: []bool{true}}}, `"short" has 1 entries`},
		{"no ROI", img, truth, nil, "no ROI"},
		{"NaN", []float64{math.NaN()}, []float64{0}, []quality.ROI{{Mask: []bool{true}}}, "not finite"},
		{"empty image", nil, nil, rois, "empty image"},
	}
	for _, c := range bad {
		_, err := quality.ROIStatistics(c.img, c.truth, c.rois)
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: error %v, want one containing %q", c.name, err, c.want)
		}
	}
}

func TestGridHelpers(t *testing.T) {
	g := quality.Grid{Nx: 8, Ny: 4, FOVmm: 80}
	if dx, dy := g.PixelMM(); dx != 10 || dy != 20 {
		t.Errorf("pixel %v × %v mm, want 10 × 20", dx, dy)
	}
	// Centre convention of package simulate: (j − nx/2)/nx, (i − ny/2)/ny.
	if x, y := g.Centre(0, 4); x != 0 || y != -0.5 {
		t.Errorf("centre (%v, %v), want (0, −0.5)", x, y)
	}
	m := g.CircleMask(0, 0, 10)
	count := 0
	for k, in := range m {
		if in {
			count++
			if k != 2*8+4 && k != 2*8+3 && k != 2*8+5 {
				t.Errorf("pixel %d in the circle", k)
			}
		}
	}
	if count != 3 {
		t.Errorf("%d pixels within 10 mm of the centre, want 3 (the centre one and its two 10 mm neighbours)", count)
	}
	if (quality.Grid{Nx: 0, Ny: 4, FOVmm: 1}).CircleMask(0, 0, 1) != nil {
		t.Error("invalid grid must give a nil mask")
	}
}

func BenchmarkEdgeResponse256(b *testing.B) {
	p, _ := simulate.NewResolutionPhantom(simulate.ResolutionSpec{FOVmm: 220})
	img := p.Rasterize(256, 256)
	g := quality.Grid{Nx: 256, Ny: 256, FOVmm: 220}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := quality.EdgeResponse(img, g, p.Edges[0], quality.EdgeOptions{}); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkDetectDiscs256(b *testing.B) {
	p, _ := simulate.NewLowContrastPhantom(simulate.LowContrastSpec{FOVmm: 220})
	img := p.Rasterize(256, 256)
	rng := rand.New(rand.NewPCG(1, 2))
	for k := range img {
		img[k] += 0.01 * rng.NormFloat64()
	}
	opt := quality.DetectOptions{NoiseROI: p.NoiseROI(256, 256)}
	g := quality.Grid{Nx: 256, Ny: 256, FOVmm: 220}
	b.ReportAllocs()
	for b.Loop() {
		if _, err := quality.DetectDiscs(img, g, p.Targets, opt); err != nil {
			b.Fatal(err)
		}
	}
}

// The low-contrast phantom of package simulate, seen with white noise of 1 %
// of the background on a 128² grid over 220 mm: which discs does the Rose
// criterion detect? (Invented scenario.)
func ExampleDetectDiscs() {
	const n, fov = 128, 220.0
	p, err := simulate.NewLowContrastPhantom(simulate.LowContrastSpec{FOVmm: fov})
	if err != nil {
		fmt.Println(err)
		return
	}
	img := p.Rasterize(n, n)
	rng := rand.New(rand.NewPCG(2024, 7))
	for k := range img {
		img[k] += 0.01 * rng.NormFloat64()
	}
	g := quality.Grid{Nx: n, Ny: n, FOVmm: fov}
	det, err := quality.DetectDiscs(img, g, p.Targets, quality.DetectOptions{NoiseROI: p.NoiseROI(n, n)})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("σ measured on %d pixels: %.4f\n", det.NoisePixels, det.Sigma)
	for _, c := range det.Contrasts() {
		d, ok, _ := det.Smallest(c)
		if ok {
			fmt.Printf("contrast %2.0f %%: smallest disc seen %g mm\n", 100*c, d)
		} else {
			fmt.Printf("contrast %2.0f %%: no disc seen\n", 100*c)
		}
	}
	s := det.Discs[1]
	fmt.Printf("%g mm at %g %%: CNR %.2f, Rose SNR %.1f, detected %v\n", s.Disc.DiameterMM, 100*s.Disc.Contrast, s.CNR, s.RoseSNR, s.Detected)
	// Output:
	// σ measured on 4311 pixels: 0.0101
	// contrast  5 %: smallest disc seen 3 mm
	// contrast  2 %: smallest disc seen 6 mm
	// contrast  1 %: smallest disc seen 12 mm
	// 8 mm at 5 %: CNR 4.07, Rose SNR 16.8, detected true
}

// An edge blurred by a Gaussian of σ = 1 mm, point-sampled on 1 mm pixels:
// the analytic MTF50 is √(ln 2/2)/(π·σ) = 0.187 cycles/mm and the 10–90 %
// width 2.563 mm.
func ExampleEdgeResponse() {
	g := quality.Grid{Nx: 128, Ny: 128, FOVmm: 128}
	e := quality.Edge{X0: 0, Y0: 0, NormalDeg: 5, HalfLengthMM: 30, HalfWidthMM: 12}
	img := gaussianEdge(g, e, 1, 0, 1)
	res, err := quality.EdgeResponse(img, g, e, quality.EdgeOptions{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("MTF50 %.3f cycles/mm, 10–90 %% width %.3f mm, plateaus %.3f and %.3f\n", res.MTF50, res.Width1090, res.Low, res.High)
	_, err = quality.EdgeResponse(img, g, quality.Edge{NormalDeg: 0, HalfLengthMM: 30, HalfWidthMM: 12}, quality.EdgeOptions{})
	fmt.Println(err)
	// Output:
	// MTF50 0.187 cycles/mm, 10–90 % width 2.588 mm, plateaus 0.000 and 1.000
	// quality: 72 of 96 edge bins are empty (longest run 3); the edge must be slanted a few degrees against the pixel axes and long enough to fill the bins
}

// The bar groups of the resolution phantom, rasterised exactly on a 256²
// grid over 220 mm: the pixels' own averaging already lowers the finer bars,
// close to the pixel aperture's sinc(Δ/p) (0.926, 0.870, 0.817, 0.723).
func ExampleBarModulation() {
	const n, fov = 256, 220.0
	p, err := simulate.NewResolutionPhantom(simulate.ResolutionSpec{FOVmm: fov})
	if err != nil {
		fmt.Println(err)
		return
	}
	img := p.Rasterize(n, n)
	g := quality.Grid{Nx: n, Ny: n, FOVmm: fov}
	var scores []quality.BarScore
	for _, gr := range p.Groups[:len(p.Groups)/2] {
		sc, err := quality.BarModulation(img, g, gr)
		if err != nil {
			fmt.Println(err)
			return
		}
		scores = append(scores, sc)
		if sc.Resolvable {
			fmt.Printf("%.2f lp/mm: modulation %.3f\n", 1/gr.PeriodMM, sc.Modulation)
		} else {
			fmt.Printf("%.2f lp/mm: beyond the grid\n", 1/gr.PeriodMM)
		}
	}
	p50, ok := quality.FinestResolved(scores, false, 0.5)
	fmt.Printf("finest period with modulation ≥ 0.5: %g mm (%v)\n", p50, ok)
	// Output:
	// 0.25 lp/mm: modulation 0.905
	// 0.33 lp/mm: modulation 0.868
	// 0.40 lp/mm: modulation 0.827
	// 0.50 lp/mm: modulation 0.718
	// 0.62 lp/mm: beyond the grid
	// 0.80 lp/mm: beyond the grid
	// 1.00 lp/mm: beyond the grid
	// finest period with modulation ≥ 0.5: 2 mm (true)
}

// Mean, spread and bias of a reconstruction in two regions (invented values).
func ExampleROIStatistics() {
	truth := []float64{1, 1, 1, 1, 0, 0, 0, 0}
	recon := []float64{0.9, 1.1, 0.8, 1.0, 0.1, -0.1, 0.05, 0.0}
	st, err := quality.ROIStatistics(recon, truth, []quality.ROI{
		{Name: "object", Mask: []bool{true, true, true, true, false, false, false, false}},
		{Name: "background", Mask: []bool{false, false, false, false, true, true, true, true}},
	})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, s := range st {
		fmt.Printf("%-10s n=%d mean %.4f std %.4f bias %+.4f rmse %.4f\n", s.Name, s.N, s.Mean, s.Std, s.Bias, s.RMSE)
	}
	// Output:
	// object     n=4 mean 0.9500 std 0.1291 bias -0.0500 rmse 0.1225
	// background n=4 mean 0.0125 std 0.0854 bias +0.0125 rmse 0.0750
}
