package trajectories

import (
	"math"
	"testing"
)

func TestPicture(t *testing.T) {
	c2, _ := CartesianUniform(16, 8, 4, 2)
	c3, _ := Cartesian3DUniform(Grid3D{Ny: 12, Nz: 10, Nx: 4}, 2, 2)
	rad, _ := Radial(RadialSpec{N: 32, Spokes: 8, Order: "uniform", Oversampling: 1})
	for _, c := range []struct {
		s          Sampling
		rows, cols int
		want       int // sampled cells, worked by hand
	}{
		// 16 rows step 4 → 4 lines, band of 2 (ky = -1, 0) adds ky = -1: 5 lines × 8.
		{c2, 16, 8, 40},
		// ky even of -6..5 → 6, kz even of -5..4 → 5: 30 points.
		{c3, 10, 12, 30},
	} {
		img, rows, cols, err := c.s.Picture()
		if err != nil || rows != c.rows || cols != c.cols {
			t.Fatalf("%s: %d×%d (%v), want %d×%d", c.s.Scheme, rows, cols, err, c.rows, c.cols)
		}
		sum := 0.0
		for _, v := range img {
			sum += v
		}
		if int(sum) != c.want {
			t.Errorf("%s: %g sampled cells, want %d", c.s.Scheme, sum, c.want)
		}
	}
	img, rows, cols, err := rad.Picture()
	if err != nil || rows != 32 || cols != 32 {
		t.Fatal(err)
	}
	// The spoke at 0° runs along the kx axis through DC: the whole centre
	// row is marked; a spoke at 90° marks the whole centre column.
	for j := range 32 {
		if img[16*32+j] != 1 || img[j*32+16] != 1 {
			t.Fatalf("centre row/column not fully marked at %d", j)
		}
	}
	psf, _ := rad.PSF()
	m, err := Magnitude(psf, 32, 32)
	if err != nil || m[16*32+16] != 1 {
		t.Fatalf("magnitude at centre %v (%v)", m[16*32+16], err)
	}
	for _, v := range m {
		if math.IsNaN(v) || v < 0 {
			t.Fatal("bad magnitude")
		}
	}
}
