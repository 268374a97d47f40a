package plans

import (
	"context"
	"image"
	"image/color"
	"image/png"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"accelplan/simulate"
)

// writeDiscPNG writes a 16-bit greyscale PNG of a bright disc with a darker
// inset, n × n pixels.
func writeDiscPNG(t *testing.T, path string, n int) {
	t.Helper()
	img := image.NewGray16(image.Rect(0, 0, n, n))
	for i := 0; i < n; i++ {
		for j := 0; j < n; j++ {
			x, y := (float64(j)+0.5)/float64(n)-0.5, (float64(i)+0.5)/float64(n)-0.5
			v := 0.0
			if x*x+y*y < 0.16 {
				v = 0.8
			}
			if (x-0.1)*(x-0.1)+y*y < 0.01 {
				v = 0.3
			}
			img.SetGray16(j, i, color.Gray16{Y: uint16(v * 65535)})
		}
	}
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := png.Encode(f, img); err != nil {
		t.Fatal(err)
	}
	f.Close()
}

// The user's own object runs through the sweep: a PNG on the
// reconstruction's own grid is refined (the inverse crime is avoided) with a
// notice, and its data come from its exact box-pixel spectrum.
func TestUserImageObject(t *testing.T) {
	dir := t.TempDir()
	writeDiscPNG(t, filepath.Join(dir, "disc.png"), 64)
	text := strings.NewReplacer(`phantom = "modified-shepp-logan"`, "phantom = \"image\"\nimage = \"disc.png\"",
		"[[scheme]]\npattern = \"cartesian-uniform\"", "[[scheme]]\npattern = \"radial\"\naccelerations = [2]\n[[scheme]]\npattern = \"cartesian-uniform\"").Replace(minimal)
	path := filepath.Join(dir, "p.toml")
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
	p, err := Load(path)
	if err != nil {
		t.Fatal(err)
	}
	if len(p.ImageNotices) == 0 || !strings.Contains(strings.Join(p.ImageNotices, " "), "refine") {
		t.Errorf("no refinement notice for an object on the reconstruction grid: %q", p.ImageNotices)
	}
	if p.image.InverseCrime(64, 64) {
		t.Error("the refined object still shares the reconstruction grid")
	}
	// The batch spectrum used off the grid equals the exact spectrum.
	kx, ky := []float64{0, 3.3, -17.25}, []float64{0, -4.5, 20.125}
	got, err := p.image.SpectrumPoints(kx, ky)
	if err != nil {
		t.Fatal(err)
	}
	for j := range kx {
		want := p.image.Spectrum(kx[j], ky[j])
		if cmplx.Abs(got[j]-want) > 1e-6*math.Max(1, cmplx.Abs(want)) {
			t.Errorf("k = (%v, %v): batch %v, exact %v", kx[j], ky[j], got[j], want)
		}
	}
	o, err := Run(context.Background(), p, Options{Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	a := Analyse(o)
	for _, r := range a.Rows {
		if !(r.NRMSE.Mean > 0 && r.NRMSE.Mean < 1) {
			t.Errorf("%s R %v: NRMSE %v", r.Scheme, r.R, r.NRMSE.Mean)
		}
	}
	// Bad input: not an image.
	if err := os.WriteFile(filepath.Join(dir, "disc.png"), []byte("not a png"), 0o644); err != nil {
		t.Fatal(err)
	}
	if _, err := Load(path); err == nil || !strings.Contains(err.Error(), "object.image") {
		t.Errorf("a corrupt image was accepted or unclear: %v", err)
	}
	_ = simulate.MaxImageSide
}

// The roi-rmse metric is the worst RMSE against the truth over the [[roi]]
// circles (ROI statistics, common practice): a fully sampled, almost noiseless
// reconstruction scores near zero, and ROIs outside the FOV are refused.
func TestROIMetric(t *testing.T) {
	text := strings.NewReplacer(`metric = "ssim"`, `metric = "roi-rmse"`, "threshold = 0.8", "threshold = 0.5",
		"reference_snr = 30", "reference_snr = 1000").Replace(minimal) +
		"\n[[roi]]\nname = \"a\"\nx = 0.0\ny = 0.0\nradius_mm = 10\n[[roi]]\nname = \"b\"\nx = -0.1\ny = 0.1\nradius_mm = 8\n"
	p, err := Parse("m.toml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	o, err := Run(context.Background(), p, Options{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	a := Analyse(o)
	full := a.Rows[0]
	// What remains at full sampling is the truncation of k-space at the grid
	// (ringing at edges inside the ROIs), measured 0.015.
	if full.R != 1 || !(full.Task.Mean < 0.03) {
		t.Errorf("fully sampled at SNR 1000: worst ROI RMSE %v", full.Task.Mean)
	}
	if !(a.Rows[1].Task.Mean > full.Task.Mean) {
		t.Errorf("R = 2 not worse in the ROIs than full sampling")
	}
	bad := strings.Replace(text, "x = -0.1", "x = -0.7", 1)
	if _, err := Parse("m.toml", []byte(bad)); err == nil || !strings.Contains(err.Error(), "outside the field of view") {
		t.Errorf("an ROI outside the FOV was accepted: %v", err)
	}
	none := strings.SplitN(text, "[[roi]]", 2)[0]
	if _, err := Parse("m.toml", []byte(none)); err == nil || !strings.Contains(err.Error(), "needs at least one [[roi]]") {
		t.Errorf("roi-rmse without ROIs accepted: %v", err)
	}
}
