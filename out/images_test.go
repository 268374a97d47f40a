package out

import (
	"bytes"
	"image"
	"image/png"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func decodePNG(t *testing.T, path string) image.Image {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	m, err := png.Decode(bytes.NewReader(b))
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return m
}

func TestGrayPNGMatchesSkimageRescale(t *testing.T) {
	// Reference: skimage.exposure.rescale_intensity(img, in_range=(0.05,
	// 0.95), out_range=(0, 255)) rounded, scikit-image 0.19.3; fixture
	// testdata/gray_skimage.csv made by testdata/gen_gray.py. The PNG is
	// read back with Go's image/png (ISO/IEC 15948).
	recs := readCSVFile(t, "testdata/gray_skimage.csv")[1:]
	const ny, nx, lo, hi = 12, 17, 0.05, 0.95
	if len(recs) != ny*nx {
		t.Fatalf("fixture has %d pixels, want %d", len(recs), ny*nx)
	}
	img := make([]float64, ny*nx)
	want := make([]uint8, ny*nx)
	clamped := 0
	for _, r := range recs {
		i, j := atoi(t, r[0]), atoi(t, r[1])
		img[i*nx+j] = atof(t, r[2])
		want[i*nx+j] = uint8(atoi(t, r[3]))
		if img[i*nx+j] < lo || img[i*nx+j] > hi {
			clamped++
		}
	}
	if clamped == 0 {
		t.Fatal("fixture exercises no clamping")
	}
	path := filepath.Join(t.TempDir(), "gray.png")
	if err := WriteGrayPNG(path, img, ny, nx, lo, hi); err != nil {
		t.Fatal(err)
	}
	m := decodePNG(t, path)
	g, ok := m.(*image.Gray)
	if !ok {
		t.Fatalf("decoded %T, want 8-bit greyscale *image.Gray", m)
	}
	if b := g.Bounds(); b.Dx() != nx || b.Dy() != ny {
		t.Fatalf("size %v, want %d×%d", b, nx, ny)
	}
	for i := range ny {
		for j := range nx {
			if got := g.GrayAt(j, i).Y; got != want[i*nx+j] {
				t.Errorf("pixel (%d,%d) value %v: level %d, skimage %d", i, j, img[i*nx+j], got, want[i*nx+j])
			}
		}
	}
}

func TestMaskPNGRoundTrip(t *testing.T) {
	// Reference: Go's image/png decoder; row-major layout, row 0 on top.
	const ny, nx = 5, 7
	mask := make([]bool, ny*nx)
	for i := range ny {
		for j := range nx {
			mask[i*nx+j] = (i*3+j)%4 == 0 || i == 2
		}
	}
	path := filepath.Join(t.TempDir(), "mask.png")
	if err := WriteMaskPNG(path, mask, ny, nx); err != nil {
		t.Fatal(err)
	}
	m := decodePNG(t, path)
	if b := m.Bounds(); b.Dx() != nx || b.Dy() != ny {
		t.Fatalf("size %v, want %d×%d", b, nx, ny)
	}
	for i := range ny {
		for j := range nx {
			r, g, b, _ := m.At(j, i).RGBA()
			want := uint32(0)
			if mask[i*nx+j] {
				want = 0xFFFF
			}
			if r != want || g != want || b != want {
				t.Errorf("(%d,%d): got %#x, want %#x", i, j, r, want)
			}
		}
	}
}

func TestDivergingPNGRoundTrip(t *testing.T) {
	// Zero maps to the neutral middle entry, ±limit to the ends, values
	// beyond are clamped; read back with Go's image/png.
	const limit = 0.2
	img := []float64{0, limit, -limit, 5 * limit, -5 * limit, limit / 2}
	want := []int{128, 256, 0, 256, 0, 192}
	path := filepath.Join(t.TempDir(), "err.png")
	if err := WriteDivergingPNG(path, img, 2, 3, limit); err != nil {
		t.Fatal(err)
	}
	m := decodePNG(t, path)
	if b := m.Bounds(); b.Dx() != 3 || b.Dy() != 2 {
		t.Fatalf("size %v, want 3×2", b)
	}
	divergingOnce.Do(buildDiverging)
	for k, v := range img {
		r, g, b, a := m.At(k%3, k/3).RGBA()
		c := divergingLUT[want[k]]
		if uint8(r>>8) != c.R || uint8(g>>8) != c.G || uint8(b>>8) != c.B || a != 0xFFFF {
			t.Errorf("value %g: got (%d,%d,%d,%d), want entry %d = %v", v, r>>8, g>>8, b>>8, a>>8, want[k], c)
		}
	}
}

func TestImageInputErrors(t *testing.T) {
	dir := t.TempDir()
	p := filepath.Join(dir, "x.png")
	tests := []struct {
		name string
		err  error
		want string
	}{
		{"short", WriteGrayPNG(p, make([]float64, 5), 2, 3, 0, 1), "has 5 values"},
		{"zero size", WriteGrayPNG(p, nil, 0, 3, 0, 1), "must be positive"},
		{"flat window", WriteGrayPNG(p, make([]float64, 6), 2, 3, 1, 1), "lo < hi"},
		{"inverted window", WriteGrayPNG(p, make([]float64, 6), 2, 3, 1, 0), "lo < hi"},
		{"NaN window", WriteGrayPNG(p, make([]float64, 6), 2, 3, math.NaN(), 1), "lo < hi"},
		{"NaN pixel", WriteGrayPNG(p, []float64{0, 0, 0, 0, math.NaN(), 0}, 2, 3, 0, 1), "(row 1, column 1) is NaN"},
		{"Inf pixel", WriteDivergingPNG(p, []float64{0, math.Inf(1)}, 1, 2, 1), "(row 0, column 1) is +Inf"},
		{"zero limit", WriteDivergingPNG(p, make([]float64, 6), 2, 3, 0), "positive and finite"},
		{"mask size", WriteMaskPNG(p, make([]bool, 7), 2, 3), "has 7 values"},
		{"huge", WriteMaskPNG(p, nil, 1<<16, 1), "limit"},
	}
	for _, tc := range tests {
		if tc.err == nil {
			t.Errorf("%s: no error", tc.name)
			continue
		}
		if !strings.Contains(tc.err.Error(), tc.want) {
			t.Errorf("%s: error %q does not mention %q", tc.name, tc.err, tc.want)
		}
	}
	if _, err := os.Stat(p); !os.IsNotExist(err) {
		t.Errorf("a failed call left %s behind (stat: %v)", p, err)
	}
}

func TestImageRenderersDoNotAllocatePerPixel(t *testing.T) {
	// Allocation count must not grow with the image: only the result and
	// its pixel buffer are allocated.
	for _, n := range []int{16, 256} {
		img := make([]float64, n*n)
		mask := make([]bool, n*n)
		for i := range img {
			img[i] = float64(i%97)/48 - 1
		}
		if a := testing.AllocsPerRun(5, func() { GrayImage(img, n, n, -1, 1) }); a > 2 {
			t.Errorf("GrayImage %d²: %v allocations", n, a)
		}
		if a := testing.AllocsPerRun(5, func() { DivergingImage(img, n, n, 1) }); a > 2 {
			t.Errorf("DivergingImage %d²: %v allocations", n, a)
		}
		if a := testing.AllocsPerRun(5, func() { MaskImage(mask, n, n) }); a > 2 {
			t.Errorf("MaskImage %d²: %v allocations", n, a)
		}
	}
}
