package trajectories

import (
	"encoding/json"
	"math"
	"math/cmplx"
	"os"
	"testing"
)

// TestHaarAgainstPyWavelets compares the forward Haar transform with
// pywt.wavedec2(x, 'haar', mode='periodization', level=2) laid out by
// pywt.coeffs_to_array (PyWavelets 1.1.1, Debian python3-pywt; fixture made
// by testdata/make_haar_fixture.py).
func TestHaarAgainstPyWavelets(t *testing.T) {
	raw, err := os.ReadFile("testdata/haar_fixture.json")
	if err != nil {
		t.Fatal(err)
	}
	var fx struct {
		Rows, Cols, Levels int
		Image, Coeffs      []float64
	}
	if err := json.Unmarshal(raw, &fx); err != nil {
		t.Fatal(err)
	}
	x := make([]complex128, len(fx.Image))
	for i, v := range fx.Image {
		x[i] = complex(v, 0)
	}
	tmp := make([]complex128, max(fx.Rows, fx.Cols))
	haar2(x, fx.Rows, fx.Cols, fx.Levels, false, tmp)
	for i, v := range x {
		if math.Abs(real(v)-fx.Coeffs[i]) > 1e-12 || imag(v) != 0 {
			t.Fatalf("coefficient %d (row %d, col %d): %v, PyWavelets %g", i, i/fx.Cols, i%fx.Cols, v, fx.Coeffs[i])
		}
	}
	haar2(x, fx.Rows, fx.Cols, fx.Levels, true, tmp)
	for i, v := range x {
		if cmplx.Abs(v-complex(fx.Image[i], 0)) > 1e-12 {
			t.Fatalf("inverse does not restore pixel %d", i)
		}
	}
}

// TestWaveletPSF: full sampling leaves each coefficient alone; uniform
// undersampling by 2 along rows aliases a finest-scale Haar wavelet onto the
// one FOV/2 away with equal weight (coherent, ratio 1), while variable-density
// random sampling at the same R spreads the interference incoherently below it
// (Lustig, Donoho & Pauly 2007, transform point-spread function).
func TestWaveletPSF(t *testing.T) {
	const rows, cols, levels = 64, 64, 3
	coeff := (rows/2+5)*cols + 7 // a finest-scale detail coefficient (bottom-left block)
	full, _ := CartesianUniform(rows, cols, 1, 0)
	_, side, err := WaveletPSF(full.Mask, rows, cols, levels, coeff)
	if err != nil || side > 1e-12 {
		t.Errorf("full sampling: side %g (%v), want 0", side, err)
	}
	uni, _ := CartesianUniform(rows, cols, 2, 0)
	tp, side, err := WaveletPSF(uni.Mask, rows, cols, levels, coeff)
	if err != nil || math.Abs(side-1) > 1e-12 {
		t.Errorf("uniform R=2: side %g (%v), want 1", side, err)
	}
	// The replica sits FOV/2 away in the image, i.e. rows/4 coefficient rows
	// away inside the finest-scale block of rows/2 rows.
	rep := ((rows/2+5+rows/4)%(rows/2)+rows/2)*cols + 7
	if math.Abs(tp[rep]-1) > 1e-12 {
		t.Errorf("uniform R=2: replica coefficient %g, want 1", tp[rep])
	}
	mean := 0.0
	for seed := range uint64(5) {
		rnd, _ := CartesianRandom(rows, cols, rows/2, 8, 2, seed)
		_, side, err := WaveletPSF(rnd.Mask, rows, cols, levels, coeff)
		if err != nil {
			t.Fatal(err)
		}
		mean += side / 5
	}
	if mean > 0.8 {
		t.Errorf("random R=2: mean transform side-lobe-to-peak %.3f, want clearly below 1", mean)
	}
	t.Logf("transform-domain side-lobe-to-peak, R=2, 64×64, Haar 3 levels: uniform 1, random (8 calib, power 2) %.3f", mean)
	if _, _, err := WaveletPSF(full.Mask, rows, cols, 7, 0); err == nil {
		t.Error("7 levels on 64×64 accepted")
	}
}
