package quality_test

import (
	"encoding/binary"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"testing"

	"accelplan/simulate/quality"
)

// The fixture testdata/quality_fixture.json and its image files were made by
// testdata/make_quality_fixture.py with scikit-image 0.19.3, SciPy 1.10.1 and
// NumPy 1.24.2 (Debian python3-skimage, python3-scipy, python3-numpy); the
// script documents which library call gave each value.

type fixtureCase struct {
	Name      string  `json:"name"`
	Ny        int     `json:"ny"`
	Nx        int     `json:"nx"`
	DataRange float64 `json:"data_range"`
	X         string  `json:"x"`
	Ref       string  `json:"ref"`
	ROI       string  `json:"roi"`
	Map       string  `json:"map"`
	SSIM      float64 `json:"ssim"`
	SSIMAll   float64 `json:"ssim_all"`
	SSIMROI   float64 `json:"ssim_roi"`
	PSNR      float64 `json:"psnr"`
	PSNRROI   float64 `json:"psnr_roi"`
	NRMSE     float64 `json:"nrmse"`
	NRMSEROI  float64 `json:"nrmse_roi"`
	HFEN      float64 `json:"hfen"`
	HFENROI   float64 `json:"hfen_roi"`
}

type fixture struct {
	Versions map[string]string `json:"versions"`
	Cases    []fixtureCase     `json:"cases"`
}

func loadFixture(t testing.TB) fixture {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", "quality_fixture.json"))
	if err != nil {
		t.Fatal(err)
	}
	var f fixture
	if err := json.Unmarshal(b, &f); err != nil {
		t.Fatal(err)
	}
	if len(f.Cases) < 6 {
		t.Fatalf("fixture has %d cases, want at least 6", len(f.Cases))
	}
	if f.Versions["skimage"] != "0.19.3" {
		t.Fatalf("fixture made with scikit-image %q, the tests expect 0.19.3", f.Versions["skimage"])
	}
	return f
}

func readF64(t testing.TB, name string, n int) []float64 {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	if len(b) != 8*n {
		t.Fatalf("%s has %d bytes, want %d", name, len(b), 8*n)
	}
	v := make([]float64, n)
	for i := range v {
		v[i] = math.Float64frombits(binary.LittleEndian.Uint64(b[8*i:]))
	}
	return v
}

func readROI(t testing.TB, name string, n int) []bool {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", name))
	if err != nil {
		t.Fatal(err)
	}
	if len(b) != n {
		t.Fatalf("%s has %d bytes, want %d", name, len(b), n)
	}
	roi := make([]bool, n)
	for i, c := range b {
		roi[i] = c != 0
	}
	return roi
}

func relClose(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Abs(want)
}

// TestAgainstScikitImage checks every metric against scikit-image 0.19.3 /
// SciPy 1.10.1 values (see fixture header) to 1e-9 relative.
func TestAgainstScikitImage(t *testing.T) {
	const tol = 1e-9
	f := loadFixture(t)
	for _, c := range f.Cases {
		t.Run(c.Name, func(t *testing.T) {
			n := c.Ny * c.Nx
			x := readF64(t, c.X, n)
			ref := readF64(t, c.Ref, n)
			roi := readROI(t, c.ROI, n)
			plan, err := quality.NewSSIMPlan(c.Ny, c.Nx, c.DataRange)
			if err != nil {
				t.Fatal(err)
			}
			all, err := plan.Mean(x, ref, nil, quality.AverageAll)
			if err != nil {
				t.Fatal(err)
			}
			checks := []struct {
				what      string
				got, want float64
			}{
				{"SSIM (skimage structural_similarity)", quality.SSIM(x, ref, c.Ny, c.Nx, nil, c.DataRange), c.SSIM},
				{"SSIM map mean over all pixels (skimage full=True map)", all, c.SSIMAll},
				{"SSIM over roi (skimage map[roi].mean())", quality.SSIM(x, ref, c.Ny, c.Nx, roi, c.DataRange), c.SSIMROI},
				{"PSNR (skimage peak_signal_noise_ratio)", quality.PSNR(x, ref, nil, c.DataRange), c.PSNR},
				{"PSNR over roi (skimage on ref[roi], x[roi])", quality.PSNR(x, ref, roi, c.DataRange), c.PSNRROI},
				{"NRMSE (skimage normalized_root_mse euclidean)", quality.NRMSE(x, ref, nil), c.NRMSE},
				{"NRMSE over roi (skimage on ref[roi], x[roi])", quality.NRMSE(x, ref, roi), c.NRMSEROI},
				{"HFEN (LoG by scipy.ndimage.correlate, constant 0)", quality.HFEN(x, ref, c.Ny, c.Nx, nil), c.HFEN},
				{"HFEN over roi", quality.HFEN(x, ref, c.Ny, c.Nx, roi), c.HFENROI},
			}
			for _, ch := range checks {
				if !relClose(ch.got, ch.want, tol) {
					t.Errorf("%s: got %.17g, want %.17g (rel. diff %.3g)", ch.what, ch.got, ch.want,
						math.Abs(ch.got-ch.want)/math.Abs(ch.want))
				}
			}
			if c.Map == "" {
				return
			}
			want := readF64(t, c.Map, n)
			got := quality.SSIMMap(x, ref, c.Ny, c.Nx, c.DataRange)
			worst := 0.0
			for i := range want {
				worst = max(worst, math.Abs(got[i]-want[i]))
			}
			// SSIM map values lie in [−1, 1]; compare absolutely.
			if worst > 1e-12 {
				t.Errorf("SSIM map (skimage full=True): max abs diff %.3g, want ≤ 1e-12", worst)
			}
		})
	}
}
